package freqplan

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"testing"
)

const MHz = 1e6

// scanned is what a brute-force scan finds for one (m, n, form): the lowest and highest input
// frequency on the grid that converts into the IF.
type scanned struct{ lo, hi float64 }

// scan steps the input frequency over [0, top] and applies the three mixing relations
// directly (not the band formulas of Spurs), recording where each lands inside the IF.
func scan(p Plan, top, step float64) map[string]scanned {
	out := map[string]scanned{}
	for i := 0; float64(i)*step <= top; i++ {
		f := float64(i) * step
		for m := 0; m < p.Order; m++ {
			for n := 1; m+n <= p.Order; n++ {
				rel := [3]float64{
					Sum:        float64(m)*p.LO + float64(n)*f,
					LOMinus:    float64(m)*p.LO - float64(n)*f,
					InputMinus: float64(n)*f - float64(m)*p.LO,
				}
				for _, form := range []Form{Sum, LOMinus, InputMinus} {
					if m == 0 && form != Sum {
						continue // with m = 0 all three read n·f (or −n·f): one response
					}
					if v := rel[form]; v >= p.IF.Lo && v <= p.IF.Hi {
						key := fmt.Sprintf("%dx%d %s", m, n, form)
						s, ok := out[key]
						if !ok {
							s = scanned{f, f}
						}
						s.lo, s.hi = math.Min(s.lo, f), math.Max(s.hi, f)
						out[key] = s
					}
				}
			}
		}
	}
	return out
}

// TestSpursAgainstScan compares Spurs set for set with the brute-force scan for several plans
// (high-side and low-side LO, an up-converter, a zero-width-at-DC case), and checks each
// response's flags against the scanned band.
func TestSpursAgainstScan(t *testing.T) {
	plans := []struct {
		name string
		p    Plan
		top  float64
	}{
		{"ISM 915 high-side", Plan{LO: 1185 * MHz, IF: Band{257 * MHz, 283 * MHz}, RF: Band{902 * MHz, 928 * MHz}, Order: 7}, 9e9},
		{"868 low-side", Plan{LO: 758.3 * MHz, IF: Band{109.3 * MHz, 110.3 * MHz}, RF: Band{867.6 * MHz, 868.6 * MHz}, Order: 9}, 10e9},
		{"up-converter", Plan{LO: 1000 * MHz, IF: Band{1400 * MHz, 1450 * MHz}, RF: Band{400 * MHz, 450 * MHz}, Order: 5}, 8e9},
		{"IF through LO/2", Plan{LO: 100 * MHz, IF: Band{40 * MHz, 60 * MHz}, RF: Band{140 * MHz, 160 * MHz}, Order: 6}, 2e9},
	}
	for _, c := range plans {
		rs, err := Spurs(c.p)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		step := 0.02 * MHz
		want := scan(c.p, c.top, step)
		got := map[string]Response{}
		for _, r := range rs {
			key := fmt.Sprintf("%dx%d %s", r.M, r.N, r.Form)
			if _, dup := got[key]; dup {
				t.Errorf("%s: %s listed twice", c.name, key)
			}
			got[key] = r
		}
		var keys []string
		for k := range want {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			s := want[k]
			r, ok := got[k]
			if !ok {
				t.Errorf("%s: scan finds %s at %.3f–%.3f MHz, Spurs does not", c.name, k, s.lo/MHz, s.hi/MHz)
				continue
			}
			if math.Abs(r.From-s.lo) > step || math.Abs(r.To-s.hi) > step {
				t.Errorf("%s: %s is %.4f–%.4f MHz, scan %.4f–%.4f MHz", c.name, k, r.From/MHz, r.To/MHz, s.lo/MHz, s.hi/MHz)
			}
			inBand := s.lo <= c.p.RF.Hi && s.hi >= c.p.RF.Lo
			if r.InBand != inBand {
				t.Errorf("%s: %s in_band %v, scan says %v", c.name, k, r.InBand, inBand)
			}
			if r.Wanted != (r.M == 1 && r.N == 1 && inBand) {
				t.Errorf("%s: %s wanted %v", c.name, k, r.Wanted)
			}
		}
		for k, r := range got {
			if _, ok := want[k]; !ok && r.To-r.From > 2*step && r.To < c.top {
				t.Errorf("%s: Spurs lists %s at %.3f–%.3f MHz, the scan finds nothing", c.name, k, r.From/MHz, r.To/MHz)
			}
		}
	}
}

// Hand-worked: the 915 MHz plan. LO 1185 MHz, IF 257–283 MHz.
func TestSpursHandWorked(t *testing.T) {
	p := Plan{LO: 1185 * MHz, IF: Band{257 * MHz, 283 * MHz}, RF: Band{902 * MHz, 928 * MHz}, Order: 7,
		Reject: map[[2]int]float64{{2, 1}: -45, {2, 2}: -60}}
	rs, err := Spurs(p)
	if err != nil {
		t.Fatal(err)
	}
	find := func(m, n int, f Form) Response {
		for _, r := range rs {
			if r.M == m && r.N == n && r.Form == f {
				return r
			}
		}
		t.Fatalf("no %dx%d %s", m, n, f)
		return Response{}
	}
	near := func(a, b float64) bool { return math.Abs(a-b) < 1 } // Hz
	// Wanted: 1185 − f = 257…283 → f = 902…928 MHz.
	if w := find(1, 1, LOMinus); !w.Wanted || !w.InBand || !near(w.From, 902*MHz) || !near(w.To, 928*MHz) || w.Level != 0 || !w.HasLevel {
		t.Errorf("wanted: %+v", w)
	}
	// Image: f − 1185 = 257…283 → 1442…1468 MHz, above the LO, the passband below it.
	if im := find(1, 1, InputMinus); !im.Image || im.InBand || !near(im.From, 1442*MHz) || !near(im.To, 1468*MHz) {
		t.Errorf("image: %+v", im)
	}
	// Half-IF: 2·1185 − 2f = IF → f = 1185 − IF/2 = 1043.5…1056.5 MHz, −60 dBc from the table.
	if h := find(2, 2, LOMinus); !h.HalfIF || !near(h.From, 1043.5*MHz) || !near(h.To, 1056.5*MHz) || h.Level != -60 {
		t.Errorf("half-IF: %+v", h)
	}
	// 2×1: 2·1185 − f = IF → 2087…2113 MHz at −45 dBc; f − 2·1185 → 2627…2653 MHz.
	if r := find(2, 1, LOMinus); !near(r.From, 2087*MHz) || !near(r.To, 2113*MHz) || r.Level != -45 {
		t.Errorf("2x1: %+v", r)
	}
	if r := find(2, 1, InputMinus); !near(r.From, 2627*MHz) || r.Level != -45 {
		t.Errorf("2x1 sum side: %+v", r)
	}
	// IF feedthrough 0×1: f = 257…283 MHz, no level in the table.
	if r := find(0, 1, Sum); !near(r.From, 257*MHz) || r.HasLevel {
		t.Errorf("0x1: %+v", r)
	}
	// The page's order: the wanted response first, then (no other in-band one here) the image.
	if !rs[0].Wanted || !rs[1].Image || !rs[2].HalfIF {
		t.Errorf("order: %+v, %+v, %+v", rs[0], rs[1], rs[2])
	}
	// By hand, 3×3: 3f − 3555 = IF → 1270.67…1279.33; 3555 − 3f → 1090.67…1099.33.
	if r := find(3, 3, LOMinus); !near(r.From, (3555-283)/3.0*MHz) {
		t.Errorf("3x3: %+v", r)
	}
	// None of them, other than the wanted one, falls in 902–928 MHz (checked by hand for
	// n ≤ 2; the scan test covers the rest).
	for _, r := range rs[1:] {
		if r.InBand {
			t.Errorf("in band: %+v", r)
		}
	}
}

func TestSpursBadPlans(t *testing.T) {
	good := Plan{LO: 1e9, IF: Band{1e8, 2e8}, RF: Band{8e8, 9e8}, Order: 7}
	for name, mod := range map[string]func(*Plan){
		"zero LO":     func(p *Plan) { p.LO = 0 },
		"negative LO": func(p *Plan) { p.LO = -1 },
		"NaN LO":      func(p *Plan) { p.LO = math.NaN() },
		"IF reversed": func(p *Plan) { p.IF = Band{2e8, 1e8} },
		"IF empty":    func(p *Plan) { p.IF = Band{1e8, 1e8} },
		"RF reversed": func(p *Plan) { p.RF = Band{9e8, 8e8} },
		"order 16":    func(p *Plan) { p.Order = 16 },
		"order 0":     func(p *Plan) { p.Order = 0 },
		"negative IF": func(p *Plan) { p.IF = Band{-1e8, 1e8} },
		"infinite RF": func(p *Plan) { p.RF = Band{1, math.Inf(1)} },
	} {
		p := good
		mod(&p)
		if _, err := Spurs(p); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := Spurs(good); err != nil {
		t.Error(err)
	}
}

// bruteProducts enumerates the coefficient box [−order, order]^d directly (not the budgeted
// walk of Products).
func bruteProducts(tones []float64, protect []Band, order int) map[string]bool {
	out := map[string]bool{}
	d := len(tones)
	k := make([]int, d)
	total := int(math.Pow(float64(2*order+1), float64(d)))
	for idx := 0; idx < total; idx++ {
		x, ord, f := idx, 0, 0.0
		for i := range k {
			k[i] = x%(2*order+1) - order
			x /= 2*order + 1
			ord += abs(k[i])
			f += float64(k[i]) * tones[i]
		}
		if ord < 2 || ord > order || f <= 0 {
			continue
		}
		for b, band := range protect {
			if f >= band.Lo && f <= band.Hi {
				out[fmt.Sprint(k, b)] = true
			}
		}
	}
	return out
}

func TestProductsAgainstBruteForce(t *testing.T) {
	cases := []struct {
		tones   []float64
		protect []Band
		order   int
	}{
		{[]float64{915 * MHz, 868 * MHz}, []Band{{1559 * MHz, 1610 * MHz}}, 5},
		{[]float64{915 * MHz, 868 * MHz}, []Band{{1559 * MHz, 1610 * MHz}, {2400 * MHz, 2483.5 * MHz}, {800 * MHz, 870 * MHz}}, 7},
		{[]float64{433.92 * MHz}, []Band{{1 * MHz, 5000 * MHz}}, 9},
		{[]float64{144.8 * MHz, 145.5 * MHz, 433.9 * MHz}, []Band{{1575 * MHz, 1576 * MHz}, {100 * MHz, 200 * MHz}}, 6},
	}
	for _, c := range cases {
		hits, err := Products(c.tones, c.protect, c.order)
		if err != nil {
			t.Fatal(err)
		}
		want := bruteProducts(c.tones, c.protect, c.order)
		got := map[string]bool{}
		for _, h := range hits {
			key := fmt.Sprint(h.K, h.Band)
			if got[key] {
				t.Errorf("%v: %s twice", c.tones, key)
			}
			got[key] = true
			f, ord := 0.0, 0
			for i, k := range h.K {
				f += float64(k) * c.tones[i]
				ord += abs(k)
			}
			if math.Abs(f-h.Freq) > 1e-3 || ord != h.Order {
				t.Errorf("%v: %+v: frequency %g, order %d", c.tones, h, f, ord)
			}
		}
		for k := range want {
			if !got[k] {
				t.Errorf("%v: brute force finds %s, Products does not", c.tones, k)
			}
		}
		for k := range got {
			if !want[k] {
				t.Errorf("%v: Products finds %s, brute force does not", c.tones, k)
			}
		}
	}
}

// Hand-worked products, each checked on paper.
func TestProductsHandWorked(t *testing.T) {
	// A single 520 MHz tone: its 3rd harmonic 1560 MHz is the only harmonic in 1559–1610 MHz.
	hits, err := Products([]float64{520 * MHz}, []Band{{1559 * MHz, 1610 * MHz}}, 5)
	if err != nil {
		t.Fatal(err)
	}
	if len(hits) != 1 || hits[0].K[0] != 3 || hits[0].Order != 3 || math.Abs(hits[0].Freq-1560*MHz) > 1 {
		t.Errorf("520 MHz harmonics: %+v", hits)
	}
	// Two tones 915 and 868 MHz against 1559–1610 MHz up to order 5: write the product as
	// 868·s + 47·k1 with s = k1 + k2. For s = 1 it lies at 774…1009 MHz, for s = 2 at
	// 1689…1877 MHz, for s = 3 above 2557 MHz (k1 limited by |k1| + |k2| ≤ 5): none in band.
	hits, err = Products([]float64{915 * MHz, 868 * MHz}, []Band{{1559 * MHz, 1610 * MHz}}, 5)
	if err != nil {
		t.Fatal(err)
	}
	if len(hits) != 0 {
		t.Errorf("915/868 in 1559–1610: %+v", hits)
	}
	// Two tones 2440 and 2400 MHz against 2360–2370 MHz: 2·2400 − 2440 = 2360 (IM3 low side).
	hits, err = Products([]float64{2440 * MHz, 2400 * MHz}, []Band{{2360 * MHz, 2370 * MHz}}, 3)
	if err != nil {
		t.Fatal(err)
	}
	if len(hits) != 1 || hits[0].K[0] != -1 || hits[0].K[1] != 2 || hits[0].Order != 3 {
		t.Errorf("IM3: %+v", hits)
	}
}

func TestProductsBadInput(t *testing.T) {
	band := []Band{{1, 2}}
	for name, err := range map[string]error{
		"one tone, order 1": second(Products([]float64{1e9}, band, 1)),
		"no tones":          second(Products(nil, band, 3)),
		"order 16":          second(Products([]float64{1e9}, band, 16)),
		"negative tone":     second(Products([]float64{-1e9}, band, 3)),
		"band reversed":     second(Products([]float64{1e9}, []Band{{2, 1}}, 3)),
		"no bands":          second(Products([]float64{1e9}, nil, 3)),
		"seven tones":       second(Products([]float64{1, 2, 3, 4, 5, 6, 7}, band, 3)),
	} {
		if err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

func second(_ []Hit, err error) error { return err }

// BenchmarkSpursOrder15 is a plan of order 15 whose responses spread over 10 GHz.
func BenchmarkSpursOrder15(b *testing.B) {
	p := Plan{LO: 5.2e9, IF: Band{140e6, 160e6}, RF: Band{5.0e9, 5.1e9}, Order: 15}
	for b.Loop() {
		if _, err := Spurs(p); err != nil {
			b.Fatal(err)
		}
	}
}

// Edges written in decimal MHz are not exact in binary; a product or response that meets an
// edge on paper must still meet it (each case worked by hand in decimal arithmetic).
func TestDecimalEdges(t *testing.T) {
	// mhz reads a frequency as the worksheet does (the number parsed, then scaled at run
	// time); a constant expression such as 512.07 * MHz would be exact and hide the rounding.
	mhz := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		return v * MHz
	}
	// 3 × 512.07 = 1536.21 MHz: on the upper edge of the first band and the lower of the second.
	// In binary, 3·(512.07·1e6) is 2.4e-7 Hz above 1536.21·1e6.
	if 3*mhz("512.07") == mhz("1536.21") {
		t.Fatal("the rounding this test is about does not happen")
	}
	hits, err := Products([]float64{mhz("512.07")}, []Band{{1500 * MHz, mhz("1536.21")}, {mhz("1536.21"), 1540 * MHz}}, 3)
	if err != nil {
		t.Fatal(err)
	}
	if len(hits) != 2 || hits[0].Band != 0 || hits[1].Band != 1 || hits[0].K[0] != 3 {
		t.Errorf("3 × 512.07 MHz on the shared edge: %+v", hits)
	}
	// f − LO = IF with LO 512.07 MHz and IF from 1024.14 MHz: f from 1536.21 MHz, which touches
	// a preselector passband ending at 1536.21 MHz, so the 1×1 response is the wanted one.
	rs, err := Spurs(Plan{LO: mhz("512.07"), IF: Band{mhz("1024.14"), 1030 * MHz}, RF: Band{1400 * MHz, mhz("1536.21")}, Order: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(rs) == 0 || !rs[0].Wanted || rs[0].Form != InputMinus {
		t.Errorf("touching response: %+v", rs)
	}
	// LO 100.1 MHz, IF 150.15–200.2 MHz, passband above the LO: LO + f = IF gives f = 50.05–
	// 100.1 MHz, up to the LO and so on its other side: the image (f = IF − LO, the mirror of
	// f = LO + IF); 2·LO + f = IF has no positive f (2·LO is the IF's upper edge).
	rs, err = Spurs(Plan{LO: mhz("100.1"), IF: Band{mhz("150.15"), mhz("200.2")}, RF: Band{mhz("300.3"), mhz("400.4")}, Order: 3})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rs {
		if r.M == 1 && r.N == 1 && r.Form == Sum && !r.Image {
			t.Errorf("LO + f = IF ending on the LO is not flagged as the image: %+v", r)
		}
		if r.M == 2 && r.Form == Sum {
			t.Errorf("2·LO + n·f = IF listed though 2·LO is the IF's upper edge: %+v", r)
		}
	}
}
