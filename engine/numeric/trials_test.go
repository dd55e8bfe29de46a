package numeric

import (
	"math/rand/v2"
	"slices"
	"testing"
)

func runTrials(n, workers int, seed uint64) []float64 {
	out := make([]float64, n)
	scratch := make([][]float64, max(workers, 8))
	Trials(n, workers, seed, func(w, trial int, r *rand.Rand) {
		buf := scratch[w][:0]
		for range 5 {
			buf = append(buf, Draw(r, Triangular, 0, -1, 2))
		}
		scratch[w] = buf
		s := 0.0
		for _, v := range buf {
			s += v
		}
		out[trial] = s
	}, nil)
	return out
}

func TestTrialsDeterministic(t *testing.T) {
	const n = 5000
	one := runTrials(n, 1, 42)
	for _, w := range []int{2, 4, 7, 0} {
		if got := runTrials(n, w, 42); !slices.Equal(one, got) {
			t.Errorf("workers=%d differs from workers=1", w)
		}
	}
	if other := runTrials(n, 4, 43); slices.Equal(one, other) {
		t.Errorf("a different seed gave the same results")
	}
}

// TestTrialsStream: each trial sees the documented stream,
// rand.New(rand.NewPCG(seed, trial)).
func TestTrialsStream(t *testing.T) {
	const n, seed = 100, 7
	got := make([]uint64, n)
	Trials(n, 3, seed, func(_, trial int, r *rand.Rand) { got[trial] = r.Uint64() }, nil)
	for i := range n {
		if want := rand.New(rand.NewPCG(seed, uint64(i))).Uint64(); got[i] != want {
			t.Fatalf("trial %d: %d, want %d", i, got[i], want)
		}
	}
}

func TestTrialsProgress(t *testing.T) {
	for _, n := range []int{1, 7, 1000, 12345} {
		var calls []int
		Trials(n, 4, 1, func(int, int, *rand.Rand) {}, func(d int) { calls = append(calls, d) })
		if len(calls) == 0 || len(calls) > 21 {
			t.Errorf("n=%d: %d progress calls", n, len(calls))
		}
		if !slices.IsSorted(calls) || calls[len(calls)-1] != n {
			t.Errorf("n=%d: progress %v not increasing to n", n, calls)
		}
	}
	Trials(0, 4, 1, func(int, int, *rand.Rand) { t.Fatal("fn called for n=0") }, nil)
}

// BenchmarkTrials measures the runner overhead with a light trial
// (ten draws), as in a Monte Carlo link budget with ten uncertain inputs.
func BenchmarkTrials(b *testing.B) {
	const n = 10000
	out := make([]float64, n)
	b.ReportAllocs()
	for b.Loop() {
		Trials(n, 0, 1, func(_, trial int, r *rand.Rand) {
			s := 0.0
			for range 10 {
				s += Draw(r, Normal, 0, -3, 3)
			}
			out[trial] = s
		}, nil)
	}
}
