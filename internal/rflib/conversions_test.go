package rflib_test

import (
	"math"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/internal/sheettest"
)

func TestConversionAndMathReferences(t *testing.T) {
	refs := []ref{
		// Decibel facts: common practice, no source (10·log10 of power ratios, 1 mW / 1 W references).
		{"db(2)", "dB", db10(2), 1e-12, "common practice, no source: 10 log10 2 = 3.01 dB"},
		{"db(1000)", "dB", 30, 1e-12, "common practice, no source"},
		{"db(290 K)", "dBK", db10(290), 1e-12, "common practice, no source: 24.62 dBK"},
		{"db(1 mW)", "dBm", 0, 1e-12, "common practice, no source: 1 mW is 0 dBm"},
		{"lin(3 dB)", "", math.Pow(10, 0.3), 1e-12, "common practice, no source"},
		{"lin(-10 dB)", "", 0.1, 1e-12, "common practice, no source"},
		{"lin(20 dBm)", "mW", 100, 1e-9, "common practice, no source: 20 dBm = 100 mW"},
		{"dbm(1 W)", "dBm", 30, 1e-12, "common practice, no source: 1 W = 30 dBm"},
		{"dbm(25 mW)", "dBm", db10(25), 1e-12, "common practice, no source"},
		{"dbm(0 dBW)", "dBm", 30, 1e-12, "common practice, no source"},
		{"dbw(30 dBm)", "dBW", 0, 1e-12, "common practice, no source"},
		{"dbw(100 W)", "dBW", 20, 1e-12, "common practice, no source"},
		{"watts(30 dBm)", "W", 1, 1e-12, "common practice, no source"},
		{"watts(0 dBm)", "mW", 1, 1e-12, "common practice, no source"},
		{"watts(-3 dBW)", "W", math.Pow(10, -0.3), 1e-12, "common practice, no source"},
		{"dbhz(1 MHz)", "dBHz", 60, 1e-12, "common practice, no source"},
		{"dbhz(38.4 kbit/s)", "dBHz", db10(38400), 1e-12, "common practice, no source: bit/s has the dimension of Hz"},
		{"dbk(290 K)", "dBK", db10(290), 1e-12, "common practice, no source"},
		{"to(2.4 km, 'm')", "m", 2400, 1e-9, "SI prefixes (SI Brochure)"},
		{"to(10 dBm, 'mW')", "mW", 10, 1e-9, "common practice, no source"},
		{"to(1 W, 'dBm')", "dBm", 30, 1e-12, "common practice, no source"},
		{"to(1 mi, 'ft')", "ft", 5280, 1e-9, "international mile and foot (1959 agreement)"},
		// psum/pdiff: power addition of uncorrelated signals, computed in mW here.
		{"psum(-90 dBm, -90 dBm)", "dBm", db10(2e-9), 1e-9, "common practice, no source: two equal powers +3.01 dB"},
		{"psum(-90 dBm, -90 dBm, -90 dBm)", "dBm", -90 + db10(3), 1e-9, "common practice, no source: three equal powers +4.77 dB"},
		{"psum(-100 dBm, -110 dBm)", "dBm", db10(1e-10 + 1e-11), 1e-9, "common practice, no source"},
		{"psum(0 dBW, 30 dBm)", "dBW", db10(2), 1e-9, "common practice, no source: dBW and dBm powers add"},
		{"pdiff(-87 dBm, -90 dBm)", "dBm", db10(math.Pow(10, -8.7) - 1e-9), 1e-9, "common practice, no source"},
		{"pdiff(psum(-95 dBm, -100 dBm), -100 dBm)", "dBm", -95, 1e-9, "psum and pdiff invert each other"},
		// Math (ISO 80000-2).
		{"sqrt(4 m^2)", "m", 2, 1e-12, "ISO 80000-2"},
		{"sqrt(2)", "", math.Sqrt2, 1e-12, "ISO 80000-2"},
		{"abs(-3 dB)", "dB", 3, 1e-12, "ISO 80000-2"},
		{"abs(-2 m)", "m", 2, 1e-12, "ISO 80000-2"},
		{"min(3 dBm, 1 mW)", "dBm", 0, 1e-12, "levels compare with linear values"},
		{"max(3 dBm, 1 mW, -5 dBm)", "dBm", 3, 1e-12, "levels compare with linear values"},
		{"log10(1000)", "", 3, 1e-12, "ISO 80000-2"},
		{"ln(exp(2))", "", 2, 1e-12, "ISO 80000-2"},
		{"exp(0)", "", 1, 1e-12, "ISO 80000-2"},
	}
	runRefs(t, "", refs)
}

func TestConversionErrors(t *testing.T) {
	cases := []struct{ formula, want string }{
		{"dbm(3 km)", "dbm: p: got m, want a power"},
		{"db(3 dB)", "db: x: already in decibels"},
		{"lin(2)", "lin: x: got a plain number, want a value in decibels"},
		{"psum(-90 dBm)", "psum: needs at least two levels"},
		{"pdiff(-90 dBm, -87 dBm)", "pdiff: the result is not a positive power"},
		{"log10(-1)", "log10: x = -1 is outside the function's domain"},
		{"ln(3 dB)", "ln: x: got dB, want a plain number"},
		{"10 dBm + 10 dBm", "psum(a, b) adds powers"},
	}
	for _, c := range cases {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
	}
}

// TestToShowsTheTargetUnit checks that a conversion within one family of decibel units is
// shown in the unit asked for: to(6 dBi, 'dBd') once showed "6.00 dBi".
func TestToShowsTheTargetUnit(t *testing.T) {
	cases := []struct{ formula, unit, display string }{
		// dBd = dBi − 2.15 dB: half-wave dipole gain over isotropic (IEEE Std 145, from memory).
		{"to(6 dBi, 'dBd')", "dBd", "3.85 dBd"},
		// 0 dBmV is 1 mV by the definition of the unit.
		{"to(1 mV, 'dBmV')", "dBmV", "0.00 dBmV"},
		// 0 dBV = 1 V = 120 dBuV by definition.
		{"to(1 V, 'dBuV')", "dBuV", "120.00 dBuV"},
	}
	for _, c := range cases {
		r, diags := sheettest.Eval("[x]\ny = \"= " + c.formula + "\"\n")
		if diags.HasErrors() {
			t.Fatalf("%s: %v", c.formula, diags)
		}
		q, _ := r.Sheet().Quantity("x.y")
		if got := q.UnitName(); got != c.unit {
			t.Errorf("%s: unit %q, want %q", c.formula, got, c.unit)
		}
		if got := r.Display(q); got != c.display {
			t.Errorf("%s: shows %q, want %q", c.formula, got, c.display)
		}
	}
}
