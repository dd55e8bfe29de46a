package analysis_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/gen"
)

// analyzeBoth runs the analyses once with the affine forms and once recomputing every cone.
func analyzeBoth(t *testing.T, r *engine.Result, opt analysis.Options) (lin, per *analysis.Analysis) {
	t.Helper()
	lin, diags := analysis.Analyze(r, opt)
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	restore := analysis.PerturbOnly()
	per, diags = analysis.Analyze(r, opt)
	restore()
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	return lin, per
}

// sameAnalysis checks that two analyses agree to within rounding (rel relative to the
// focus's size).
func sameAnalysis(t *testing.T, lin, per *analysis.Analysis, abs float64) {
	t.Helper()
	changes := map[string]float64{}
	for _, s := range per.Sensitivity {
		changes[s.Input] = s.Change
	}
	if len(lin.Sensitivity) != len(per.Sensitivity) {
		t.Fatalf("%d sensitivities, perturbation gives %d", len(lin.Sensitivity), len(per.Sensitivity))
	}
	for _, s := range lin.Sensitivity {
		near(t, "sensitivity to "+s.Input, s.Change, changes[s.Input], abs)
	}
	a, b := lin.Tolerance, per.Tolerance
	if a == nil || b == nil {
		t.Fatalf("tolerance: %v, perturbation %v", a, b)
	}
	near(t, "worst low", a.WorstLow, b.WorstLow, abs)
	near(t, "worst high", a.WorstHigh, b.WorstHigh, abs)
	near(t, "RSS σ", a.RSSSigma, b.RSSSigma, abs)
	near(t, "P01", a.P01, b.P01, abs)
	near(t, "P50", a.P50, b.P50, abs)
	near(t, "P99", a.P99, b.P99, abs)
	if len(a.Warnings) != len(b.Warnings) {
		t.Errorf("%d warnings tallied in the trials, perturbation %d", len(a.Warnings), len(b.Warnings))
	}
	if a.PPass != b.PPass || a.Failed != b.Failed || len(a.Samples) != len(b.Samples) {
		t.Errorf("P(pass) %v, failed %d, %d samples; perturbation %v, %d, %d", a.PPass, a.Failed, len(a.Samples), b.PPass, b.Failed, len(b.Samples))
	}
	for i := range min(len(a.Samples), len(b.Samples)) {
		if math.Abs(a.Samples[i]-b.Samples[i]) > abs {
			t.Fatalf("sample %d: %v, perturbation %v", i, a.Samples[i], b.Samples[i])
		}
	}
	if len(a.Requires) != len(b.Requires) {
		t.Fatalf("%d requirement spreads, perturbation %d", len(a.Requires), len(b.Requires))
	}
	for i := range a.Requires {
		ra, rb := a.Requires[i], b.Requires[i]
		near(t, "worst case of "+ra.Require.That, ra.Worst, rb.Worst, abs)
		if ra.WorstHolds != rb.WorstHolds || ra.Holds != rb.Holds {
			t.Errorf("%s: worst holds %v, %d trials hold; perturbation %v, %d", ra.Require.That, ra.WorstHolds, ra.Holds, rb.WorstHolds, rb.Holds)
		}
	}
	// The variance shares differ by design: the affine form gives them exactly, the
	// recomputation estimates them from the draws; the tests check the exact ones.
	if len(a.Shares) != len(b.Shares) {
		t.Errorf("%d shares, perturbation %d", len(a.Shares), len(b.Shares))
	}
}

// exactShares checks each input's share of the variance against want (by input name): for
// a focus affine in independent inputs, Var(Σ aᵢXᵢ) = Σ aᵢ²σᵢ² (Bienaymé's formula, any
// probability text), so input i's share is aᵢ²σᵢ² over that sum.
func exactShares(t *testing.T, got []analysis.Share, want map[string]float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%d shares, want %d", len(got), len(want))
	}
	total := 0.0
	for _, w := range want {
		total += w
	}
	for _, s := range got {
		near(t, "share of "+s.Input, s.Share, want[s.Input]/total, 1e-9)
	}
}

// TestLinearSumChain: along a feeder of cascaded sections the far-end level is the start
// level less the sum of the section losses in dB (losses of cascaded matched sections add
// in decibels: the definition of the decibel, IEC 60027-3), so a 1 dB rise of any loss
// lowers the focus by exactly 1 dB; the arithmetic worst case is the nominal ∓ the sum of
// the tolerances; and with the tolerance limits taken as 3σ of independent normal spreads
// (common practice, no source) the RSS σ is √(Σ (tolᵢ/3)²). The figures from the affine form
// (one backward pass) must equal those from recomputing each input's cone.
func TestLinearSumChain(t *testing.T) {
	const k = 200 // above the threshold, so the affine form is used
	if k < analysis.LinearThreshold {
		t.Fatal("the sheet is too small to use the affine form")
	}
	src, err := gen.SumChain(k, 3)
	if err != nil {
		t.Fatal(err)
	}
	r := evalSrc(t, string(src))
	lin, per := analyzeBoth(t, r, analysis.Options{Trials: 3000, Seed: 5})
	sameAnalysis(t, lin, per, 1e-9)

	var tolSum, varSum float64
	parts := map[string]float64{} // each input's aᵢ²σᵢ²
	s := r.Sheet()
	for i := 1; i <= k; i++ {
		q, _ := s.Quantity(fmt.Sprintf("feeder.loss%03d", i))
		if q == nil {
			q, _ = s.Quantity(fmt.Sprintf("feeder.loss%02d", i))
		}
		if q == nil || q.Tol == nil {
			t.Fatalf("section %d has no toleranced loss", i)
		}
		v, _ := r.Value(q)
		lo, hi, err := q.Tol.Limits(v)
		if err != nil {
			t.Fatal(err)
		}
		tolSum += (hi.V - lo.V) / 2
		varSum += math.Pow((hi.V-lo.V)/6, 2)
		parts[q.Name] = math.Pow((hi.V-lo.V)/6, 2) // a coefficient of ±1
	}
	for _, x := range lin.Sensitivity {
		if strings.Contains(x.Input, "loss") {
			near(t, "sensitivity to "+x.Input, x.Change, -1, 1e-9)
		} else {
			near(t, "sensitivity to "+x.Input, x.Change, 1, 1e-9) // the start level
		}
	}
	tol := lin.Tolerance
	near(t, "worst low", tol.WorstLow, tol.Nominal-tolSum, 1e-9)
	near(t, "worst high", tol.WorstHigh, tol.Nominal+tolSum, 1e-9)
	near(t, "RSS σ", tol.RSSSigma, math.Sqrt(varSum), 1e-9)
	exactShares(t, tol.Shares, parts)
}

// TestLinearScaledAndRequired: products and quotients by quantities the tolerances do not
// move, a requirement on the focus and one on an input; sensitivity falls back to
// recomputing (the gain input multiplies a toleranced sum), the tolerance analyses use the
// affine form, and both agree with recomputing everything. The focus is 3·Σxᵢ/2 − y, so a
// +10 % step of xᵢ = 1 changes it by 0.15 (plain algebra).
func TestLinearScaledAndRequired(t *testing.T) {
	var b strings.Builder
	b.WriteString("focus = \"s.m\"\n[s]\ng = \"3\"\nh = \"2\"\ny = { is = \"0.5\", tol = \"0.1\" }\n")
	var terms []string
	n := analysis.LinearThreshold + 6
	for i := range n {
		fmt.Fprintf(&b, "x%02d = { is = \"1\", tol = \"0.%d\", dist = \"%s\" }\n", i, 1+i%5, []string{"normal", "uniform", "triangular"}[i%3])
		terms = append(terms, fmt.Sprintf("x%02d", i))
	}
	fmt.Fprintf(&b, "sum = \"= %s\"\nm = \"= -(y - sum * g / h)\"\n", strings.Join(terms, " + "))
	b.WriteString("[[require]]\nthat = \"= s.m >= 100\"\n[[require]]\nthat = \"= s.y <= 0.55\"\n")
	r := evalSrc(t, b.String())
	lin, per := analyzeBoth(t, r, analysis.Options{Trials: 4000, Seed: 9})
	sameAnalysis(t, lin, per, 1e-9)
	for _, x := range lin.Sensitivity {
		if strings.HasPrefix(x.Input, "s.x") {
			near(t, "sensitivity to "+x.Input, x.Change, 0.15, 1e-9)
		}
	}
	// The shares: ∂m/∂xᵢ = 1.5 and ∂m/∂y = −1; a tolerance ±a read as 3σ of a normal spread
	// (common practice, no source), as a uniform spread of standard deviation a/√3, and as a
	// symmetric triangular one of a/√6 (the textbook variances of those distributions).
	parts := map[string]float64{"s.y": math.Pow(0.1/3, 2)}
	for i := range n {
		a := float64(1+i%5) / 10
		sigma := []float64{a / 3, a / math.Sqrt(3), a / math.Sqrt(6)}[i%3]
		parts[fmt.Sprintf("s.x%02d", i)] = math.Pow(1.5*sigma, 2)
	}
	exactShares(t, lin.Tolerance.Shares, parts)
	if p := lin.Tolerance.PPass; p <= 0 || p >= 1 {
		t.Errorf("P(pass) = %v, want strictly between 0 and 1 for these requirements", p)
	}
}

// TestLinearForms: the affine form's coefficients are the partial derivatives (plain
// algebra): m = −(y − Σxᵢ·g/h) has ∂m/∂xᵢ = g/h = 1.5 and ∂m/∂y = −1 while g and h are held;
// with g varying too the sum times g is not affine, and neither is a decibel conversion.
func TestLinearForms(t *testing.T) {
	r := evalSrc(t, `focus = "s.m"
[s]
g = "3"
h = "2"
y = "0.5"
x1 = "1"
x2 = "2"
m = "= -(y - (x1 + x2) * g / h)"
w = "2 W"
z = "1 dB"
p = "= dbw(w) + z"
`)
	s := r.Sheet()
	q := func(name string) *engine.Quantity {
		v, ok := s.Quantity("s." + name)
		if !ok {
			t.Fatalf("no s.%s", name)
		}
		return v
	}
	l, ok := r.Linear([]*engine.Quantity{q("x1"), q("x2"), q("y")}, []*engine.Quantity{q("m")}, true)
	if !ok {
		t.Fatal("m is affine in x1, x2, y")
	}
	for i, want := range []float64{1.5, 1.5, -1} {
		near(t, fmt.Sprintf("coefficient %d", i), l.Coef(0, i), want, 1e-15)
	}
	if v, ok := l.At(0, 2, 1.5); !ok {
		t.Error("At failed")
	} else {
		near(t, "m with y = 1.5", v, -(1.5 - 3*3/2.0), 1e-12)
	}
	if _, ok := r.Linear([]*engine.Quantity{q("x1"), q("g")}, []*engine.Quantity{q("m")}, false); ok {
		t.Error("(x1 + x2)·g is not affine in x1 and g together")
	}
	if _, ok := r.Linear([]*engine.Quantity{q("w")}, []*engine.Quantity{q("p")}, false); ok {
		t.Error("dbw(w) is not affine in w")
	}
	if l, ok := r.Linear([]*engine.Quantity{q("z")}, []*engine.Quantity{q("p")}, false); !ok || l.Coef(0, 0) != 1 {
		t.Error("dbw(w) + z is affine in z with coefficient 1")
	}
	// For trials a function anywhere the inputs reach rules the affine form out: recomputing
	// would count its validity warnings at each point.
	if _, ok := r.Linear([]*engine.Quantity{q("z")}, []*engine.Quantity{q("p")}, true); ok {
		t.Error("p calls dbw: no affine form for trials")
	}
}

// TestSharesAnyWorkers: the variance shares of a sheet with enough inputs to split their
// sums among workers are the same, bit for bit, on one worker and on three (the page must
// not depend on the number of cores).
func TestSharesAnyWorkers(t *testing.T) {
	src, err := gen.SumChain(600, 2)
	if err != nil {
		t.Fatal(err)
	}
	r := evalSrc(t, string(src))
	var got [][]analysis.Share
	for _, w := range []int{1, 3} {
		a, diags := analysis.Analyze(r, analysis.Options{Trials: 500, Seed: 4, Workers: w})
		if diags.HasErrors() || a.Tolerance == nil {
			t.Fatalf("workers %d: %v", w, diags)
		}
		got = append(got, a.Tolerance.Shares)
	}
	if len(got[0]) != 600 || len(got[1]) != 600 {
		t.Fatalf("%d and %d shares, want 600", len(got[0]), len(got[1]))
	}
	for i := range got[0] {
		if got[0][i] != got[1][i] {
			t.Fatalf("share %d: %v on one worker, %v on three", i, got[0][i], got[1][i])
		}
	}
}
