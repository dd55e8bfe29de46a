package engine

import (
	"fmt"
	"strconv"

	"github.com/rfledger/rfledger/units"
)

// This file holds the checks for mistakes that would otherwise pass without a word: a value
// shown in a unit of another dimension, a solve's target or range in the wrong unit, a
// worksheet with nothing in it, and keys of the wrong kind that would be dropped.

// shownAt is where a quantity's `show` is written.
type shownAt struct {
	q *Quantity
	r Range
}

// checkMistakes runs once every formula has its type.
func (l *loader) checkMistakes() {
	l.checkEmpty()
	l.checkShows()
	l.convertedDisplay()
	l.checkSolveUnits()
	l.checkStageKinds()
	l.chainGroupKeys()
	l.checkPlanLOKinds()
}

// checkEmpty refuses a worksheet with no quantity at all (an empty file, a file of comments,
// a save cut short): it would pass with "0 of 0 requirements".
func (l *loader) checkEmpty() {
	for _, n := range l.sh.nodes {
		if n.q != nil {
			return
		}
	}
	if hasError(l.diags) {
		return
	}
	start := Pos{Line: 1, Col: 1}
	l.errAt(Range{File: l.sh.File, Start: start, End: start}, "", "add a quantity, e.g. power = \"14 dBm\" (rfledger new writes a starting worksheet)", "no quantities: the worksheet is empty")
}

func hasError(ds Diagnostics) bool {
	for _, d := range ds {
		if d.Severity == Error {
			return true
		}
	}
	return false
}

// checkShows refuses a `show` unit of another dimension than the quantity's value, which
// would leave the value with no number.
func (l *loader) checkShows() {
	for _, s := range l.shows {
		n := l.sh.nodes[s.q.node]
		if !n.typed || s.q.Show == nil {
			continue
		}
		if _, err := n.ty.In(s.q.Show); err != nil {
			l.errAt(s.r, s.q.Name, "show a unit of the same dimension as the value ("+describeType(n.ty)+")", "show: %s cannot be shown in %s", describeType(n.ty), s.q.Show.Sym)
			s.q.Show = nil
		}
	}
}

// describeType names a type by its unit ("dBm"), or "a plain number".
func describeType(t units.Q) string {
	if n := t.UnitName(); n != "" {
		return "a value in " + n
	}
	return "a plain number"
}

// convertedDisplay shows a quantity whose formula is to(x, 'unit') in that unit: within one
// family (dBi and dBd, dBV and dBmV) the value is the same and only the unit shown changes,
// so without this the conversion would not show at all.
func (l *loader) convertedDisplay() {
	for _, n := range l.sh.nodes {
		q := n.q
		if q == nil || !n.typed || n.code == nil || q.Show != nil || n.code.op != opCall || n.code.fn == nil || n.code.fn.Name != "to" {
			continue
		}
		if len(n.code.kids) < 2 || n.code.kids[1].op != opStr {
			continue
		}
		u, err := units.ParseUnit(n.code.kids[1].text)
		if err != nil {
			continue
		}
		if _, err := n.ty.In(u); err == nil {
			q.Unit = u
		}
	}
}

// checkSolveUnits refuses a solve whose target is not of the kind of its so_that quantity,
// or whose range is not of the kind of the input it varies (as a sweep's from and to are).
func (l *loader) checkSolveUnits() {
	var keep []*Solve
	for _, so := range l.sh.Solves {
		ok := true
		if tq, found := l.sh.Quantity(so.SoThat); found {
			if n := l.sh.nodes[tq.node]; n.typed {
				if !fits(so.Equals, n.ty, unitOf(tq)) {
					l.errAt(so.equalsAt, "solve "+so.Name, targetHint(n.ty), "equals %s cannot be compared with %s (%s)", so.Equals, so.SoThat, describeType(n.ty))
					ok = false
				}
			}
		}
		if vq, found := l.sh.Quantity(so.Vary); found && l.sh.nodes[vq.node].ok {
			in := l.sh.nodes[vq.node].input
			for _, w := range so.Within {
				if !sameKind(w, in) {
					l.errAt(so.withinAt, "solve "+so.Name, "write within in a unit like the input's, e.g. ["+strconv.Quote(vq.Text)+", …]", "within must be of the same kind as %s (%s), not %s", so.Vary, vq.Text, w)
					ok = false
					break
				}
			}
		}
		if ok {
			keep = append(keep, so)
		}
	}
	l.sh.Solves = keep
}

func targetHint(t units.Q) string {
	if n := t.UnitName(); n != "" {
		return "write equals in " + n + ", e.g. equals = \"0 " + n + "\""
	}
	return "write equals as a plain number, e.g. equals = 0"
}

// fits reports whether a target can be compared with values of type t shown in unit u
// (nil: a plain number).
func fits(v, t units.Q, u *units.Unit) bool {
	if u == nil {
		return sameKind(v, t)
	}
	_, err := v.In(u)
	return err == nil && v.D == t.D
}

// sameKind reports whether two values have the same dimension and decibel form.
func sameKind(a, b units.Q) bool { return a.D == b.D && a.K == b.K }

// noteText reads an optional `note`, which must be a text.
func (l *loader) noteText(f *sheetFile, path string, m map[string]any) string {
	v, has := m["note"]
	if !has {
		return ""
	}
	s, ok := v.(string)
	if !ok {
		l.errAt(f.valueRange(path), "", "write the note in quotes", "note must be a text in quotes, not %s", tomlText(v))
	}
	return s
}

// plotNames reads a sweep's `plot`: a name or a list of names, each a text.
func (l *loader) plotNames(f *sheetFile, path string, m map[string]any) []string {
	switch pl := m["plot"].(type) {
	case nil:
		return nil
	case string:
		return []string{pl}
	case []any:
		var out []string
		for i, e := range pl {
			s, ok := e.(string)
			if !ok {
				l.errAt(f.valueRange(fmt.Sprintf("%s[%d]", path, i)), "sweep", "write the names in quotes, e.g. plot = [\"link.margin\"]", "plot names quantities in quotes, not %s", tomlText(e))
				continue
			}
			out = append(out, s)
		}
		return out
	default:
		l.errAt(f.valueRange(path), "sweep", "write plot = [\"link.margin\"]", "plot names quantities in quotes, not %s", tomlText(pl))
		return nil
	}
}

// tomlText describes a TOML value in an error: a number as written, a text in quotes, else
// its kind.
func tomlText(v any) string {
	switch x := v.(type) {
	case int64:
		return strconv.FormatInt(x, 10)
	case float64:
		return strconv.FormatFloat(x, 'g', -1, 64)
	case string:
		return strconv.Quote(x) + " (a text)"
	}
	return "a " + tomlType(v)
}
