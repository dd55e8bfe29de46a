package engine

import (
	"fmt"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
)

// NominalName is the name of the nominal evaluation when the sheet does not name it.
const NominalName = "nominal"

// Case is a named operating point of the budget ([[case]]): the sheet evaluated with some
// inputs replaced, as --set replaces them. The nominal evaluation is a Case too, with no Set.
type Case struct {
	Name     string     // the case's name, as --case selects it
	Note     string     // the note written with it, "" for none
	Set      []Override // in file order, each an input of the sheet with a value of its kind
	Focus    string     // the quantity this case centres on; "" means the sheet's focus
	Analyses bool       // run the analyses for this case even without --all-cases
	Nominal  bool       // the nominal evaluation (no overrides)
	Range    Range      // where the [[case]] is written; no position for an unnamed nominal
}

// FocusName returns the quantity the case centres on: its own focus, else the sheet's.
func (c *Case) FocusName(s *Sheet) string {
	if c.Focus != "" {
		return c.Focus
	}
	return s.Focus
}

var caseKeys = keyNames(caseKeyDocs)

// caseSite remembers where a case's set entries are written, for checking them once the
// sheet is compiled and every input's type is known.
type caseSite struct {
	c     *Case
	keyAt []Range // per entry of c.Set: the key
	valAt []Range // per entry of c.Set: the value
	focus Range
	name  Range
}

// cases reads the top-level "case" key: [[case]] tables in file order. A case without set
// names the nominal evaluation.
func (l *loader) cases(f *sheetFile, v any) {
	seen := map[string]Range{}
	for i, m := range tableList(l, f, "case", v) {
		p := fmt.Sprintf("case[%d]", i)
		r := f.rangeOf(p)
		if i == MaxCases {
			l.errAt(r, "case", "split the operating points over several worksheets", "more than %d cases", MaxCases)
			return
		}
		l.checkKeys(f, p, m, caseKeys, "a case's")
		c := &Case{Range: r}
		if !l.caseName(f, p, m, c) || !l.caseText(f, p, m, c) {
			continue
		}
		if at, dup := seen[c.Name]; dup {
			l.errAt(f.valueRange(join(p, "name")), "case", "already defined at "+at.String(), "case %q is defined twice", c.Name)
			continue
		}
		seen[c.Name] = f.valueRange(join(p, "name"))
		cs := &caseSite{c: c, focus: f.valueRange(join(p, "focus")), name: f.valueRange(join(p, "name"))}
		if sv, has := m["set"]; has {
			if !l.caseSet(f, join(p, "set"), sv, cs) {
				continue
			}
		}
		if len(c.Set) == 0 {
			if l.sh.Nominal != nil {
				l.errAt(r, "case", "already named at "+l.sh.Nominal.Range.String(), "a second case without set: only the nominal evaluation has no overrides")
				continue
			}
			if c.Focus != "" {
				l.errAt(cs.focus, "case", "the nominal case centres on the sheet's focus; set focus at the top of the sheet", "the nominal case cannot have its own focus")
				continue
			}
			c.Nominal = true
			l.sh.Nominal = c
			l.caseSites = append(l.caseSites, cs)
			continue
		}
		l.sh.Cases = append(l.sh.Cases, c)
		l.caseSites = append(l.caseSites, cs)
	}
	if l.sh.Nominal == nil {
		if r, dup := seen[NominalName]; dup {
			l.errAt(r, "case", "the unnamed nominal evaluation is called so; name it with a [[case]] without set, or choose another name", "case %q is defined twice", NominalName)
		}
	}
}

// caseName reads a case's required name.
func (l *loader) caseName(f *sheetFile, p string, m map[string]any, c *Case) bool {
	nv, has := m["name"]
	if !has {
		l.errAt(f.rangeOf(p), "case", "write name = \"heavy rain\"", "a case needs a name")
		return false
	}
	s, ok := nv.(string)
	s = strings.TrimSpace(s)
	if !ok || s == "" {
		l.errAt(f.valueRange(join(p, "name")), "case", "write name = \"heavy rain\"", "a case's name must be a non-empty text in quotes")
		return false
	}
	c.Name = s
	return true
}

// caseText reads a case's note, focus and analyses.
func (l *loader) caseText(f *sheetFile, p string, m map[string]any, c *Case) bool {
	ok := true
	for _, key := range []string{"note", "focus"} {
		v, has := m[key]
		if !has {
			continue
		}
		s, isText := v.(string)
		if !isText {
			l.errAt(f.valueRange(join(p, key)), "case", "", "%s must be a text in quotes", key)
			ok = false
			continue
		}
		if key == "note" {
			c.Note = s
		} else {
			c.Focus = strings.TrimSpace(s)
		}
	}
	if v, has := m["analyses"]; has {
		b, isBool := v.(bool)
		if !isBool {
			l.errAt(f.valueRange(join(p, "analyses")), "case", "write analyses = true", "analyses must be true or false")
			ok = false
		}
		c.Analyses = b
	}
	return ok
}

// caseSet reads a case's set table: input names and the values they take, in file order.
func (l *loader) caseSet(f *sheetFile, p string, v any, cs *caseSite) bool {
	m, isTable := v.(map[string]any)
	if !isTable {
		l.errAt(f.valueRange(p), "case", `write set = { "path.distance" = "8 km" }`, "set must be a table of input names and values")
		return false
	}
	ok := true
	for _, name := range l.ordered(f, p, m) {
		kp := keyJoin(p, name)
		var text string
		switch x := m[name].(type) {
		case string:
			text = strings.TrimSpace(x)
		case int64:
			text = strconv.FormatInt(x, 10)
		case float64:
			text = strconv.FormatFloat(x, 'g', -1, 64)
		default:
			l.errAt(f.valueRange(kp), name, "write a number with its unit in quotes, e.g. \"8 km\"", "a %s is not a value for an input", tomlType(x))
			ok = false
			continue
		}
		cs.c.Set = append(cs.c.Set, Override{Name: name, Value: text})
		cs.keyAt = append(cs.keyAt, f.rangeOf(kp))
		cs.valAt = append(cs.valAt, f.valueRange(kp))
	}
	return ok
}

// checkCases checks every case's overrides as --set is checked (an input of the sheet, a
// value of the same kind) and its focus, positioned where they are written. A case with an
// error is dropped.
func (l *loader) checkCases() {
	var kept []*Case
	for _, cs := range l.caseSites {
		ok := l.caseNameFree(cs)
		if cs.c.Nominal {
			if !ok {
				l.sh.Nominal = nil
			}
			continue
		}
		for i, o := range cs.c.Set {
			if _, _, d := l.sh.checkOverride(o, cs.keyAt[i], cs.valAt[i], l.suggest); d != nil {
				l.diags = append(l.diags, *d)
				ok = false
			}
		}
		if f := cs.c.Focus; f != "" {
			if _, found := l.sh.Quantity(f); !found {
				l.errAt(cs.focus, "case", l.suggest(f, scope{}), "focus names no quantity: %q", f)
				ok = false
			}
		}
		if ok {
			kept = append(kept, cs.c)
		}
	}
	l.sh.Cases = kept
	if l.sh.Nominal == nil {
		l.sh.Nominal = &Case{Name: NominalName, Nominal: true, Range: Range{File: l.sh.File}}
	}
}

// caseNameFree reports whether no group of the sheet is named like the case (a name on the
// page and on the command line must say which it is).
func (l *loader) caseNameFree(cs *caseSite) bool {
	for _, g := range l.sh.Groups {
		if g.Name != "" && g.Name == cs.c.Name {
			l.errAt(cs.name, "case", "choose a name no group has", "case %q is named like the group [%s]", cs.c.Name, g.Name)
			return false
		}
	}
	return true
}

// Overrides returns what the case is evaluated with: the overrides given for the whole run
// (--set) and then the case's own, which win where both name an input.
func (c *Case) Overrides(run []Override) []Override {
	out := make([]Override, 0, len(run)+len(c.Set))
	for _, o := range run {
		mine := false
		for _, co := range c.Set {
			mine = mine || co.Name == o.Name
		}
		if !mine {
			out = append(out, o)
		}
	}
	return append(out, c.Set...)
}

// EvalCases evaluates each case from nominal, an evaluation of this sheet with the run's
// overrides (the case's own added, see [Case.Overrides]): only the cones of the inputs a case
// changes are computed again. The cases run in parallel on up to workers goroutines (0 means
// GOMAXPROCS); results[i] and diags[i] belong to cases[i], the same for any number of workers.
func (s *Sheet) EvalCases(nominal *Result, cases []*Case, workers int) ([]*Result, []Diagnostics) {
	results := make([]*Result, len(cases))
	diags := make([]Diagnostics, len(cases))
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(cases))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1)) - 1
				if i >= len(cases) {
					return
				}
				results[i], diags[i] = s.EvalFrom(nominal, cases[i].Overrides(nominal.set)...)
			}
		}()
	}
	wg.Wait()
	return results, diags
}
