package cli

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"path/filepath"
	"strings"
	"sync"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/internal/watch"
)

func cmdWatch(e *Env, args []string) int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	return watchUntil(ctx, e, args, nil)
}

// watchUntil is watch until ctx ends; ready, when set, is told the served address.
func watchUntil(ctx context.Context, e *Env, args []string, ready func(addr string)) int {
	fs := newFlags(e, "watch")
	out := fs.String("o", "", "write the page to `FILE` (required)")
	serve := fs.String("serve", "", "also serve the page with live refresh on `ADDR` (e.g. :8080, loopback only unless a host is given)")
	trials, seed, set := analysisFlags(fs)
	sel := caseFlags(fs, true)
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) != 1 || *out == "" {
		return usageErr(e, "watch", "want one worksheet and -o FILE")
	}
	over, err := parseSet(*set)
	if err != nil {
		return usageErr(e, "watch", "%v", err)
	}
	if *serve != "" {
		if err := watch.CheckServe(*serve); err != nil {
			return usageErr(e, "watch", "--serve %v; give a port, e.g. --serve :8080 or --serve localhost:8080", err)
		}
	}
	sheet := pos[0]
	// The parts are known once the sheet is loaded; a part named as -o is refused here too.
	lib := rflib.Library()
	first, _ := engine.Load(sheet, engine.Options{Library: lib})
	if err := checkOut(*out, inputFiles(sheet, first.Parts)); err != nil {
		return usageErr(e, "watch", "%v", err)
	}
	lw := &liveSheet{e: e, sheet: sheet, out: *out, over: over, lib: lib, sel: *sel, ao: analysis.Options{Trials: *trials, Seed: *seed}}
	err = watch.Run(ctx, lw.render, watch.Options{
		Out: *out, Status: e.Stderr, Errors: e.Stderr, Serve: *serve, Title: strings.TrimSuffix(filepath.Base(sheet), ".toml"),
		Extra:   lw.extra,
		Written: lw.written,
		Refine:  lw.refine,
		Summary: lw.summary,
		Ready:   ready,
	})
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger watch: %v\n", err)
		return ExitBadSheet
	}
	return ExitOK
}

// liveSheet is what watch renders. Each save reloads the sheet reusing the previous load's
// parsed formulas and evaluates only what the edit changed (engine.Options.Previous,
// Sheet.EvalFrom); the page is written first without the Monte Carlo trials, then completed
// by refine in the background.
type liveSheet struct {
	e     *Env
	sheet string
	out   string
	over  []engine.Override
	lib   *engine.Library
	sel   caseSel
	ao    analysis.Options

	prevSh *engine.Sheet // used by render only (one goroutine)
	prevR  *engine.Result

	mu     sync.Mutex
	charts []report.File // the charts of the page on disk
	last   *evaluated    // the latest good evaluation, which refine completes
	full   *evaluated    // last completed with the Monte Carlo (nil until refine has done so)
}

// render loads and evaluates the sheet and writes the quick page's charts.
func (lw *liveSheet) render() ([]byte, []string, error) {
	lw.mu.Lock()
	lw.last, lw.full = nil, nil
	lw.mu.Unlock()
	sh, diags := engine.Load(lw.sheet, engine.Options{Library: lw.lib, Previous: lw.prevSh})
	r, ediags := sh.EvalFrom(lw.prevR, lw.over...)
	diags = append(diags, ediags...)
	files := inputFiles(lw.sheet, sh.Parts)
	if diags.HasErrors() {
		return nil, files, errors.New(strings.TrimSuffix(formatDiags(diags.Sorted(), nil), "\n"))
	}
	lw.prevSh, lw.prevR = sh, r
	quick := lw.ao
	quick.SkipMonteCarlo = true
	ev := &evaluated{sheet: sh, result: r, diags: diags}
	cases, err := lw.sel.chosen(sh)
	if err != nil {
		return nil, files, err
	}
	ev.diags = append(ev.diags, ev.evalCases(cases, lw.over, lw.sel, &quick)...).Sorted()
	if err := checkOut(lw.out, files); err != nil {
		return nil, files, err
	}
	printDiags(lw.e, ev.diags)
	lw.mu.Lock()
	lw.last = ev
	lw.mu.Unlock()
	page, ok := lw.page(ev, files)
	if !ok {
		return nil, files, errors.New("writing the charts failed")
	}
	return page, files, nil
}

// refine completes the latest page with the Monte Carlo trials.
func (lw *liveSheet) refine() ([]byte, bool) {
	lw.mu.Lock()
	ev := lw.last
	lw.mu.Unlock()
	if ev == nil || ev.analysis == nil || ev.analysis.Tolerance == nil {
		return nil, false // nothing was left out
	}
	a, ds := analysis.Analyze(ev.result, lw.ao)
	full := *ev
	full.analysis, full.diags = a, append(ev.diags, ds...).Sorted()
	page, ok := lw.pageOf(ev, &full)
	if ok {
		lw.mu.Lock()
		if lw.last == ev {
			lw.full = &full
		}
		lw.mu.Unlock()
	}
	return page, ok
}

// page renders ev and writes its charts.
func (lw *liveSheet) page(ev *evaluated, files []string) ([]byte, bool) { return lw.pageOf(ev, ev) }

// pageOf renders shown (ev or its completion) and writes its charts; they become the served
// ones only while ev is still the latest evaluation (a completion that a newer save
// overtook must not replace them).
func (lw *liveSheet) pageOf(ev, shown *evaluated) ([]byte, bool) {
	page, charts := output(shown, false, lw.out)
	if err := writeCharts(lw.out, charts, inputFiles(lw.sheet, ev.sheet.Parts), watch.WriteLive); err != nil {
		fmt.Fprintf(lw.e.Stderr, "rfledger watch: %v\n", err)
		return nil, false
	}
	lw.mu.Lock()
	defer lw.mu.Unlock()
	if lw.last != ev {
		return nil, false
	}
	lw.charts = charts
	return page, true
}

// extra lists the charts to serve beside the page.
func (lw *liveSheet) extra(string) []string {
	lw.mu.Lock()
	defer lw.mu.Unlock()
	var names []string
	for _, f := range lw.charts {
		names = append(names, f.Name)
	}
	return names
}

// written removes the charts the page on disk no longer links.
func (lw *liveSheet) written() {
	lw.mu.Lock()
	charts, inputs := lw.charts, []string{lw.sheet}
	if lw.last != nil && lw.last.sheet != nil {
		inputs = inputFiles(lw.sheet, lw.last.sheet.Parts)
	}
	lw.mu.Unlock()
	if err := removeOldCharts(lw.out, charts, inputs); err != nil {
		fmt.Fprintf(lw.e.Stderr, "rfledger watch: %v\n", err)
	}
}

// summary is the served page's status bar for the latest render: the verdict over every
// case shown and the focus value of the first.
func (lw *liveSheet) summary() watch.Summary {
	lw.mu.Lock()
	ev, full := lw.last, lw.full
	lw.mu.Unlock()
	if ev == nil {
		return watch.Summary{}
	}
	sh := ev.sheet
	// refine fills in the Monte Carlo exactly when the quick analyses have a tolerance.
	s := watch.Summary{Pending: ev.analysis != nil && ev.analysis.Tolerance != nil}
	results := []*engine.Result{ev.result}
	if len(ev.cases) > 1 {
		results = results[:0]
		for _, c := range ev.cases {
			results = append(results, c.Result)
		}
	}
	if len(sh.Requires) > 0 {
		held, checked := 0, 0
		for _, r := range results {
			for _, rq := range sh.Requires {
				checked++
				if pass, known := r.Pass(rq); pass && known {
					held++
				}
			}
		}
		s.Verdict = "FAIL"
		if held == checked {
			s.Verdict = "PASS"
		}
		s.Detail = fmt.Sprintf("%d of %d requirements hold", held, checked)
		if len(results) > 1 {
			s.Detail = fmt.Sprintf("%d of %d requirement checks hold over %d cases", held, checked, len(results))
		}
		// The Monte Carlo runs for the first case: passing there at nominal is not enough
		// when the requirements hold together in too few of its trials.
		if full != nil && s.Verdict == "PASS" && analysis.AtRisk(full.result, full.analysis) {
			t := full.analysis.Tolerance
			s.Verdict = "AT RISK"
			s.Detail = fmt.Sprintf("%s at nominal, but they hold together in only %.1f %% ± %.1f %% of %d Monte Carlo trials", s.Detail, 100*t.PPass, 100*t.PPassSE, t.Trials)
		}
	}
	if f, ok := sh.Quantity(sh.Focus); ok {
		s.FocusName, s.FocusValue = f.Name, ev.result.Display(f)
	}
	return s
}
