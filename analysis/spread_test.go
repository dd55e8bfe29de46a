package analysis_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// spreadSheet has one uniform input x on [0 dB, 6 dB] (3 dB ± 3 dB) and three bounds on it:
// x >= 1 dB holds with probability 5/6 and fails at its worst corner (0 dB); x <= 5 dB
// holds with probability 5/6 and fails at 6 dB; y >= -10 dB always holds.
const spreadSheet = `
focus = "x"
x = { is = "3 dB", tol = "3 dB", dist = "uniform" }
y = "= x - 2 dB"

[[require]]
that = "= x >= 1 dB"

[[require]]
that = "= x <= 5 dB"

[[require]]
that = "= y >= -10 dB"
`

// TestRequireSpread checks each requirement's worst case in its failing direction and its
// Monte Carlo chance against the exact probabilities of a uniform input: P(x ≥ 1) = 5/6,
// P(x ≤ 5) = 5/6, P(both) = 4/6 (the uniform distribution's CDF, (x−a)/(b−a)), each within
// 4 standard errors; the standard error itself, sqrt(p(1−p)/n) for a binomial proportion
// (Wackerly, Mendenhall and Scheaffer, Mathematical Statistics with Applications, 7th ed.;
// recalled from memory), is checked against gonum's binomial distribution, whose standard
// deviation over n is that formula.
func TestRequireSpread(t *testing.T) {
	r := evalSrc(t, spreadSheet)
	a, diags := analysis.Analyze(r, analysis.Options{Trials: 20_000, Seed: 3})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	tol := a.Tolerance
	if tol == nil || len(tol.Requires) != 3 {
		t.Fatalf("tolerance = %+v, want three requirement spreads", tol)
	}
	want := []struct {
		worst      float64
		worstHolds bool
		p          float64
	}{{0, false, 5.0 / 6}, {6, false, 5.0 / 6}, {-2, true, 1}}
	n := tol.Trials
	for i, w := range want {
		rs := tol.Requires[i]
		near(t, rs.Require.That+" worst", rs.Worst, w.worst, 1e-9)
		if rs.WorstHolds != w.worstHolds {
			t.Errorf("%s: holds at worst = %v, want %v", rs.Require.That, rs.WorstHolds, w.worstHolds)
		}
		se := math.Sqrt(w.p * (1 - w.p) / float64(n))
		if math.Abs(rs.Chance-w.p) > 4*se+1e-12 {
			t.Errorf("%s: chance %.4f, want %.4f ± %.4f", rs.Require.That, rs.Chance, w.p, 4*se)
		}
		b := distuv.Binomial{N: float64(n), P: rs.Chance}
		near(t, rs.Require.That+" standard error", rs.ChanceSE, b.StdDev()/float64(n), 1e-12)
	}
	if se := math.Sqrt(4.0 / 6 * 2.0 / 6 / float64(n)); math.Abs(tol.PPass-4.0/6) > 4*se {
		t.Errorf("p_pass %.4f, want %.4f ± %.4f", tol.PPass, 4.0/6, 4*se)
	}
	near(t, "p_pass standard error", tol.PPassSE, distuv.Binomial{N: float64(n), P: tol.PPass}.StdDev()/float64(n), 1e-12)
	if !analysis.AtRisk(r, a) {
		t.Errorf("passes at nominal and holds in %.1f %% of trials: want at risk (below %.0f %%)", 100*tol.PPass, 100*analysis.AtRiskBelow)
	}
}

// TestAtRisk: a sheet that holds in almost every trial, one that fails at nominal, and one
// without requirements are not at risk.
func TestAtRisk(t *testing.T) {
	for _, c := range []struct {
		name, src string
	}{
		{"holds nearly always", "focus = \"x\"\nx = { is = \"3 dB\", tol = \"3 dB\", dist = \"uniform\" }\n[[require]]\nthat = \"= x >= 0.1 dB\"\n"},
		{"fails at nominal", "focus = \"x\"\nx = { is = \"3 dB\", tol = \"3 dB\", dist = \"uniform\" }\n[[require]]\nthat = \"= x >= 4 dB\"\n"},
		{"no requirements", "focus = \"x\"\nx = { is = \"3 dB\", tol = \"3 dB\", dist = \"uniform\" }\n"},
	} {
		r := evalSrc(t, c.src)
		a, _ := analysis.Analyze(r, analysis.Options{Trials: 2000, Seed: 1})
		if analysis.AtRisk(r, a) {
			t.Errorf("%s: at risk, p_pass %.3f", c.name, a.Tolerance.PPass)
		}
	}
}

// logDist is the log-distance path loss at 868 MHz with d0 = 100 m and n = 3: free space
// (ITU-R P.525-4) out to d0, then 10·n·log10(d/d0) (Rappaport, log-distance path loss).
func logDist(d float64) float64 { return fsplDB(100, 868e6) + 30*math.Log10(d/100) }

// distanceFor inverts logDist: the distance at which the loss is l dB.
func distanceFor(l float64) float64 { return 100 * math.Pow(10, (l-fsplDB(100, 868e6))/30) }

// TestWarningsAtEveryPoint: in testdata/valid/below_reference.toml logdist warns below its
// reference distance d0 = 100 m (the model is anchored there). The nominal (110 m) raises no
// warning, but the Monte Carlo trials below 100 m (d uniform on 88–132 m, so a share of
// 12/44), the sweep points below 100 m (50, 60, 70, 80, 90 m: the first five of eleven), the
// solve whose answer is below 100 m and the requirement's worst case do; each comes back
// counted, as a diagnostic at the quantity.
func TestWarningsAtEveryPoint(t *testing.T) {
	r := loadValid(t, "below_reference.toml")
	const trials = 20_000
	a, diags := analysis.Analyze(r, analysis.Options{Trials: trials, Seed: 5})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	tw := a.Tolerance.Warnings
	if len(tw) != 1 || tw[0].Quantity.Name != "loss" {
		t.Fatalf("trial warnings = %+v, want one on loss", tw)
	}
	p := 12.0 / 44
	if got, se := float64(tw[0].Points)/trials, math.Sqrt(p*(1-p)/trials); math.Abs(got-p) > 4*se {
		t.Errorf("warned in %d of %d trials (%.4f), want %.4f ± %.4f", tw[0].Points, trials, got, p, 4*se)
	}
	sw := a.Sweeps[0].Warnings
	if len(sw) != 1 || sw[0].Points != 5 || sw[0].First != 0 || sw[0].Last != 4 {
		t.Errorf("sweep warnings = %+v, want 5 points, the first five", sw)
	}
	near, far := a.Solves[0], a.Solves[1]
	sheettest.Near(t, "near answer (m)", near.Value, distanceFor(70), 1e-6)
	sheettest.Near(t, "far answer (m)", far.Value, distanceFor(90), 1e-6)
	if len(near.Warnings) != 1 || !strings.Contains(near.Warnings[0], "shorter than the reference distance") || len(far.Warnings) != 0 {
		t.Errorf("solve warnings: near (%.4g m) %q, far (%.4g m) %q; want one at the near answer only", near.Value, near.Warnings, far.Value, far.Warnings)
	}
	var msgs []string
	for _, d := range diags {
		if d.Severity == engine.Warning && d.Quantity == "loss" {
			msgs = append(msgs, d.Summary)
		}
	}
	// The requirement loss >= 70 dB has its worst case at 88 m, below d0; it holds where
	// d >= 91.07 m, a share of (132 − 91.07)/44 of the uniform distance.
	rs := a.Tolerance.Requires[0]
	sheettest.Near(t, "worst case of loss >= 70 dB", rs.Worst, logDist(88), 1e-9)
	if p, se := (132-distanceFor(70))/44, rs.ChanceSE; math.Abs(rs.Chance-p) > 4*se || len(rs.Warnings) != 1 {
		t.Errorf("loss >= 70 dB: chance %.4f, want %.4f ± %.4f; warnings at its worst case %+v, want one", rs.Chance, p, 4*se, rs.Warnings)
	}
	wantIn := []string{
		"at the worst case of the requirement loss >= 70 dB (loss = 69.55 dB)",
		" of 20,000 Monte Carlo trials (figures from trial ",
		"at 5 of 11 points of the sweep of d, from d = 50 m to 90 m",
		"at the answer of solve near (d = 91.07 m)",
	}
	if len(msgs) != len(wantIn) {
		t.Fatalf("warnings on loss: %q, want %d", msgs, len(wantIn))
	}
	for i, w := range wantIn {
		if !strings.Contains(msgs[i], w) {
			t.Errorf("warning %d = %q, want it to contain %q", i, msgs[i], w)
		}
	}
}

// TestTrialWarningsDoNotDependOnWorkers: the counts and the message (the first trial's)
// are the same with one worker and with four.
func TestTrialWarningsDoNotDependOnWorkers(t *testing.T) {
	r := loadValid(t, "below_reference.toml")
	var got []engine.Tally
	for _, w := range []int{1, 4} {
		a, _ := analysis.Analyze(r, analysis.Options{Trials: 3000, Seed: 9, Workers: w})
		got = append(got, a.Tolerance.Warnings...)
	}
	if len(got) != 2 || got[0].Points != got[1].Points || got[0].First != got[1].First || got[0].Message != got[1].Message {
		t.Errorf("1 worker vs 4: %+v", got)
	}
}

func TestCount(t *testing.T) {
	for n, want := range map[int]string{0: "0", 999: "999", 1000: "1,000", 10000: "10,000", 1234567: "1,234,567", -4500: "-4,500"} {
		if got := analysis.Count(n); got != want {
			t.Errorf("Count(%d) = %q, want %q", n, got, want)
		}
	}
}

// TestFocusCornerWarnings: without a requirement, the focus's own worst cases are checked:
// the low one of the loss sits at 88 m, below logdist's d0 = 100 m, and says so once; the
// high one (132 m) is inside the model's range.
func TestFocusCornerWarnings(t *testing.T) {
	r := evalSrc(t, `focus = "loss"
d    = { is = "110 m", tol = "20 %", dist = "uniform" }
loss = "= logdist(d, 868 MHz, 100 m, 3)"
`)
	a, diags := analysis.Analyze(r, analysis.Options{Trials: 100, Seed: 1})
	if len(a.Tolerance.LowWarnings) != 1 || len(a.Tolerance.HighWarnings) != 0 {
		t.Errorf("corner warnings low %+v, high %+v; want one at the low corner only", a.Tolerance.LowWarnings, a.Tolerance.HighWarnings)
	}
	n := 0
	for _, d := range diags {
		if strings.HasPrefix(d.Summary, "at the worst case") {
			n++
			want := fmt.Sprintf("at the worst case low of loss (%.2f dB): logdist: distance 88 m is shorter", logDist(88))
			if !strings.HasPrefix(d.Summary, want) {
				t.Errorf("corner warning %q, want it to start %q", d.Summary, want)
			}
		}
	}
	if n != 1 {
		t.Errorf("%d corner warnings in %v, want 1", n, diags)
	}
}
