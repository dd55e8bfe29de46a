package cli

import (
	"context"
	"encoding/json"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/rflib"
)

// browserTools finds Debian's chromium and the npm playwright-core that drives it, or says
// what is missing. RFLEDGER_CHROMIUM and RFLEDGER_PLAYWRIGHT (the playwright-core folder)
// override the search; .ci/run installs both where it can.
func browserTools() (node, chromium, playwright, missing string) {
	var err error
	if node, err = exec.LookPath("node"); err != nil {
		return "", "", "", "node not found (apt-get install -y nodejs)"
	}
	chromium = os.Getenv("RFLEDGER_CHROMIUM")
	for _, name := range []string{"chromium", "chromium-browser"} {
		if chromium != "" {
			break
		}
		chromium, _ = exec.LookPath(name)
	}
	if chromium == "" {
		return "", "", "", "chromium not found (apt-get install -y chromium, as .ci/run does, or set RFLEDGER_CHROMIUM)"
	}
	playwright = os.Getenv("RFLEDGER_PLAYWRIGHT")
	if playwright == "" {
		cache := os.Getenv("XDG_CACHE_HOME")
		if cache == "" {
			home, _ := os.UserHomeDir()
			cache = filepath.Join(home, ".cache")
		}
		playwright = filepath.Join(cache, "rfledger-ci", "playwright", "node_modules", "playwright-core")
	}
	if _, err := os.Stat(filepath.Join(playwright, "package.json")); err != nil {
		return "", "", "", "playwright-core not found at " + playwright + " (npm install --prefix ~/.cache/rfledger-ci/playwright playwright-core, as .ci/run does, or set RFLEDGER_PLAYWRIGHT)"
	}
	return node, chromium, playwright, ""
}

// livePage is what testdata/livepage.js reports.
type livePage struct {
	Error          string   `json:"error"`
	Steps          []string `json:"steps"`
	Console        []string `json:"console"`
	Shots          []string `json:"shots"`
	InitialFocus   string   `json:"initialFocus"`
	InitialVerdict string   `json:"initialVerdict"`
	LiveText       string   `json:"liveText"`
	FoldedSweep    *struct {
		Open    bool   `json:"open"`
		Rows    int    `json:"rows"`
		Summary string `json:"summary"`
	} `json:"foldedSweep"`
	ScrollBefore     float64 `json:"scrollBefore"`
	ScrollAfter      float64 `json:"scrollAfter"`
	UpdateMs         int     `json:"updateMs"`
	UpdatedFocus     string  `json:"updatedFocus"`
	ReportHasUpdated bool    `json:"reportHasUpdated"`
	Seen             struct {
		Quick   bool `json:"quick"`
		Running bool `json:"running"`
	} `json:"seen"`
	MonteCarloFilled      bool `json:"monteCarloFilled"`
	SameDocumentAfterEdit bool `json:"sameDocumentAfterEdit"`
	SweepStillOpen        bool `json:"sweepStillOpen"`
	Broken                *struct {
		BarClass     string  `json:"barClass"`
		BarTop       float64 `json:"barTop"`
		ErrorTop     float64 `json:"errorTop"`
		ErrorBottom  float64 `json:"errorBottom"`
		Viewport     float64 `json:"viewport"`
		ScrollY      float64 `json:"scrollY"`
		Text         string  `json:"text"`
		Focus        string  `json:"focus"`
		Report       bool    `json:"report"`
		SameDocument bool    `json:"sameDocument"`
	} `json:"broken"`
	Fixed   bool `json:"fixed"`
	Layouts map[string]struct {
		ScrollWidth     int    `json:"scrollWidth"`
		ClientWidth     int    `json:"clientWidth"`
		BodyBackground  string `json:"bodyBackground"`
		BodyColor       string `json:"bodyColor"`
		ChartBackground string `json:"chartBackground"`
		ScrollingBoxes  int    `json:"scrollingBoxes"`
		Boxes           int    `json:"boxes"`
		FocusLines      int    `json:"focusLines"`
		WrappedValues   int    `json:"wrappedValues"`
	} `json:"layouts"`
	ChartContrast     map[string]float64 `json:"chartContrast"`
	Loads             int                `json:"loads"`
	SameDocumentAtEnd bool               `json:"sameDocumentAtEnd"`
}

// TestLivePageInChromium serves a copy of a demo with `watch --serve` and has a real headless
// Chromium (Debian's, driven by npm playwright-core through testdata/livepage.js) load the
// page, edit the sheet on disk, break it and mend it, and lay the page out at 1280 and 420 px
// in light and dark. Screenshots go to $RFLEDGER_SHOTS when set (to keep them), else to the
// test's temporary folder; the test logs where.
func TestLivePageInChromium(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a browser")
	}
	node, chromium, playwright, missing := browserTools()
	if missing != "" {
		t.Skip("the live page's browser test needs " + missing)
	}
	dir := t.TempDir()
	src, err := os.ReadFile("../../worksheets/field-probe-uplink.toml")
	if err != nil {
		t.Fatal(err)
	}
	sheet := filepath.Join(dir, "field.toml")
	if err := os.WriteFile(sheet, src, 0o644); err != nil {
		t.Fatal(err)
	}
	shots := os.Getenv("RFLEDGER_SHOTS")
	if shots == "" {
		shots = filepath.Join(dir, "shots")
	}
	if err := os.MkdirAll(shots, 0o755); err != nil {
		t.Fatal(err)
	}

	ctx, cancel := context.WithCancel(context.Background())
	ready := make(chan string, 1)
	// What watch prints goes to a file: the loop and its server write at once.
	logFile, err := os.Create(filepath.Join(dir, "watch.log"))
	if err != nil {
		t.Fatal(err)
	}
	defer logFile.Close()
	stderr := logText(logFile.Name())
	done := make(chan int, 1)
	go func() {
		done <- watchUntil(ctx, &Env{Stdout: logFile, Stderr: logFile}, []string{sheet, "-o", filepath.Join(dir, "field.md"), "--serve", "127.0.0.1:0"}, func(a string) { ready <- a })
	}()
	defer func() {
		cancel()
		select {
		case <-done:
		case <-time.After(10 * time.Second):
			t.Error("watch did not stop")
		}
	}()
	var addr string
	select {
	case addr = <-ready:
	case code := <-done:
		t.Fatalf("watch ended with %d:\n%s", code, stderr.String())
	case <-time.After(30 * time.Second):
		t.Fatalf("watch did not serve:\n%s", stderr.String())
	}

	out := filepath.Join(shots, "live-result.json")
	bctx, bcancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer bcancel()
	cmd := exec.CommandContext(bctx, node, "testdata/livepage.js")
	cmd.Env = append(os.Environ(), "RFL_PLAYWRIGHT="+playwright, "RFL_CHROMIUM="+chromium, "RFL_URL=http://"+addr+"/",
		"RFL_SHEET="+sheet, "RFL_OUT="+out, "RFL_SHOTS="+shots, "RFL_PROFILE="+filepath.Join(dir, "profile"))
	if b, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("node: %v\n%s", err, b)
	}
	raw, err := os.ReadFile(out)
	if err != nil {
		t.Fatalf("the browser script wrote no results: %v", err)
	}
	var r livePage
	if err := json.Unmarshal(raw, &r); err != nil {
		t.Fatalf("%v: %s", err, raw)
	}
	t.Logf("screenshots and what the browser saw (live-result.json) in %s", shots)
	t.Logf("watch said:\n%s", stderr.String())
	if r.Error != "" {
		t.Fatalf("the browser script failed after steps %v: %s\nwatch said:\n%s", r.Steps, r.Error, stderr.String())
	}
	if len(r.Console) > 0 {
		t.Errorf("the page logged errors (a CSP violation shows here): %q", r.Console)
	}

	// The committed page of this demo gives the focus as 12.50 dB and the verdict PASS.
	if r.InitialFocus != "12.50 dB" || r.InitialVerdict != "PASS" || r.LiveText != "live" {
		t.Errorf("status bar on load: focus %q verdict %q connection %q", r.InitialFocus, r.InitialVerdict, r.LiveText)
	}
	// The sweep has 40 steps, so 41 rows (the sheet's [[sweep]]), folded by default.
	if r.FoldedSweep == nil || r.FoldedSweep.Open || r.FoldedSweep.Rows != 41 {
		t.Errorf("the sweep table should be folded: %+v", r.FoldedSweep)
	}

	// The margin is a sum of decibel terms (the Friis transmission equation in logarithmic
	// form, as every link budget writes it), so 1 dB more transmit power is 1 dB more margin.
	if r.UpdatedFocus != "13.50 dB" || !r.ReportHasUpdated {
		t.Errorf("after raising the power by 1 dB the status bar shows %q (report updated: %v), want 13.50 dB", r.UpdatedFocus, r.ReportHasUpdated)
	}
	if r.UpdateMs > 1000 {
		t.Errorf("the page took %d ms to show the edit, want within 1 s", r.UpdateMs)
	}
	if !r.SameDocumentAfterEdit || !r.SameDocumentAtEnd || r.Loads != 1 {
		t.Errorf("the page reloaded (same document after the edit %v, at the end %v, %d loads)", r.SameDocumentAfterEdit, r.SameDocumentAtEnd, r.Loads)
	}
	if d := r.ScrollAfter - r.ScrollBefore; r.ScrollBefore < 1000 || d > 2 || d < -2 {
		t.Errorf("the scroll position moved from %v to %v on update", r.ScrollBefore, r.ScrollAfter)
	}
	if !r.SweepStillOpen {
		t.Error("the sweep table a reader unfolded closed again on update")
	}
	if !r.Seen.Quick || !r.Seen.Running || !r.MonteCarloFilled {
		t.Errorf("the page should show the nominal results first and the Monte Carlo after: saw the quick page %v, the running mark %v, filled in %v", r.Seen.Quick, r.Seen.Running, r.MonteCarloFilled)
	}

	b := r.Broken
	switch {
	case b == nil:
		t.Errorf("a broken save shows no error")
	case !strings.Contains(b.BarClass, "broken") || !strings.Contains(b.Text, `unknown name "antena"`):
		t.Errorf("the error state: bar %q, text %q", b.BarClass, b.Text)
	case b.ScrollY < 1000 || b.BarTop != 0 || b.ErrorTop < 0 || b.ErrorTop > b.Viewport:
		t.Errorf("the error is not in view while scrolled to %v: bar at %v, error at %v..%v of %v", b.ScrollY, b.BarTop, b.ErrorTop, b.ErrorBottom, b.Viewport)
	case b.Focus != "13.50 dB" || !b.Report || !b.SameDocument:
		t.Errorf("while broken the page should keep the last good numbers: focus %q, report kept %v, same document %v", b.Focus, b.Report, b.SameDocument)
	}
	if !r.Fixed {
		t.Error("the error stayed after the sheet was mended")
	}

	for _, name := range []string{"1280-light", "420-light", "1280-dark", "420-dark"} {
		l, ok := r.Layouts[name]
		if !ok {
			t.Errorf("no layout %s", name)
			continue
		}
		if l.ScrollWidth > l.ClientWidth {
			t.Errorf("%s: the page scrolls sideways (%d px wide in %d)", name, l.ScrollWidth, l.ClientWidth)
		}
		if l.FocusLines != 1 || l.WrappedValues != 0 {
			t.Errorf("%s: a value wraps between number and unit (focus on %d lines, %d table values on two)", name, l.FocusLines, l.WrappedValues)
		}
		dark := strings.HasSuffix(name, "dark")
		if bg := luminance(t, l.BodyBackground); dark != (bg < 0.2) {
			t.Errorf("%s: background %s", name, l.BodyBackground)
		}
		// The charts have transparent backgrounds: their text and lines must stand out
		// from the page's own background, light or dark (measured below).
		if l.ChartBackground != "rgba(0, 0, 0, 0)" {
			t.Errorf("%s: the chart is shown on %s, not on the page's background", name, l.ChartBackground)
		}
	}
	for _, scheme := range []string{"light", "dark"} {
		if c := r.ChartContrast[scheme]; c < chartInk {
			t.Errorf("%s: only %.2f %% of the chart's pixels stand out from the page's background (contrast 4.5:1)", scheme, 100*c)
		}
	}
	// The control: the same chart without its dark-mode rule, on the dark page, must fail
	// the measure, or the measure proves nothing.
	if c, ok := r.ChartContrast["control"]; !ok || c >= chartInk {
		t.Errorf("the chart without its dark-mode rule measures %.2f %% (present %v), want below %.2f %%", 100*c, ok, 100*chartInk)
	}
	if l := r.Layouts["420-light"]; l.ScrollingBoxes == 0 {
		t.Errorf("at 420 px no table scrolls inside its box (%d boxes): is the page squeezing them?", l.Boxes)
	}
}

// chartInk is the least share of a chart's pixels that must stand out from the page (contrast
// 4.5:1, WCAG 2.1's minimum for text). A chart is mostly empty plot area: its labels, ticks
// and lines were measured here at about 1.6 % of it at 1280 px in light and in dark, the
// control (dark text on the dark page) at about 0.2 %; the floor lies between them, set from
// these measurements (no source).
const chartInk = 0.01

// logText reads the log file named when asked for its String.
type logText string

func (l logText) String() string {
	b, _ := os.ReadFile(string(l))
	return string(b)
}

// luminance reads a CSS rgb()/rgba() colour as a relative luminance from 0 to 1 (WCAG 2.1's
// definition of relative luminance); a fully transparent colour counts as white, the
// browser's default canvas.
func luminance(t *testing.T, css string) float64 {
	t.Helper()
	s := strings.TrimSuffix(strings.TrimPrefix(strings.TrimPrefix(css, "rgba("), "rgb("), ")")
	parts := strings.Split(s, ",")
	if len(parts) < 3 {
		t.Errorf("colour %q", css)
		return 0
	}
	if len(parts) == 4 && strings.TrimSpace(parts[3]) == "0" {
		return 1
	}
	var c [3]float64
	for i := range c {
		v, err := strconv.ParseFloat(strings.TrimSpace(parts[i]), 64)
		if err != nil {
			t.Errorf("colour %q", css)
			return 0
		}
		v /= 255
		if v <= 0.04045 {
			v /= 12.92
		} else {
			v = math.Pow((v+0.055)/1.055, 2.4)
		}
		c[i] = v
	}
	return 0.2126*c[0] + 0.7152*c[1] + 0.0722*c[2]
}

// TestLiveSummary checks the served page's status bar against each demo's committed page:
// the same verdict as its Verdict section and the same focus value as its "Focus:" line.
func TestLiveSummary(t *testing.T) {
	sheets, err := filepath.Glob("../../worksheets/*.toml")
	if err != nil || len(sheets) == 0 {
		t.Fatalf("no demos: %v", err)
	}
	for _, sheet := range sheets {
		t.Run(filepath.Base(sheet), func(t *testing.T) {
			md, err := os.ReadFile(strings.TrimSuffix(sheet, ".toml") + ".md")
			if err != nil {
				t.Fatal(err)
			}
			page := string(md)
			verdict, _, _ := strings.Cut(page[strings.Index(page, "## Verdict"):], "\n\n##")
			lw := &liveSheet{e: &Env{Stdout: io.Discard, Stderr: io.Discard}, sheet: sheet, out: filepath.Join(t.TempDir(), "s.md"), lib: rflib.Library(), ao: analysis.Options{Seed: 1}}
			if _, _, err := lw.render(); err != nil {
				t.Fatal(err)
			}
			s := lw.summary()
			switch {
			case strings.Contains(verdict, "**PASS"):
				if s.Verdict != "PASS" {
					t.Errorf("the page passes, the bar says %q (%s)", s.Verdict, s.Detail)
				}
			case strings.Contains(verdict, "**FAIL"):
				if s.Verdict != "FAIL" {
					t.Errorf("the page fails, the bar says %q (%s)", s.Verdict, s.Detail)
				}
			default:
				if s.Verdict != "" {
					t.Errorf("the page checks nothing, the bar says %q", s.Verdict)
				}
			}
			if s.FocusName == "" {
				t.Fatal("no focus in the bar")
			}
			if line := "Focus: `" + s.FocusName + "` = **" + s.FocusValue + "**"; strings.Contains(verdict, "Focus:") && !strings.Contains(verdict, line) {
				t.Errorf("the bar's %q is not the page's focus line", line)
			}
			if !s.Pending {
				t.Error("the demos have tolerances: the quick render leaves the Monte Carlo pending")
			}
			// Once the Monte Carlo is in, the bar says "AT RISK" exactly where the page does.
			if _, ok := lw.refine(); !ok {
				t.Fatal("the refinement wrote no page")
			}
			s = lw.summary()
			if risky := strings.Contains(verdict, "AT RISK"); risky != (s.Verdict == "AT RISK") {
				t.Errorf("page at risk: %v; the bar after the Monte Carlo says %q (%s)", risky, s.Verdict, s.Detail)
			}
		})
	}
}
