package report

import (
	"bytes"
	"fmt"
	"math"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/chart"
	"github.com/rfledger/rfledger/units"
)

// signalFlow writes the budget in signal order: the path from the first level to the level
// compared, the comparison and what follows it up to the focus, then each compared level's
// own terms in a block of its own. On a page with cases side by side, each case whose budget
// follows the same signal order gets a level column of its own.
func (p *page) signalFlow() {
	a := p.in.Analysis
	fl := a.Flow
	cols, apart := p.caseFlows()
	p.f("%s = %s in signal order: each term as the formulas write it, followed through the quantities they name, with the level after it", code(a.Focus.Name), p.r.Display(a.Focus))
	if len(cols) > 1 {
		p.f(" in each case (a case's change or compared level, where it differs from the first column's, in brackets beside its level)")
	}
	if len(fl.Blocks) > 0 {
		p.f("; the level it is compared with is broken down below")
	}
	p.f(":\n\n")
	if len(apart) > 0 {
		p.f("%s: not the same signal order, so no column here; see the line items.\n\n", strings.Join(apart, ", "))
	}
	p.flowTable(fl.Rows, cols, func(f *analysis.SignalFlow) []analysis.FlowRow { return f.Rows })
	for i, b := range fl.Blocks {
		rowsOf := func(f *analysis.SignalFlow) []analysis.FlowRow { return f.Blocks[i].Rows }
		p.f("%s, compared with above, is formed of", code(b.Quantity))
		if len(cols) > 1 && sameInEvery(b.Rows, cols, rowsOf) {
			p.f(" (the same in every case)")
		}
		p.f(":\n\n")
		p.flowTable(b.Rows, cols, rowsOf)
	}
	p.flowChart()
}

// caseFlow is one case's budget in signal order, for its level column.
type caseFlow struct {
	name string
	fl   *analysis.SignalFlow
}

// caseFlows returns, on a page whose cases fit side by side, the first case's budget in
// signal order and then each other case's whose rows are the same items in the same order;
// apart names, quoted, the cases whose budget follows another order (or cannot be put in one).
// A page of one case gets nothing.
func (p *page) caseFlows() (cols []caseFlow, apart []string) {
	if !p.multiCase() || !p.wideCases() {
		return nil, nil
	}
	a := p.in.Analysis
	for i, c := range p.in.Cases {
		var fl *analysis.SignalFlow
		switch {
		case i == 0:
			fl = a.Flow
		case c.Analysis != nil && c.Analysis.Focus == a.Focus:
			fl = c.Analysis.Flow
		case c.Result.Known(a.Focus):
			fl = analysis.FlowOf(c.Result, a.Focus)
		}
		if fl == nil || !sameFlow(a.Flow, fl) {
			apart = append(apart, "“"+text(c.Case.Name)+"”")
			continue
		}
		cols = append(cols, caseFlow{name: c.Case.Name, fl: fl})
	}
	return cols, apart
}

// sameFlow reports whether two budgets in signal order have the same rows: items, kinds and
// units, in the path and in every block.
func sameFlow(a, b *analysis.SignalFlow) bool {
	same := func(x, y []analysis.FlowRow) bool {
		if len(x) != len(y) {
			return false
		}
		for i := range x {
			if x[i].Item != y[i].Item || x[i].Kind != y[i].Kind || x[i].Unit != y[i].Unit {
				return false
			}
		}
		return true
	}
	if !same(a.Rows, b.Rows) || len(a.Blocks) != len(b.Blocks) {
		return false
	}
	for i := range a.Blocks {
		if a.Blocks[i].Quantity != b.Blocks[i].Quantity || !same(a.Blocks[i].Rows, b.Blocks[i].Rows) {
			return false
		}
	}
	return true
}

// sameInEvery reports whether every case's rows print as the first case's: such a table
// (a noise floor no case changes) shows its levels once, as the line items do.
func sameInEvery(rows []analysis.FlowRow, cols []caseFlow, rowsOf func(*analysis.SignalFlow) []analysis.FlowRow) bool {
	for _, c := range cols {
		for j, r := range rowsOf(c.fl) {
			f := rows[j]
			if fmtNum(r.Level, r.Unit) != fmtNum(f.Level, f.Unit) || signedIn(r.Change, r.ChangeUnit) != signedIn(f.Change, f.ChangeUnit) || fmtNum(r.Compared, r.ComparedUnit) != fmtNum(f.Compared, f.ComparedUnit) {
				return false
			}
		}
	}
	return true
}

// flowTable writes rows of a budget in signal order: numbered terms, and in bold the
// quantities they add up to. With more than one case column, rowsOf picks the same rows out of
// each case's budget, and each case gets a level column.
func (p *page) flowTable(rows []analysis.FlowRow, cols []caseFlow, rowsOf func(*analysis.SignalFlow) []analysis.FlowRow) {
	if len(cols) < 2 || sameInEvery(rows, cols, rowsOf) {
		cols = nil
	}
	levels := func(j int, bold bool) string {
		if cols == nil {
			lv := fmtNum(rows[j].Level, rows[j].Unit)
			if bold {
				lv = "**" + lv + "**"
			}
			return lv
		}
		var cells []string
		for k, c := range cols {
			r := rowsOf(c.fl)[j]
			cell := fmtNum(r.Level, r.Unit)
			if bold {
				cell = "**" + cell + "**"
			}
			first := rows[j]
			switch {
			case k == 0:
			case (r.Kind == analysis.FlowTerm || r.Kind == analysis.FlowTotal && !math.IsNaN(r.Change)) && signedIn(r.Change, r.ChangeUnit) != signedIn(first.Change, first.ChangeUnit):
				cell += " (" + signedIn(r.Change, r.ChangeUnit) + ")"
			case r.Kind == analysis.FlowCompare && fmtNum(r.Compared, r.ComparedUnit) != fmtNum(first.Compared, first.ComparedUnit):
				cell += " (vs " + fmtNum(r.Compared, r.ComparedUnit) + ")"
			}
			cells = append(cells, cell)
		}
		return strings.Join(cells, " | ")
	}
	if cols == nil {
		p.f("| # | item | change | level |\n| ---: | --- | ---: | ---: |\n")
	} else {
		p.f("| # | item | change |")
		for _, c := range cols {
			p.f(" %s |", text(c.name))
		}
		p.f("\n| ---: | --- | ---: |%s\n", strings.Repeat(" ---: |", len(cols)))
	}
	n := 0
	for j, r := range rows {
		switch r.Kind {
		case analysis.FlowStart, analysis.FlowTerm:
			n++
			ch := ""
			if r.Kind == analysis.FlowTerm {
				ch = signedIn(r.Change, r.ChangeUnit)
			}
			p.f("| %d | %s | %s | %s |\n", n, code(r.Item), ch, levels(j, false))
		case analysis.FlowCompare:
			n++
			p.f("| %d | compared with %s = %s | | %s |\n", n, code(r.Item), fmtNum(r.Compared, r.ComparedUnit), levels(j, false))
		case analysis.FlowTotal:
			if !math.IsNaN(r.Change) {
				p.f("| | %s%s | %s | %s |\n", code(r.Item), span(n, r.Terms), signedIn(r.Change, r.ChangeUnit), levels(j, false))
				continue
			}
			p.f("| | **%s** | | %s |\n", code(r.Item), levels(j, true))
		}
	}
	p.f("\n")
}

// span names the last k numbered rows up to row n: " (4–6)".
func span(n, k int) string {
	switch {
	case k <= 0:
		return ""
	case k == 1:
		return fmt.Sprintf(" (%d)", n)
	}
	return fmt.Sprintf(" (%d–%d)", n-k+1, n)
}

// flowChart draws the budget in signal order as a waterfall of levels: the path, the level
// compared with (formed from its own terms), what follows the comparison as a move of that
// level, and the margin as the gap between the two.
func (p *page) flowChart() {
	a := p.in.Analysis
	steps, unit := flowSteps(a.Flow, p.focusUp())
	spec := chart.WaterfallSpec{Title: a.Focus.Name + " in signal order", Unit: unit, Steps: steps}
	p.addChart("budget", a.Focus.Name+" in signal order", func(b *bytes.Buffer) error { return chart.Waterfall(b, spec) })
}

// focusUp is +1 when a rise of the focus is good, −1 when a requirement caps it (a
// sensitivity, a spurious level).
func (p *page) focusUp() float64 {
	for _, rq := range p.in.Sheet.Requires {
		if rq.Subject == p.in.Analysis.Focus.Name && strings.HasPrefix(rq.Op, "<") {
			return -1
		}
	}
	return 1
}

// waterfall lays rows of a budget in signal order out on one level axis, in the unit of the
// level the path starts from (a dBm compared level on a dBW path is moved by 30 dB).
type waterfall struct {
	steps []chart.Step
	unit  string  // of the level axis
	up    float64 // +1 when a rise of the path's level is good, −1 when it is bad
	prev  float64 // the level the last row reached, on the axis
}

// at is a level in unit on the axis; NaN when it cannot be put there.
func (w *waterfall) at(v float64, unit string) float64 {
	if unit == w.unit {
		return v
	}
	from, err1 := units.ParseUnit(unit)
	to, err2 := units.ParseUnit(w.unit)
	if err1 != nil || err2 != nil {
		return math.NaN()
	}
	x, err := from.Of(v).In(to)
	if err != nil {
		return math.NaN()
	}
	return x
}

// path adds a row of the path or of a block: a gain or loss is a bar from the level before
// it, a level a mark; a group's total adds nothing (its bars are drawn already).
func (w *waterfall) path(r analysis.FlowRow) {
	lv := w.at(r.Level, r.Unit)
	switch {
	case r.Kind == analysis.FlowTerm:
		w.steps = append(w.steps, chart.Step{Label: shorten(r.Item, 34), Kind: chart.StepChange, From: w.prev, To: lv, Text: signedIn(r.Change, r.ChangeUnit), Good: w.up*r.Change > 0})
	case r.Kind == analysis.FlowStart || r.Kind == analysis.FlowTotal && math.IsNaN(r.Change):
		w.steps = append(w.steps, chart.Step{Label: shorten(r.Item, 34), Kind: chart.StepLevel, To: lv, Text: fmtNum(r.Level, r.Unit)})
	default:
		return
	}
	w.prev = lv
}

// flowSteps lays the rows of a budget in signal order out on one level axis, and returns
// the axis's unit; up is +1 when a rise of the path's level is good, −1 when it is bad.
func flowSteps(fl *analysis.SignalFlow, up float64) ([]chart.Step, string) {
	if len(fl.Rows) == 0 {
		return nil, ""
	}
	w := &waterfall{unit: fl.Rows[0].Unit, up: up, prev: math.NaN()}
	compared := false
	received, ref := math.NaN(), math.NaN()
	for i, r := range fl.Rows {
		switch {
		case !compared && r.Kind != analysis.FlowCompare:
			w.path(r)
		case r.Kind == analysis.FlowCompare:
			if compared {
				return w.steps, w.unit // a second comparison has no place on one level axis
			}
			compared, received, ref = true, w.prev, w.at(r.Compared, r.ComparedUnit)
			w.up = -w.up // a rise of the level compared with lowers the margin
			w.formed(fl, r)
		case r.Kind == analysis.FlowTerm:
			// After the comparison a gain raises the margin: on the level axis it lowers the
			// level compared with.
			w.steps = append(w.steps, chart.Step{Label: shorten(r.Item, 34), Kind: chart.StepChange, From: ref, To: ref - r.Change, Text: signedIn(-r.Change, r.ChangeUnit), Good: r.Change > 0})
			ref -= r.Change
		case i == len(fl.Rows)-1:
			w.steps = append(w.steps, chart.Step{Label: shorten(r.Item, 34), Kind: chart.StepGap, From: ref, To: received, Text: fmtNum(r.Level, r.Unit), Good: r.Level >= 0})
		}
	}
	return w.steps, w.unit
}

// formed adds the rows of the block that forms a compared level, or a mark at the level when
// it has no terms of its own.
func (w *waterfall) formed(fl *analysis.SignalFlow, r analysis.FlowRow) {
	for _, b := range fl.Blocks {
		if b.Quantity == r.Item {
			for _, br := range b.Rows {
				w.path(br)
			}
			return
		}
	}
	w.path(analysis.FlowRow{Item: r.Item, Kind: analysis.FlowStart, Level: r.Compared, Unit: r.ComparedUnit})
}

// jsonFlowRow is one row of "signal_flow": the rows of the path and comparison first, then
// each compared level's own rows with "block" naming it.
type jsonFlowRow struct {
	Item   string   `json:"item"`
	Kind   string   `json:"kind"`   // start, term, total or compare
	Change *float64 `json:"change"` // dB; null on a row that states a level
	Level  *float64 `json:"level"`  // the running value after the row
	Unit   string   `json:"unit"`   // of level
	Block  string   `json:"block"`  // the compared level the row forms; "" on the path
}

func flowJSON(fl *analysis.SignalFlow) []jsonFlowRow {
	out := []jsonFlowRow{}
	if fl == nil {
		return out
	}
	add := func(rows []analysis.FlowRow, block string) {
		for _, r := range rows {
			out = append(out, jsonFlowRow{Item: r.Item, Kind: string(r.Kind), Change: num(r.Change), Level: num(r.Level), Unit: r.Unit, Block: block})
		}
	}
	add(fl.Rows, "")
	for _, b := range fl.Blocks {
		add(b.Rows, b.Quantity)
	}
	return out
}

// contribution writes a line item's signed value; a subtracted level keeps its own sign
// inside, "-(-228.60 dBW/K/Hz)", since a +228.60 dBW/K/Hz would be a level that is not there.
func contribution(c analysis.Contribution) string {
	switch c.Unit {
	case "dB", "dBi", "dBc", "dBd":
	default:
		if c.Sign < 0 && c.Value > 0 {
			return "-(" + fmtNum(-c.Value, c.Unit) + ")"
		}
	}
	return signed(c.Value) + " " + c.Unit
}
