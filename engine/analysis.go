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
	FocusValue  units.Q
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

// Analyze runs the analyses on the focus quantity of r's sheet, and the sweeps and solves,
// around the values of r (overrides included). r is not changed. Problems (a solve that
// failed to evaluate, say) come back as diagnostics.
func Analyze(r *Result, opt AnalysisOptions) (*Analysis, Diagnostics) {
	s := r.sh
	if opt.Trials <= 0 {
		opt.Trials = DefaultTrials
	}
	if opt.Workers <= 0 {
		opt.Workers = runtime.GOMAXPROCS(0)
	}
	a := &Analysis{}
	var diags Diagnostics
	if id, ok := s.byName[s.Focus]; ok && s.nodes[id].q != nil && r.known[id] {
		f := s.nodes[id].q
		a.Focus = f
		a.FocusValue, _ = r.Value(f)
		a.Unit = unitName(f)
		a.ChangeUnit = a.Unit
		if a.FocusValue.K == units.Level {
			a.ChangeUnit = "dB"
		}
		sc := newScenario(r, id)
		a.Sensitivity = sc.sensitivity()
		a.Budget = s.budget(sc.e, id)
		if opt.Trials > MaxTrials {
			diags = append(diags, Diagnostic{Severity: Error, Quantity: "trials", Summary: fmt.Sprintf("at most %d Monte Carlo trials", MaxTrials), Range: Range{File: s.File}})
		} else {
			a.Tolerance = sc.tolerance(opt)
		}
	}
	for _, sw := range s.Sweeps {
		a.Sweeps = append(a.Sweeps, sweep(r, sw))
	}
	for _, so := range s.Solves {
		res, err := solve(r, so)
		if err != nil {
			diags = append(diags, Diagnostic{Severity: Warning, Quantity: "solve " + so.Name, Summary: err.Error(), Range: so.Range})
		}
		a.Solves = append(a.Solves, res)
	}
	return a, diags
}

// unitOf returns the unit a quantity's numbers are reported in: its display unit, else the
// unit its type gives.
func unitOf(q *Quantity) *units.Unit {
	if u := q.DisplayUnit(); u != nil && u.Sym != "" {
		return u
	}
	t, _ := q.Type()
	u, err := units.ParseUnit(t.UnitName())
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

// Number returns a value of quantity q as a number in the unit the report uses for q.
func Number(q *Quantity, v units.Q) float64 {
	return numberIn(unitOf(q), v)
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

// scenario re-evaluates a sheet around a result with some inputs changed: only the cone of
// the changed inputs (what depends on them, in evaluation order) is recomputed, and put back
// from the nominal values afterwards.
type scenario struct {
	nom   *Result
	e     *Result
	focus int
	fu    *units.Unit // the focus's report unit
}

func newScenario(r *Result, focus int) *scenario {
	return &scenario{nom: r, e: r.clone(), focus: focus, fu: unitOf(r.sh.nodes[focus].q)}
}

// at evaluates the focus with inputs ids set to vals (over cone), then restores the nominal.
func (sc *scenario) at(ids []int, vals []units.Q, cone []int32) (float64, bool) {
	e := sc.e
	for i, id := range ids {
		e.vals[id], e.known[id] = vals[i].V, true
	}
	e.runCone(cone)
	x, ok := math.NaN(), e.known[sc.focus]
	if ok {
		v := e.sh.nodes[sc.focus].ty
		v.V = e.vals[sc.focus]
		x = numberIn(sc.fu, v)
	}
	for _, id := range ids {
		e.vals[id], e.known[id] = sc.nom.vals[id], sc.nom.known[id]
	}
	e.restore(sc.nom, cone)
	return x, ok && !math.IsNaN(x)
}

// runCone evaluates the nodes of a cone, quietly.
func (r *Result) runCone(cone []int32) {
	r.quiet, r.call.quiet = true, true
	for _, id := range cone {
		r.evalNode(int(id))
	}
}

// restore copies the nominal values of a cone back.
func (r *Result) restore(nom *Result, cone []int32) {
	for _, id := range cone {
		r.vals[id], r.known[id] = nom.vals[id], nom.known[id]
		if n := r.sh.nodes[id]; n.chain != nil {
			copy(r.chains[n.chainIdx].Stages, nom.chains[n.chainIdx].Stages)
			r.chains[n.chainIdx].Memo.Valid = false
		}
	}
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

// inputValue returns an input's value in a result.
func (r *Result) inputValue(id int) units.Q {
	v := r.sh.nodes[id].ty
	v.V = r.vals[id]
	return v
}

func (sc *scenario) sensitivity() []Sensitivity {
	s := sc.nom.sh
	f0 := numberIn(sc.fu, sc.nom.inputValue(sc.focus))
	var out []Sensitivity
	for _, id := range s.upstreamInputs(sc.focus) {
		q := s.nodes[id].q
		up, per := step(sc.nom.inputValue(id))
		v, ok := sc.at([]int{id}, []units.Q{up}, s.cone(id))
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
func (sc *scenario) tolerance(opt AnalysisOptions) *Tolerance {
	s, nom, focus := sc.nom.sh, sc.nom, sc.focus
	sinks := []int{focus}
	for _, rq := range s.Requires {
		if rq.code != nil {
			sinks = append(sinks, rq.deps...)
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
		v := nom.inputValue(id)
		lo, hi, err := q.Tol.Limits(v)
		if err != nil {
			continue
		}
		d, _ := numeric.ParseDist(q.Tol.Dist)
		ins = append(ins, tolIn{id, v, lo, hi, d})
	}
	if len(ins) == 0 {
		return nil
	}
	t := &Tolerance{Nominal: numberIn(sc.fu, nom.inputValue(focus)), Trials: opt.Trials, Seed: opt.Seed}

	// Worst case: find which limit of each input lowers (raises) the focus, then evaluate
	// the corner where all of them sit at those limits together.
	lowCorner := make([]units.Q, len(ins))
	highCorner := make([]units.Q, len(ins))
	ids := make([]int, len(ins))
	var rss float64
	for i, in := range ins {
		ids[i] = in.id
		cone := s.cone(in.id)
		fl, okl := sc.at([]int{in.id}, []units.Q{in.lo}, cone)
		fh, okh := sc.at([]int{in.id}, []units.Q{in.hi}, cone)
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
	union := s.coneOf(ids)
	t.WorstLow, _ = sc.at(ids, lowCorner, union)
	t.WorstHigh, _ = sc.at(ids, highCorner, union)
	t.RSSSigma = math.Sqrt(rss)

	// Monte Carlo: every trial draws every toleranced input, recomputes the cone of all of
	// them, and records the focus and whether all requirements hold. Each worker has its own
	// copy of the result; nothing is allocated per trial.
	n := opt.Trials
	focusVals := make([]float64, n)
	pass := make([]bool, n)
	draws := make([]float64, n*len(ins))
	workers := make([]*Result, opt.Workers)
	for w := range workers {
		workers[w] = nom.clone()
	}
	var progress func(int)
	if opt.Progress != nil {
		progress = func(done int) { opt.Progress("Monte Carlo", done, n) }
	}
	fty := s.nodes[focus].ty
	numeric.Trials(n, opt.Workers, opt.Seed, func(w, trial int, r *rand.Rand) {
		ev := workers[w]
		row := draws[trial*len(ins) : (trial+1)*len(ins)]
		for i, in := range ins {
			x := numeric.Draw(r, in.dist, in.nom.V, in.lo.V, in.hi.V)
			row[i] = x
			ev.vals[in.id], ev.known[in.id] = x, true
		}
		ev.runCone(union)
		focusVals[trial] = math.NaN()
		if ev.known[focus] {
			v := fty
			v.V = ev.vals[focus]
			focusVals[trial] = numberIn(sc.fu, v)
		}
		ev.requirements()
		pass[trial] = ev.known[focus] && ev.allPass()
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

func sweep(nom *Result, sw *Sweep) SweepResult {
	s := nom.sh
	vid := s.byName[sw.Vary]
	vq := s.nodes[vid].q
	res := SweepResult{Sweep: sw, Unit: unitName(vq)}
	e := nom.clone()
	down := s.cone(vid)
	xs := sweepPoints(sw)
	base := nom.inputValue(vid)
	set := func(q units.Q) {
		e.vals[vid], e.known[vid] = q.V, true
		e.runCone(down)
	}
	var plots []int
	for _, p := range sw.Plot {
		id := s.byName[p]
		plots = append(plots, id)
		res.Series = append(res.Series, Series{Quantity: p, Unit: unitName(s.nodes[id].q)})
	}
	for _, x := range xs {
		q := base
		q.V = x
		set(q)
		res.X = append(res.X, Number(vq, q))
		for i, id := range plots {
			v, ok := e.Value(s.nodes[id].q)
			y := math.NaN()
			if ok {
				y = Number(s.nodes[id].q, v)
			}
			res.Series[i].Y = append(res.Series[i].Y, y)
		}
	}
	set(base)
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
					q := base
					q.V = x
					set(q)
					v, ok := e.Value(s.nodes[id].q)
					if !ok {
						return math.NaN(), nil
					}
					return Number(s.nodes[id].q, v) - bound, nil
				}
				x, found, err := numeric.Brent(g, xs[i-1], xs[i], false, 1e-9)
				set(base)
				if err == nil && found {
					q := base
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

func solve(nom *Result, so *Solve) (SolveResult, error) {
	s := nom.sh
	vid := s.byName[so.Vary]
	tid := s.byName[so.SoThat]
	vq, tq := s.nodes[vid].q, s.nodes[tid].q
	res := SolveResult{Solve: so, Unit: unitName(vq)}
	base := nom.inputValue(vid)
	if so.Within[0].D != base.D || so.Within[1].D != base.D || so.Within[0].K != base.K {
		res.Note = fmt.Sprintf("within must be in the same unit kind as %s", so.Vary)
		return res, fmt.Errorf("%s", res.Note)
	}
	if !nom.known[tid] {
		res.Note = so.SoThat + " could not be evaluated"
		return res, nil
	}
	target, err := so.Equals.In(unitOf(tq))
	if err != nil {
		res.Note = fmt.Sprintf("equals %s does not fit %s: %v", so.Equals, so.SoThat, err)
		return res, fmt.Errorf("%s", res.Note)
	}
	e := nom.clone()
	down := s.cone(vid)
	g := func(x float64) (float64, error) {
		e.vals[vid], e.known[vid] = x, true
		e.runCone(down)
		v, ok := e.Value(tq)
		if !ok {
			return math.NaN(), nil
		}
		return Number(tq, v) - target, nil
	}
	lo, hi := so.Within[0].V, so.Within[1].V
	logScale := base.K == units.Linear && lo > 0 && hi > 0 && math.Max(lo, hi)/math.Min(lo, hi) >= 100
	x, found, err := numeric.Brent(g, lo, hi, logScale, 1e-10)
	if err != nil {
		res.Note = err.Error()
		return res, err
	}
	if !found {
		res.Note = "no crossing in range"
		return res, nil
	}
	q := base
	q.V = x
	res.Found, res.Value = true, Number(vq, q)
	return res, nil
}

// UnitName returns the symbol of the unit a quantity's numbers are reported in: its display
// unit, else the unit its type gives ("" for a plain number).
func UnitName(q *Quantity) string { return unitName(q) }
