package engine

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"

	"github.com/rfledger/rfledger/engine/numeric"
	"github.com/rfledger/rfledger/units"
)

// Limits on analyses.
const (
	DefaultTrials = 10_000
	MaxTrials     = 1_000_000
)

// AnalysisOptions configure Analyze.
type AnalysisOptions struct {
	Trials   int    // Monte Carlo trials; 0 means DefaultTrials
	Seed     uint64 // Monte Carlo seed; the same seed gives the same report
	Workers  int    // goroutines for the trials; 0 means GOMAXPROCS. Results do not depend on it.
	Progress func(what string, done, total int)
}

// Analysis is what the analyses found about the focus quantity, and the sweeps and solves.
type Analysis struct {
	Focus       *Quantity
	Unit        string // the unit focus values below are in ("dB", "dBm", "m" …)
	ChangeUnit  string // the unit of changes of the focus ("dB" for a decibel focus)
	Sensitivity []Sensitivity
	Budget      []Contribution // where the budget goes; nil when the focus is not a sum of decibel terms
	Tolerance   *Tolerance     // nil when no input the focus depends on has a tolerance
	Sweeps      []SweepResult
	Solves      []SolveResult
}

// Sensitivity is the change of the focus when one input rises by Per (1 dB or 10 %).
type Sensitivity struct {
	Input  string
	Per    string
	Change float64 // in Analysis.ChangeUnit; NaN when the focus could not be evaluated
}

// Contribution is one signed line item of a focus that is a sum of decibel terms.
type Contribution struct {
	Item     string  // label: a quantity's name, or "quantity: term" for a term inside a formula
	Quantity string  // the quantity the term belongs to
	Value    float64 // signed, in the term's own decibel unit
	Unit     string
}

// Tolerance is the spread of the focus from the inputs' tolerances.
type Tolerance struct {
	Nominal   float64
	WorstLow  float64
	WorstHigh float64
	RSSSigma  float64
	Trials    int
	Seed      uint64
	PPass     float64 // chance that every requirement holds (1 when there are none and all trials evaluate)
	P01, P50  float64
	P99       float64
	Failed    int       // trials that could not be evaluated (counted as failing)
	Shares    []Share   // each input's share of the variance, largest first
	Samples   []float64 // the focus in each trial that evaluated, sorted
}

// Share is one input's share of the focus's variance.
type Share struct {
	Input string
	Share float64
}

// SweepResult holds a sweep's points.
type SweepResult struct {
	Sweep     *Sweep
	Unit      string // unit of X
	X         []float64
	Series    []Series
	Crossings []Crossing
}

// Series is one plotted quantity over a sweep. Y is NaN where it could not be evaluated.
type Series struct {
	Quantity string
	Unit     string
	Y        []float64
}

// Crossing is where a plotted quantity crosses a requirement's bound within a sweep.
type Crossing struct {
	Quantity string
	Require  int // index into Sheet.Requires
	X, Y     float64
}

// SolveResult is the answer to a solve. Found is false when there is no crossing in range.
type SolveResult struct {
	Solve *Solve
	Found bool
	Value float64 // in Unit
	Unit  string
	Note  string // why nothing was found, or what went wrong
}

// Analyze runs the analyses on the focus quantity, and the sweeps and solves. Call it after
// Eval. Problems (a solve that failed to evaluate, say) come back as diagnostics.
func (s *Sheet) Analyze(opt AnalysisOptions) (*Analysis, Diagnostics) {
	if s.values == nil {
		s.Eval()
	}
	if opt.Trials <= 0 {
		opt.Trials = DefaultTrials
	}
	if opt.Workers <= 0 {
		opt.Workers = runtime.GOMAXPROCS(0)
	}
	a := &Analysis{}
	var diags Diagnostics
	if id, ok := s.byName[s.Focus]; ok && s.nodes[id].q != nil && s.nodes[id].q.Known {
		f := s.nodes[id].q
		a.Focus = f
		a.Unit = unitName(f)
		a.ChangeUnit = a.Unit
		if f.Value.K == units.Level {
			a.ChangeUnit = "dB"
		}
		a.Sensitivity = s.sensitivity(id)
		a.Budget = s.budget(id)
		if opt.Trials > MaxTrials {
			diags = append(diags, Diagnostic{Severity: Error, Quantity: "trials", Summary: fmt.Sprintf("at most %d Monte Carlo trials", MaxTrials), Range: Range{File: s.File}})
		} else {
			a.Tolerance = s.tolerance(id, opt)
		}
	}
	for _, sw := range s.Sweeps {
		a.Sweeps = append(a.Sweeps, s.sweep(sw))
	}
	for _, so := range s.Solves {
		r, err := s.solve(so)
		if err != nil {
			diags = append(diags, Diagnostic{Severity: Warning, Quantity: "solve " + so.Name, Summary: err.Error(), Range: so.Range})
		}
		a.Solves = append(a.Solves, r)
	}
	return a, diags
}

// unitOf returns the unit a quantity's numbers are reported in: its display unit, else the
// unit its value's algebra gives.
func unitOf(q *Quantity) *units.Unit {
	if u := q.DisplayUnit(); u != nil && u.Sym != "" {
		return u
	}
	u, err := units.ParseUnit(q.Value.UnitName())
	if err != nil {
		return nil
	}
	return u
}

func unitName(q *Quantity) string {
	if u := unitOf(q); u != nil {
		return u.Sym
	}
	return ""
}

// Number returns a quantity's value as a number in the unit unitName reports.
func Number(q *Quantity, v units.Q) float64 {
	u := unitOf(q)
	if u == nil {
		return v.V
	}
	x, err := v.In(u)
	if err != nil {
		return math.NaN()
	}
	return x
}

// QuantityNumber returns a quantity's current value as a number and the unit it is in.
func QuantityNumber(q *Quantity) (float64, string) {
	return Number(q, q.Value), unitName(q)
}

// users returns, for every node, the nodes that read it.
func (s *Sheet) users() [][]int {
	if s.userCache != nil {
		return s.userCache
	}
	us := make([][]int, len(s.nodes))
	for id, n := range s.nodes {
		for _, d := range n.deps {
			us[d] = append(us[d], id)
		}
	}
	s.userCache = us
	return us
}

// downstream returns, in evaluation order, the nodes that depend on any of the given ones
// (excluding them).
func (s *Sheet) downstream(from []int) []int {
	us := s.users()
	mark := make([]bool, len(s.nodes))
	stack := append([]int(nil), from...)
	for len(stack) > 0 {
		id := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		for _, u := range us[id] {
			if !mark[u] {
				mark[u] = true
				stack = append(stack, u)
			}
		}
	}
	var out []int
	for _, id := range s.order {
		if mark[id] {
			out = append(out, id)
		}
	}
	return out
}

// upstreamInputs returns the input quantities a node depends on, in file order.
func (s *Sheet) upstreamInputs(ids ...int) []int {
	mark := make([]bool, len(s.nodes))
	stack := append([]int(nil), ids...)
	for len(stack) > 0 {
		id := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if mark[id] {
			continue
		}
		mark[id] = true
		stack = append(stack, s.nodes[id].deps...)
	}
	var out []int
	for id, n := range s.nodes {
		if mark[id] && n.q != nil && n.code == nil && n.ok {
			out = append(out, id)
		}
	}
	return out
}

// clone copies the nominal evaluation, for a scenario of its own.
func (s *Sheet) clone() *evaluator {
	e := s.newEvaluator(true)
	for k, v := range s.values.env {
		e.env[k] = v
	}
	e.env[ctxName] = &e.call
	copy(e.failed, s.values.failed)
	return e
}

// set replaces the values of some inputs and recomputes the given downstream nodes.
func (e *evaluator) set(ids []int, vals []units.Q, down []int) {
	for i, id := range ids {
		e.env[e.sh.nodes[id].env] = vals[i]
		e.failed[id] = false
	}
	for _, id := range down {
		_ = e.evalNode(id)
	}
}

// value reads a node's value; ok is false when it failed.
func (e *evaluator) value(id int) (units.Q, bool) {
	if e.failed[id] {
		return units.Q{}, false
	}
	q, ok := e.env[e.sh.nodes[id].env].(units.Q)
	return q, ok
}

// requirementsPass reports whether every requirement holds in this scenario.
func (e *evaluator) requirementsPass() bool {
	for _, rq := range e.sh.Requires {
		if rq.prog == nil {
			return false
		}
		for _, d := range rq.prog.deps {
			if e.failed[d] {
				return false
			}
		}
		out, err := e.vm.Run(rq.prog.prog, e.env)
		if err != nil || out != true {
			return false
		}
	}
	return true
}

// focusAt evaluates the focus with some inputs replaced, and puts the nominal values back.
func (s *Sheet) focusAt(e *evaluator, focus int, ids []int, vals []units.Q) (float64, bool) {
	down := s.downstream(ids)
	nominal := make([]units.Q, len(ids))
	for i, id := range ids {
		nominal[i], _ = e.value(id)
	}
	e.set(ids, vals, down)
	v, ok := e.value(focus)
	x := Number(s.nodes[focus].q, v)
	e.set(ids, nominal, down)
	return x, ok && !math.IsNaN(x)
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

func (s *Sheet) sensitivity(focus int) []Sensitivity {
	e := s.clone()
	f0 := Number(s.nodes[focus].q, s.nodes[focus].q.Value)
	var out []Sensitivity
	for _, id := range s.upstreamInputs(focus) {
		q := s.nodes[id].q
		up, per := step(q.Value)
		v, ok := s.focusAt(e, focus, []int{id}, []units.Q{up})
		change := v - f0
		if !ok {
			change = math.NaN()
		}
		out = append(out, Sensitivity{Input: q.Name, Per: per, Change: change})
	}
	sort.SliceStable(out, func(i, j int) bool { return math.Abs(out[i].Change) > math.Abs(out[j].Change) })
	return out
}

// tolerance computes worst cases, RSS and the Monte Carlo spread of the focus.
func (s *Sheet) tolerance(focus int, opt AnalysisOptions) *Tolerance {
	sinks := []int{focus}
	for _, rq := range s.Requires {
		if rq.prog != nil {
			sinks = append(sinks, rq.prog.deps...)
		}
	}
	type tolIn struct {
		id          int
		nom, lo, hi units.Q
		dist        numeric.Dist
	}
	var ins []tolIn
	for _, id := range s.upstreamInputs(sinks...) {
		q := s.nodes[id].q
		if q.Tol == nil {
			continue
		}
		lo, hi, err := q.Tol.Limits(q.Value)
		if err != nil {
			continue
		}
		d, _ := numeric.ParseDist(q.Tol.Dist)
		ins = append(ins, tolIn{id, q.Value, lo, hi, d})
	}
	if len(ins) == 0 {
		return nil
	}
	fq := s.nodes[focus].q
	t := &Tolerance{Nominal: Number(fq, fq.Value), Trials: opt.Trials, Seed: opt.Seed}

	// Worst case: find which limit of each input lowers (raises) the focus, then evaluate
	// the corner where all of them sit at those limits together.
	e := s.clone()
	lowCorner := make([]units.Q, len(ins))
	highCorner := make([]units.Q, len(ins))
	ids := make([]int, len(ins))
	var rss float64
	for i, in := range ins {
		ids[i] = in.id
		fl, okl := s.focusAt(e, focus, []int{in.id}, []units.Q{in.lo})
		fh, okh := s.focusAt(e, focus, []int{in.id}, []units.Q{in.hi})
		lowCorner[i], highCorner[i] = in.nom, in.nom
		if okl && okh {
			if fl < fh {
				lowCorner[i], highCorner[i] = in.lo, in.hi
			} else if fh < fl {
				lowCorner[i], highCorner[i] = in.hi, in.lo
			}
			if span := in.hi.V - in.lo.V; span > 0 {
				slope := (fh - fl) / span
				sd := slope * numeric.Sigma(in.dist, in.nom.V, in.lo.V, in.hi.V)
				rss += sd * sd
			}
		}
	}
	t.WorstLow, _ = s.focusAt(e, focus, ids, lowCorner)
	t.WorstHigh, _ = s.focusAt(e, focus, ids, highCorner)
	t.RSSSigma = math.Sqrt(rss)

	// Monte Carlo: every trial draws every toleranced input, recomputes what depends on
	// them, and records the focus and whether all requirements hold.
	down := s.downstream(ids)
	n := opt.Trials
	focusVals := make([]float64, n)
	pass := make([]bool, n)
	draws := make([]float64, n*len(ins))
	workers := make([]*evaluator, opt.Workers)
	for w := range workers {
		workers[w] = s.clone()
	}
	var progress func(int)
	if opt.Progress != nil {
		progress = func(done int) { opt.Progress("Monte Carlo", done, n) }
	}
	numeric.Trials(n, opt.Workers, opt.Seed, func(w, trial int, r *rand.Rand) {
		ev := workers[w]
		vals := make([]units.Q, len(ins))
		for i, in := range ins {
			q := in.nom
			q.V = numeric.Draw(r, in.dist, in.nom.V, in.lo.V, in.hi.V)
			vals[i] = q
			draws[trial*len(ins)+i] = q.V
		}
		ev.set(ids, vals, down)
		v, ok := ev.value(focus)
		focusVals[trial] = math.NaN()
		if ok {
			focusVals[trial] = Number(fq, v)
		}
		pass[trial] = ok && ev.requirementsPass()
	}, progress)

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
	sort.Float64s(samples)
	t.Samples = samples
	if len(samples) > 0 {
		t.P01 = numeric.Quantile(samples, 0.01)
		t.P50 = numeric.Quantile(samples, 0.50)
		t.P99 = numeric.Quantile(samples, 0.99)
	}
	t.Shares = varianceShares(focusVals, draws, len(ins), func(i int) string { return s.nodes[ins[i].id].name })
	return t
}

// varianceShares estimates each input's share of the focus variance as its squared
// correlation with the focus, normalised to sum to 1 (exact for a focus linear in
// independent inputs).
func varianceShares(f, draws []float64, k int, name func(int) string) []Share {
	n := len(f)
	// Two passes (means, then centred sums): the one-pass formula cancels catastrophically
	// when the focus barely moves.
	var my float64
	var m int
	mx := make([]float64, k)
	for t := range n {
		if math.IsNaN(f[t]) {
			continue
		}
		my += f[t]
		for i := range k {
			mx[i] += draws[t*k+i]
		}
		m++
	}
	corr2 := make([]float64, k)
	if m >= 2 {
		my /= float64(m)
		for i := range k {
			mx[i] /= float64(m)
		}
		var vy float64
		vx := make([]float64, k)
		cov := make([]float64, k)
		for t := range n {
			if math.IsNaN(f[t]) {
				continue
			}
			dy := f[t] - my
			vy += dy * dy
			for i := range k {
				dx := draws[t*k+i] - mx[i]
				vx[i] += dx * dx
				cov[i] += dx * dy
			}
		}
		// A focus that moves by less than rounding noise has no variance to share out.
		if vy > float64(m)*1e-24*max(1, my*my) {
			for i := range k {
				if vx[i] > 0 {
					corr2[i] = cov[i] * cov[i] / (vx[i] * vy)
				}
			}
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

// sweepPoints returns the values of a sweep's input, evenly spaced (or log-spaced):
// Steps intervals, Steps+1 points including both ends.
func sweepPoints(sw *Sweep) []float64 {
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

func (s *Sheet) sweep(sw *Sweep) SweepResult {
	vid := s.byName[sw.Vary]
	vq := s.nodes[vid].q
	res := SweepResult{Sweep: sw, Unit: unitName(vq)}
	e := s.clone()
	down := s.downstream([]int{vid})
	xs := sweepPoints(sw)
	var plots []int
	for _, p := range sw.Plot {
		id := s.byName[p]
		plots = append(plots, id)
		res.Series = append(res.Series, Series{Quantity: p, Unit: unitName(s.nodes[id].q)})
	}
	for _, x := range xs {
		q := vq.Value
		q.V = x
		e.set([]int{vid}, []units.Q{q}, down)
		res.X = append(res.X, Number(vq, q))
		for i, id := range plots {
			v, ok := e.value(id)
			y := math.NaN()
			if ok {
				y = Number(s.nodes[id].q, v)
			}
			res.Series[i].Y = append(res.Series[i].Y, y)
		}
	}
	e.set([]int{vid}, []units.Q{vq.Value}, down)
	// Where a plotted quantity crosses a requirement's bound, refine the crossing on the model.
	for ri, rq := range s.Requires {
		for si, id := range plots {
			if rq.Subject != s.nodes[id].name {
				continue
			}
			bound := Number(s.nodes[id].q, rq.Bound)
			ys := res.Series[si].Y
			for i := 1; i < len(xs); i++ {
				a, b := ys[i-1]-bound, ys[i]-bound
				if math.IsNaN(a) || math.IsNaN(b) || a*b > 0 || a == 0 && b == 0 {
					continue
				}
				g := func(x float64) (float64, error) {
					q := vq.Value
					q.V = x
					e.set([]int{vid}, []units.Q{q}, down)
					v, ok := e.value(id)
					if !ok {
						return math.NaN(), nil
					}
					return Number(s.nodes[id].q, v) - bound, nil
				}
				x, found, err := numeric.Brent(g, xs[i-1], xs[i], false, 1e-9)
				e.set([]int{vid}, []units.Q{vq.Value}, down)
				if err == nil && found {
					q := vq.Value
					q.V = x
					res.Crossings = append(res.Crossings, Crossing{Quantity: s.nodes[id].name, Require: ri, X: Number(vq, q), Y: bound})
				}
				if b == 0 {
					i++ // do not report a crossing exactly at a point twice
				}
			}
		}
	}
	return res
}

func (s *Sheet) solve(so *Solve) (SolveResult, error) {
	vid := s.byName[so.Vary]
	tid := s.byName[so.SoThat]
	vq, tq := s.nodes[vid].q, s.nodes[tid].q
	res := SolveResult{Solve: so, Unit: unitName(vq)}
	if so.Within[0].D != vq.Value.D || so.Within[1].D != vq.Value.D || so.Within[0].K != vq.Value.K {
		res.Note = fmt.Sprintf("within must be in the same unit kind as %s", so.Vary)
		return res, fmt.Errorf("%s", res.Note)
	}
	if !tq.Known {
		res.Note = so.SoThat + " could not be evaluated"
		return res, nil
	}
	target, err := so.Equals.In(unitOf(tq))
	if err != nil {
		res.Note = fmt.Sprintf("equals %s does not fit %s: %v", so.Equals, so.SoThat, err)
		return res, fmt.Errorf("%s", res.Note)
	}
	e := s.clone()
	down := s.downstream([]int{vid})
	g := func(x float64) (float64, error) {
		q := vq.Value
		q.V = x
		e.set([]int{vid}, []units.Q{q}, down)
		v, ok := e.value(tid)
		if !ok {
			return math.NaN(), nil
		}
		return Number(tq, v) - target, nil
	}
	lo, hi := so.Within[0].V, so.Within[1].V
	logScale := vq.Value.K == units.Linear && lo > 0 && hi > 0 && math.Max(lo, hi)/math.Min(lo, hi) >= 100
	x, found, err := numeric.Brent(g, lo, hi, logScale, 1e-10)
	if err != nil {
		res.Note = err.Error()
		return res, err
	}
	if !found {
		res.Note = "no crossing in range"
		return res, nil
	}
	q := vq.Value
	q.V = x
	res.Found, res.Value = true, Number(vq, q)
	return res, nil
}
