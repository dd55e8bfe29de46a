package engine_test

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/gen"
)

// genCases returns the generated farm network of n quantities with k cases appended, each
// moving a few inputs of its own: a probe's distance and clutter, and a gateway's antenna.
func genCases(tb testing.TB, n, k int) string {
	tb.Helper()
	src, err := gen.Budget(n, 1)
	if err != nil {
		tb.Fatal(err)
	}
	var b strings.Builder
	b.Write(src)
	for i := range k {
		f, p := i%3+1, i+1
		fmt.Fprintf(&b, "\n[[case]]\nname = \"point %d\"\nset = { \"r01.f%02d.p%02d.distance\" = \"%d m\", \"r01.f%02d.p%02d.clutter\" = \"%d dB\", \"r01.f%02d.gw_antenna\" = \"%d dBi\" }\n",
			i+1, f, p, 800+300*i, f, p, 4+i, f, 3+i%4)
	}
	return b.String()
}

func loadCases(tb testing.TB, src string) *engine.Sheet {
	tb.Helper()
	sh, diags := loadFS(map[string]string{"sheet.toml": src}, "sheet.toml")
	if diags.HasErrors() {
		tb.Fatal(diags)
	}
	return sh
}

// sameResults fails unless a and b hold the same value, to the bit, for every quantity, and
// the same outcome for every requirement.
func sameResults(t *testing.T, what string, a, b *engine.Result) {
	t.Helper()
	sh := a.Sheet()
	for _, q := range sh.Quantities() {
		va, ka := a.Value(q)
		vb, kb := b.Value(q)
		if ka != kb || math.Float64bits(va.V) != math.Float64bits(vb.V) {
			t.Fatalf("%s: %s = %v (%v), want %v (%v)", what, q.Name, va, ka, vb, kb)
		}
	}
	for i, rq := range sh.Requires {
		pa, ka := a.Pass(rq)
		pb, kb := b.Pass(rq)
		if pa != pb || ka != kb {
			t.Fatalf("%s: requirement %d: %v/%v, want %v/%v", what, i+1, pa, ka, pb, kb)
		}
	}
}

// TestCasesEqualTheirOwnEvaluation: a case evaluated from the nominal result (only its
// cones again) has exactly the values of a full evaluation with the same overrides, with
// and without overrides for the whole run, on any number of workers.
func TestCasesEqualTheirOwnEvaluation(t *testing.T) {
	sh := loadCases(t, genCases(t, 2000, 5))
	if len(sh.Cases) != 5 || sh.Nominal == nil || sh.Nominal.Name != engine.NominalName {
		t.Fatalf("cases %d, nominal %+v", len(sh.Cases), sh.Nominal)
	}
	for _, run := range [][]engine.Override{nil, {{Name: "r01.f01.p01.distance", Value: "2 km"}, {Name: "bandwidth", Value: "250 kHz"}}} {
		nom, diags := sh.Eval(run...)
		if diags.HasErrors() {
			t.Fatal(diags)
		}
		one, _ := sh.EvalCases(nom, sh.Cases, 1)
		many, _ := sh.EvalCases(nom, sh.Cases, 4)
		for i, c := range sh.Cases {
			full, _ := sh.Eval(c.Overrides(run)...)
			sameResults(t, c.Name+" (1 worker)", one[i], full)
			sameResults(t, c.Name+" (4 workers)", many[i], full)
		}
	}
}

// TestCaseOverridesWin: a case's own value replaces the run's override of the same input.
func TestCaseOverridesWin(t *testing.T) {
	c := &engine.Case{Set: []engine.Override{{Name: "a", Value: "2 dB"}}}
	got := c.Overrides([]engine.Override{{Name: "a", Value: "1 dB"}, {Name: "b", Value: "3 dB"}})
	want := []engine.Override{{Name: "b", Value: "3 dB"}, {Name: "a", Value: "2 dB"}}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Fatalf("got %v, want %v", got, want)
	}
}

// TestNominalNamedByACase: a [[case]] without set names the nominal column and is not an
// operating point of its own.
func TestNominalNamedByACase(t *testing.T) {
	sh := loadCases(t, "a = \"1 dB\"\n[[case]]\nname = \"clear sky\"\nnote = \"n\"\n[[case]]\nname = \"rain\"\nset = { a = \"2 dB\" }\n")
	if sh.Nominal.Name != "clear sky" || sh.Nominal.Note != "n" || len(sh.Cases) != 1 || sh.Cases[0].Name != "rain" {
		t.Fatalf("nominal %+v, cases %d", sh.Nominal, len(sh.Cases))
	}
}

// BenchmarkCases8 evaluates the 10,000-quantity generated network's 8 cases from its nominal
// result and, in the same run, the nominal evaluation alone: x-nominal is the ratio of the
// two (the target is at most 2). Each case moves a probe and its gateway's antenna, so only
// that field's cones are computed again. The cases run on one goroutine (workers-1) and on
// GOMAXPROCS (x-nominal-parallel).
func BenchmarkCases8(b *testing.B) {
	sh := loadCases(b, genCases(b, 10000, 8))
	nom, diags := sh.Eval()
	if diags.HasErrors() {
		b.Fatal(diags)
	}
	var tNom, tOne, tPar time.Duration
	for b.Loop() {
		start := time.Now()
		sh.Eval()
		t1 := time.Now()
		sh.EvalCases(nom, sh.Cases, 1)
		t2 := time.Now()
		sh.EvalCases(nom, sh.Cases, 0)
		tNom, tOne, tPar = tNom+t1.Sub(start), tOne+t2.Sub(t1), tPar+time.Since(t2)
	}
	b.ReportMetric(float64(tOne)/float64(tNom), "x-nominal")
	b.ReportMetric(float64(tPar)/float64(tNom), "x-nominal-parallel")
	b.ReportMetric(float64(tNom.Nanoseconds())/float64(b.N), "nominal-ns/op")
}

// BenchmarkCases8Parts times the parts BenchmarkCases8 interleaves, one sub-benchmark each,
// for their own ns/op and B/op: the nominal evaluation of the 10,000-quantity network alone,
// and its 8 cases evaluated from that result on one goroutine and on GOMAXPROCS. The ratio
// the target is about comes from BenchmarkCases8, where both halves run in the same loop.
func BenchmarkCases8Parts(b *testing.B) {
	sh := loadCases(b, genCases(b, 10000, 8))
	nom, diags := sh.Eval()
	if diags.HasErrors() {
		b.Fatal(diags)
	}
	b.Run("nominal", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			sh.Eval()
		}
	})
	for _, w := range []struct {
		name    string
		workers int
	}{{"cases-1worker", 1}, {"cases-parallel", 0}} {
		b.Run(w.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				sh.EvalCases(nom, sh.Cases, w.workers)
			}
		})
	}
}
