package cli

import (
	"fmt"

	"github.com/rfledger/rfledger/analysis"
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
	trials := fs.Int("trials", 0, "also run `N` Monte Carlo trials for the chance that the requirements hold (0: none)")
	seed := fs.Uint64("seed", 1, "Monte Carlo seed `N`")
	var set setFlag
	fs.Var(&set, "set", "replace an input for this run, as `name=value` (repeatable)")
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
		ev := evaluate(p, over, nil, ao)
		c := report.CheckInput{File: p, Result: ev.result, Analysis: ev.analysis, Diags: ev.diags}
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

// checkCode is a worksheet's exit code: 3 cannot be evaluated, 1 a requirement fails, else 0.
func checkCode(c report.CheckInput) int {
	if c.Diags.HasErrors() {
		return ExitBadSheet
	}
	for _, rq := range c.Result.Sheet().Requires {
		if pass, _ := c.Result.Pass(rq); !pass {
			return ExitFail
		}
	}
	return ExitOK
}

// checkText writes the verdict for people: diagnostics on stderr, one line per sheet and one
// per failed requirement on stdout.
func checkText(e *Env, c report.CheckInput) {
	printDiags(e, c.Diags)
	if c.Diags.HasErrors() {
		fmt.Fprintf(e.Stdout, "%s: cannot be evaluated\n", c.File)
		return
	}
	r := c.Result
	sh := r.Sheet()
	fails := 0
	for _, rq := range sh.Requires {
		if pass, _ := r.Pass(rq); !pass {
			fails++
		}
	}
	verdict := "PASS"
	if fails > 0 {
		verdict = "FAIL"
	}
	fmt.Fprintf(e.Stdout, "%s: %s, %d of %d requirements hold", c.File, verdict, len(sh.Requires)-fails, len(sh.Requires))
	if f, ok := sh.Quantity(sh.Focus); ok {
		fmt.Fprintf(e.Stdout, "; %s = %s", f.Name, r.Display(f))
	}
	if c.Analysis != nil && c.Analysis.Tolerance != nil {
		fmt.Fprintf(e.Stdout, "; all hold in %.1f %% of %d trials", 100*c.Analysis.Tolerance.PPass, c.Analysis.Tolerance.Trials)
	}
	fmt.Fprintln(e.Stdout)
	for _, rq := range sh.Requires {
		if pass, _ := r.Pass(rq); !pass {
			fmt.Fprintf(e.Stdout, "  failed: %s", rq.That)
			if q, ok := sh.Quantity(rq.Subject); ok {
				fmt.Fprintf(e.Stdout, " (%s = %s)", q.Name, r.Display(q))
			}
			fmt.Fprintln(e.Stdout)
		}
	}
}
