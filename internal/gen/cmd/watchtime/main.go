//go:build unix

// Command watchtime measures `rfledger watch` from outside, as an editor's user sees it: the
// time from a save of the generated farm-network sheet to the new page on disk.
//
//	go build -o /tmp/rfledger ./cmd/rfledger
//	go run ./internal/gen/cmd/watchtime -bin /tmp/rfledger -n 10000 -saves 20
//
// It writes the sheet (internal/gen, seed 1) to a temporary folder, starts `BIN watch SHEET
// -o PAGE`, waits for the first page and its Monte Carlo completion, and then saves the
// sheet -saves times the way editors do (the new text written to a temporary file in the
// same folder, renamed over the sheet), alternating between two versions that differ in one
// input (-edit input) or one formula (-edit formula). For each save it records the time from
// the rename to the first new page (the nominal page, written before the Monte Carlo), read
// from a file-system watch on the page's folder, and then waits for the completion before the
// next save. It prints the median, the smallest and the largest time; the debounce of watch is
// included, as it is in what a user sees.
package main

import (
	"bufio"
	"bytes"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"github.com/fsnotify/fsnotify"

	"github.com/rfledger/rfledger/internal/gen"
)

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

// edit returns the one-line change of the generated sheet named (gen.Edits).
func edit(name string) (gen.Edit, bool) {
	for _, e := range gen.Edits {
		if e.Name == name {
			return e, true
		}
	}
	return gen.Edit{}, false
}

func run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("watchtime", flag.ContinueOnError)
	fs.SetOutput(stderr)
	bin := fs.String("bin", "", "the rfledger `binary` to time (required)")
	n := fs.Int("n", 10000, "quantities in the generated sheet")
	saves := fs.Int("saves", 20, "saves to time")
	which := fs.String("edit", "input", "what each save changes: `input` or formula")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	e, ok := edit(*which)
	if *bin == "" || *saves < 1 || !ok {
		fmt.Fprintln(stderr, "watchtime: want -bin BINARY, -saves ≥ 1 and -edit input|formula")
		return 2
	}
	times, err := measure(*bin, *n, *saves, e)
	if err != nil {
		fmt.Fprintln(stderr, "watchtime:", err)
		return 1
	}
	slices.Sort(times)
	fmt.Fprintf(stdout, "save → new page, %s edit of %d quantities, %d saves: median %.1f ms, min %.1f ms, max %.1f ms\n",
		*which, *n, len(times), ms(times[len(times)/2]), ms(times[0]), ms(times[len(times)-1]))
	return 0
}

func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1000 }

func measure(bin string, n, saves int, e gen.Edit) ([]time.Duration, error) {
	src, err := gen.Budget(n, 1)
	if err != nil {
		return nil, err
	}
	versions := [2]string{string(src), strings.Replace(string(src), e.From, e.To, 1)}
	if versions[1] == versions[0] {
		return nil, fmt.Errorf("the generated sheet has no %q", e.From)
	}
	dir, err := os.MkdirTemp("", "watchtime")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(dir)
	sheet, page := filepath.Join(dir, "farm.toml"), filepath.Join(dir, "farm.md")
	if err := os.WriteFile(sheet, src, 0o644); err != nil {
		return nil, err
	}
	w, err := fsnotify.NewWatcher()
	if err != nil {
		return nil, err
	}
	defer w.Close()
	if err := w.Add(dir); err != nil {
		return nil, err
	}
	cmd := exec.Command(bin, "watch", sheet, "-o", page)
	logs, err := cmd.StderrPipe()
	if err != nil {
		return nil, err
	}
	if err := cmd.Start(); err != nil {
		return nil, err
	}
	defer func() { cmd.Process.Kill(); cmd.Wait() }() //nolint:errcheck // the watcher is stopped either way
	// watch logs "rendered PAGE in …" for each nominal page and "completed PAGE in …" when the
	// Monte Carlo has filled it in.
	completed := make(chan struct{}, 16)
	go func() {
		sc := bufio.NewScanner(logs)
		for sc.Scan() {
			if strings.Contains(sc.Text(), "completed") {
				completed <- struct{}{}
			}
		}
	}()
	wait := func(what string, ch <-chan struct{}) error {
		select {
		case <-ch:
			return nil
		case <-time.After(60 * time.Second):
			return fmt.Errorf("no %s within 60 s", what)
		}
	}
	if err := wait("first page", completed); err != nil {
		return nil, err
	}
	var times []time.Duration
	for i := range saves {
		time.Sleep(200 * time.Millisecond) // the completion's own events come in
		drain(w)
		before, err := os.ReadFile(page)
		if err != nil {
			return nil, err
		}
		tmp := filepath.Join(dir, fmt.Sprintf(".farm.toml.save%d", i))
		if err := os.WriteFile(tmp, []byte(versions[(i+1)%2]), 0o644); err != nil {
			return nil, err
		}
		start := time.Now()
		if err := os.Rename(tmp, sheet); err != nil {
			return nil, err
		}
		if err := pageWritten(w, page, before); err != nil {
			return nil, err
		}
		times = append(times, time.Since(start))
		if err := wait("completion", completed); err != nil {
			return nil, err
		}
	}
	return times, nil
}

// drain discards the events already queued.
func drain(w *fsnotify.Watcher) {
	for {
		select {
		case <-w.Events:
		default:
			return
		}
	}
}

// pageWritten waits for the page to be created or renamed into place (watch writes it to a
// temporary file and renames that over the page) with other text than before.
func pageWritten(w *fsnotify.Watcher, page string, before []byte) error {
	deadline := time.After(60 * time.Second)
	for {
		select {
		case ev := <-w.Events:
			if filepath.Clean(ev.Name) != page || ev.Op&(fsnotify.Create|fsnotify.Rename|fsnotify.Write) == 0 {
				continue
			}
			if now, err := os.ReadFile(page); err == nil && !bytes.Equal(now, before) {
				return nil
			}
		case err := <-w.Errors:
			return err
		case <-deadline:
			return fmt.Errorf("no new page within 60 s")
		}
	}
}
