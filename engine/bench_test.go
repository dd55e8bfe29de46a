package engine_test

import (
	"flag"
	"fmt"
	"os"
	"runtime"
	"strings"
	"testing"
	"time"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/gen"
	"github.com/rfledger/rfledger/internal/sheettest"
)

const demo = "../worksheets/field-probe-uplink.toml"

// benchSizes can widen the slow benchmarks: -bench-sizes=5000 runs the 5,000-input sum chain
// without naming it in -bench.
var benchSizes = flag.String("bench-sizes", "", "extra sizes for the slow benchmarks, comma-separated")

// sheetOps is what the benchmarks time, for one worksheet text.
type sheetOps struct {
	load    func()                    // read, check and compile afresh
	eval    func()                    // evaluate the loaded sheet
	analyze func(trials, workers int) // every analysis of the evaluated sheet
}

// opsFor is the only function in this file that calls the engine's API, so that a change of
// API is adapted in one place. It loads src once (failing on any error) for eval and analyze.
func opsFor(tb testing.TB, src string) sheetOps {
	tb.Helper()
	files := map[string]string{"sheet.toml": src}
	load := func() *engine.Sheet {
		sh, diags := loadFS(files, "sheet.toml")
		if diags.HasErrors() {
			tb.Fatal(diags)
		}
		return sh
	}
	sh := load()
	r, diags := sh.Eval()
	if diags.HasErrors() {
		tb.Fatal(diags)
	}
	return sheetOps{
		load: func() { load() },
		// The evaluator's cost: the sheet evaluated again into the same result (a fresh
		// result's storage is a few allocations proportional to the sheet, made once).
		eval: func() { engine.Rerun(r) },
		analyze: func(trials, workers int) {
			if _, diags := analysis.Analyze(r, analysis.Options{Trials: trials, Seed: 1, Workers: workers}); diags.HasErrors() {
				tb.Fatal(diags)
			}
		},
	}
}

func readDemo(tb testing.TB) string {
	b, err := os.ReadFile(demo)
	if err != nil {
		tb.Fatal(err)
	}
	return string(b)
}

func BenchmarkLoadDemo(b *testing.B) {
	ops := opsFor(b, readDemo(b))
	for b.Loop() {
		ops.load()
	}
}

// BenchmarkEvalDemo times the engine's evaluation of the demo and, interleaved with it in
// blocks (so both see the same machine load), the hand-written Go that computes every
// quantity of it over the same rfmath models (handwritten_test.go): x-handwritten is the
// ratio of the two. Most of the baseline's time is rfmath.EbN0For's bisection, which the
// engine runs too; so the closed-form margin alone (the earlier, margin-only baseline) is
// timed the same way, as x-margin-closedform.
func BenchmarkEvalDemo(b *testing.B) {
	const block = 64
	ops := opsFor(b, readDemo(b))
	in := demoIn()
	var v demoValues
	var sink float64
	var hand, closed time.Duration
	blocks, i := 0, 0
	baselines := func() {
		b.StopTimer()
		start := time.Now()
		for range block {
			handDemo(&in, &v)
		}
		mid := time.Now()
		for range block {
			sink += closedFormMargin()
		}
		hand, closed = hand+mid.Sub(start), closed+time.Since(mid)
		blocks++
		b.StartTimer()
	}
	for b.Loop() {
		ops.eval()
		if i++; i%block == 0 {
			baselines()
		}
	}
	if blocks == 0 {
		baselines()
	}
	if sink == 0 {
		b.Fatal("closed-form margin is zero")
	}
	engineNs := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
	handNs := float64(hand.Nanoseconds()) / float64(blocks*block)
	closedNs := float64(closed.Nanoseconds()) / float64(blocks*block)
	b.ReportMetric(engineNs/handNs, "x-handwritten")
	b.ReportMetric(handNs, "handwritten-ns/op")
	b.ReportMetric(engineNs/closedNs, "x-margin-closedform")
}

// BenchmarkMonteCarloDemo runs the demo's analyses (10,000 Monte Carlo trials, with the
// sensitivity, worst case, sweep and solve, which take a few per cent of the time) with
// GOMAXPROCS 1 and then 2: one op is both runs. speed-up is the 1-core time over the 2-core
// time; allocs/trial counts every allocation of both runs over their 20,000 trials, and
// allocs/extra-trial what one more trial allocates (the setup left out).
func BenchmarkMonteCarloDemo(b *testing.B) {
	const trials = 10_000
	ops := opsFor(b, readDemo(b))
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	var t1, t2 time.Duration
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	for b.Loop() {
		for _, procs := range []int{1, 2} {
			runtime.GOMAXPROCS(procs)
			start := time.Now()
			ops.analyze(trials, 0)
			if procs == 1 {
				t1 += time.Since(start)
			} else {
				t2 += time.Since(start)
			}
		}
	}
	runtime.ReadMemStats(&after)
	n := float64(b.N)
	b.ReportMetric(t1.Seconds()*1e3/n, "ms-1cpu")
	b.ReportMetric(t2.Seconds()*1e3/n, "ms-2cpu")
	b.ReportMetric(float64(t1)/float64(t2), "speed-up")
	b.ReportMetric(float64(after.Mallocs-before.Mallocs)/(2*trials*n), "allocs/trial")
	// What a trial itself allocates, without the setup: the allocations of a run of twice the
	// trials less those of a run of trials, per extra trial (on two cores).
	b.StopTimer()
	runtime.GOMAXPROCS(2)
	mallocs := func(k int) uint64 {
		var m0, m1 runtime.MemStats
		runtime.ReadMemStats(&m0)
		ops.analyze(k, 0)
		runtime.ReadMemStats(&m1)
		return m1.Mallocs - m0.Mallocs
	}
	one, two := mallocs(trials), mallocs(2*trials)
	b.ReportMetric((float64(two)-float64(one))/trials, "allocs/extra-trial")
}

// BenchmarkLoad loads generated farm-network sheets (internal/gen) of 1k, 10k and 100k
// quantities.
func BenchmarkLoad(b *testing.B) {
	for _, n := range []int{1_000, 10_000, 100_000} {
		src, err := gen.Budget(n, 1)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			ops := opsFor(b, string(src))
			for b.Loop() {
				ops.load()
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/quantity")
		})
	}
}

// BenchmarkSensitivityTolerance runs the analyses (sensitivity, worst case, RSS and 10,000
// Monte Carlo trials) on a feeder of K toleranced sections summed in a chain; -bench-sizes
// adds sizes.
func BenchmarkSensitivityTolerance(b *testing.B) {
	sizes := []int{1_000, 2_000, 5_000}
	for _, s := range strings.Split(*benchSizes, ",") {
		var k int
		if _, err := fmt.Sscan(s, &k); err == nil && k > 0 {
			sizes = append(sizes, k)
		}
	}
	if named := flag.Lookup("test.bench"); named != nil && strings.Contains(named.Value.String(), "5000") {
		sizes = append(sizes, 5_000)
	}
	for _, k := range dedupe(sizes) {
		src, err := gen.SumChain(k, 1)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprint(k), func(b *testing.B) {
			ops := opsFor(b, string(src))
			for b.Loop() {
				ops.analyze(10_000, 0)
			}
		})
	}
}

func dedupe(xs []int) []int {
	var out []int
	seen := map[int]bool{}
	for _, x := range xs {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}

func BenchmarkCompileFormula(b *testing.B) {
	// 100 quantities whose formula is a full link-budget line; Load compiles each once.
	// ns/formula is the load time divided by 100 (it includes the sheet's fixed cost, shared).
	const n = 100
	var sb strings.Builder
	sb.WriteString("p = \"14 dBm\"\ng = \"2 dBi\"\nd = \"2.4 km\"\nf = \"868 MHz\"\nbw = \"50 kHz\"\n")
	for i := range n {
		fmt.Fprintf(&sb, "m%d = \"= p + g - fspl(d, f) + 5 dBi - 0.22 dB/m * 12 m - (thermal(bw) + 3 dB) - 8 dB\"\n", i)
	}
	ops := opsFor(b, sb.String())
	for b.Loop() {
		ops.load()
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/n, "ns/formula")
}

// BenchmarkEvalDemoFresh evaluates the demo into a new result each time (Eval as a program
// calls it), for comparison with BenchmarkEvalDemo.
func BenchmarkEvalDemoFresh(b *testing.B) {
	sh, diags := engine.Load(demo, engine.Options{Library: lib})
	if diags.HasErrors() {
		b.Fatal(diags)
	}
	for b.Loop() {
		sh.Eval()
	}
}

// BenchmarkLoadFile loads and evaluates the sheet named by RFLEDGER_BENCH_SHEET (for
// profiling a sheet of one's own).
func BenchmarkLoadFile(b *testing.B) {
	path := os.Getenv("RFLEDGER_BENCH_SHEET")
	if path == "" {
		b.Skip("RFLEDGER_BENCH_SHEET not set")
	}
	for b.Loop() {
		sh, _ := engine.Load(path, engine.Options{Library: lib})
		sh.Eval()
	}
}

// BenchmarkReloadEdit is the engine's part of a save in watch or a keystroke in an editor on
// the generated 10,000-quantity sheet (internal/gen): Load with the previous load as
// Options.Previous, then EvalFrom the previous result. Each op alternates between two
// versions that differ in one input's value (input) or in one formula (formula).
func BenchmarkReloadEdit(b *testing.B) {
	src, err := gen.Budget(10_000, 1)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range gen.Edits {
		b.Run(c.Name, func(b *testing.B) {
			edited := strings.Replace(string(src), c.From, c.To, 1)
			if edited == string(src) {
				b.Fatalf("the generated sheet has no %q", c.From)
			}
			versions := []string{string(src), edited}
			sh, diags := sheetFromFiles(map[string]string{"s.toml": versions[0]}, nil)
			if diags.HasErrors() {
				b.Fatal(diags)
			}
			r, _ := sh.Eval()
			i := 1
			cpu := sheettest.CPUTime()
			for b.Loop() {
				next, diags := sheetFromFiles(map[string]string{"s.toml": versions[i%2]}, r.Sheet())
				if diags.HasErrors() {
					b.Fatal(diags)
				}
				r, _ = next.EvalFrom(r)
				i++
			}
			sheettest.ReportCPU(b, cpu)
		})
	}
}
