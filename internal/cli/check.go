package cli

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
)

// checkFormats are the outputs of check: for people, for scripts, for CI test reporters and
// for GitHub Actions annotations.
var checkFormats = map[string]func([]report.CheckInput) []byte{
	"json":   report.CheckJSON,
	"junit":  report.CheckJUnit,
	"github": report.CheckGitHub,
}

func cmdCheck(e *Env, args []string) int {
	fs := newFlags(e, "check")
	format := fs.String("format", "text", "output `text|json|junit|github`: for people, scripts, CI test reporters, GitHub Actions annotations")
	trials := fs.Int("trials", analysis.DefaultTrials, "Monte Carlo trials `N` for each requirement's chance of holding and the at-risk verdict (0: none)")
	seed := fs.Uint64("seed", 1, "Monte Carlo seed `N`")
	var set setFlag
	fs.Var(&set, "set", "replace an input for this run, as `name=value` (repeatable)")
	sel := caseFlags(fs, true)
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) == 0 {
		return usageErr(e, "check", "want at least one worksheet")
	}
	write, ok := checkFormats[*format]
	if !ok && *format != "text" {
		return usageErr(e, "check", "--format is text, json, junit or github, not %q", *format)
	}
	if *trials < 0 || *trials > analysis.MaxTrials {
		return usageErr(e, "check", "--trials must be between 0 and %d", analysis.MaxTrials)
	}
	over, err := parseSet(set)
	if err != nil {
		return usageErr(e, "check", "%v", err)
	}
	var ao *analysis.Options
	if *trials > 0 {
		ao = &analysis.Options{Trials: *trials, Seed: *seed, Progress: progress(e)}
	}
	code := ExitOK
	var in []report.CheckInput
	for _, p := range pos {
		ev := evaluateCases(p, over, nil, ao, *sel)
		if ev.caseErr != nil {
			return usageErr(e, "check", "%v", ev.caseErr)
		}
		c := report.CheckInput{File: p, Result: ev.result, Analysis: ev.analysis, Diags: ev.diags, Cases: ev.cases}
		code = max(code, checkCode(c)) // a sheet that cannot be evaluated (3) outranks a failed requirement (1)
		if write == nil {
			checkText(e, c)
		}
		in = append(in, c)
	}
	if write != nil {
		_, _ = e.Stdout.Write(write(in))
	}
	return code
}

// checkCode is a worksheet's exit code: 3 cannot be evaluated, 1 a requirement fails in
// some case, else 0.
func checkCode(c report.CheckInput) int {
	if c.Diags.HasErrors() {
		return ExitBadSheet
	}
	for _, k := range checkedCases(c) {
		for _, rq := range k.Result.Sheet().Requires {
			if pass, _ := k.Result.Pass(rq); !pass {
				return ExitFail
			}
		}
	}
	return ExitOK
}

// checkedCases returns the cases checked; a sheet without cases is its one result.
func checkedCases(c report.CheckInput) []report.Case {
	if len(c.Cases) > 0 {
		return c.Cases
	}
	return []report.Case{{Case: &engine.Case{Name: engine.NominalName, Nominal: true}, Result: c.Result, Analysis: c.Analysis}}
}

// checkText writes the verdict for people: diagnostics on stderr, one line per sheet and one
// per failed requirement on stdout, naming the case when the sheet has several.
func checkText(e *Env, c report.CheckInput) {
	printDiags(e, c.Diags)
	if c.Diags.HasErrors() {
		fmt.Fprintf(e.Stdout, "%s: cannot be evaluated\n", c.File)
		return
	}
	sh := c.Result.Sheet()
	cases := checkedCases(c)
	type failure struct {
		c  report.Case
		rq *engine.Require
	}
	var fails []failure
	failedCases := 0
	for _, k := range cases {
		before := len(fails)
		for _, rq := range sh.Requires {
			if pass, _ := k.Result.Pass(rq); !pass {
				fails = append(fails, failure{k, rq})
			}
		}
		if len(fails) > before {
			failedCases++
		}
	}
	verdict := "PASS"
	var risky []report.Case
	for _, k := range cases {
		if analysis.AtRisk(k.Result, k.Analysis) {
			risky = append(risky, k)
		}
	}
	switch {
	case len(fails) > 0:
		verdict = "FAIL"
	case len(risky) > 0:
		verdict = "PASS at nominal but AT RISK"
	}
	first := cases[0]
	r := first.Result
	if len(cases) == 1 {
		fmt.Fprintf(e.Stdout, "%s: %s, %d of %d requirements hold", c.File, verdict, len(sh.Requires)-len(fails), len(sh.Requires))
	} else {
		fmt.Fprintf(e.Stdout, "%s: %s, every requirement holds in %d of %d cases", c.File, verdict, len(cases)-failedCases, len(cases))
	}
	if f, ok := sh.Quantity(first.Case.FocusName(sh)); ok {
		if len(cases) > 1 {
			fmt.Fprintf(e.Stdout, "; %s = %s in %q", f.Name, r.Display(f), first.Case.Name)
		} else {
			fmt.Fprintf(e.Stdout, "; %s = %s", f.Name, r.Display(f))
		}
	}
	if t := first.Analysis; t != nil && t.Tolerance != nil && t.Tolerance.Trials > 0 && len(sh.Requires) > 0 {
		in := ""
		if len(cases) > 1 {
			in = fmt.Sprintf(" in %q", first.Case.Name)
		}
		fmt.Fprintf(e.Stdout, ";%s all hold together in %s of %s Monte Carlo trials", in, report.ChanceText(t.Tolerance.PPass, t.Tolerance.PPassSE, t.Tolerance.Trials), analysis.Count(t.Tolerance.Trials))
		if analysis.AtRisk(first.Result, first.Analysis) {
			fmt.Fprintf(e.Stdout, " (below %.0f %%)", 100*analysis.AtRiskBelow)
		}
	}
	fmt.Fprintln(e.Stdout)
	checkAnalysed(e, cases)
	if len(fails) == 0 {
		for _, k := range risky {
			checkRisk(e, sh, k, len(cases) > 1)
		}
	}
	for _, f := range fails {
		fmt.Fprintf(e.Stdout, "  failed: %s", f.rq.That)
		if len(cases) > 1 {
			fmt.Fprintf(e.Stdout, " in case %q", f.c.Case.Name)
		}
		if q, ok := sh.Quantity(f.rq.Subject); ok {
			fmt.Fprintf(e.Stdout, " (%s = %s)", q.Name, f.c.Result.Display(q))
		}
		fmt.Fprintln(e.Stdout)
	}
}

// checkAnalysed writes, for a sheet with cases whose first case ran the Monte Carlo trials,
// each other case's chance that all its requirements hold where its analyses were run too
// (analyses = true, --all-cases), and how many cases they were not run for.
func checkAnalysed(e *Env, cases []report.Case) {
	ran := func(k report.Case) bool {
		a := k.Analysis
		return a != nil && a.Tolerance != nil && a.Tolerance.Trials > 0 && len(k.Result.Sheet().Requires) > 0
	}
	if len(cases) < 2 || !ran(cases[0]) {
		return
	}
	not := 0
	for _, k := range cases[1:] {
		if !ran(k) {
			not++
			continue
		}
		t := k.Analysis.Tolerance
		fmt.Fprintf(e.Stdout, "  in case %q all hold together in %s of %s Monte Carlo trials\n", k.Case.Name, report.ChanceText(t.PPass, t.PPassSE, t.Trials), analysis.Count(t.Trials))
	}
	if not > 0 {
		fmt.Fprintf(e.Stdout, "  Monte Carlo not run for %d of %d cases (--all-cases runs it for every case)\n", not, len(cases))
	}
}

// checkRisk writes why a case that passes at nominal is at risk: the requirements that hold
// in fewer than analysis.AtRiskBelow of its trials, with their worst case.
func checkRisk(e *Env, sh *engine.Sheet, k report.Case, named bool) {
	t := k.Analysis.Tolerance
	in := ""
	if named {
		in = fmt.Sprintf(" in case %q", k.Case.Name)
		fmt.Fprintf(e.Stdout, "  at risk%s: every requirement holds, but all of them together in only %s of %s trials\n", in, report.ChanceText(t.PPass, t.PPassSE, t.Trials), analysis.Count(t.Trials))
	}
	for _, rs := range t.Requires {
		if rs.Chance >= analysis.AtRiskBelow {
			continue
		}
		fmt.Fprintf(e.Stdout, "  at risk%s: %s holds in %s of trials", in, rs.Require.That, report.ChanceText(rs.Chance, rs.ChanceSE, t.Trials))
		if !math.IsNaN(rs.Worst) {
			fmt.Fprintf(e.Stdout, " (%s = %s at the worst case)", rs.Require.Subject, report.WorstValue(sh, rs))
		}
		fmt.Fprintln(e.Stdout)
	}
}
