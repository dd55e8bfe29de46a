package analysis

import (
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// FlowKind says what a row of a budget in signal order is.
type FlowKind string

// The rows of a budget in signal order.
const (
	FlowStart   FlowKind = "start"   // the first level (dBm, dBW, dBuV): where the signal starts
	FlowTerm    FlowKind = "term"    // a gain or loss in dB that changes the running value
	FlowTotal   FlowKind = "total"   // a quantity whose terms were just followed, and the value it reaches
	FlowCompare FlowKind = "compare" // a level subtracted from the running level: the comparison
)

// FlowRow is one row of a budget in signal order. Level is the running value after the row
// in Unit: a level (dBm) on the signal path, a ratio (dB) after the comparison.
type FlowRow struct {
	Item         string // a quantity's name, or "quantity: term" for a term inside a formula
	Quantity     string // the quantity the row belongs to
	Kind         FlowKind
	Change       float64 // the row's change of the running value in dB; NaN on a row that states a level
	ChangeUnit   string  // the unit the change is written in (dB, dBi, dBc)
	Compared     float64 // on a compare row, the level compared with, in ComparedUnit
	ComparedUnit string
	Terms        int // on the total of a group of gains and losses: how many term rows above it it sums
	Level        float64
	Unit         string
}

// FlowBlock is the decomposition of a level that the signal is compared with (a noise
// floor, a sensitivity): its own rows in the order its formula writes them.
type FlowBlock struct {
	Quantity string
	Rows     []FlowRow
}

// SignalFlow is a decibel focus in signal order: the terms as the formulas write them,
// followed depth-first through the quantities they name, from the first level (the
// transmitter's power, a thermal noise) through each gain and loss, with the running level
// after each, then the comparison with the level subtracted from it and what follows up to
// the focus. Levels that are compared with are broken down in Blocks, not in the path.
type SignalFlow struct {
	Rows   []FlowRow
	Blocks []FlowBlock
}

// flowEvent is one step of a formula flattened in signal order.
type flowEvent struct {
	item, owner string
	q           *engine.Quantity // set on a compare with a quantity, and on a leave
	leave       bool             // the terms of q have all been written
	sign        int
	v           units.Q
}

// isAbsLevel reports whether v is an absolute level with a reference (dBm, dBW, dBuV, dBuV/m)
// rather than a ratio (dB, dBi) or another decibel quantity (dBHz, dB/K).
func isAbsLevel(v units.Q) bool {
	return v.K == units.Level && (v.D == units.Power || v.D == units.Voltage || v.D == units.Voltage.Div(units.Length))
}

// signalFlow puts a decibel focus in signal order; it returns nil when the focus is not a
// level built from one starting level by decibel gains and losses, possibly compared with
// another level (a C/N0, an SFDR, a sum of mixed references).
func signalFlow(sc *engine.Scenario, focus *engine.Quantity) *SignalFlow {
	f := &flower{sh: focus.Sheet(), sc: sc}
	return f.flow(focus, 0)
}

// FlowOf puts focus in signal order as r evaluates it, as [Analyze] does for its focus: a
// page with several cases lays each case's levels beside the first case's rows. It returns
// nil where [Analysis.Flow] would be nil.
func FlowOf(r *engine.Result, focus *engine.Quantity) *SignalFlow {
	return signalFlow(r.Scenario(), focus)
}

// flower puts quantities of one scenario in signal order.
type flower struct {
	sh *engine.Sheet
	sc *engine.Scenario
}

// flow puts q in signal order: its formula flattened, the first level (added) as the start,
// then every event in turn; depth counts the compared levels followed into blocks.
func (f *flower) flow(q *engine.Quantity, depth int) *SignalFlow {
	fv, ok := f.sc.Value(q)
	if !ok || fv.K != units.Level || depth > 8 {
		return nil
	}
	var ev []flowEvent
	if !f.flatten(q, 1, 0, &ev) {
		return nil
	}
	start := -1
	for i, e := range ev {
		if !e.leave && e.q == nil && e.sign > 0 && isAbsLevel(e.v) {
			start = i
			break
		}
	}
	if start < 0 {
		return nil
	}
	cur := ev[start].v
	run := &flowRun{f: f, sf: &SignalFlow{}, cur: cur, depth: depth}
	run.sf.Rows = append(run.sf.Rows, FlowRow{Item: ev[start].item, Quantity: ev[start].owner, Kind: FlowStart, Change: math.NaN(), Level: number(cur), Unit: cur.UnitName()})
	for i, e := range ev {
		ok := true
		switch {
		case i == start:
			run.spoil()
		case e.leave:
			if e.q != q {
				run.leave(e)
			}
		case e.item == "":
			run.open = append(run.open, openQ{pure: true, first: len(run.sf.Rows)})
		case isAbsLevel(e.v) && e.sign < 0:
			ok = run.compare(e)
		case e.v.K == units.Level && e.v.D.IsNone():
			d := float64(e.sign) * e.v.V
			run.cur.V += d
			run.add(FlowRow{Item: e.item, Quantity: e.owner, Kind: FlowTerm, Change: d, ChangeUnit: e.v.UnitName()})
		default:
			ok = false // a term with another reference: not a level in signal order
		}
		if !ok {
			return nil
		}
	}
	sf, cur := run.sf, run.cur
	if math.Abs(cur.V-fv.V) > 1e-9*math.Max(1, math.Abs(fv.V)) || cur.D != fv.D {
		return nil
	}
	sf.Rows = append(sf.Rows, FlowRow{Item: q.Name, Quantity: q.Name, Kind: FlowTotal, Change: math.NaN(), Level: q.Number(fv), Unit: q.UnitName()})
	return sf
}

// openQ is a quantity whose terms are being written: whether they are all gains and losses
// so far (its total is then a change), or it holds the start or a comparison (its total is
// the value the path reaches); and where its rows begin.
type openQ struct {
	pure  bool
	first int
}

// flowRun builds the rows of one signal flow from its flattened events.
type flowRun struct {
	f     *flower
	sf    *SignalFlow
	cur   units.Q // the running value
	open  []openQ
	depth int
}

// spoil marks the innermost open quantity as holding more than gains and losses.
func (r *flowRun) spoil() {
	if len(r.open) > 0 {
		r.open[len(r.open)-1].pure = false
	}
}

// add appends a row at the running value.
func (r *flowRun) add(row FlowRow) {
	row.Level, row.Unit = number(r.cur), r.cur.UnitName()
	r.sf.Rows = append(r.sf.Rows, row)
}

// leave writes the total of a quantity whose terms were all written.
func (r *flowRun) leave(e flowEvent) {
	var o openQ
	if n := len(r.open); n > 0 {
		o, r.open = r.open[n-1], r.open[:n-1]
	}
	row := FlowRow{Item: e.q.Name, Quantity: e.q.Name, Kind: FlowTotal, Change: math.NaN()}
	if o.pure {
		row.Change, row.ChangeUnit = float64(e.sign)*e.v.V, e.v.UnitName()
		for _, x := range r.sf.Rows[o.first:] {
			if x.Kind == FlowTerm {
				row.Terms++
			}
		}
	} else {
		r.spoil()
		if math.Abs(r.cur.V-e.v.V) > 1e-9*math.Max(1, math.Abs(e.v.V)) || r.cur.D != e.v.D {
			row.Item = "after " + e.q.Name // the path started outside it
		}
	}
	r.add(row)
}

// compare subtracts a level from the running level; the level's own terms become a block.
func (r *flowRun) compare(e flowEvent) bool {
	next, err := units.Sub(r.cur, e.v)
	if err != nil || !isAbsLevel(r.cur) {
		return false
	}
	r.cur = next
	r.add(FlowRow{Item: e.item, Quantity: e.owner, Kind: FlowCompare, Change: math.NaN(), Compared: number(e.v), ComparedUnit: e.v.UnitName()})
	r.spoil()
	if e.q != nil {
		if sub := r.f.flow(e.q, r.depth+1); sub != nil {
			r.sf.Blocks = append(r.sf.Blocks, FlowBlock{Quantity: e.q.Name, Rows: sub.Rows})
			r.sf.Blocks = append(r.sf.Blocks, sub.Blocks...)
		}
	}
	return true
}

// flatten writes q's terms with the given sign in the order its formula writes them,
// following the quantities that are sums themselves; a subtracted level is not followed (it
// is the comparison). It reports false when a term cannot be evaluated or is not in decibels.
func (f *flower) flatten(q *engine.Quantity, sign, depth int, ev *[]flowEvent) bool {
	terms, ok := f.sh.Terms(q)
	if !ok || depth > 64 {
		return false
	}
	*ev = append(*ev, flowEvent{q: q, sign: sign}) // enter: item is empty
	for _, t := range terms {
		s := sign * t.Sign
		v, ok := f.sc.Term(t)
		if !ok || v.K != units.Level {
			return false
		}
		if t.Quantity != nil {
			_, isSum := f.sh.Terms(t.Quantity)
			if isSum && !(s < 0 && isAbsLevel(v)) {
				if !f.flatten(t.Quantity, s, depth+1, ev) {
					return false
				}
				continue
			}
			e := flowEvent{item: t.Quantity.Name, owner: t.Quantity.Name, sign: s, v: v}
			if isSum {
				e.q = t.Quantity
			}
			*ev = append(*ev, e)
			continue
		}
		*ev = append(*ev, flowEvent{item: q.Name + ": " + t.Text, owner: q.Name, sign: s, v: v})
	}
	v, _ := f.sc.Value(q)
	*ev = append(*ev, flowEvent{q: q, leave: true, sign: sign, v: v})
	return true
}

// number is a level in the unit it is shown in (dBm, dBW, dB).
func number(v units.Q) float64 {
	u, err := units.ParseUnit(v.UnitName())
	if err != nil {
		return v.V
	}
	x, err := v.In(u)
	if err != nil {
		return math.NaN()
	}
	return x
}
