package cli

import (
	"flag"
	"fmt"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/units"
)

// caseSel is which cases of a worksheet a command evaluates and analyses.
type caseSel struct {
	names []string // --case: only these (the nominal one by its name); none means every case
	all   bool     // --all-cases: analyse every case, not only the first
}

// caseFlags declares --case (repeatable) and, for the commands that run the analyses,
// --all-cases.
func caseFlags(fs *flag.FlagSet, analyses bool) *caseSel {
	sel := &caseSel{}
	fs.Func("case", "evaluate only the case `NAME` (repeatable; the nominal evaluation is \""+engine.NominalName+"\" unless the sheet names it)", func(v string) error {
		sel.names = append(sel.names, strings.TrimSpace(v))
		return nil
	})
	if analyses {
		fs.BoolVar(&sel.all, "all-cases", false, "run the analyses for every case, not only the first")
	}
	return sel
}

// chosen returns the cases of sh the selection names, nominal first and then in file order,
// or an error naming a case the sheet does not have.
func (sel caseSel) chosen(sh *engine.Sheet) ([]*engine.Case, error) {
	all := append([]*engine.Case{sh.Nominal}, sh.Cases...)
	if len(sel.names) == 0 {
		return all, nil
	}
	var names []string
	for _, c := range all {
		names = append(names, c.Name)
	}
	want := map[string]bool{}
	for _, n := range sel.names {
		found := false
		for _, c := range all {
			found = found || c.Name == n
		}
		if !found {
			hint := ""
			if near := units.Nearest(n, names); near != "" {
				hint = fmt.Sprintf("; did you mean %q?", near)
			}
			return nil, fmt.Errorf("%s has no case %q%s (cases: %s)", sh.File, n, hint, quoteList(names))
		}
		want[n] = true
	}
	var out []*engine.Case
	for _, c := range all {
		if want[c.Name] {
			out = append(out, c)
		}
	}
	return out, nil
}

func quoteList(ss []string) string {
	q := make([]string, len(ss))
	for i, s := range ss {
		q[i] = fmt.Sprintf("%q", s)
	}
	return strings.Join(q, ", ")
}

// evalCases evaluates the chosen cases of ev's sheet from its nominal result, and analyses
// the first (and, with sel.all or a case's analyses = true, every other). The first case
// becomes ev's result. Diagnostics that only a case raised are kept, named after the case.
func (ev *evaluated) evalCases(cases []*engine.Case, set []engine.Override, sel caseSel, ao *analysis.Options) engine.Diagnostics {
	nominal := ev.result
	var diags engine.Diagnostics
	seen := map[string]bool{}
	for _, d := range ev.diags {
		seen[d.String()] = true
	}
	var others []*engine.Case
	for _, c := range cases {
		if !c.Nominal {
			others = append(others, c)
		}
	}
	results, cdiags := ev.sheet.EvalCases(nominal, others, 0)
	k := 0
	for _, c := range cases {
		rc := report.Case{Case: c, Result: nominal}
		if !c.Nominal {
			rc.Result = results[k]
			for _, d := range cdiags[k] {
				if !seen[d.String()] {
					d.Quantity = strings.TrimSpace(d.Quantity + " in case " + fmt.Sprintf("%q", c.Name))
					d.Hint = caseHint(d.Hint, c)
					diags = append(diags, d)
				}
			}
			k++
		}
		ev.cases = append(ev.cases, rc)
	}
	ev.result = ev.cases[0].Result
	if ao == nil || diags.HasErrors() || ev.diags.HasErrors() {
		return diags
	}
	for i := range ev.cases {
		c := &ev.cases[i]
		if i > 0 && !sel.all && !c.Case.Analyses {
			continue
		}
		opt := *ao
		opt.Focus = c.Case.Focus
		a, ds := analysis.Analyze(c.Result, opt)
		c.Analysis = a
		for _, d := range ds {
			if i > 0 {
				d.Quantity = strings.TrimSpace(d.Quantity + " in case " + fmt.Sprintf("%q", c.Case.Name))
			}
			diags = append(diags, d)
		}
	}
	ev.analysis = ev.cases[0].Analysis
	return diags
}

// caseHint adds to the hint of a problem only a case's overrides raised where that case is
// written, since the problem's own position is the formula, not the value that upset it.
func caseHint(hint string, c *engine.Case) string {
	if c.Range.Start.Line == 0 {
		return hint
	}
	where := fmt.Sprintf("the case is written at %s", c.Range)
	if hint == "" {
		return where
	}
	return hint + "; " + where
}

// diffCase is what changed in one case between two worksheets.
type diffCase struct {
	Name         string     `json:"name"`
	Status       string     `json:"status"` // added, removed, changed or same
	Focus        *diffFocus `json:"focus,omitempty"`
	Requirements []diffReq  `json:"requirements"`
	Quantities   []diffQ    `json:"quantities"`
	Flipped      []string   `json:"flipped"`
}

// diffCases compares two worksheets case by case, matched by name: each case of the new
// sheet (added when the old has none of its name), then the cases the new one dropped. A
// requirement that passed in a case and fails there now counts in reg, as --exit-code reads it.
// Sheets without cases give nothing (the nominal comparison above says it all).
func diffCases(a, b *evaluated, tol units.Q, reg *regression) ([]diffCase, error) {
	if len(a.cases) < 2 && len(b.cases) < 2 {
		return nil, nil
	}
	old := map[string]report.Case{}
	for _, c := range a.cases {
		old[c.Case.Name] = c
	}
	var out []diffCase
	seen := map[string]bool{}
	for _, c := range b.cases {
		seen[c.Case.Name] = true
		oc, ok := old[c.Case.Name]
		if !ok {
			out = append(out, lonelyCase(c, "added", tol))
			continue
		}
		r, err := regressions(oc.Result, c.Result, tol)
		if err != nil {
			return nil, err
		}
		doc := diffDocOf("", "", oc.Result, c.Result, r)
		dc := diffCase{Name: c.Case.Name, Status: "same", Focus: doc.Focus, Requirements: doc.Requirements, Quantities: doc.Quantities, Flipped: doc.Flipped}
		if len(dc.Quantities) > 0 || fmt.Sprint(oc.Case.Set) != fmt.Sprint(c.Case.Set) {
			dc.Status = "changed"
		}
		for _, that := range r.flipped {
			reg.flipped = append(reg.flipped, fmt.Sprintf("%s (case %q)", that, c.Case.Name))
		}
		out = append(out, dc)
	}
	for _, c := range a.cases {
		if !seen[c.Case.Name] {
			out = append(out, lonelyCase(c, "removed", tol))
		}
	}
	return out, nil
}

// lonelyCase is a case only one side has (status added or removed): its focus and its
// requirements' states on that side, "absent" on the other.
func lonelyCase(c report.Case, status string, tol units.Q) diffCase {
	dc := diffCase{Name: c.Case.Name, Status: status, Requirements: []diffReq{}, Quantities: []diffQ{}, Flipped: []string{}}
	sh := c.Result.Sheet()
	if f, ok := sh.Quantity(sh.Focus); ok {
		r, _ := regressions(c.Result, c.Result, tol) // only for which way is worse
		dc.Focus = &diffFocus{Name: f.Name, OldName: sh.Focus, Formula: f.Formula, OldFormula: f.Formula, Lower: r.lowerWorse}
		if status == "added" {
			dc.Focus.New = valueOf(c.Result, f)
		} else {
			dc.Focus.Old = valueOf(c.Result, f)
		}
	}
	for _, rq := range sh.Requires {
		r := diffReq{That: rq.That, Old: reqState(c.Result, rq), New: "absent"}
		if status == "added" {
			r.Old, r.New = r.New, r.Old
		}
		dc.Requirements = append(dc.Requirements, r)
	}
	return dc
}

// casesMarkdown writes the case-by-case comparison: one row per case.
func casesMarkdown(cases []diffCase) []byte {
	if len(cases) == 0 {
		return nil
	}
	var b strings.Builder
	b.WriteString("\n## Cases\n\n| case | status | focus old | focus new | requirements that changed | values changed |\n| --- | --- | ---: | ---: | --- | ---: |\n")
	for _, c := range cases {
		fo, fn := "", ""
		if c.Focus != nil {
			if c.Focus.Old != nil {
				fo = c.Focus.Old.Display
			}
			if c.Focus.New != nil {
				fn = c.Focus.New.Display
			}
		}
		var reqs []string
		for _, r := range c.Requirements {
			switch {
			case c.Status == "added" && r.New != "pass":
				reqs = append(reqs, fmt.Sprintf("`%s`: %s", r.That, r.New))
			case c.Status == "removed" && r.Old != "pass":
				reqs = append(reqs, fmt.Sprintf("`%s`: %s", r.That, r.Old))
			case c.Status != "added" && c.Status != "removed" && r.Old != r.New:
				reqs = append(reqs, fmt.Sprintf("`%s`: %s → %s", r.That, r.Old, r.New))
			}
		}
		if len(reqs) == 0 && len(c.Requirements) > 0 && (c.Status == "added" || c.Status == "removed") {
			reqs = append(reqs, "all pass")
		}
		changed := ""
		if c.Status == "changed" || c.Status == "same" {
			changed = fmt.Sprint(len(c.Quantities))
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s | %s |\n", strings.ReplaceAll(c.Name, "|", "\\|"), c.Status, fo, fn, strings.Join(reqs, "; "), changed)
	}
	return []byte(b.String())
}
