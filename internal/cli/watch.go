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
	"github.com/rfledger/rfledger/internal/watch"
)

func cmdWatch(e *Env, args []string) int {
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
	sheet := pos[0]
	dir := filepath.Dir(sheet)
	var charts []string
	render := func() ([]byte, []string, error) {
		ev := evaluateCases(sheet, over, nil, &analysis.Options{Trials: *trials, Seed: *seed}, *sel)
		if ev.caseErr != nil {
			return nil, []string{sheet}, ev.caseErr
		}
		files := []string{sheet}
		for _, p := range ev.sheet.Parts {
			files = append(files, filepath.Join(dir, filepath.FromSlash(p)))
		}
		if !ev.ok() {
			return nil, files, errors.New(strings.TrimSuffix(formatDiags(ev.diags, nil), "\n"))
		}
		printDiags(e, ev.diags)
		page, extra := output(ev, false, *out)
		charts = charts[:0]
		for _, f := range extra {
			if err := watch.WriteAtomic(filepath.Join(filepath.Dir(*out), f.Name), f.Data); err != nil {
				return nil, files, err
			}
			charts = append(charts, f.Name)
		}
		return page, files, nil
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	err = watch.Run(ctx, render, watch.Options{
		Out: *out, Status: e.Stderr, Errors: e.Stderr, Serve: *serve, Title: strings.TrimSuffix(filepath.Base(sheet), ".toml"),
		Extra: func(string) []string { return append([]string(nil), charts...) },
	})
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger watch: %v\n", err)
		return ExitBadSheet
	}
	return ExitOK
}
