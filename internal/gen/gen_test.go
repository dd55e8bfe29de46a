package gen_test

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/gen"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// evalSheet loads and evaluates a generated worksheet and fails on any diagnostic, warnings
// included: the generator writes only what today's worksheets accept without complaint.
// It is the one place these tests touch the engine.
func evalSheet(t *testing.T, src []byte) (*engine.Sheet, func(name, unit string) float64) {
	t.Helper()
	r, diags := sheettest.Eval(string(src))
	sh := r.Sheet()
	if len(diags) > 0 {
		t.Fatalf("generated sheet: %d diagnostics, first:\n%v", len(diags), diags[0])
	}
	for _, rq := range sh.Requires {
		if pass, _ := r.Pass(rq); !pass {
			t.Errorf("requirement %q does not hold", rq.That)
		}
	}
	return sh, func(name, unit string) float64 { return sheettest.Value(t, r, name, unit) }
}

// TestBudgetEvaluates loads budget sheets of several sizes (odd ones too, where the last
// field takes the remainder) and checks the shapes the package promises.
func TestBudgetEvaluates(t *testing.T) {
	sizes := []int{gen.MinBudget, 101, 397, 1000, 4321, 10_000}
	if !testing.Short() {
		sizes = append(sizes, 100_000)
	}
	for _, n := range sizes {
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			src, err := gen.Budget(n, 1)
			if err != nil {
				t.Fatal(err)
			}
			sh, value := evalSheet(t, src)
			qs := sh.Quantities()
			if len(qs) != n {
				t.Errorf("%d quantities, want %d", len(qs), n)
			}
			inputs, tols := 0, 0
			for _, q := range qs {
				if q.Input() {
					inputs++
					if q.Tol != nil {
						tols++
					}
				}
			}
			// about one input in ten has a tolerance (drawn, so allow for chance at small n)
			if frac := float64(tols) / float64(inputs); n >= 1000 && (frac < 0.07 || frac > 0.13) {
				t.Errorf("%d of %d inputs toleranced (%.1f %%), want about 10 %%", tols, inputs, 100*frac)
			}
			chains := sh.Chains()
			if len(chains) == 0 {
				t.Fatal("no chain")
			}
			for _, c := range chains {
				if len(c.Stages) != 20 {
					t.Errorf("%s has %d stages, want 20", c.Name, len(c.Stages))
				}
			}
			// groups three deep: a probe group such as r01.f01.p01
			if strings.Count(sh.Focus, ".") != 3 {
				t.Errorf("focus %q is not in a group nested three deep", sh.Focus)
			}
			if len(sh.Sweeps) != 1 || len(sh.Solves) != 1 || len(sh.Requires) < 3 {
				t.Errorf("%d sweeps, %d solves, %d requirements", len(sh.Sweeps), len(sh.Solves), len(sh.Requires))
			}
			// The field's worst margin is the minimum over its probes (fan-in): check it
			// against the probes' own margins.
			field := strings.Join(strings.Split(sh.Focus, ".")[:2], ".")
			worst := math.Inf(1)
			for _, q := range qs {
				if strings.HasPrefix(q.Name, field+".p") && strings.HasSuffix(q.Name, ".margin") {
					worst = math.Min(worst, value(q.Name, "dB"))
				}
			}
			if got := value(field+".worst", "dB"); got != worst {
				t.Errorf("%s.worst = %g, the smallest probe margin is %g", field, got, worst)
			}
		})
	}
}

// TestSumChainEvaluates checks that the far-end level is the start level less every
// section's loss, summed here independently of the engine.
func TestSumChainEvaluates(t *testing.T) {
	for _, k := range []int{1, 10, 1000} {
		t.Run(fmt.Sprint(k), func(t *testing.T) {
			src, err := gen.SumChain(k, 1)
			if err != nil {
				t.Fatal(err)
			}
			sh, value := evalSheet(t, src)
			qs := sh.Quantities()
			if len(qs) != 2*k+1 {
				t.Errorf("%d quantities, want %d", len(qs), 2*k+1)
			}
			want := value("feeder.start", "dBm")
			tols := 0
			for _, q := range qs {
				if q.Tol != nil {
					tols++
					want -= value(q.Name, "dB")
				}
			}
			if tols != k {
				t.Errorf("%d toleranced inputs, want %d", tols, k)
			}
			if got := value(sh.Focus, "dBm"); math.Abs(got-want) > 1e-9*math.Abs(want) {
				t.Errorf("%s = %.12g dBm, start less the losses is %.12g dBm", sh.Focus, got, want)
			}
		})
	}
}

func TestDeterministic(t *testing.T) {
	for _, c := range []struct {
		name string
		gen  func(int, uint64) ([]byte, error)
		n    int
	}{{"budget", gen.Budget, 5000}, {"sumchain", gen.SumChain, 500}} {
		a, errA := c.gen(c.n, 7)
		b, errB := c.gen(c.n, 7)
		other, errC := c.gen(c.n, 8)
		if errA != nil || errB != nil || errC != nil {
			t.Fatal(errA, errB, errC)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s: two runs with the same size and seed differ", c.name)
		}
		if bytes.Equal(a, other) {
			t.Errorf("%s: seeds 7 and 8 give the same sheet", c.name)
		}
	}
}

func TestSizeLimits(t *testing.T) {
	for _, n := range []int{-1, 0, gen.MinBudget - 1, gen.MaxBudget + 1} {
		if _, err := gen.Budget(n, 1); err == nil {
			t.Errorf("Budget(%d) gave no error", n)
		}
	}
	for _, k := range []int{0, gen.MaxSumChain + 1} {
		if _, err := gen.SumChain(k, 1); err == nil {
			t.Errorf("SumChain(%d) gave no error", k)
		}
	}
}

// TestEditsApply: each of Edits finds its text in sheets of several sizes (the first
// occurrence is the one changed: the first gateway's), so the benchmarks and watchtime that
// make them change one line of any sheet they generate.
func TestEditsApply(t *testing.T) {
	for _, n := range []int{300, 10_000} {
		src, err := gen.Budget(n, 1)
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range gen.Edits {
			if !strings.Contains(string(src), e.From) {
				t.Errorf("Budget(%d): no %q", n, e.From)
			}
		}
	}
}
