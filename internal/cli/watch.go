package cli

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"path/filepath"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/internal/watch"
)

func cmdWatch(e *Env, args []string) int {
	fs := newFlags(e, "watch")
	out := fs.String("o", "", "write the page to `FILE` (required)")
	serve := fs.String("serve", "", "also serve the page with live refresh on `ADDR` (e.g. :8080, loopback only unless a host is given)")
	trials, seed, set := analysisFlags(fs)
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
	sheet := pos[0]
	// The parts are known once the sheet is loaded; a part named as -o is refused here too.
	first, _ := engine.Load(sheet, engine.Options{Library: rflib.Library()})
	if err := checkOut(*out, inputFiles(sheet, first.Parts)); err != nil {
		return usageErr(e, "watch", "%v", err)
	}
	var charts []string
	var written []report.File
	render := func() ([]byte, []string, error) {
		ev := evaluate(sheet, over, nil, &analysis.Options{Trials: *trials, Seed: *seed})
		files := inputFiles(sheet, ev.sheet.Parts)
		if !ev.ok() {
			return nil, files, errors.New(strings.TrimSuffix(formatDiags(ev.diags, nil), "\n"))
		}
		if err := checkOut(*out, files); err != nil {
			return nil, files, err
		}
		for _, d := range ev.diags {
			fmt.Fprintln(e.Stderr, d.String())
		}
		printDiags(e, ev.diags)
		page, extra := output(ev, false, *out)
		if err := writeCharts(*out, extra, files); err != nil {
			return nil, files, err
		}
		charts, written = charts[:0], extra
		for _, f := range extra {
			charts = append(charts, f.Name)
		}
		return page, files, nil
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	err = watch.Run(ctx, render, watch.Options{
		Out: *out, Status: e.Stderr, Errors: e.Stderr, Serve: *serve, Title: strings.TrimSuffix(filepath.Base(sheet), ".toml"),
		Extra: func(string) []string { return append([]string(nil), charts...) },
		Written: func() {
			if err := removeOldCharts(*out, written); err != nil {
				fmt.Fprintf(e.Stderr, "rfledger watch: %v\n", err)
			}
		},
	})
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger watch: %v\n", err)
		return ExitBadSheet
	}
	return ExitOK
}
