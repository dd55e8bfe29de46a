package rflib_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// ref is one reference check: a formula evaluated by the real engine, read in unit, compared
// with want. The source of want is named in src (and in a comment where it is computed).
type ref struct {
	expr string  // the formula, without "="
	unit string  // unit to read the result in ("" for a plain number)
	want float64 // reference value
	tol  float64 // absolute tolerance, in unit
	src  string  // where want comes from
}

// load evaluates a worksheet held in memory and returns the sheet and all diagnostics.
func load(t *testing.T, src string) (*engine.Result, engine.Diagnostics) {
	t.Helper()
	return sheettest.Eval(src)
}

// value reads quantity name of an evaluated sheet in unit u.
func value(t *testing.T, sh *engine.Result, name, u string) float64 {
	t.Helper()
	return sheettest.Value(t, sh, name, u)
}

// runRefs evaluates every check as one quantity of a single worksheet (with the given
// preamble of inputs) and compares each with its reference.
func runRefs(t *testing.T, preamble string, refs []ref) {
	t.Helper()
	var b strings.Builder
	b.WriteString(preamble + "\n")
	for i, r := range refs {
		fmt.Fprintf(&b, "x%d = %q\n", i, "= "+r.expr)
	}
	sh, diags := load(t, b.String())
	if err := diags.Err(); err != nil {
		t.Fatalf("worksheet errors:\n%v", err)
	}
	for i, r := range refs {
		got := value(t, sh, fmt.Sprintf("x%d", i), r.unit)
		if !(math.Abs(got-r.want) <= r.tol) {
			t.Errorf("%s = %.6g %s, want %.6g ± %g (%s)", r.expr, got, r.unit, r.want, r.tol, r.src)
		}
	}
}

// evalErr evaluates one formula that must fail and returns the error diagnostic's summary.
func evalErr(t *testing.T, formula string) string {
	t.Helper()
	sh, diags := load(t, fmt.Sprintf("x = %q\n", "= "+formula))
	if q, ok := sh.Sheet().Quantity("x"); ok && sh.Known(q) {
		t.Errorf("%s: evaluated to %s, want an error", formula, sh.Display(q))
	}
	for _, d := range diags {
		if d.Severity == engine.Error && d.Quantity == "x" {
			return d.Summary + "; " + d.Hint
		}
	}
	t.Errorf("%s: no error diagnostic (got %v)", formula, diags)
	return ""
}

// evalWarn evaluates one formula that must succeed and returns its warnings for quantity x.
func evalWarn(t *testing.T, formula string) []string {
	t.Helper()
	sh, diags := load(t, fmt.Sprintf("x = %q\n", "= "+formula))
	if err := diags.Err(); err != nil {
		t.Fatalf("%s: %v", formula, err)
	}
	if q, _ := sh.Sheet().Quantity("x"); !sh.Known(q) {
		t.Fatalf("%s: unknown", formula)
	}
	var out []string
	for _, d := range diags {
		if d.Severity == engine.Warning {
			if d.Quantity != "x" {
				t.Errorf("%s: warning names %q, want x", formula, d.Quantity)
			}
			out = append(out, d.Summary)
		}
	}
	return out
}

func db10(x float64) float64 { return 10 * math.Log10(x) }

// c0 and kB are the SI defining constants (exact, SI 2019).
const (
	c0 = 299792458.0
	kB = 1.380649e-23
)
