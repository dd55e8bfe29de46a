package analysis_test

import (
	"path/filepath"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/sheettest"
)

var lib = sheettest.Lib

// evalSrc loads and evaluates a one-file sheet and fails the test on any error.
func evalSrc(t testing.TB, src string, set ...engine.Override) *engine.Result {
	t.Helper()
	r, diags := sheettest.Eval(src, set...)
	if err := diags.Err(); err != nil {
		t.Fatalf("load or eval:\n%v", err)
	}
	return r
}

func evalFile(t testing.TB, path string, set ...engine.Override) *engine.Result {
	t.Helper()
	return sheettest.EvalFile(t, path, set...)
}

// loadValid loads and evaluates a sheet of testdata/valid.
func loadValid(t *testing.T, name string) *engine.Result {
	t.Helper()
	return evalFile(t, filepath.Join("..", "testdata", "valid", name))
}

// value returns a known quantity's value in the unit named.
func value(t testing.TB, r *engine.Result, name, unit string) float64 {
	t.Helper()
	return sheettest.Value(t, r, name, unit)
}

func near(t testing.TB, what string, got, want, tol float64) {
	t.Helper()
	sheettest.Near(t, what, got, want, tol)
}

// fsplDB is free-space basic transmission loss (sheettest.FreeSpaceLossDB, ITU-R P.525-4).
func fsplDB(d, f float64) float64 { return sheettest.FreeSpaceLossDB(d, f) }
