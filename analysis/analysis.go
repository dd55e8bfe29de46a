// Package analysis works out what a budget page shows beyond the values: for the focus
// quantity, its sensitivity to each input, where the budget goes (the signed line items of a
// sum of decibel terms), the worst case, RSS and Monte Carlo spread from the inputs'
// tolerances; the sweeps and solves; and each chain's cascade with every stage's share of
// the noise and distortion. It works on an [engine.Result] through [engine.Scenario]s, so
// that only what depends on a changed input is computed again; the result is not changed.
package analysis

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/engine/numeric"
	"github.com/rfledger/rfledger/units"
)

// Limits on analyses.
const (
	DefaultTrials = 10_000    // Monte Carlo trials when Options.Trials is 0
	MaxTrials     = 1_000_000 // the most trials the command accepts
)

// Options configure Analyze.
type Options struct {
	Trials   int                                // Monte Carlo trials; 0 means DefaultTrials
	Seed     uint64                             // Monte Carlo seed; the same seed gives the same report
	Workers  int                                // goroutines for the trials; 0 means GOMAXPROCS. Results do not depend on it.
	Focus    string                             // the quantity to centre on (a case's own focus); "" means the sheet's
	Progress func(what string, done, total int) // told of the trials done, about 20 times a run, never concurrently; nil for none
	// SkipMonteCarlo leaves the trials out (Tolerance.Trials is then 0): the worst case and
	// RSS come at once, for a page that is completed later.
	SkipMonteCarlo bool
}

// Analysis is what the analyses found about the focus quantity, and the sweeps and solves.
type Analysis struct {
	Focus       *engine.Quantity // the quantity analysed; nil when the sheet has no focus
	FocusValue  units.Q          // its value in the result analysed
	Unit        string           // the unit focus values below are in ("dB", "dBm", "m" …)
	ChangeUnit  string           // the unit of changes of the focus ("dB" for a decibel focus)
	Sensitivity []Sensitivity    // one per input the focus depends on, largest change first
	Budget      []Contribution   // where the budget goes; nil when the focus is not a sum of decibel terms
	Flow        *SignalFlow      // the budget in signal order; nil when the focus is not a level in signal order
	Tolerance   *Tolerance       // nil when no input the focus depends on has a tolerance
	Sweeps      []SweepResult    // one per [[sweep]], in file order
	Solves      []SolveResult    // one per [[solve]], in file order
}

// Sensitivity is the change of the focus when one input rises by Per (1 dB or 10 %).
type Sensitivity struct {
	Input  string  // the input's full name
	Per    string  // how far it rises: "1 dB" for a decibel input, "10 %" for a linear one
	Change float64 // in Analysis.ChangeUnit; NaN when the focus could not be evaluated
}

// Contribution is one signed line item of a focus that is a sum of decibel terms. The items
// with a reference (dBm, dBHz) come first as the formula writes them, then the gains and
// losses in dB, largest first.
type Contribution struct {
	Item      string  // label: a quantity's name, or "quantity: term" for a term inside a formula
	Quantity  string  // the quantity the term belongs to
	Value     float64 // signed, in the term's own decibel unit
	Unit      string  // that unit ("dB", "dBi" …)
	Sign      int     // how the term enters the sum: +1 or −1
	Total     float64 // the running total of the items so far, in TotalUnit
	TotalUnit string  // the unit the references so far leave it in ("dBHz" after a C/N0, "dB" once a dBHz is taken off)
	ref       units.Q // the term's value, before its sign
}

// Tolerance is the spread of the focus from the inputs' tolerances.
type Tolerance struct {
	Nominal   float64         // the focus at the nominal inputs, in Analysis.Unit like all values below
	WorstLow  float64         // the focus with every input at the end of its tolerance that lowers it
	WorstHigh float64         // the focus with every input at the end that raises it
	RSSSigma  float64         // one standard deviation of the focus: root-sum-square of each input's slope × σ
	Trials    int             // Monte Carlo trials run (0 with Options.SkipMonteCarlo)
	Seed      uint64          // the seed they ran with
	PPass     float64         // chance that every requirement holds (1 when there are none and all trials evaluate)
	PPassSE   float64         // its binomial standard error, StdErr(PPass, Trials)
	P01, P50  float64         // the 1st percentile and the median of the trials
	P99       float64         // the 99th percentile
	Failed    int             // trials that could not be evaluated (counted as failing)
	Shares    []Share         // each input's share of the variance, largest first
	Samples   []float64       // the focus in each trial that evaluated, sorted
	Requires  []RequireSpread // every requirement's worst case and chance, in the sheet's order
	Warnings  []engine.Tally  // validity warnings raised in the trials (points are trial numbers from 0)
	// LowWarnings and HighWarnings are the validity warnings raised at the worst cases.
	LowWarnings, HighWarnings []engine.Tally
	// LowCorner and HighCorner say where each toleranced input sits in the worst case low
	// and high: the input with the larger effect first, ties by name.
	LowCorner, HighCorner []Corner
}

// Corner is where one toleranced input sits in a worst case.
type Corner struct {
	Input  string  // the input's full name
	Limit  string  // "low" or "high" (its tolerance limit), or "nominal" when it does not move the focus
	Value  float64 // the input's value there, in Unit
	Unit   string  // the input's report unit
	Effect float64 // the change of the focus (in Analysis.ChangeUnit) with this input alone moved there; NaN when a limit could not be evaluated
}

// Share is one input's share of the focus's variance.
type Share struct {
	Input string  // the input's full name
	Share float64 // its fraction of the variance, 0 to 1
}

// SweepResult holds a sweep's points.
type SweepResult struct {
	Sweep     *engine.Sweep
	Unit      string         // unit of X
	X         []float64      // the swept input's values, Sweep.Steps+1 of them
	Series    []Series       // one per quantity of Sweep.Plot, in that order
	Crossings []Crossing     // where a series crosses a plain bound on it, by requirement and series
	Warnings  []engine.Tally // validity warnings raised at the points (points index X)
}

// Series is one plotted quantity over a sweep. Y is NaN where it could not be evaluated.
type Series struct {
	Quantity string    // the plotted quantity's full name
	Unit     string    // unit of Y
	Y        []float64 // one per point of the sweep's X
}

// Crossing is where a plotted quantity crosses a requirement's bound within a sweep.
type Crossing struct {
	Quantity string  // the plotted quantity's full name
	Require  int     // index into Sheet.Requires
	X, Y     float64 // where, in the sweep's and the series' units; X found on the model between points
}

// SolveResult is the answer to a solve. Found is false when there is no crossing in range.
type SolveResult struct {
	Solve *engine.Solve
	Found bool    // a value within the solve's range was found
	Value float64 // in Unit
	Unit  string  // the unit of the varied input
	Note  string  // why nothing was found, or what went wrong
	// Warnings are the validity warnings raised at the answer: a model used outside its range there.
	Warnings []string
}

// Analyze runs the analyses on the focus quantity of r's sheet, and the sweeps and solves,
// around the values of r (overrides included). Problems (a solve that failed to evaluate,
// say) come back as diagnostics.
func Analyze(r *engine.Result, opt Options) (*Analysis, engine.Diagnostics) {
	s := r.Sheet()
	if opt.Trials <= 0 {
		opt.Trials = DefaultTrials
	}
	if opt.Workers <= 0 {
		opt.Workers = runtime.GOMAXPROCS(0)
	}
	a := &Analysis{}
	var diags engine.Diagnostics
	for _, cc := range Cascades(r) {
		diags = append(diags, cc.Warnings...) // stages near compression at the chain's input level
	}
	focus := s.Focus
	if opt.Focus != "" {
		focus = opt.Focus
	}
	if f, ok := s.Quantity(focus); ok && r.Known(f) {
		a.Focus = f
		a.FocusValue, _ = r.Value(f)
		a.Unit = f.UnitName()
		a.ChangeUnit = a.Unit
		if a.FocusValue.K == units.Level {
			a.ChangeUnit = "dB"
		}
		fa := newFocusAt(r, f)
		a.Sensitivity = fa.sensitivity()
		a.Budget = budget(fa.sc, f)
		a.Flow = signalFlow(fa.sc, f)
		if opt.Trials > MaxTrials {
			diags = append(diags, engine.Diagnostic{Severity: engine.Error, Quantity: "trials", Summary: fmt.Sprintf("at most %d Monte Carlo trials", MaxTrials), Range: engine.Range{File: s.File}})
		} else {
			a.Tolerance = fa.tolerance(opt)
			if a.Tolerance != nil {
				diags = append(diags, cornerDiags(a.Tolerance, f.Name, a.Unit)...)
				diags = append(diags, trialsDiags(a.Tolerance)...)
			}
		}
	}
	for _, sw := range s.Sweeps {
		res := sweep(r, sw)
		diags = append(diags, sweepDiags(res)...)
		a.Sweeps = append(a.Sweeps, res)
	}
	for _, so := range s.Solves {
		res, ts, err := solve(r, so)
		if err != nil {
			diags = append(diags, engine.Diagnostic{Severity: engine.Warning, Quantity: "solve " + so.Name, Summary: err.Error(), Range: so.Range})
		}
		diags = append(diags, solveDiags(res, ts)...)
		a.Solves = append(a.Solves, res)
	}
	return a, diags
}

// reportUnit is the unit a quantity's numbers are reported in (nil for a plain number).
func reportUnit(q *engine.Quantity) *units.Unit {
	u, err := units.ParseUnit(q.UnitName())
	if err != nil {
		return nil
	}
	return u
}

func numberIn(u *units.Unit, v units.Q) float64 {
	if u == nil {
		return v.V
	}
	x, err := v.In(u)
	if err != nil {
		return math.NaN()
	}
	return x
}

// focusAt evaluates the focus with some inputs changed.
type focusAt struct {
	nom   *engine.Result
	sc    *engine.Scenario
	focus *engine.Quantity
	fu    *units.Unit // the focus's report unit
}

// perturbOnly makes the analyses recompute cones even where the focus has an affine form
// (the tests compare the two ways).
var perturbOnly bool

func newFocusAt(r *engine.Result, focus *engine.Quantity) *focusAt {
	return &focusAt{nom: r, sc: r.Scenario(), focus: focus, fu: reportUnit(focus)}
}

// at evaluates the focus with inputs set to vals (over cone), then restores the nominal.
func (fa *focusAt) at(ins []*engine.Quantity, vals []units.Q, cone *engine.Cone) (float64, bool) {
	for i, q := range ins {
		fa.sc.Set(q, vals[i])
	}
	fa.sc.Run(cone)
	x := math.NaN()
	v, ok := fa.sc.Value(fa.focus)
	if ok {
		x = numberIn(fa.fu, v)
	}
	fa.sc.Reset(cone)
	return x, ok && !math.IsNaN(x)
}

// linearThreshold is the number of inputs from which an analysis takes each input's effect
// on the focus from the focus's affine form, when it has one, rather than recomputing the
// input's cone: one backward pass over the formulas instead of inputs × cone. Below it the
// cones are small and recomputing keeps the figures exactly as evaluating gives them (the
// two agree to within rounding; see TestLinearMatchesPerturbation).
const linearThreshold = 64

// linear returns the focus's affine form in the inputs, or nil when there are few inputs or
// the focus is not affine in them.
func (fa *focusAt) linear(ins []*engine.Quantity) *engine.Linear {
	if len(ins) < linearThreshold || perturbOnly {
		return nil
	}
	l, ok := fa.nom.Linear(ins, []*engine.Quantity{fa.focus}, false)
	if !ok {
		return nil
	}
	return l
}

// linearAt is at for input i of l alone set to x.
func (fa *focusAt) linearAt(l *engine.Linear, i int, x float64) (float64, bool) {
	y, ok := l.At(0, i, x)
	if !ok {
		return math.NaN(), false
	}
	v, _ := fa.nom.Value(fa.focus)
	v.V = y
	f := numberIn(fa.fu, v)
	return f, !math.IsNaN(f)
}

// step returns an input raised by 1 dB (decibel inputs) or by 10 % (linear inputs).
func step(q units.Q) (units.Q, string) {
	if q.K == units.Level || q.K == units.Rate {
		q.V++
		return q, "1 dB"
	}
	q.V *= 1.1
	return q, "10 %"
}

func (fa *focusAt) sensitivity() []Sensitivity {
	s := fa.nom.Sheet()
	fv, _ := fa.nom.Value(fa.focus)
	f0 := numberIn(fa.fu, fv)
	ins := s.Inputs(fa.focus)
	out := make([]Sensitivity, len(ins))
	lin := fa.linear(ins)
	one := func(fa *focusAt, i int) {
		q := ins[i]
		nv, _ := fa.nom.Value(q)
		up, per := step(nv)
		var v float64
		var ok bool
		if lin != nil {
			v, ok = fa.linearAt(lin, i, up.V)
		} else {
			v, ok = fa.at([]*engine.Quantity{q}, []units.Q{up}, s.Cone(q))
		}
		change := v - f0
		if !ok {
			change = math.NaN()
		}
		out[i] = Sensitivity{Input: q.Name, Per: per, Change: change}
	}
	workers := min(runtime.GOMAXPROCS(0), len(ins)/parallelInputs)
	if lin != nil || workers < 2 {
		for i := range ins {
			one(fa, i)
		}
	} else {
		// Each input's cone is recomputed on its own and set back: on many inputs, the
		// workers each take inputs in turn with a scenario of their own; every result goes
		// to its input's place, so the order and the figures do not depend on the workers.
		var next atomic.Int64
		var wg sync.WaitGroup
		for w := range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				f := fa
				if w > 0 {
					f = newFocusAt(fa.nom, fa.focus)
				}
				for i := int(next.Add(1) - 1); i < len(ins); i = int(next.Add(1) - 1) {
					one(f, i)
				}
			}()
		}
		wg.Wait()
	}
	sort.Slice(out, func(i, j int) bool { return largerEffect(out[i].Change, out[j].Change, out[i].Input, out[j].Input) })
	return out
}

// parallelInputs is the number of inputs per worker from which sensitivity shares its
// inputs' recomputations out among the cores.
const parallelInputs = 16

// largerEffect orders effects largest first, those that could not be evaluated (NaN) last,
// ties by name, so the order never depends on the order the inputs were found in.
func largerEffect(a, b float64, nameA, nameB string) bool {
	if na, nb := math.IsNaN(a), math.IsNaN(b); na != nb {
		return nb
	}
	if x, y := math.Abs(a), math.Abs(b); x != y && !math.IsNaN(x) {
		return x > y
	}
	return nameA < nameB
}

// tolerance computes worst cases, RSS and the Monte Carlo spread of the focus.
func (fa *focusAt) tolerance(opt Options) *Tolerance {
	s, nom, focus := fa.nom.Sheet(), fa.nom, fa.focus
	sinks := []*engine.Quantity{focus}
	for _, rq := range s.Requires {
		sinks = append(sinks, rq.Quantities()...)
	}
	type tolIn struct {
		q           *engine.Quantity
		nom, lo, hi units.Q
		dist        numeric.Dist
	}
	var ins []tolIn
	for _, q := range s.Inputs(sinks...) {
		if q.Tol == nil {
			continue
		}
		v, _ := nom.Value(q)
		lo, hi, err := q.Tol.Limits(v)
		if err != nil {
			continue
		}
		d, _ := numeric.ParseDist(q.Tol.Dist)
		ins = append(ins, tolIn{q, v, lo, hi, d})
	}
	if len(ins) == 0 {
		return nil
	}
	fv, _ := nom.Value(focus)
	t := &Tolerance{Nominal: numberIn(fa.fu, fv), Trials: opt.Trials, Seed: opt.Seed}

	// Worst case: find which limit of each input lowers (raises) the focus, then evaluate
	// the corner where all of them sit at those limits together.
	lowCorner := make([]units.Q, len(ins))
	highCorner := make([]units.Q, len(ins))
	qs := make([]*engine.Quantity, len(ins))
	var rss float64
	sds := make([]float64, len(ins)) // each input's slope × σ: its part of the RSS
	for i, in := range ins {
		qs[i] = in.q
	}
	lin := fa.linear(qs)
	for i, in := range ins {
		var fl, fh float64
		var okl, okh bool
		if lin != nil {
			fl, okl = fa.linearAt(lin, i, in.lo.V)
			fh, okh = fa.linearAt(lin, i, in.hi.V)
		} else {
			cone := s.Cone(in.q)
			fl, okl = fa.at(qs[i:i+1], []units.Q{in.lo}, cone)
			fh, okh = fa.at(qs[i:i+1], []units.Q{in.hi}, cone)
		}
		lowCorner[i], highCorner[i] = in.nom, in.nom
		low, high := corner(in.q, "nominal", in.nom, math.NaN()), corner(in.q, "nominal", in.nom, math.NaN())
		if okl && okh {
			low.Effect, high.Effect = 0, 0
			if fl < fh {
				lowCorner[i], highCorner[i] = in.lo, in.hi
				low, high = corner(in.q, "low", in.lo, fl-t.Nominal), corner(in.q, "high", in.hi, fh-t.Nominal)
			} else if fh < fl {
				lowCorner[i], highCorner[i] = in.hi, in.lo
				low, high = corner(in.q, "high", in.hi, fh-t.Nominal), corner(in.q, "low", in.lo, fl-t.Nominal)
			}
			if span := in.hi.V - in.lo.V; span > 0 {
				slope := (fh - fl) / span
				sd := slope * numeric.Sigma(in.dist, in.nom.V, in.lo.V, in.hi.V)
				rss += sd * sd
				sds[i] = sd
			}
		}
		t.LowCorner, t.HighCorner = append(t.LowCorner, low), append(t.HighCorner, high)
	}
	sortCorners(t.LowCorner)
	sortCorners(t.HighCorner)
	union := s.ConeFor(sinks, qs...) // what the focus and the requirements read, no more
	t.WorstLow, _ = fa.at(qs, lowCorner, union)
	t.WorstHigh, _ = fa.at(qs, highCorner, union)
	_, _, t.LowWarnings = fa.corner(qs, lowCorner, union, focus)
	_, _, t.HighWarnings = fa.corner(qs, highCorner, union, focus)
	t.RSSSigma = math.Sqrt(rss)
	los, his := make([]units.Q, len(ins)), make([]units.Q, len(ins))
	for i, in := range ins {
		los[i], his[i] = in.lo, in.hi
	}
	t.Requires = fa.requireWorst(qs, los, his, union)
	if opt.SkipMonteCarlo {
		t.Trials = 0
		return t
	}

	// Monte Carlo: every trial draws every toleranced input, recomputes the cone of all of
	// them, and records the focus and whether all requirements hold. Each worker has its own
	// scenario; nothing is allocated per trial.
	n := opt.Trials
	focusVals := make([]float64, n)
	pass := make([]bool, n)
	workers := make([]*engine.Scenario, opt.Workers)
	holds := make([][]int, opt.Workers) // per worker, trials in which each requirement holds
	for w := range workers {
		workers[w] = nom.Scenario()
		holds[w] = make([]int, len(s.Requires))
	}
	// When the focus and what the requirements read are affine in the toleranced inputs, a
	// trial computes them from their affine form (a multiply-add per input) instead of
	// recomputing the whole cone.
	var mcLin *engine.Linear
	if len(ins) >= linearThreshold && !perturbOnly {
		if l, ok := nom.Linear(qs, []*engine.Quantity{focus}, true); ok {
			mcLin = l
		}
	}
	// The draws are kept for the variance shares, except where the focus is affine in the
	// inputs and shown in a unit linear in its value: each input's share is then exactly
	// its part of the variance, (slope × σ)² over their sum (the variance of a sum of
	// independent terms), and the trials need only a row of scratch per worker.
	exactShares := mcLin != nil && linearIn(fa.fu, fv)
	var draws []float64
	rows := make([][]float64, opt.Workers)
	if exactShares {
		for w := range rows {
			rows[w] = make([]float64, len(ins))
		}
	} else {
		draws = make([]float64, n*len(ins))
	}
	var progress func(int)
	if opt.Progress != nil {
		progress = func(done int) { opt.Progress("Monte Carlo", done, n) }
	}
	samplers := make([]numeric.Sampler, len(ins))
	for i, in := range ins {
		samplers[i] = numeric.NewSampler(in.dist, in.nom.V, in.lo.V, in.hi.V)
	}
	numeric.Trials(n, opt.Workers, opt.Seed, func(w, trial int, r *rand.Rand) {
		sc := workers[w]
		row := rows[w]
		if !exactShares {
			row = draws[trial*len(ins) : (trial+1)*len(ins)]
		}
		if mcLin != nil {
			for i := range samplers {
				row[i] = samplers[i].Draw(r)
			}
			sc.RunLinear(mcLin, row)
		} else {
			for i, in := range ins {
				v := in.nom
				v.V = samplers[i].Draw(r)
				row[i] = v.V
				sc.Set(in.q, v)
			}
			sc.Point(trial)
			sc.Run(union)
		}
		focusVals[trial] = math.NaN()
		v, ok := sc.Value(focus)
		if ok {
			focusVals[trial] = numberIn(fa.fu, v)
		}
		pass[trial] = ok && sc.Holds()
		for i, rq := range s.Requires {
			if p, _ := sc.Pass(rq); p {
				holds[w][i]++
			}
		}
	}, progress)
	tallies := make([][]engine.Tally, len(workers))
	for w, sc := range workers {
		tallies[w] = sc.Tallies()
		for i := range t.Requires {
			t.Requires[i].Holds += holds[w][i]
		}
	}
	t.Warnings = engine.MergeTallies(tallies...)
	for i := range t.Requires {
		rs := &t.Requires[i]
		rs.Chance = float64(rs.Holds) / float64(n)
		rs.ChanceSE = StdErr(rs.Chance, n)
	}

	passed := 0
	var samples []float64
	for i := range n {
		if pass[i] {
			passed++
		}
		if math.IsNaN(focusVals[i]) {
			t.Failed++
		} else {
			samples = append(samples, focusVals[i])
		}
	}
	t.PPass = float64(passed) / float64(n)
	t.PPassSE = StdErr(t.PPass, n)
	sort.Float64s(samples)
	t.Samples = samples
	if len(samples) > 0 {
		t.P01 = numeric.Quantile(samples, 0.01)
		t.P50 = numeric.Quantile(samples, 0.50)
		t.P99 = numeric.Quantile(samples, 0.99)
	}
	name := func(i int) string { return ins[i].q.Name }
	if exactShares {
		t.Shares = exactVarianceShares(sds, name)
	} else {
		t.Shares = varianceShares(focusVals, draws, len(ins), opt.Workers, name)
	}
	return t
}

// linearIn reports whether showing values near v in unit u is a linear map of their
// numbers (a scale such as m to km, or a decibel value in dB), not a change between a
// decibel and a linear form.
func linearIn(u *units.Unit, v units.Q) bool {
	if u == nil {
		return true
	}
	d := max(1, math.Abs(v.V)) * 1e-3
	a, b, c := v, v, v
	b.V += d
	c.V += 2 * d
	fa, fb, fc := numberIn(u, a), numberIn(u, b), numberIn(u, c)
	step := fb - fa
	return !math.IsNaN(fa+fb+fc) && step != 0 && math.Abs((fc-fb)-step) <= 1e-9*math.Abs(step)
}

// exactVarianceShares gives each input its part of the variance of a focus affine in
// independent inputs: sd[i]² over the sum of them, sd[i] being the input's slope × σ.
// Like varianceShares, a focus that does not move has no variance to share out.
func exactVarianceShares(sd []float64, name func(int) string) []Share {
	total := 0.0
	for _, x := range sd {
		total += x * x
	}
	out := make([]Share, len(sd))
	for i, x := range sd {
		out[i] = Share{Input: name(i)}
		if total > 0 {
			out[i].Share = x * x / total
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Share > out[j].Share })
	return out
}

func corner(q *engine.Quantity, limit string, v units.Q, effect float64) Corner {
	return Corner{Input: q.Name, Limit: limit, Value: q.Number(v), Unit: q.UnitName(), Effect: effect}
}

func sortCorners(cs []Corner) {
	sort.Slice(cs, func(i, j int) bool { return largerEffect(cs[i].Effect, cs[j].Effect, cs[i].Input, cs[j].Input) })
}

// varianceShares estimates each input's share of the focus variance as its squared
// correlation with the focus, normalised to sum to 1 (exact for a focus linear in
// independent inputs). The inputs' sums are split among workers by blocks of inputs; each
// input's sums run over the trials in order whatever the split, so the shares do not
// depend on the number of workers.
func varianceShares(f, draws []float64, k, workers int, name func(int) string) []Share {
	n := len(f)
	// Two passes (means, then centred sums): the one-pass formula cancels catastrophically
	// when the focus barely moves.
	var my, vy float64
	var m int
	for t := range n {
		if !math.IsNaN(f[t]) {
			my += f[t]
			m++
		}
	}
	corr2 := make([]float64, k)
	if m >= 2 {
		my /= float64(m)
		for t := range n {
			if !math.IsNaN(f[t]) {
				dy := f[t] - my
				vy += dy * dy
			}
		}
		// A focus that moves by less than rounding noise has no variance to share out.
		if vy > float64(m)*1e-24*max(1, my*my) {
			columns(k, workers, func(lo, hi int) { inputShares(f, draws, k, lo, hi, my, vy, m, corr2) })
		}
	}
	total := 0.0
	for _, c := range corr2 {
		total += c
	}
	var out []Share
	for i, c := range corr2 {
		sh := 0.0
		if total > 0 {
			sh = c / total
		}
		out = append(out, Share{Input: name(i), Share: sh})
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Share > out[j].Share })
	return out
}

// inputShares fills corr2[lo:hi], the squared correlations of inputs lo..hi-1 with the
// focus f of mean my and centred sum of squares vy over m trials.
func inputShares(f, draws []float64, k, lo, hi int, my, vy float64, m int, corr2 []float64) {
	w := hi - lo
	mx, vx, cov := make([]float64, w), make([]float64, w), make([]float64, w)
	for t := range len(f) {
		if math.IsNaN(f[t]) {
			continue
		}
		row := draws[t*k+lo : t*k+hi]
		for i, x := range row {
			mx[i] += x
		}
	}
	for i := range mx {
		mx[i] /= float64(m)
	}
	for t := range len(f) {
		if math.IsNaN(f[t]) {
			continue
		}
		dy := f[t] - my
		row := draws[t*k+lo : t*k+hi]
		for i, x := range row {
			dx := x - mx[i]
			vx[i] += dx * dx
			cov[i] += dx * dy
		}
	}
	for i := range w {
		if vx[i] > 0 {
			corr2[lo+i] = cov[i] * cov[i] / (vx[i] * vy)
		}
	}
}

// columns runs fn over blocks [lo, hi) of 0..k-1, on up to workers goroutines when there is
// enough to share.
func columns(k, workers int, fn func(lo, hi int)) {
	const minBlock = 256
	if workers <= 1 || k < 2*minBlock {
		fn(0, k)
		return
	}
	var wg sync.WaitGroup
	size := (k + workers - 1) / workers
	for lo := 0; lo < k; lo += size {
		wg.Go(func() { fn(lo, min(lo+size, k)) })
	}
	wg.Wait()
}

// sweepPoints returns the values of a sweep's input, evenly spaced (or log-spaced):
// Steps intervals, Steps+1 points including both ends.
func sweepPoints(sw *engine.Sweep) []float64 {
	xs := make([]float64, sw.Steps+1)
	for i := range xs {
		f := float64(i) / float64(sw.Steps)
		if sw.Log {
			xs[i] = sw.From.V * math.Pow(sw.To.V/sw.From.V, f)
		} else {
			xs[i] = sw.From.V + f*(sw.To.V-sw.From.V)
		}
	}
	return xs
}

func sweep(nom *engine.Result, sw *engine.Sweep) SweepResult {
	s := nom.Sheet()
	vq, _ := s.Quantity(sw.Vary)
	res := SweepResult{Sweep: sw, Unit: vq.UnitName()}
	sc := nom.Scenario()
	down := s.Cone(vq)
	xs := sweepPoints(sw)
	base, _ := nom.Value(vq)
	set := func(q units.Q) {
		sc.Set(vq, q)
		sc.Run(down)
	}
	var plots []*engine.Quantity
	for _, p := range sw.Plot {
		pq, _ := s.Quantity(p)
		plots = append(plots, pq)
		res.Series = append(res.Series, Series{Quantity: p, Unit: pq.UnitName()})
	}
	for j, x := range xs {
		q := base
		q.V = x
		sc.Point(j)
		set(q)
		res.X = append(res.X, vq.Number(q))
		for i, pq := range plots {
			v, ok := sc.Value(pq)
			y := math.NaN()
			if ok {
				y = pq.Number(v)
			}
			res.Series[i].Y = append(res.Series[i].Y, y)
		}
	}
	sc.Point(-1)
	res.Warnings = sc.Tallies()
	set(base)
	// Where a plotted quantity crosses a requirement's bound, refine the crossing on the model.
	for ri, rq := range s.Requires {
		for si, pq := range plots {
			if rq.Subject != pq.Name {
				continue
			}
			bound := pq.Number(rq.Bound)
			ys := res.Series[si].Y
			for i := 1; i < len(xs); i++ {
				a, b := ys[i-1]-bound, ys[i]-bound
				if math.IsNaN(a) || math.IsNaN(b) || a*b > 0 || a == 0 && b == 0 {
					continue
				}
				g := func(x float64) (float64, error) {
					q := base
					q.V = x
					set(q)
					v, ok := sc.Value(pq)
					if !ok {
						return math.NaN(), nil
					}
					return pq.Number(v) - bound, nil
				}
				x, found, err := numeric.Brent(g, xs[i-1], xs[i], false, 1e-9)
				set(base)
				if err == nil && found {
					q := base
					q.V = x
					res.Crossings = append(res.Crossings, Crossing{Quantity: pq.Name, Require: ri, X: vq.Number(q), Y: bound})
				}
				if b == 0 {
					i++ // do not report a crossing exactly at a point twice
				}
			}
		}
	}
	return res
}

// solve finds a solve's answer; the tallies are the validity warnings raised at it.
func solve(nom *engine.Result, so *engine.Solve) (SolveResult, []engine.Tally, error) {
	s := nom.Sheet()
	vq, _ := s.Quantity(so.Vary)
	tq, _ := s.Quantity(so.SoThat)
	res := SolveResult{Solve: so, Unit: vq.UnitName()}
	base, _ := nom.Value(vq)
	if so.Within[0].D != base.D || so.Within[1].D != base.D || so.Within[0].K != base.K {
		res.Note = fmt.Sprintf("within must be in the same unit kind as %s", so.Vary)
		return res, nil, fmt.Errorf("%s", res.Note)
	}
	if !nom.Known(tq) {
		res.Note = so.SoThat + " could not be evaluated"
		return res, nil, nil
	}
	target, err := so.Equals.V, error(nil)
	if u := reportUnit(tq); u != nil {
		target, err = so.Equals.In(u)
	}
	if err != nil {
		res.Note = fmt.Sprintf("equals %s does not fit %s: %v", so.Equals, so.SoThat, err)
		return res, nil, fmt.Errorf("%s", res.Note)
	}
	sc := nom.Scenario()
	down := s.Cone(vq)
	g := func(x float64) (float64, error) {
		q := base
		q.V = x
		sc.Set(vq, q)
		sc.Run(down)
		v, ok := sc.Value(tq)
		if !ok {
			return math.NaN(), nil
		}
		return tq.Number(v) - target, nil
	}
	lo, hi := so.Within[0].V, so.Within[1].V
	logScale := base.K == units.Linear && lo > 0 && hi > 0 && math.Max(lo, hi)/math.Min(lo, hi) >= 100
	x, found, err := numeric.Brent(g, lo, hi, logScale, 1e-10)
	if err != nil {
		res.Note = err.Error()
		return res, nil, err
	}
	if !found {
		res.Note = "no crossing in range"
		return res, nil, nil
	}
	q := base
	q.V = x
	res.Found, res.Value = true, vq.Number(q)
	// The answer evaluated once more, counting the warnings its models raise there.
	sc.Point(0)
	sc.Set(vq, q)
	sc.Run(down)
	ts := sc.Tallies()
	for _, t := range ts {
		res.Warnings = append(res.Warnings, t.Message)
	}
	return res, ts, nil
}
