package analysis_test

import (
	"fmt"
	"math"
	"reflect"
	"runtime"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

func analyze(t *testing.T, src string, opt analysis.Options, set ...engine.Override) (*engine.Result, *analysis.Analysis) {
	t.Helper()
	sh := evalSrc(t, src, set...)
	a, diags := analysis.Analyze(sh, opt)
	if diags.HasErrors() {
		t.Fatalf("analyze:\n%v", diags)
	}
	return sh, a
}

func TestMonteCarloSingleNormal(t *testing.T) {
	src := `focus = "x"
x = { is = "10 dB", tol = "3 dB" }
[[require]]
that = "= x >= 9 dB"
`
	const n = 20000
	_, a := analyze(t, src, analysis.Options{Trials: n, Seed: 7})
	// SPEC §2: tol is the 3σ limit, so x ~ N(10, 1); P(x >= 9) from gonum's normal CDF.
	p := distuv.Normal{Mu: 10, Sigma: 1}.Survival(9)
	se := math.Sqrt(p * (1 - p) / n) // binomial standard error of a proportion
	if got := a.Tolerance.PPass; math.Abs(got-p) > 3*se {
		t.Errorf("p_pass = %.4f, want %.4f ± %.4f (3 standard errors)", got, p, 3*se)
	}
	// The 50 % point of N(10, 1) is 10; the sample median's standard error is
	// sqrt(π/2)·σ/sqrt(n) (asymptotic variance of the median).
	near(t, "p50", a.Tolerance.P50, 10, 3*math.Sqrt(math.Pi/2/n))
	// RSS of one normal input is its σ = tol/3 (SPEC §2), exact for a linear focus.
	near(t, "rss", a.Tolerance.RSSSigma, 1, 1e-9)
	if a.Tolerance.Failed != 0 || a.Tolerance.Trials != n {
		t.Errorf("failed %d trials %d", a.Tolerance.Failed, a.Tolerance.Trials)
	}
}

func TestZeroTolerance(t *testing.T) {
	for _, c := range []struct {
		bound string
		want  float64
	}{{"9 dB", 1}, {"11 dB", 0}} {
		src := fmt.Sprintf("focus = \"x\"\nx = { is = \"10 dB\", tol = \"0 dB\" }\n[[require]]\nthat = \"= x >= %s\"\n", c.bound)
		_, a := analyze(t, src, analysis.Options{Trials: 500, Seed: 1})
		tl := a.Tolerance
		if tl == nil {
			t.Fatalf("no tolerance analysis")
		}
		// A zero tolerance leaves the input at its nominal value in every trial (definition).
		if tl.PPass != c.want {
			t.Errorf("x >= %s: p_pass = %v, want exactly %v", c.bound, tl.PPass, c.want)
		}
		if tl.WorstLow != tl.Nominal || tl.WorstHigh != tl.Nominal || tl.Nominal != 10 {
			t.Errorf("worst low %v high %v nominal %v, want all 10", tl.WorstLow, tl.WorstHigh, tl.Nominal)
		}
		if tl.RSSSigma != 0 || tl.P01 != 10 || tl.P99 != 10 {
			t.Errorf("rss %v p01 %v p99 %v", tl.RSSSigma, tl.P01, tl.P99)
		}
	}
}

func TestSolveFSPL(t *testing.T) {
	src := `focus = "margin"
p = "20 dBm"
s = "-110 dBm"
f = "868 MHz"
d = "1 km"
margin = "= p - fspl(d, f) - s"

[[solve]]
name    = "range"
vary    = "d"
so_that = "margin"
equals  = "0 dB"
within  = ["10 m", "1000 km"]

[[solve]]
name    = "short"
vary    = "d"
so_that = "margin"
equals  = "0 dB"
within  = ["10 m", "1 km"]
`
	_, a := analyze(t, src, analysis.Options{Trials: 10})
	// Margin 0 dB means L = p − s = 130 dB; inverting ITU-R P.525 (L = 20·log10(4π·d·f/c)):
	// d = c/(4π·f)·10^(L/20).
	const c = 299792458.0
	want := c / (4 * math.Pi * 868e6) * math.Pow(10, 130.0/20) // metres
	r := a.Solves[0]
	if !r.Found || r.Unit != "km" {
		t.Fatalf("solve: %+v", r)
	}
	near(t, "range (km)", r.Value, want/1000, want/1000*1e-8)
	// Within 10 m … 1 km the margin never reaches 0 dB: no made-up number (SPEC §2).
	if r := a.Solves[1]; r.Found || r.Note != "no crossing in range" {
		t.Errorf("short solve: %+v", r)
	}
}

func TestSweepPointsMatchDirectEvaluation(t *testing.T) {
	sh := loadValid(t, "link.toml")
	a, diags := analysis.Analyze(sh, analysis.Options{Trials: 10})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	sw := a.Sweeps[0]
	if len(sw.X) != 21 || sw.Unit != "km" {
		t.Fatalf("sweep: %d points in %q", len(sw.X), sw.Unit)
	}
	// Log spacing from 200 m to 10 km (SPEC §2 scale = "log"), steps+1 points.
	near(t, "first x", sw.X[0], 0.2, 1e-12)
	near(t, "last x", sw.X[20], 10, 1e-9)
	near(t, "middle x", sw.X[10], math.Sqrt(0.2*10), 1e-9)
	for i, x := range sw.X {
		// The same sheet, loaded again with the input set to the point (--set), evaluated directly.
		direct := evalFile(t, "../testdata/valid/link.toml", engine.Override{Name: "path.distance", Value: fmt.Sprintf("%.17g km", x)})
		want := value(t, direct, "link.margin", "dB")
		near(t, fmt.Sprintf("sweep point %d (%g km)", i, x), sw.Series[0].Y[i], want, 1e-9)
	}
	// The margin falls through 20 dB (the requirement) inside the sweep; the crossing is where
	// the margin equals the bound.
	if len(sw.Crossings) != 1 {
		t.Fatalf("crossings: %+v", sw.Crossings)
	}
	cr := sw.Crossings[0]
	direct := evalFile(t, "../testdata/valid/link.toml", engine.Override{Name: "path.distance", Value: fmt.Sprintf("%.17g km", cr.X)})
	near(t, "margin at the crossing", value(t, direct, "link.margin", "dB"), 20, 1e-6)
}

func sensitivityOf(a *analysis.Analysis, input string) (analysis.Sensitivity, bool) {
	for _, s := range a.Sensitivity {
		if s.Input == input {
			return s, true
		}
	}
	return analysis.Sensitivity{}, false
}

func TestSensitivity(t *testing.T) {
	_, a := analyze(t, `focus = "m"
a = "10 dBm"
b = "3 dB"
c = "2 dB"
m = "= a + b - c"
`, analysis.Options{Trials: 10})
	// A sum of decibel terms moves exactly 1 dB per dB of each term, with the term's sign.
	for in, want := range map[string]float64{"a": 1, "b": 1, "c": -1} {
		s, ok := sensitivityOf(a, in)
		if !ok || s.Per != "1 dB" {
			t.Fatalf("%s: %+v", in, s)
		}
		near(t, "sensitivity to "+in, s.Change, want, 1e-12)
	}

	_, a = analyze(t, `focus = "loss"
d = "2 km"
f = "868 MHz"
loss = "= fspl(d, f)"
`, analysis.Options{Trials: 10})
	// ITU-R P.525: L grows by 20·log10(1.1) ≈ 0.828 dB when d (or f) grows by 10 %.
	for _, in := range []string{"d", "f"} {
		s, ok := sensitivityOf(a, in)
		if !ok || s.Per != "10 %" {
			t.Fatalf("%s: %+v", in, s)
		}
		near(t, "sensitivity to "+in, s.Change, 20*math.Log10(1.1), 1e-9)
	}
	if a.ChangeUnit != "dB" {
		t.Errorf("change unit %q", a.ChangeUnit)
	}
}

func TestWorstCaseAsymmetric(t *testing.T) {
	_, a := analyze(t, `focus = "m"
x = { is = "10 dB", tol = ["-0.5 dB", "+1.5 dB"] }
z = { is = "2 dB", tol = ["-0.25 dB", "+0.75 dB"] }
m = "= x - z"
`, analysis.Options{Trials: 100})
	// SPEC §5: the worst case sits at the corner of the tolerance box; x raises m, z lowers it.
	near(t, "worst low", a.Tolerance.WorstLow, (10-0.5)-(2+0.75), 1e-12)
	near(t, "worst high", a.Tolerance.WorstHigh, (10+1.5)-(2-0.25), 1e-12)
	near(t, "nominal", a.Tolerance.Nominal, 8, 1e-12)
}

func TestRSSAndShares(t *testing.T) {
	_, a := analyze(t, `focus = "m"
x = { is = "10 dB", tol = "3 dB" }
z = { is = "2 dB", tol = "6 dB" }
m = "= x + z"
`, analysis.Options{Trials: 20000, Seed: 3})
	tl := a.Tolerance
	// σ = tol/3 (SPEC §2): σx = 1, σz = 2; independent inputs add in quadrature.
	near(t, "rss", tl.RSSSigma, math.Sqrt(1*1+2*2), 1e-9)
	// Variance shares of a linear sum: σi²/Σσ² = 1/5 and 4/5 (definition), estimated from
	// 20000 trials.
	if len(tl.Shares) != 2 || tl.Shares[0].Input != "z" {
		t.Fatalf("shares: %+v", tl.Shares)
	}
	near(t, "share of z", tl.Shares[0].Share, 0.8, 0.02)
	near(t, "share of x", tl.Shares[1].Share, 0.2, 0.02)
	// The Monte Carlo spread agrees with the RSS: the 99 % point of N(12, √5).
	p99 := distuv.Normal{Mu: 12, Sigma: math.Sqrt(5)}.Quantile(0.99)
	near(t, "p99", tl.P99, p99, 0.1)
}

func TestTrialsDeterministic(t *testing.T) {
	path := "../worksheets/field-probe-uplink.toml"
	// One evaluation for every run: the tolerance names its requirements and quantities by
	// pointer, which DeepEqual follows to the same sheet.
	sh := evalFile(t, path)
	run := func(workers, procs int) *analysis.Tolerance {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		a, _ := analysis.Analyze(sh, analysis.Options{Trials: 3000, Seed: 42, Workers: workers})
		if a.Tolerance == nil {
			t.Fatal("no tolerance analysis")
		}
		return a.Tolerance
	}
	ref := run(1, 1)
	for _, c := range [][2]int{{4, 1}, {4, 2}, {1, 2}, {0, 2}} {
		if got := run(c[0], c[1]); !reflect.DeepEqual(got, ref) {
			t.Errorf("workers %d GOMAXPROCS %d: tolerance differs from workers 1 GOMAXPROCS 1", c[0], c[1])
		}
	}
}

func TestBudgetSumsToFocus(t *testing.T) {
	for _, path := range []string{"../testdata/valid/link.toml", "../worksheets/field-probe-uplink.toml"} {
		sh := evalFile(t, path)
		a, _ := analysis.Analyze(sh, analysis.Options{Trials: 10})
		if len(a.Budget) < 2 {
			t.Fatalf("%s: budget %+v", path, a.Budget)
		}
		total := 0.0
		for _, c := range a.Budget {
			total += c.Value
		}
		// The signed line items of a sum of decibel terms add up to the sum.
		f, _ := sh.Number(a.Focus)
		near(t, path+": budget total", total, f, 1e-9)
	}
	sh := loadValid(t, "link.toml")
	a, _ := analysis.Analyze(sh, analysis.Options{Trials: 10})
	items := map[string]float64{}
	for _, c := range a.Budget {
		items[c.Item] = c.Value
	}
	// margin = rx.level − rx.floor − snr_req, followed through eirp and loss (SPEC §5).
	for item, want := range map[string]float64{"tx.power": 14, "tx.cable": -0.4, "tx.antenna": 2.15, "path.clutter": -6, "rx.antenna": 3, "rx.snr_req": -8} {
		got, ok := items[item]
		if !ok {
			t.Errorf("budget has no item %q: %+v", item, a.Budget)
			continue
		}
		near(t, "budget item "+item, got, want, 1e-12)
	}
}

// TestSharesOfAFocusThatDoesNotMove: an input whose tolerance cannot move the focus (the
// noise figure of a filter followed by an LNA does not depend on the LNA's gain, Friis 1944)
// gets no share of a variance that is only rounding noise.
func TestSharesOfAFocusThatDoesNotMove(t *testing.T) {
	sh := evalSrc(t, `focus = "rx.nf"
[rx]
g  = { is = "18 dB", tol = "0.5 dB" }
nf = "= cascade_nf(chain)"
[[rx.chain]]
loss = "1 dB"
[[rx.chain]]
gain = "= g"
nf = "0.8 dB"
`)
	a, diags := analysis.Analyze(sh, analysis.Options{Trials: 2000, Seed: 1})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	for _, s := range a.Tolerance.Shares {
		if s.Share != 0 {
			t.Errorf("%s has a %.3g share of a focus that does not move", s.Input, s.Share)
		}
	}
	near(t, "rx.nf", value(t, sh, "rx.nf", "dB"), 1.8, 1e-12) // passive 1 dB (NF = loss at T0) + 0.8 dB, Friis 1944
}

// TestSensitivityOnManyInputs: with enough inputs that their recomputations are shared out
// among the cores, every input's effect is still the one ITU-R P.525-4 gives (free-space
// loss grows by 20·log10(1.1) dB for 10 % more distance, and a sum of 39 such losses by
// 39 times that for 10 % more frequency), in the same order, on one core and on two.
func TestSensitivityOnManyInputs(t *testing.T) {
	var src, sum strings.Builder
	src.WriteString("focus = \"m\"\nf = \"868 MHz\"\n")
	for i := 1; i <= 39; i++ {
		fmt.Fprintf(&src, "d%d = \"%d km\"\n", i, i)
		if i > 1 {
			sum.WriteString(" + ")
		}
		fmt.Fprintf(&sum, "fspl(d%d, f)", i)
	}
	fmt.Fprintf(&src, "m = \"= %s\"\n", sum.String())
	var runs [][]analysis.Sensitivity
	for _, procs := range []int{1, 2} {
		old := runtime.GOMAXPROCS(procs)
		_, a := analyze(t, src.String(), analysis.Options{Trials: 10})
		runtime.GOMAXPROCS(old)
		if len(a.Sensitivity) != 40 {
			t.Fatalf("GOMAXPROCS %d: %d inputs in the sensitivity, want 40", procs, len(a.Sensitivity))
		}
		step := 20 * math.Log10(1.1) // ITU-R P.525-4: L = 20 log10(4π d f / c)
		for i, s := range a.Sensitivity {
			want := step
			if s.Input == "f" {
				want = 39 * step
				if i != 0 {
					t.Errorf("GOMAXPROCS %d: f is at place %d, want first (largest effect)", procs, i)
				}
			}
			near(t, fmt.Sprintf("GOMAXPROCS %d: sensitivity to %s", procs, s.Input), s.Change, want, 1e-9)
		}
		runs = append(runs, a.Sensitivity)
	}
	if !slices.Equal(runs[0], runs[1]) {
		t.Errorf("one core and two give different sensitivities:\n%v\n%v", runs[0], runs[1])
	}
}
