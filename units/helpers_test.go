package units

import (
	"math"
	"testing"
)

// mustParse parses s or fails the test.
func mustParse(t testing.TB, s string) Q {
	t.Helper()
	q, _, err := Parse(s)
	if err != nil {
		t.Fatalf("Parse(%q): %v", s, err)
	}
	return q
}

// mustUnit parses a unit or fails the test.
func mustUnit(t testing.TB, s string) *Unit {
	t.Helper()
	u, err := ParseUnit(s)
	if err != nil {
		t.Fatalf("ParseUnit(%q): %v", s, err)
	}
	return u
}

// near reports whether got is within tol of want, relative to |want| when |want| > 1 and
// absolute otherwise.
func near(got, want, tol float64) bool {
	if got == want {
		return true
	}
	scale := math.Max(1, math.Abs(want))
	return math.Abs(got-want) <= tol*scale
}

// db10 is 10·log10(x), computed independently of the package.
func db10(x float64) float64 { return 10 * math.Log10(x) }
