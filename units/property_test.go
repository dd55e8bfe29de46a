package units

import (
	"math"
	"math/rand/v2"
	"testing"
)

const propRuns = 3000

// logUniform draws a positive value between 10^lo and 10^hi.
func logUniform(r *rand.Rand, lo, hi float64) float64 {
	return math.Pow(10, lo+(hi-lo)*r.Float64())
}

// watts(dbm(p)) == p, through As with the units dBm and W.
func TestPropDBmRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	dbm, w := mustUnit(t, "dBm"), mustUnit(t, "W")
	for range propRuns {
		p := logUniform(r, -18, 6)
		l, err := Lin(p, Power).As(dbm)
		if err != nil {
			t.Fatalf("dbm(%g W): %v", p, err)
		}
		back, err := l.As(w)
		if err != nil {
			t.Fatalf("watts(%v): %v", l, err)
		}
		if back.K != Linear || back.D != Power || math.Abs(back.V-p) > 1e-12*p {
			t.Fatalf("watts(dbm(%g W)) = %g", p, back.V)
		}
	}
}

// Adding then subtracting a ratio is the identity, and (a + b) − b == a for levels.
func TestPropAddSub(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	levels := []string{"dBm", "dBW", "dBm/Hz", "dBW/K", "dBK", "dBHz", "dBuV", "dBuV/m", "dB/K", "dBi", "dB"}
	others := []string{"dB", "dBi", "dBd", "dBc", "dBHz", "dBK", "dB/K"}
	for i := range propRuns {
		a := mustUnit(t, levels[i%len(levels)]).Of(200*r.Float64() - 100)
		b := mustUnit(t, others[(i/len(levels))%len(others)]).Of(100*r.Float64() - 50)
		sum, err := Add(a, b)
		if err != nil {
			continue // e.g. dBuV + dBK: no decibel unit; the error cases are tested elsewhere
		}
		back, err := Sub(sum, b)
		if err != nil {
			t.Fatalf("(%v + %v) - %v: %v", a, b, b, err)
		}
		if back.D != a.D || back.K != Level || math.Abs(back.V-a.V) > 1e-9 {
			t.Fatalf("(%v + %v) - %v = %v", a, b, b, back)
		}
		if b.IsRatio() && back.UnitName() != a.UnitName() && a.F != flavorIso {
			t.Fatalf("(%v + %v) - %v is in %s, want %s", a, b, b, back.UnitName(), a.UnitName())
		}
		// Linear cross-check: the sum stands for the product of the linear values. (For
		// root-power levels a dB ratio scales the voltage by its square root, 10^(G/20).)
		la, lb, ls := a.Linear().V, b.Linear().V, sum.Linear().V
		if a.D.root() {
			lb = math.Sqrt(lb)
		}
		if math.Abs(ls-la*lb) > 1e-9*math.Abs(la*lb) {
			t.Fatalf("lin(%v + %v) = %g, want %g × %g", a, b, ls, la, lb)
		}
	}
}

// parse(format(q)) gives q back: levels to the 2 decimals they are written with, linear
// values to 4 significant digits.
func TestPropFormatParse(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	levelUnits := []string{"dBm", "dBW", "dBm/Hz", "dBW/K/Hz", "dBK", "dBHz", "dBuV", "dBV", "dBuV/m", "dB/K", "dBi", "dB", "dB/m"}
	linUnits := []string{"m", "Hz", "W", "s", "V", "K", "ohm", "bit/s", "Bd", "W/m^2", "m/s", "J", "A", "m^2", "1/K", "", "V/m"}
	for i := range propRuns {
		var q Q
		var tol float64
		if i%2 == 0 {
			q = mustUnit(t, levelUnits[i/2%len(levelUnits)]).Of(400*r.Float64() - 200)
			tol = 0.005 + 1e-9
		} else {
			v := logUniform(r, -14, 14)
			if r.IntN(4) == 0 {
				v = -v
			}
			q = mustUnit(t, linUnits[i/2%len(linUnits)]).Of(v)
			tol = 5e-4 * math.Abs(v)
		}
		s := q.String()
		p, _, err := Parse(s)
		if err != nil {
			t.Fatalf("Parse(%q) of %+v: %v", s, q, err)
		}
		if p.D != q.D || p.K != q.K || math.Abs(p.V-q.V) > tol {
			t.Fatalf("Parse(%q) = %+v, want %+v within %g", s, p, q, tol)
		}
	}
}

// Compare(a, b) == −Compare(b, a), across decibel and linear forms of a power.
func TestPropCompareAntisymmetric(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	forms := []string{"dBm", "dBW", "W", "mW", "uW"}
	for i := range propRuns {
		a := mustUnit(t, forms[i%len(forms)]).Of(math.Round(100*r.Float64()) - 50)
		b := mustUnit(t, forms[(i/len(forms))%len(forms)]).Of(math.Round(100*r.Float64()) - 50)
		if r.IntN(8) == 0 {
			b = a
		}
		ab, err1 := Compare(a, b)
		ba, err2 := Compare(b, a)
		if (err1 == nil) != (err2 == nil) || ab != -ba {
			t.Fatalf("Compare(%v, %v) = %d, %v; reversed %d, %v", a, b, ab, err1, ba, err2)
		}
		if err1 == nil && a == b && ab != 0 {
			t.Fatalf("Compare(%v, itself) = %d", a, ab)
		}
		// Consistent with the linear values.
		if err1 == nil && a.K == Level && b.K == Level {
			want := 0
			if a.V < b.V {
				want = -1
			} else if a.V > b.V {
				want = 1
			}
			if ab != want {
				t.Fatalf("Compare(%v, %v) = %d, want %d", a, b, ab, want)
			}
		}
	}
}

// Every level unit the algebra produces from the SPEC's units has a name that ParseUnit reads
// back to the same dimension and reference; the engine relies on ParseUnit(q.UnitName()).
func TestPropUnitNamesRoundTrip(t *testing.T) {
	base := []string{"dB", "dBi", "dBd", "dBc", "dBFS", "dBm", "dBW", "dBHz", "dB-Hz", "dBK", "dB/K", "dBm/Hz",
		"dBW/Hz", "dBW/K", "dBm/K", "dBW/K/Hz", "dBm/K/Hz", "dBuV", "dBV", "dBmV", "dBuV/m", "dBuA", "dBA", "dBW/m^2", "dB/km"}
	seen := map[Q]bool{}
	var qs []Q
	for _, s := range base {
		q := mustUnit(t, s).Of(1.25)
		if !seen[q] {
			seen[q] = true
			qs = append(qs, q)
		}
	}
	// Two rounds of sums and differences of everything with everything.
	for round := 0; round < 2; round++ {
		n := len(qs)
		for i := 0; i < n; i++ {
			for j := 0; j < len(base); j++ {
				b := mustUnit(t, base[j]).Of(0.5)
				for _, f := range []func(a, b Q) (Q, error){Add, Sub} {
					r, err := f(qs[i], b)
					if err != nil {
						continue
					}
					r.V = 1.25
					if !seen[r] {
						seen[r] = true
						qs = append(qs, r)
					}
				}
			}
		}
	}
	names := map[string]bool{}
	for _, q := range qs {
		name := q.UnitName()
		names[name] = true
		u, err := ParseUnit(name)
		if err != nil {
			t.Errorf("%+v: ParseUnit(%q): %v", q, name, err)
			continue
		}
		if u.D != q.D || u.K != q.K {
			t.Errorf("ParseUnit(%q) = %v %v, want %v %v", name, u.D, u.K, q.D, q.K)
		}
		v, err := q.In(u)
		if err != nil {
			t.Errorf("%+v in %q: %v", q, name, err)
			continue
		}
		if back := u.Of(v); back.UnitName() != name || math.Abs(back.V-q.V) > 1e-12 {
			t.Errorf("%q: Of(In(q)) = %+v, want %+v", name, back, q)
		}
	}
	// The table's result units are among them.
	for _, want := range []string{"dB", "dBi", "dBm", "dBW", "dBm/Hz", "dBW/Hz", "dBHz", "dBK", "dB/K", "dBW/K", "dBW/K/Hz", "dBuV", "dBuV/m"} {
		if !names[want] {
			t.Errorf("no algebra result is shown in %s", want)
		}
	}
	// Linear products and quotients of the SPEC's units name themselves parseably too.
	lins := []string{"m", "s", "Hz", "W", "V", "A", "ohm", "K", "J", "bit/s", "Bd", "%", "W/m^2", "mm/h", "1/K"}
	for _, a := range lins {
		for _, b := range lins {
			for _, f := range []func(a, b Q) (Q, error){Mul, Div} {
				r, err := f(mustUnit(t, a).Of(2), mustUnit(t, b).Of(3))
				if err != nil {
					t.Fatalf("%s with %s: %v", a, b, err)
				}
				u, err := ParseUnit(r.UnitName())
				if err != nil || u.D != r.D {
					t.Errorf("%s with %s: ParseUnit(%q) = %v, %v", a, b, r.UnitName(), u, err)
				}
			}
		}
	}
}
