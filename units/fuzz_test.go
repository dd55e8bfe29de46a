package units

import (
	"bufio"
	"math"
	"os"
	"testing"
)

// seedLines reads the shared fuzz corpus: one input per line, valid and invalid.
func seedLines(t testing.TB) []string {
	t.Helper()
	f, err := os.Open("../testdata/fuzz/units.txt")
	if err != nil {
		t.Fatalf("fuzz corpus: %v", err)
	}
	defer f.Close()
	var lines []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		lines = append(lines, sc.Text())
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return lines
}

// FuzzUnit feeds Parse and ParseUnit arbitrary text and runs the algebra on two parsed
// values: nothing panics, a successful parse prints as text that parses again, and every
// result's unit name is one ParseUnit accepts (the engine relies on that).
func FuzzUnit(f *testing.F) {
	lines := seedLines(f)
	for i, l := range lines {
		f.Add(l, lines[(i*7+3)%len(lines)])
	}
	f.Add("14 dBm", "3 dB")
	f.Add("-174 dBm/Hz", "50 dBHz")
	f.Add("0.3 dB/km", "2.4 km")
	f.Add("2 m", "8")
	f.Fuzz(func(t *testing.T, a, b string) {
		for _, s := range []string{a, b} {
			if u, err := ParseUnit(s); err == nil {
				_ = u.Of(1).String()
			}
		}
		qa, ua, errA := Parse(a)
		if errA == nil {
			checkPrinted(t, a, qa, ua)
		}
		qb, ub, errB := Parse(b)
		if errB == nil {
			checkPrinted(t, b, qb, ub)
		}
		if errA != nil || errB != nil {
			return
		}
		results := []Q{qa.Linear()}
		for _, op := range []func(x, y Q) (Q, error){Add, Sub, Mul, Div, Pow} {
			if r, err := op(qa, qb); err == nil {
				results = append(results, r)
			}
		}
		for _, op := range []func(x Q) (Q, error){Neg, Sqrt, Q.ToLevel} {
			if r, err := op(qa); err == nil {
				results = append(results, r)
			}
		}
		if r, err := qa.As(ub); err == nil {
			results = append(results, r)
		}
		if c, err := Compare(qa, qb); err == nil {
			if c2, err2 := Compare(qb, qa); err2 != nil || c2 != -c {
				t.Fatalf("Compare(%q, %q) = %d, reversed %d, %v", a, b, c, c2, err2)
			}
		}
		_, _ = qa.In(ub)
		_ = qa.Format(ub)
		for _, r := range results {
			s := r.String()
			if s == "" {
				t.Fatalf("%+v prints as nothing", r)
			}
			if math.IsNaN(r.V) || math.IsInf(r.V, 0) {
				continue
			}
			if _, err := ParseUnit(r.UnitName()); err != nil {
				t.Fatalf("from %q and %q: %+v has the unit name %q: %v", a, b, r, r.UnitName(), err)
			}
		}
	})
}

// checkPrinted: a parsed value prints, in its own unit and in the unit it was written in, as
// text that parses again to the same kind of quantity.
func checkPrinted(t *testing.T, in string, q Q, u *Unit) {
	t.Helper()
	for _, s := range []string{q.String(), q.Format(u)} {
		p, _, err := Parse(s)
		if err != nil {
			t.Fatalf("Parse(%q) ok, but its printed form %q does not parse: %v", in, s, err)
		}
		if p.D != q.D || p.K != q.K {
			t.Fatalf("Parse(%q) = %+v, printed %q parses as %+v", in, q, s, p)
		}
	}
	if _, err := ParseUnit(q.UnitName()); err != nil {
		t.Fatalf("Parse(%q): unit name %q does not parse: %v", in, q.UnitName(), err)
	}
}
