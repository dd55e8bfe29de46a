package cli

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/gen"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// renderOnce does what `rfledger render` does short of writing files, for a worksheet text:
// load, evaluate, analyse, then the Markdown page with its charts and the JSON. It is the only
// function in this file that calls the engine's API and the command's internals, so a change
// of API is adapted in one place. It returns the bytes written, so the work cannot be skipped.
func renderOnce(tb testing.TB, fsys fstest.MapFS) int {
	ev := evaluate("sheet.toml", nil, fsys, &analysis.Options{Trials: analysis.DefaultTrials, Seed: 1})
	if !ev.ok() {
		tb.Fatal(ev.diags)
	}
	page, charts := output(ev, false, "sheet.md")
	js, _ := output(ev, true, "")
	n := len(page) + len(js)
	for _, c := range charts {
		n += len(c.Data)
	}
	return n
}

// BenchmarkRender renders a generated farm-network sheet (internal/gen) of 10,000 quantities;
// -bench 'Render/' runs 1,000 and 100,000 too (and -bench 'Render/1000$' only 1,000).
func BenchmarkRender(b *testing.B) {
	for _, n := range []int{1_000, 10_000, 100_000} {
		src, err := gen.Budget(n, 1)
		if err != nil {
			b.Fatal(err)
		}
		fsys := fstest.MapFS{"sheet.toml": &fstest.MapFile{Data: src}}
		name := fmt.Sprint(n)
		b.Run(name, func(b *testing.B) {
			if n != 10_000 && !benchNamed() {
				b.Skip("run with -bench 'Render/" + name + "'")
			}
			var bytes int
			for b.Loop() {
				bytes = renderOnce(b, fsys)
			}
			b.ReportMetric(float64(bytes), "bytes-out")
		})
	}
}

// benchNamed reports whether the -bench pattern picks sizes ("Render/", "Render/1000$").
func benchNamed() bool {
	f := flag.Lookup("test.bench")
	return f != nil && strings.Contains(f.Value.String(), "Render/")
}

// BenchmarkWatchEdit is what watch does after a save of the generated 10,000-quantity sheet
// (internal/gen): reload reusing the previous load, evaluate what changed, the quick analyses
// and the page with its charts (the Monte Carlo completion comes after, in the background).
// Each op alternates between two versions of the sheet that differ in one input (input) or
// one formula (formula). The debounce (watch.DefaultDebounce) comes on top of this.
func BenchmarkWatchEdit(b *testing.B) {
	src, err := gen.Budget(10_000, 1)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range gen.Edits {
		b.Run(c.Name, func(b *testing.B) {
			edited := strings.Replace(string(src), c.From, c.To, 1)
			if edited == string(src) {
				b.Fatalf("the generated sheet has no %q", c.From)
			}
			dir := b.TempDir()
			sheet := filepath.Join(dir, "s.toml")
			lw := &liveSheet{e: &Env{Stdout: io.Discard, Stderr: io.Discard}, sheet: sheet, out: filepath.Join(dir, "s.md"), lib: rflib.Library(), ao: analysis.Options{Seed: 1}}
			versions := [][]byte{src, []byte(edited)}
			render := func(i int) {
				if err := os.WriteFile(sheet, versions[i%2], 0o644); err != nil {
					b.Fatal(err)
				}
				if _, _, err := lw.render(); err != nil {
					b.Fatal(err)
				}
			}
			render(0)
			i := 1
			cpu := sheettest.CPUTime()
			for b.Loop() {
				render(i)
				i++
			}
			sheettest.ReportCPU(b, cpu)
		})
	}
}
