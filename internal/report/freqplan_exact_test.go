package report

import (
	"encoding/json"
	"fmt"
	"math"
	"math/big"
	"sort"
	"strings"
	"testing"
)

// This file checks the frequency plan end to end, from the worksheet to `render --json`,
// against a brute force written here without internal/freqplan: every (m, n) and every sign
// of m·LO ± n·f = IF is solved for f in exact rational arithmetic (math/big), and every
// coefficient vector k in the box [−order, order]^d is tried for the products. Exact
// arithmetic makes the edge cases decide the same way a hand calculation does: a response
// that touches the preselector's edge is in band, a product exactly on a band edge is in it,
// even when the decimal frequencies (512.07 MHz) are not exact in binary.

// exactSpurPlan is a [[spurs]] block written in MHz as decimal text.
type exactSpurPlan struct {
	name, lo, ifLo, ifHi, rfLo, rfHi string
	order                            int // 0: the default, 7
	reject                           map[string]float64
}

// exactProductPlan is a [[products]] block written in MHz as decimal text.
type exactProductPlan struct {
	name    string
	tones   []string
	protect [][2]string
	order   int // 0: the default, 5
}

var exactSpurPlans = []exactSpurPlan{
	// The plan: high-side LO, RF = LO − IF, with a rejection table.
	{name: "high-side", lo: "1185", ifLo: "257", ifHi: "283", rfLo: "902", rfHi: "928", order: 7,
		reject: map[string]float64{"0x1": -30, "2x1": -42, "1x2": -55, "2x2": -62, "3x1": -48, "1x3": -70, "3x3": -75}},
	// Low-side LO: RF = LO + IF; the image is below the LO.
	{name: "low-side", lo: "645", ifLo: "257", ifHi: "283", rfLo: "902", rfHi: "928", order: 9, reject: map[string]float64{"2x2": -60, "0x1": -20}},
	// The IF band reaches up to the LO: LO − f = IF starts at 0 Hz, LO + f = IF has no positive f.
	{name: "IF up to the LO", lo: "1000", ifLo: "900", ifHi: "1000", rfLo: "1900", rfHi: "2000", order: 5},
	// 2·LO inside the IF: both 2·LO ± n·f reach down to 0 Hz.
	{name: "2·LO inside the IF", lo: "100", ifLo: "150", ifHi: "250", rfLo: "250", rfHi: "350", order: 6},
	// Order 15 with responses from 1 GHz to 20 GHz.
	{name: "order 15", lo: "5010.7", ifLo: "10.6", ifHi: "10.8", rfLo: "5000", rfHi: "5000.2", order: 15},
	// An up-converter: LO + f = IF is the wanted response.
	{name: "up-converter", lo: "2000", ifLo: "2902", ifHi: "2928", rfLo: "902", rfHi: "928", order: 6},
	// Decimal edges that meet: 2·LO = IF high edge, LO + f = IF ends on the LO.
	{name: "decimal edges", lo: "100.1", ifLo: "150.15", ifHi: "200.2", rfLo: "300.3", rfHi: "400.4", order: 8},
	// The wanted response ends exactly on the preselector's upper edge (1024.14 + 512.07 =
	// 1536.21 MHz), which binary rounding puts a hair outside.
	{name: "touching the passband", lo: "512.07", ifLo: "1024.14", ifHi: "1030", rfLo: "1400", rfHi: "1536.21", order: 4},
	// An IF reaching 0 Hz and an LO inside a wide passband (the default order, 7).
	{name: "IF from 0 Hz", lo: "433.92", ifLo: "0", ifHi: "0.1", rfLo: "433.92", rfHi: "434.02", order: 5},
	{name: "LO inside the passband", lo: "2440", ifLo: "2", ifHi: "3", rfLo: "2400", rfHi: "2483.5"},
	// Many responses of higher order inside a wide passband.
	{name: "in-band spurs", lo: "1000", ifLo: "100", ifHi: "200", rfLo: "800", rfHi: "1100", order: 11},
}

var exactProductPlans = []exactProductPlan{
	{name: "two tones", tones: []string{"915", "868"}, protect: [][2]string{{"1559", "1610"}, {"1805", "1880"}}, order: 5},
	// 2·915 = 1830 on a lower edge, 915 + 868 = 1783 on an upper edge.
	{name: "on the edges", tones: []string{"915", "868"}, protect: [][2]string{{"1830", "1900"}, {"1700", "1783"}, {"962", "1000"}}, order: 7},
	{name: "three tones, order 15", tones: []string{"433.92", "868.3", "915.1"}, protect: [][2]string{{"1559", "1610"}, {"2400", "2483.5"}}, order: 15},
	// 3 × 512.07 = 1536.21 MHz exactly, on the edge of two bands; binary rounding puts it a
	// hair above the first band's upper edge.
	{name: "decimal edge", tones: []string{"512.07"}, protect: [][2]string{{"1500", "1536.21"}, {"1536.21", "1540"}}, order: 3},
	{name: "default order", tones: []string{"144.8", "145.5", "435.1"}, protect: [][2]string{{"290", "300"}, {"1240", "1300"}}},
	{name: "overlapping bands", tones: []string{"100", "250"}, protect: [][2]string{{"390", "410"}, {"400", "450"}, {"0.001", "60"}}, order: 6},
}

func exactSheet() string {
	var b strings.Builder
	for _, p := range exactSpurPlans {
		fmt.Fprintf(&b, "[[spurs]]\nname = %q\nlo = \"%s MHz\"\nif = [\"%s MHz\", \"%s MHz\"]\nrf = [\"%s MHz\", \"%s MHz\"]\n", p.name, p.lo, p.ifLo, p.ifHi, p.rfLo, p.rfHi)
		if p.order != 0 {
			fmt.Fprintf(&b, "order = %d\n", p.order)
		}
		var keys []string
		for k := range p.reject {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		var parts []string
		for _, k := range keys {
			parts = append(parts, fmt.Sprintf("%q = \"%g dBc\"", k, p.reject[k]))
		}
		if len(parts) > 0 {
			fmt.Fprintf(&b, "reject = { %s }\n", strings.Join(parts, ", "))
		}
	}
	for _, p := range exactProductPlans {
		var tones, bands []string
		for _, t := range p.tones {
			tones = append(tones, fmt.Sprintf("%q", t+" MHz"))
		}
		for _, x := range p.protect {
			bands = append(bands, fmt.Sprintf("[%q, %q]", x[0]+" MHz", x[1]+" MHz"))
		}
		fmt.Fprintf(&b, "[[products]]\nname = %q\ntones = [%s]\nprotect = [%s]\n", p.name, strings.Join(tones, ", "), strings.Join(bands, ", "))
		if p.order != 0 {
			fmt.Fprintf(&b, "order = %d\n", p.order)
		}
	}
	return b.String()
}

func ratOf(t *testing.T, s string) *big.Rat {
	r, ok := new(big.Rat).SetString(s)
	if !ok {
		t.Fatalf("bad number %q", s)
	}
	return r
}

func ratFloat(r *big.Rat) float64 { f, _ := r.Float64(); return f }

// exactResponse is what the brute force expects of one response, in MHz.
type exactResponse struct {
	from, to              float64
	inBand, wanted, image bool
	level                 *float64
}

// bruteSpurs solves m·LO ± n·f = IF for every m ≥ 0, n ≥ 1, m + n ≤ order and each sign, keyed
// "m/n/form". The definitions are the issue's: the input band is every f > 0 that lands in the
// IF passband, in_band that it shares a point with the preselector passband, wanted that m = n
// = 1 and in band, image that m = n = 1 and its middle is on the other side of the LO from the
// passband's middle; the level comes from the rejection table, 0 dBc for the 1×1 conversion.
func bruteSpurs(t *testing.T, p exactSpurPlan) map[string]exactResponse {
	order := p.order
	if order == 0 {
		order = 7
	}
	lo, ifLo, ifHi := ratOf(t, p.lo), ratOf(t, p.ifLo), ratOf(t, p.ifHi)
	rfLo, rfHi := ratOf(t, p.rfLo), ratOf(t, p.rfHi)
	half := big.NewRat(1, 2)
	rfMid := new(big.Rat).Mul(new(big.Rat).Add(rfLo, rfHi), half)
	out := map[string]exactResponse{}
	for m := int64(0); m <= int64(order); m++ {
		for n := int64(1); m+n <= int64(order); n++ {
			for _, form := range []struct {
				name     string
				sLO, sIn int64 // sLO·m·LO + sIn·n·f = IF
			}{{"mLO+nRF", 1, 1}, {"mLO-nRF", 1, -1}, {"nRF-mLO", -1, 1}} {
				if m == 0 && form.name != "mLO+nRF" {
					continue // with m = 0 every form reads ±n·f = IF: one response, written as the first
				}
				shift := new(big.Rat).Mul(big.NewRat(form.sLO*m, 1), lo)
				div := big.NewRat(form.sIn*n, 1)
				a := new(big.Rat).Quo(new(big.Rat).Sub(ifLo, shift), div)
				b := new(big.Rat).Quo(new(big.Rat).Sub(ifHi, shift), div)
				if a.Cmp(b) > 0 {
					a, b = b, a
				}
				if b.Sign() <= 0 {
					continue // no positive input frequency
				}
				if a.Sign() < 0 {
					a = new(big.Rat)
				}
				r := exactResponse{from: ratFloat(a), to: ratFloat(b)}
				r.inBand = a.Cmp(rfHi) <= 0 && rfLo.Cmp(b) <= 0
				r.wanted = m == 1 && n == 1 && r.inBand
				mid := new(big.Rat).Mul(new(big.Rat).Add(a, b), half)
				if m == 1 && n == 1 && rfMid.Cmp(lo) != 0 {
					r.image = mid.Cmp(lo) != 0 && (mid.Cmp(lo) > 0) != (rfMid.Cmp(lo) > 0)
				}
				if m == 1 && n == 1 {
					r.level = new(float64)
				} else if v, ok := p.reject[fmt.Sprintf("%dx%d", m, n)]; ok {
					r.level = &v
				}
				out[fmt.Sprintf("%d/%d/%s", m, n, form.name)] = r
			}
		}
	}
	return out
}

// bruteProducts tries every k in [−order, order]^d with 2 ≤ Σ|k| ≤ order and a positive
// Σ k·f, and keeps one hit per protected band (closed) it lies in, keyed "k/band".
func bruteProducts(t *testing.T, p exactProductPlan) map[string]float64 {
	order := p.order
	if order == 0 {
		order = 5
	}
	out := map[string]float64{}
	k := make([]int64, len(p.tones))
	var walk func(i int)
	walk = func(i int) {
		if i < len(k) {
			for c := -int64(order); c <= int64(order); c++ {
				k[i] = c
				walk(i + 1)
			}
			return
		}
		sum, f := int64(0), new(big.Rat)
		for j, c := range k {
			sum += max(c, -c)
			f.Add(f, new(big.Rat).Mul(big.NewRat(c, 1), ratOf(t, p.tones[j])))
		}
		if sum < 2 || sum > int64(order) || f.Sign() <= 0 {
			return
		}
		for _, band := range p.protect {
			if f.Cmp(ratOf(t, band[0])) >= 0 && f.Cmp(ratOf(t, band[1])) <= 0 {
				out[fmt.Sprintf("%v/%s-%s", k, band[0], band[1])] = ratFloat(f)
			}
		}
	}
	walk(0)
	return out
}

func closeTo(a, b float64) bool { return math.Abs(a-b) <= 1e-11*math.Max(math.Abs(a), math.Abs(b)) }

// TestFreqPlanJSONAgainstExactBruteForce compares every response and every product of the
// JSON, set for set, with the exact brute force, and checks the listing order the page uses.
func TestFreqPlanJSONAgainstExactBruteForce(t *testing.T) {
	sh := load(t, exactSheet())
	var doc struct {
		Spurs []struct {
			Name      string            `json:"name"`
			Error     string            `json:"error"`
			Responses []json.RawMessage `json:"responses"`
		} `json:"spurs"`
		Products []struct {
			Name  string            `json:"name"`
			Error string            `json:"error"`
			Hits  []json.RawMessage `json:"hits"`
		} `json:"products"`
	}
	if err := json.Unmarshal(JSON(Input{Result: sh}), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Spurs) != len(exactSpurPlans) || len(doc.Products) != len(exactProductPlans) {
		t.Fatalf("%d spurs and %d products blocks", len(doc.Spurs), len(doc.Products))
	}
	for i, p := range exactSpurPlans {
		js := doc.Spurs[i]
		if js.Error != "" {
			t.Errorf("%s: %s", p.name, js.Error)
			continue
		}
		want := bruteSpurs(t, p)
		seen := map[string]bool{}
		rank, lastRank, lastOrder := 0, 0, 0
		for _, raw := range js.Responses {
			hasFields(t, p.name, raw, "m", "n", "form", "from", "to", "unit", "order", "in_band", "wanted", "image", "level")
			var r struct {
				M, N, Order   int
				Form, Unit    string
				From, To      float64
				InBand        bool `json:"in_band"`
				Wanted, Image bool
				HalfIF        bool `json:"half_if"`
				Level         *float64
			}
			if err := json.Unmarshal(raw, &r); err != nil {
				t.Fatal(err)
			}
			key := fmt.Sprintf("%d/%d/%s", r.M, r.N, r.Form)
			w, ok := want[key]
			switch {
			case !ok:
				t.Errorf("%s: JSON lists %s at %g–%g MHz, the brute force finds nothing", p.name, key, r.From, r.To)
				continue
			case seen[key]:
				t.Errorf("%s: %s listed twice", p.name, key)
			}
			seen[key] = true
			if !closeTo(r.From, w.from) || !closeTo(r.To, w.to) || r.Unit != "MHz" || r.Order != r.M+r.N {
				t.Errorf("%s: %s is %.12g–%.12g %s order %d, want %.12g–%.12g MHz", p.name, key, r.From, r.To, r.Unit, r.Order, w.from, w.to)
			}
			if r.InBand != w.inBand || r.Wanted != w.wanted || r.Image != w.image {
				t.Errorf("%s: %s in_band %v wanted %v image %v, want %v %v %v", p.name, key, r.InBand, r.Wanted, r.Image, w.inBand, w.wanted, w.image)
			}
			if (r.Level == nil) != (w.level == nil) || r.Level != nil && *r.Level != *w.level {
				t.Errorf("%s: %s level %v, want %v", p.name, key, r.Level, w.level)
			}
			// The page's order: in band first, then the image and the half-IF response, then the
			// rest by order.
			switch {
			case r.InBand:
				rank = 0
			case r.Image || r.HalfIF:
				rank = 1
			default:
				rank = 2
			}
			if rank < lastRank || rank == 2 && lastRank == 2 && r.Order < lastOrder {
				t.Errorf("%s: %s (order %d) listed after a response of rank %d, order %d", p.name, key, r.Order, lastRank, lastOrder)
			}
			lastRank, lastOrder = rank, r.Order
		}
		for key, w := range want {
			if !seen[key] {
				t.Errorf("%s: the brute force finds %s at %.12g–%.12g MHz, the JSON does not", p.name, key, w.from, w.to)
			}
		}
	}
	for i, p := range exactProductPlans {
		jp := doc.Products[i]
		if jp.Error != "" {
			t.Errorf("%s: %s", p.name, jp.Error)
			continue
		}
		want := bruteProducts(t, p)
		seen := map[string]bool{}
		for _, raw := range jp.Hits {
			hasFields(t, p.name, raw, "k", "freq", "unit", "order", "band")
			var h struct {
				K     []int64
				Freq  float64
				Unit  string
				Order int64
				Band  [2]float64
			}
			if err := json.Unmarshal(raw, &h); err != nil {
				t.Fatal(err)
			}
			band := [2]string{}
			for _, b := range p.protect {
				if closeTo(ratFloat(ratOf(t, b[0])), h.Band[0]) && closeTo(ratFloat(ratOf(t, b[1])), h.Band[1]) {
					band = b
				}
			}
			key := fmt.Sprintf("%v/%s-%s", h.K, band[0], band[1])
			f, ok := want[key]
			sum := int64(0)
			for _, c := range h.K {
				sum += max(c, -c)
			}
			switch {
			case !ok:
				t.Errorf("%s: JSON lists %s at %g MHz, the brute force does not", p.name, key, h.Freq)
			case seen[key]:
				t.Errorf("%s: %s listed twice", p.name, key)
			case !closeTo(h.Freq, f) || h.Order != sum || h.Unit != "MHz":
				t.Errorf("%s: %s at %.12g %s order %d, want %.12g MHz order %d", p.name, key, h.Freq, h.Unit, h.Order, f, sum)
			}
			seen[key] = true
		}
		for key, f := range want {
			if !seen[key] {
				t.Errorf("%s: the brute force finds %s at %.12g MHz, the JSON does not", p.name, key, f)
			}
		}
	}
}

// hasFields checks that a JSON object has the fields the issue names, spelt exactly.
func hasFields(t *testing.T, who string, raw json.RawMessage, fields ...string) {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal(raw, &m); err != nil {
		t.Fatal(err)
	}
	for _, f := range fields {
		if _, ok := m[f]; !ok {
			t.Errorf("%s: no field %q in %s", who, f, raw)
		}
	}
}
