package cli

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/units"
)

// regression is what diff --exit-code looks at.
type regression struct {
	flipped     []string // requirements that held in the old sheet and fail in the new
	focusWorse  bool     // the focus moved the wrong way by more than the tolerance
	focusChange string   // new − old of the focus, "" when the two cannot be compared
	lowerWorse  bool     // the direction that counts as worse
}

// regressions compares two evaluated sheets. A fall of the focus counts as worse unless a
// requirement on the focus bounds it from above only (a noise figure ≤ 3 dB): the focus is
// usually a margin, where less is worse (common practice, no source).
func regressions(ra, rb *engine.Result, tol units.Q) (regression, error) {
	a, b := ra.Sheet(), rb.Sheet()
	var r regression
	for _, p := range pairRequires(a, b) {
		if p.old == nil || p.new == nil {
			continue
		}
		was, _ := ra.Pass(p.old)
		now, _ := rb.Pass(p.new)
		if was && !now {
			that := p.new.That
			if p.old.That != p.new.That {
				that += " (edited from " + p.old.That + ")"
			}
			r.flipped = append(r.flipped, that)
		}
	}
	r.lowerWorse = lowerIsWorse(b)
	fb, ok1 := b.Quantity(b.Focus)
	fa, ok2 := a.Quantity(b.Focus)
	if !ok1 || !ok2 {
		return r, nil
	}
	va, ok1 := ra.Value(fa)
	vb, ok2 := rb.Value(fb)
	if !ok1 || !ok2 {
		return r, nil
	}
	d, err := units.Sub(vb, va)
	if err != nil {
		return r, nil // not comparable (the focus changed its kind): not a regression of the value
	}
	r.focusChange = d.String()
	limit, err := toleranceLike(tol, d, fb)
	if err != nil {
		return r, err
	}
	if r.lowerWorse {
		r.focusWorse = d.V < -limit
	} else {
		r.focusWorse = d.V > limit
	}
	return r, nil
}

// reqPair is a requirement of the old sheet and its counterpart in the new one; old or new
// is nil for one that was added or removed.
type reqPair struct{ old, new *engine.Require }

// pairRequires matches the requirements of two sheets: by their text, then an unmatched one
// with an unmatched one that bounds the same quantity from the same side (an edited bound:
// "m >= 5 dBm" become "m >= 8 dBm"), in order. The new sheet's come first, in its order, then
// the removed ones.
func pairRequires(a, b *engine.Sheet) []reqPair {
	byText := map[string]*engine.Require{}
	for _, rq := range a.Requires {
		if _, dup := byText[rq.That]; !dup {
			byText[rq.That] = rq
		}
	}
	used := map[*engine.Require]bool{}
	out := make([]reqPair, len(b.Requires))
	for i, rq := range b.Requires {
		out[i].new = rq
		if o := byText[rq.That]; o != nil && !used[o] {
			out[i].old, used[o] = o, true
		}
	}
	for i := range out {
		if out[i].old != nil || out[i].new.Subject == "" {
			continue
		}
		for _, o := range a.Requires {
			if !used[o] && o.Subject == out[i].new.Subject && sameSide(o.Op, out[i].new.Op) && byThat(b, o.That) == nil {
				out[i].old, used[o] = o, true
				break
			}
		}
	}
	for _, o := range a.Requires {
		if !used[o] {
			out = append(out, reqPair{old: o})
		}
	}
	return out
}

// sameSide reports whether two comparisons bound a quantity from the same side.
func sameSide(a, b string) bool {
	side := func(op string) int {
		switch op {
		case ">=", ">":
			return 1
		case "<=", "<":
			return -1
		}
		return 0
	}
	return side(a) == side(b)
}

// byThat is the requirement of sh written as that, nil when there is none.
func byThat(sh *engine.Sheet, that string) *engine.Require {
	for _, rq := range sh.Requires {
		if rq.That == that {
			return rq
		}
	}
	return nil
}

// toleranceLike returns the tolerance as a number comparable with the change d (dB for a
// decibel focus, SI units for a linear one). A plain number is taken in the focus's unit.
func toleranceLike(tol, d units.Q, focus *engine.Quantity) (float64, error) {
	if tol.IsNumber() && tol.D.IsNone() && !d.IsNumber() {
		if d.K == units.Level {
			return tol.V, nil // decibels
		}
		unit := engine.UnitName(focus)
		u, err := units.ParseUnit(unit)
		if err != nil {
			return 0, err
		}
		return u.Of(tol.V).V, nil
	}
	if tol.D != d.D || (tol.K == units.Level) != (d.K == units.Level) {
		return 0, fmt.Errorf("%s is not of the kind of the focus's change (%s)", tol, d.UnitName())
	}
	return math.Abs(tol.V), nil
}

// lowerIsWorse says which way the focus must not move: down, unless every requirement on it
// is an upper bound.
func lowerIsWorse(sh *engine.Sheet) bool {
	upper, lower := false, false
	for _, rq := range sh.Requires {
		if rq.Subject != sh.Focus || sh.Focus == "" {
			continue
		}
		switch rq.Op {
		case "<=", "<":
			upper = true
		case ">=", ">":
			lower = true
		}
	}
	return !(upper && !lower)
}

// The JSON of diff --format json.
type diffDoc struct {
	Format       int        `json:"format"`
	Old          diffSide   `json:"old"`
	New          diffSide   `json:"new"`
	Focus        *diffFocus `json:"focus"`
	Requirements []diffReq  `json:"requirements"`
	Quantities   []diffQ    `json:"quantities"`
	Regression   bool       `json:"regression"` // what --exit-code exits 1 on
	Flipped      []string   `json:"flipped"`
	Cases        []diffCase `json:"cases,omitempty"` // case by case, when either sheet has [[case]] entries (cases.go)
	// The solves' answers and the spread of each side's focus (diffanalysis.go); tolerance is
	// null when neither focus depends on an input with a tolerance.
	Solves    []diffSolve    `json:"solves"`
	Tolerance *diffTolerance `json:"tolerance"`
}

type diffSide struct {
	File string `json:"file"`
	Hash string `json:"hash"`
}

type diffFocus struct {
	Name   string     `json:"name"`
	Old    *diffValue `json:"old"`
	New    *diffValue `json:"new"`
	Change string     `json:"change"` // new − old, "" when they cannot be compared
	Worse  bool       `json:"worse"`  // moved the wrong way by more than --tolerance
	Lower  bool       `json:"lower_is_worse"`

	// The focus's definition, old and new: another quantity (renamed), or the same one
	// obtained by another formula ("" for an input).
	OldName        string `json:"old_name"`
	Formula        string `json:"formula"`
	OldFormula     string `json:"old_formula"`
	Renamed        bool   `json:"renamed"`
	FormulaChanged bool   `json:"formula_changed"`
}

type diffValue struct {
	Value   *float64 `json:"value"`
	Unit    string   `json:"unit"`
	SI      *float64 `json:"si"`
	SIUnit  string   `json:"si_unit"`
	Display string   `json:"display"`
}

type diffReq struct {
	That string `json:"that"`
	Old  string `json:"old"` // pass, fail, unknown (cannot be evaluated) or absent
	New  string `json:"new"`

	Was string `json:"was,omitempty"` // the old text of a bound that was edited
}

type diffQ struct {
	Name           string     `json:"name"`
	Status         string     `json:"status"` // new, removed or changed
	Old            *diffValue `json:"old"`
	New            *diffValue `json:"new"`
	FormulaChanged bool       `json:"formula_changed"`
}

func valueOf(r *engine.Result, q *engine.Quantity) *diffValue {
	if q == nil {
		return nil
	}
	v, unit := r.Number(q)
	dv := &diffValue{Unit: unit, Display: r.Display(q)}
	if qv, known := r.Value(q); known {
		dv.Value = finiteOrNil(v)
		dv.SI, dv.SIUnit = report.SI(qv)
	}
	return dv
}

func finiteOrNil(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func reqState(r *engine.Result, rq *engine.Require) string {
	if rq == nil {
		return "absent"
	}
	pass, known := r.Pass(rq)
	switch {
	case !known:
		return "unknown"
	case pass:
		return "pass"
	}
	return "fail"
}

// diffJSON writes what changed between two evaluated sheets, in the order diffMarkdown uses.
func diffJSON(oldName, newName string, ra, rb *engine.Result, reg regression) []byte {
	return encode(diffDocOf(oldName, newName, ra, rb, reg))
}

// diffDocOf works out what changed between two evaluations.
func diffDocOf(oldName, newName string, ra, rb *engine.Result, reg regression) diffDoc {
	a, b := ra.Sheet(), rb.Sheet()
	doc := diffDoc{Format: 1, Old: diffSide{oldName, a.Hash}, New: diffSide{newName, b.Hash},
		Requirements: []diffReq{}, Quantities: []diffQ{}, Flipped: append([]string{}, reg.flipped...), Solves: []diffSolve{},
		Regression: reg.focusWorse || len(reg.flipped) > 0}
	if f, ok := b.Quantity(b.Focus); ok {
		old, _ := a.Quantity(b.Focus)
		doc.Focus = &diffFocus{Name: f.Name, New: valueOf(rb, f), Change: reg.focusChange, Worse: reg.focusWorse, Lower: reg.lowerWorse,
			OldName: a.Focus, Formula: f.Formula}
		doc.Focus.Renamed, doc.Focus.FormulaChanged = focusRedefined(a, b)
		if old != nil {
			doc.Focus.Old = valueOf(ra, old)
		}
		if of, ok := a.Quantity(a.Focus); ok {
			doc.Focus.OldFormula = of.Formula
		}
	}
	for _, p := range pairRequires(a, b) {
		switch {
		case p.new == nil:
			doc.Requirements = append(doc.Requirements, diffReq{That: p.old.That, Old: reqState(ra, p.old), New: "absent"})
		case p.old != nil && p.old.That != p.new.That:
			doc.Requirements = append(doc.Requirements, diffReq{That: p.new.That, Was: p.old.That, Old: reqState(ra, p.old), New: reqState(rb, p.new)})
		default:
			doc.Requirements = append(doc.Requirements, diffReq{That: p.new.That, Old: reqState(ra, p.old), New: reqState(rb, p.new)})
		}
	}
	for _, q := range b.Quantities() {
		old, ok := a.Quantity(q.Name)
		switch {
		case !ok:
			doc.Quantities = append(doc.Quantities, diffQ{Name: q.Name, Status: "new", New: valueOf(rb, q)})
		case ra.Display(old) != rb.Display(q) || old.Formula != q.Formula || old.Text != q.Text:
			doc.Quantities = append(doc.Quantities, diffQ{Name: q.Name, Status: "changed", Old: valueOf(ra, old), New: valueOf(rb, q), FormulaChanged: old.Formula != q.Formula})
		}
	}
	for _, q := range a.Quantities() {
		if _, ok := b.Quantity(q.Name); !ok {
			doc.Quantities = append(doc.Quantities, diffQ{Name: q.Name, Status: "removed", Old: valueOf(ra, q)})
		}
	}
	return doc
}

// encode writes v as indented JSON, as the report writers do.
func encode(v any) []byte {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	_ = enc.Encode(v) // only plain values: cannot fail
	return b.Bytes()
}
