package engine_test

import (
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
)

const demo = "../worksheets/field-probe-uplink.toml"

func BenchmarkLoadDemo(b *testing.B) {
	for b.Loop() {
		if _, diags := engine.Load(demo, engine.Options{Library: lib}); diags.HasErrors() {
			b.Fatal(diags)
		}
	}
}

func BenchmarkEvalDemo(b *testing.B) {
	sh, diags := engine.Load(demo, engine.Options{Library: lib})
	if diags.HasErrors() {
		b.Fatal(diags)
	}
	for b.Loop() {
		sh.Eval()
	}
}

func BenchmarkMonteCarlo10k(b *testing.B) {
	sh, _ := engine.Load(demo, engine.Options{Library: lib})
	r, _ := sh.Eval()
	for b.Loop() {
		engine.Analyze(r, engine.AnalysisOptions{Trials: 10_000, Seed: 1})
	}
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
	files := map[string]string{"s.toml": sb.String()}
	for b.Loop() {
		if _, diags := loadFS(files, "s.toml"); diags.HasErrors() {
			b.Fatal(diags)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/n, "ns/formula")
}

// handMargin is the demo worksheet's link.margin in plain float64 Go, with each model written
// out from its published form; it is the baseline for BenchmarkEvalDemo.
func handMargin() float64 {
	db := func(x float64) float64 { return 10 * math.Log10(x) }
	lin := func(x float64) float64 { return math.Pow(10, x/10) }
	// mismatch loss: Γ = (VSWR−1)/(VSWR+1), L = −10·log10(1 − Γ²)
	gamma := (1.8 - 1) / (1.8 + 1)
	match := -db(1 - gamma*gamma)
	eirp := 14 - match - 0.3 + (-2)
	// log-distance: free space (ITU-R P.525) to d0, then 10·n·log10(d/d0)
	loss := fsplDB(100, 868e6) + 10*3.1*math.Log10(2400/100.0) + 6
	// non-coherent binary FSK: BER = ½·exp(−Eb/N0 / 2)  ⇒  Eb/N0 = −2·ln(2·BER)
	ebn0 := db(-2 * math.Log(2*1e-4))
	snr := ebn0 + db(9600/50e3) // SNR = Eb/N0 · Rb/B
	// Friis over the band filter, LNA and radio
	g1, g2 := lin(-1.5), lin(16)
	f := lin(1.5) + (lin(1.2)-1)/g1 + (lin(7)-1)/(g1*g2)
	floor := ktbDBm(50e3, 290) + db(f)
	level := eirp - loss + 5 - 0.22*12
	return level - (floor + snr)
}

func BenchmarkEvalHandWritten(b *testing.B) {
	var sink float64
	for b.Loop() {
		sink += handMargin()
	}
	_ = sink
}

// The hand-written baseline computes the same number as the worksheet.
func TestDemoMatchesHandWritten(t *testing.T) {
	sh := evalFile(t, demo)
	near(t, "link.margin", value(t, sh, "link.margin", "dB"), handMargin(), 1e-9)
}

// BenchmarkRerunDemo evaluates the demo again into the same result: the evaluator's own cost.
func BenchmarkRerunDemo(b *testing.B) {
	r := evalFile(b, demo)
	for b.Loop() {
		engine.Rerun(r)
	}
}

// BenchmarkLoadFile loads the sheet named by RFLEDGER_BENCH_SHEET (for profiling by hand).
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
