package rflib_test

import (
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
)

// TestNegativeMagnitudesNamed: a negative distance, bandwidth or temperature is refused by the
// argument's name, not reported as a number that is not finite (or, for fspl, as a distance
// "within two wavelengths"). A distance, a bandwidth and an absolute temperature are not
// negative by definition (SI Brochure, 9th edition: the kelvin is an absolute scale).
func TestNegativeMagnitudesNamed(t *testing.T) {
	cases := []struct{ formula, want string }{
		{"fspl(-2 km, 868 MHz)", "fspl: d: a distance cannot be negative (got -2 km)"},
		{"logdist(-2 km, 868 MHz, 100 m, 3)", "logdist: d: a distance cannot be negative"},
		{"thermal(-1 MHz)", "thermal: b: a bandwidth cannot be negative (got -1 MHz)"},
		{"thermal(1 MHz, -3 K)", "thermal: t: a temperature cannot be negative"},
	}
	for _, c := range cases {
		got := evalErr(t, c.formula)
		if !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
		if strings.Contains(got, "finite") {
			t.Errorf("%s: error %q still speaks of a number that is not finite", c.formula, got)
		}
	}
	_, diags := load(t, "x = \"= fspl(-2 km, 868 MHz)\"\n")
	for _, d := range diags {
		if d.Severity == engine.Warning && strings.Contains(d.Summary, "two wavelengths") {
			t.Errorf("fspl(-2 km, …) still warns %q", d.Summary)
		}
	}
}
