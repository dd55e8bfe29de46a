package engine_test

import (
	"math"
	"testing"
	"testing/fstest"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// loadFS loads files (name → text) from an in-memory folder, starting at main.
func loadFS(files map[string]string, main string) (*engine.Sheet, engine.Diagnostics) {
	return sheettest.Load(files, main)
}

// evalFS loads and evaluates files from an in-memory folder, with every diagnostic.
func evalFS(files map[string]string, main string, set ...engine.Override) (*engine.Result, engine.Diagnostics) {
	return sheettest.EvalFS(files, main, set...)
}

// evalSrc loads and evaluates a one-file sheet and fails the test on any error.
func evalSrc(t testing.TB, src string, set ...engine.Override) *engine.Result {
	t.Helper()
	sh, diags := sheettest.Eval(src, set...)
	if err := diags.Err(); err != nil {
		t.Fatalf("load or eval:\n%v", err)
	}
	return sh
}

// value returns a known quantity's value in the unit named (e.g. "dBm", "m", "").
func value(t testing.TB, sh *engine.Result, name, unit string) float64 {
	t.Helper()
	return sheettest.Value(t, sh, name, unit)
}

func near(t testing.TB, what string, got, want, tol float64) {
	t.Helper()
	sheettest.Near(t, what, got, want, tol)
}

// fsplDB is free-space basic transmission loss (sheettest.FreeSpaceLossDB, ITU-R P.525-4).
func fsplDB(d, f float64) float64 { return sheettest.FreeSpaceLossDB(d, f) }

// ktbDBm is thermal noise power k·T·B in dBm (k from the 2019 SI definition).
func ktbDBm(b, t float64) float64 {
	const k = 1.380649e-23
	return 10*math.Log10(k*t*b) + 30
}

// lib is the function library every test sheet is loaded with.
var lib = sheettest.Lib

// sheetFromFiles loads files from memory with prev as the earlier load to reuse.
func sheetFromFiles(files map[string]string, prev *engine.Sheet) (*engine.Sheet, engine.Diagnostics) {
	fsys := fstest.MapFS{}
	for name, text := range files {
		fsys[name] = &fstest.MapFile{Data: []byte(text)}
	}
	return engine.Load("s.toml", engine.Options{Library: lib, FS: fsys, Previous: prev})
}

// evalFile loads and evaluates a worksheet file and fails the test on any error.
func evalFile(t testing.TB, path string, set ...engine.Override) *engine.Result {
	t.Helper()
	return sheettest.EvalFile(t, path, set...)
}
