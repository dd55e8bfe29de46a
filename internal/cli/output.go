package cli

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/internal/watch"
)

// checkOut refuses an output path before anything is written: a folder, a path whose folder
// does not exist, or the same file (by identity, whatever the name: links, "./", case on
// case-blind systems) as one of the inputs, which the write would destroy.
func checkOut(out string, inputs []string) error {
	if fi, err := os.Stat(out); err == nil {
		if fi.IsDir() {
			return fmt.Errorf("-o %s is a folder; give the page's file name, e.g. %s", out, filepath.Join(out, "budget.md"))
		}
		for _, in := range inputs {
			if ii, err := os.Stat(in); err == nil && os.SameFile(fi, ii) {
				return fmt.Errorf("-o %s is the worksheet file %s; writing the page would destroy it", out, in)
			}
		}
	}
	if fi, err := os.Stat(filepath.Dir(out)); err != nil || !fi.IsDir() {
		return fmt.Errorf("-o %s: the folder %s does not exist", out, filepath.Dir(out))
	}
	return nil
}

// isInput reports whether the file at p is one of the inputs, by identity.
func isInput(p string, inputs []string) bool {
	fi, err := os.Stat(p)
	if err != nil {
		return false
	}
	for _, in := range inputs {
		if ii, err := os.Stat(in); err == nil && os.SameFile(fi, ii) {
			return true
		}
	}
	return false
}

// inputFiles lists the worksheet and the parts it used, as paths on disk.
func inputFiles(sheet string, parts []string) []string {
	files := []string{sheet}
	for _, p := range parts {
		files = append(files, filepath.Join(filepath.Dir(sheet), filepath.FromSlash(p)))
	}
	return files
}

// writeCharts writes the charts beside out, each atomically with write (watch.WriteAtomic,
// or watch.WriteLive for watch), refusing any that would replace an input.
func writeCharts(out string, files []report.File, inputs []string, write func(string, []byte) error) error {
	dir := filepath.Dir(out)
	for _, f := range files {
		p := filepath.Join(dir, f.Name)
		if err := checkOut(p, inputs); err != nil {
			return err
		}
		if err := write(p, f.Data); err != nil {
			return err
		}
	}
	return nil
}

// removeOldCharts removes, after the page is written, the charts of earlier renders that
// the new page does not link, and temp files of killed runs beside it. A file named like a
// chart that is one of the inputs (a part called page.budget.svg) is kept.
func removeOldCharts(out string, files []report.File, inputs []string) error {
	dir := filepath.Dir(out)
	base := strings.TrimSuffix(filepath.Base(out), filepath.Ext(out))
	watch.RemoveStale(dir, base+".")
	entries, err := os.ReadDir(dir)
	if err != nil {
		return err
	}
	keep := map[string]bool{}
	for _, f := range files {
		keep[f.Name] = true
	}
	var errs []error
	for _, e := range entries {
		if n := e.Name(); e.Type().IsRegular() && report.OwnChart(base, n) && !keep[n] && !isInput(filepath.Join(dir, n), inputs) {
			if err := os.Remove(filepath.Join(dir, n)); err != nil && !errors.Is(err, os.ErrNotExist) {
				errs = append(errs, err)
			}
		}
	}
	return errors.Join(errs...)
}
