// Package sheettest loads worksheets held in memory for the tests of the engine, the function
// library and the report writers, with rfledger's own function library.
package sheettest

import (
	"math"
	"testing"
	"testing/fstest"
	"time"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/units"
)

// Lib is the function library every test sheet is loaded with.
var Lib = rflib.Library()

// Load loads files (name → text) from an in-memory folder, starting at main, and returns the
// sheet and what loading found (nothing is evaluated yet).
func Load(files map[string]string, main string) (*engine.Sheet, engine.Diagnostics) {
	fsys := fstest.MapFS{}
	for name, text := range files {
		fsys[name] = &fstest.MapFile{Data: []byte(text)}
	}
	return engine.Load(main, engine.Options{Library: Lib, FS: fsys})
}

// EvalFS loads files as Load does and evaluates the sheet with the overrides, returning the
// result with every diagnostic, from loading and from evaluation.
func EvalFS(files map[string]string, main string, set ...engine.Override) (*engine.Result, engine.Diagnostics) {
	sh, diags := Load(files, main)
	r, ediags := sh.Eval(set...)
	return r, append(diags, ediags...).Sorted()
}

// Eval loads and evaluates a one-file sheet and returns the result with every diagnostic.
func Eval(src string, set ...engine.Override) (*engine.Result, engine.Diagnostics) {
	return EvalFS(map[string]string{"sheet.toml": src}, "sheet.toml", set...)
}

// Value returns a known quantity's value in the unit named ("dBm", "m", "" for a plain
// number), failing the test when there is none.
func Value(t testing.TB, r *engine.Result, name, unit string) float64 {
	t.Helper()
	q, ok := r.Sheet().Quantity(name)
	if !ok {
		t.Fatalf("no quantity %q", name)
	}
	v, ok := r.Value(q)
	if !ok {
		t.Fatalf("%s is unknown", name)
	}
	u, err := units.ParseUnit(unit)
	if err != nil {
		t.Fatalf("unit %q: %v", unit, err)
	}
	x, err := v.In(u)
	if err != nil {
		t.Fatalf("%s = %s in %s: %v", name, v, unit, err)
	}
	return x
}

// EvalFile loads and evaluates a worksheet file with the overrides, failing the test on any
// error.
func EvalFile(t testing.TB, path string, set ...engine.Override) *engine.Result {
	t.Helper()
	sh, diags := engine.Load(path, engine.Options{Library: Lib})
	if err := diags.Err(); err != nil {
		t.Fatal(err)
	}
	r, diags := sh.Eval(set...)
	if err := diags.Err(); err != nil {
		t.Fatal(err)
	}
	return r
}

// Near fails the test when got is not within tol of want (or is NaN).
func Near(t testing.TB, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > tol {
		t.Errorf("%s = %.12g, want %.12g (±%g)", what, got, want, tol)
	}
}

// FreeSpaceLossDB is free-space basic transmission loss in dB at distance d (m) and
// frequency f (Hz), ITU-R P.525-4 eq. (4): L = 20·log10(4π·d/λ), λ = c/f, c exact by the SI.
// It is written here from the Recommendation, apart from the engine's own, as a reference.
func FreeSpaceLossDB(d, f float64) float64 {
	const c = 299792458.0
	return 20 * math.Log10(4*math.Pi*d*f/c)
}

// ReportCPU reports the CPU time per operation since start (a CPUTime reading taken before
// the benchmark's loop) as cpu-ms/op, where CPU time can be read.
func ReportCPU(b *testing.B, start time.Duration) {
	if now := CPUTime(); now > 0 && b.N > 0 {
		b.ReportMetric(float64(now-start)/float64(b.N)/1e6, "cpu-ms/op")
	}
}
