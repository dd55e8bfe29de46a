package rfmath

import (
	"math"
	"testing"
)

// ref is one reference check: got is the value under test, want the
// reference value obtained by an independent route named in the comment
// beside each table row, tol the allowed absolute difference (or relative
// difference when rel is true).
type ref struct {
	name      string
	got, want float64
	tol       float64
	rel       bool
}

func checkRefs(t *testing.T, refs []ref) {
	t.Helper()
	for _, r := range refs {
		diff := math.Abs(r.got - r.want)
		if r.rel {
			diff /= math.Abs(r.want)
		}
		switch {
		case math.IsInf(r.want, 0) && r.got == r.want:
		case math.IsNaN(diff) || diff > r.tol:
			t.Errorf("%s: got %.8g, want %.8g (tol %g, rel %v)", r.name, r.got, r.want, r.tol, r.rel)
		}
	}
}

// must discards notes and fails the test on error.
func must(t *testing.T) func(v float64, notes []string, err error) float64 {
	return func(v float64, _ []string, err error) float64 {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
}

func log10(x float64) float64 { return math.Log10(x) }

func db(x float64) float64 { return 10 * math.Log10(x) }
