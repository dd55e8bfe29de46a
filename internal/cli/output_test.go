package cli

import (
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// A sheet with a chart (a sweep) and a part, for the output tests.
const outSheet = `title = "Barn to silo"
use = { lna = "parts/lna.toml" }
focus = "m"
p = "10 dBm"
d = "300 m"
m = "= p - fspl(d, 2.4 GHz) + lna.gain + 90 dB"
[[sweep]]
vary = "d"
from = "100 m"
to = "1 km"
steps = 4
plot = ["m"]
`

func outFixture(t *testing.T) (dir, sheet, part string) {
	t.Helper()
	dir = t.TempDir()
	sheet = filepath.Join(dir, "victim.toml")
	part = filepath.Join(dir, "parts", "lna.toml")
	if err := os.MkdirAll(filepath.Dir(part), 0o755); err != nil {
		t.Fatal(err)
	}
	writeT(t, sheet, outSheet)
	writeT(t, part, "gain = \"15 dB\"\n")
	return dir, sheet, part
}

func writeT(t *testing.T, p, s string) {
	t.Helper()
	if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
}

func readT(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// Issue 8, finding 5: -o naming the worksheet or a part (by any name: itself, a link, a
// hard link, ./) is refused before anything is written, and the file is unchanged.
func TestOutputIsNotAnInput(t *testing.T) {
	dir, sheet, part := outFixture(t)
	must := func(err error) {
		if err != nil {
			t.Fatal(err)
		}
	}
	must(os.Symlink("victim.toml", filepath.Join(dir, "alias.md")))
	must(os.Link(part, filepath.Join(dir, "hard.md")))
	for _, out := range []string{sheet, filepath.Join(dir, ".", "victim.toml"), filepath.Join(dir, "alias.md"), part, filepath.Join(dir, "hard.md")} {
		for _, cmd := range [][]string{{"render", sheet, "-o", out}, {"watch", sheet, "-o", out}, {"render", sheet, "--json", "-o", out}} {
			code, _, stderr := run(t, cmd...)
			if code != ExitUsage || !strings.Contains(stderr, "is the worksheet file") {
				t.Errorf("%v: exit %d, want 2 with a refusal:\n%s", cmd, code, stderr)
			}
		}
	}
	if readT(t, sheet) != outSheet || readT(t, part) != "gain = \"15 dB\"\n" {
		t.Error("an input was overwritten")
	}
	if svgs, _ := filepath.Glob(filepath.Join(dir, "*.svg")); len(svgs) > 0 {
		t.Errorf("charts written before the refusal: %v", svgs)
	}
}

// Issue 8, finding 11: -o a folder, or a path in a folder that does not exist, is refused
// before any chart is written beside it.
func TestOutputFolderCheckedFirst(t *testing.T) {
	dir, sheet, _ := outFixture(t)
	some := filepath.Join(dir, "somedir")
	if err := os.Mkdir(some, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, out := range []string{some, filepath.Join(dir, "missing", "page.md")} {
		code, _, stderr := run(t, "render", sheet, "-o", out)
		if code != ExitUsage {
			t.Errorf("-o %s: exit %d, want 2:\n%s", out, code, stderr)
		}
	}
	if svgs, _ := filepath.Glob(filepath.Join(dir, "*.svg")); len(svgs) > 0 {
		t.Errorf("written before the refusal: %v", svgs)
	}
}

// New files get 0666 less the umask; an existing page keeps its mode.
func TestOutputModes(t *testing.T) {
	dir, sheet, _ := outFixture(t)
	old := syscall.Umask(0o077)
	defer syscall.Umask(old)
	out := filepath.Join(dir, "page.md")
	if code, _, stderr := run(t, "render", sheet, "-o", out); code != ExitOK {
		t.Fatal(stderr)
	}
	files, _ := filepath.Glob(filepath.Join(dir, "page*"))
	for _, f := range files {
		if fi, _ := os.Stat(f); fi.Mode().Perm() != 0o600 {
			t.Errorf("%s: mode %v under umask 077, want 0600", f, fi.Mode().Perm())
		}
	}
	if err := os.Chmod(out, 0o640); err != nil {
		t.Fatal(err)
	}
	if code, _, stderr := run(t, "render", sheet, "-o", out); code != ExitOK {
		t.Fatal(stderr)
	}
	if fi, _ := os.Stat(out); fi.Mode().Perm() != 0o640 {
		t.Errorf("existing page: mode %v, want its 0640 kept", fi.Mode().Perm())
	}
}

// Temp files of our pattern left by a killed run are removed by the next run; those of a
// running process (this one) and other files are left alone.
func TestStaleTempFilesRemoved(t *testing.T) {
	dir, sheet, _ := outFixture(t)
	out := filepath.Join(dir, "page.md")
	// A pid far above any pid_max in use (Linux allows at most 4,194,304) belongs to no process.
	dead := []string{".page.md.tmp-99999999-0a1b2c", ".page.sweep-1.0123456789ab.svg.tmp-99999998-ffee"}
	live := []string{".page.md.tmp-" + strconv.Itoa(os.Getpid()) + "-0a1b2c", ".page.md.notes", "page.md.tmp-99999999-x"}
	for _, n := range append(dead, live...) {
		writeT(t, filepath.Join(dir, n), "partial")
	}
	if code, _, stderr := run(t, "render", sheet, "-o", out); code != ExitOK {
		t.Fatal(stderr)
	}
	for _, n := range dead {
		if _, err := os.Stat(filepath.Join(dir, n)); err == nil {
			t.Errorf("stale %s left", n)
		}
	}
	for _, n := range live {
		if _, err := os.Stat(filepath.Join(dir, n)); err != nil {
			t.Errorf("%s removed", n)
		}
	}
}

// Charts carry a hash of their content, are written before the page, and the charts of the
// previous page are removed after it: the page always links charts of its own run, and
// charts that belong to no page do not pile up. Other files beside the page stay.
func TestChartsFollowThePage(t *testing.T) {
	dir, sheet, _ := outFixture(t)
	out := filepath.Join(dir, "page.md")
	writeT(t, filepath.Join(dir, "page.sweep-1.svg"), "<svg/>") // the unhashed name of older versions
	writeT(t, filepath.Join(dir, "page.notes.svg"), "<svg/>")   // not ours
	link := regexp.MustCompile(`\]\((page\.[^)]+\.svg)\)`)
	var before []string
	for i, to := range []string{"800 m", "900 m"} {
		writeT(t, sheet, strings.Replace(outSheet, `"1 km"`, `"`+to+`"`, 1))
		if code, _, stderr := run(t, "render", sheet, "-o", out); code != ExitOK {
			t.Fatal(stderr)
		}
		linked := map[string]bool{}
		for _, m := range link.FindAllStringSubmatch(readT(t, out), -1) {
			linked[m[1]] = true
			if !regexp.MustCompile(`^page\.(sweep-1|budget)\.[0-9a-f]{12}\.svg$`).MatchString(m[1]) {
				t.Errorf("chart name %q has no content hash", m[1])
			}
		}
		svgs, _ := filepath.Glob(filepath.Join(dir, "page.*.svg"))
		var names []string
		for _, s := range svgs {
			n := filepath.Base(s)
			names = append(names, n)
			if !linked[n] && n != "page.notes.svg" {
				t.Errorf("run %d: %s left beside the page", i, n)
			}
		}
		for n := range linked {
			if _, err := os.Stat(filepath.Join(dir, n)); err != nil {
				t.Errorf("run %d: the page links %s, which is missing", i, n)
			}
		}
		if i == 1 && strings.Join(names, ",") == strings.Join(before, ",") {
			t.Error("a changed sweep kept the same chart name")
		}
		before = names
	}
}

// A worksheet that is a named pipe is read once: the error's excerpt is not read by opening
// the pipe again, which blocked until another writer came (render and check hung).
func TestPipedSheetWithAnError(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "pipe.toml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("no named pipes here: %v", err)
	}
	for _, cmd := range []string{"render", "check"} {
		go func() {
			if f, err := os.OpenFile(fifo, os.O_WRONLY, 0); err == nil {
				f.WriteString("x = \"= y\"\n")
				f.Close()
			}
		}()
		done := make(chan struct{})
		var code int
		var stderr string
		go func() {
			code, _, stderr = run(t, cmd, fifo)
			close(done)
		}()
		select {
		case <-done:
		case <-time.After(20 * time.Second):
			// unblock the command so that the test can end
			if f, err := os.OpenFile(fifo, os.O_WRONLY, 0); err == nil {
				f.Close()
			}
			<-done
			t.Fatalf("%s of a named pipe hung after reading it", cmd)
		}
		if code != ExitBadSheet || !strings.Contains(stderr, fifo+":1:8: x: unknown name \"y\"") {
			t.Errorf("%s: exit %d, stderr %q", cmd, code, stderr)
		}
	}
}

// A part whose file is named like one of the page's old charts (page.budget.svg) is an
// input, not a chart to clean up: render and watch keep it (render removed it).
func TestPartNamedLikeAChartKept(t *testing.T) {
	dir := t.TempDir()
	sheet, part := filepath.Join(dir, "s.toml"), filepath.Join(dir, "page.budget.svg")
	writeT(t, sheet, "use = { a = \"page.budget.svg\" }\nx = \"= a.g\"\n")
	writeT(t, part, "g = \"1 dB\"\n")
	out := filepath.Join(dir, "page.md")
	if code, _, stderr := run(t, "render", sheet, "-o", out); code != ExitOK {
		t.Fatalf("render: exit %d\n%s", code, stderr)
	}
	if got := readT(t, part); got != "g = \"1 dB\"\n" {
		t.Errorf("the part is now %q", got)
	}
	if !strings.Contains(readT(t, out), "a.g") {
		t.Error("the page does not show the part's quantity")
	}
}

// The JSON result beside the page (page.json next to page.md) writes no charts and removes
// none: every chart the page links is still there (the JSON render removed them all).
func TestJSONBesideThePageKeepsItsCharts(t *testing.T) {
	dir, sheet, _ := outFixture(t)
	page := filepath.Join(dir, "page.md")
	for _, args := range [][]string{{"render", sheet, "-o", page}, {"render", sheet, "--json", "-o", filepath.Join(dir, "page.json")}} {
		if code, _, stderr := run(t, args...); code != ExitOK {
			t.Fatalf("%v: exit %d\n%s", args, code, stderr)
		}
	}
	links := regexp.MustCompile(`\]\((page\.[^)]+\.svg)\)`).FindAllStringSubmatch(readT(t, page), -1)
	if len(links) == 0 {
		t.Fatal("the page links no chart")
	}
	for _, l := range links {
		if _, err := os.Stat(filepath.Join(dir, l[1])); err != nil {
			t.Errorf("chart %s: %v", l[1], err)
		}
	}
}

// A --serve address with no port or a port that is no port is a usage error (exit 2) before
// anything is rendered; it was exit 3, as if the worksheet could not be evaluated.
func TestServeAddressIsAUsageError(t *testing.T) {
	dir, sheet, _ := outFixture(t)
	out := filepath.Join(dir, "page.md")
	for _, addr := range []string{"nonsense", "localhost:", ":99999", "a:b:c"} {
		code, _, stderr := run(t, "watch", sheet, "-o", out, "--serve", addr)
		if code != ExitUsage || !strings.Contains(stderr, "--serve") {
			t.Errorf("--serve %s: exit %d, want 2:\n%s", addr, code, stderr)
		}
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a page was written")
	}
}
