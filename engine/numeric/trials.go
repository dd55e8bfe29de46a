package numeric

import (
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"
)

// progressSteps is roughly how many times Trials reports progress.
const progressSteps = 20

// Trials runs fn for trial = 0..n-1 across workers goroutines and returns
// when all are done. Each trial gets a *rand.Rand whose stream is exactly
// that of rand.New(rand.NewPCG(seed, uint64(trial))), so the numbers a
// trial sees depend only on (seed, trial) and never on the worker count,
// scheduling or GOMAXPROCS. The generator is reseeded in place, so the
// *rand.Rand must not be kept after fn returns.
//
// fn receives the worker index (0..workers-1) so that it can use
// per-worker scratch state without locking; results should be stored by
// trial index. workers <= 0 means runtime.GOMAXPROCS(0). progress, if not
// nil, is called with the number of trials done, at most about 20 times,
// never concurrently, with increasing counts, the last call being n.
func Trials(n, workers int, seed uint64, fn func(worker, trial int, r *rand.Rand), progress func(done int)) {
	if n <= 0 {
		return
	}
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, n)

	step := max((n+progressSteps-1)/progressSteps, 1)
	chunk := min(max(n/(workers*32), 1), 256)

	// The counters are touched once per chunk, not per trial, and sit on cache lines of
	// their own: a counter bumped on every trial by every worker bounces its line between
	// the cores and costs more than a light trial.
	var c struct {
		_    [64]byte
		next atomic.Int64
		_    [56]byte
		done atomic.Int64
		_    [56]byte
	}
	var (
		mu       sync.Mutex
		reported int
	)
	report := func(d, k int) {
		// d trials are done, k of them just now: report when a multiple of step was passed.
		if progress == nil || (d/step == (d-k)/step && d != n) {
			return
		}
		mu.Lock()
		if d > reported {
			reported = d
			progress(d)
		}
		mu.Unlock()
	}

	work := func(worker int) {
		src := rand.NewPCG(0, 0)
		r := rand.New(src)
		for {
			start := int(c.next.Add(int64(chunk))) - chunk
			if start >= n {
				return
			}
			end := min(start+chunk, n)
			for t := start; t < end; t++ {
				src.Seed(seed, uint64(t))
				fn(worker, t, r)
			}
			if progress != nil {
				report(int(c.done.Add(int64(end-start))), end-start)
			}
		}
	}

	if workers == 1 {
		work(0)
		return
	}
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() { work(w) })
	}
	wg.Wait()
}
