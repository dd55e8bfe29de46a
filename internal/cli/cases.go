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
