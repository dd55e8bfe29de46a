package cli

import (
	"flag"
	"fmt"
	"io"
	"io/fs"
	"path/filepath"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/internal/watch"
)

// evaluated is a loaded, evaluated and analysed worksheet.
type evaluated struct {
	sheet    *engine.Sheet
	result   *engine.Result     // the first case's (the nominal one unless --case leaves it out)
	analysis *analysis.Analysis // the first case's analyses
	cases    []report.Case      // every case evaluated, the first being result's
	diags    engine.Diagnostics // everything found, sorted; errors mean the sheet cannot be evaluated
	caseErr  error              // --case named a case the sheet does not have
}

// evaluate loads, evaluates and (unless ao is nil) analyses a worksheet, with every case.
func evaluate(path string, set []engine.Override, fsys fs.FS, ao *analysis.Options) *evaluated {
	return evaluateCases(path, set, fsys, ao, caseSel{})
}

// evaluateCases is evaluate for the cases sel chooses: each evaluated from the nominal
// result; the analyses for the first, or for every case with sel.all.
func evaluateCases(path string, set []engine.Override, fsys fs.FS, ao *analysis.Options, sel caseSel) *evaluated {
	sh, diags := engine.Load(path, engine.Options{Library: rflib.Library(), FS: fsys})
	// Evaluate even when loading found errors: failed quantities are skipped, and the
	// user sees every error in the file at once, run-time ones included.
	r, ediags := sh.Eval(set...)
	ev := &evaluated{sheet: sh, result: r}
	ev.diags = append(diags, ediags...)
	cases, err := sel.chosen(sh)
	if err != nil {
		ev.caseErr = err
		cases = []*engine.Case{sh.Nominal}
	}
	ev.diags = append(ev.diags, ev.evalCases(cases, set, sel, ao)...)
	ev.diags = ev.diags.Sorted()
	return ev
}

func (ev *evaluated) ok() bool { return !ev.diags.HasErrors() }

// printDiags writes every diagnostic, errors and warnings, each on one line followed by the
// source line and a caret line under the offending text (see formatDiags).
func printDiags(e *Env, ds engine.Diagnostics) { printDiagsFrom(e, ds, nil) }

// printDiagsFrom is printDiags for a sheet loaded from fsys (nil: the operating system's files).
func printDiagsFrom(e *Env, ds engine.Diagnostics, fsys fs.FS) {
	_, _ = io.WriteString(e.Stderr, formatDiags(ds, fsys))
}

func parseSet(set []string) ([]engine.Override, error) {
	var out []engine.Override
	for _, s := range set {
		name, value, ok := strings.Cut(s, "=")
		name, value = strings.TrimSpace(name), strings.TrimSpace(value)
		if !ok || name == "" || value == "" {
			return nil, fmt.Errorf("--set wants name=value, e.g. --set path.distance=\"5 km\"; got %q", s)
		}
		out = append(out, engine.Override{Name: name, Value: strings.Trim(value, "\"")})
	}
	return out, nil
}

// progress returns a progress reporter for long analyses, writing to a terminal only.
func progress(e *Env) func(string, int, int) {
	if !e.Terminal {
		return nil
	}
	return func(what string, done, total int) {
		fmt.Fprintf(e.Stderr, "\r%s: %d/%d trials", what, done, total)
		if done == total {
			fmt.Fprintf(e.Stderr, "\r%s\r", strings.Repeat(" ", 40))
		}
	}
}

// output is what render produces: the main file and the charts beside it.
func output(ev *evaluated, asJSON bool, out string) ([]byte, []report.File) {
	in := report.Input{Result: ev.result, Analysis: ev.analysis, Warnings: ev.diags, Cases: ev.cases}
	if asJSON {
		return report.JSON(in), nil
	}
	if out != "" {
		in.ChartBase = strings.TrimSuffix(out, filepath.Ext(out))
	}
	return report.Markdown(in)
}

// writeOutputs writes the charts first and the page last, each atomically, so a reader
// never sees a page whose charts are missing; charts of earlier pages go after the page.
// JSON has no charts and removes none: page.json beside page.md leaves the page's charts.
func writeOutputs(out string, page []byte, files []report.File, inputs []string, asJSON bool) error {
	if err := checkOut(out, inputs); err != nil {
		return err
	}
	if err := writeCharts(out, files, inputs, watch.WriteAtomic); err != nil {
		return err
	}
	if err := watch.WriteAtomic(out, page); err != nil {
		return err
	}
	if asJSON {
		watch.RemoveStale(filepath.Dir(out), filepath.Base(out)+".")
		return nil
	}
	return removeOldCharts(out, files, inputs)
}

func cmdRender(e *Env, args []string) int {
	fs := newFlags(e, "render")
	out := fs.String("o", "", "write the page to `FILE` (charts go beside it) instead of standard output")
	asJSON := fs.Bool("json", false, "write the JSON result (format 2; rfledger schema --render-output) instead of Markdown")
	trials, seed, set := analysisFlags(fs)
	sel := caseFlags(fs, true)
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) != 1 {
		return usageErr(e, "render", "want one worksheet, got %d arguments", len(pos))
	}
	if *trials < 1 || *trials > analysis.MaxTrials {
		return usageErr(e, "render", "--trials must be between 1 and %d", analysis.MaxTrials)
	}
	over, err := parseSet(*set)
	if err != nil {
		return usageErr(e, "render", "%v", err)
	}
	if *out != "" {
		if err := checkOut(*out, []string{pos[0]}); err != nil {
			return usageErr(e, "render", "%v", err)
		}
	}
	ev := evaluateCases(pos[0], over, nil, &analysis.Options{Trials: *trials, Seed: *seed, Progress: progress(e)}, *sel)
	if ev.caseErr != nil {
		return usageErr(e, "render", "%v", ev.caseErr)
	}
	printDiags(e, ev.diags)
	if !ev.ok() {
		fmt.Fprintf(e.Stderr, "rfledger: %s cannot be evaluated; nothing written\n", pos[0])
		return ExitBadSheet
	}
	page, files := output(ev, *asJSON, *out)
	if *out == "" {
		_, _ = e.Stdout.Write(page)
		return ExitOK
	}
	if err := writeOutputs(*out, page, files, inputFiles(pos[0], ev.sheet.Parts), *asJSON); err != nil {
		fmt.Fprintf(e.Stderr, "rfledger: %v\n", err)
		return ExitUsage
	}
	return ExitOK
}

// analysisFlags declares the flags shared by the commands that run the analyses.
func analysisFlags(fs *flag.FlagSet) (trials *int, seed *uint64, set *setFlag) {
	trials = fs.Int("trials", analysis.DefaultTrials, "run `N` Monte Carlo trials")
	seed = fs.Uint64("seed", 1, "Monte Carlo seed `N` (the same seed gives the same page)")
	set = &setFlag{}
	fs.Var(set, "set", "replace an input for this run, as `name=value` (repeatable)")
	return trials, seed, set
}
