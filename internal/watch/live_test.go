package watch

import (
	"bytes"
	"encoding/json"
	"fmt"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
	"unicode"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"
)

// A number and its unit symbol are separated by a space (SI Brochure, 9th edition 2019,
// §5.4.3); that the space does not break is typesetting practice (common practice, no
// source). The served page makes it a no-break space, and only there.
func TestBindUnits(t *testing.T) {
	const nb = "\u00a0"
	for _, c := range []struct{ in, want string }{
		{"12.50 dB", "12.50" + nb + "dB"},
		{"2.4 km away across", "2.4" + nb + "km away across"},
		{"-114.00 dB", "-114.00" + nb + "dB"},
		{"±1 dB (normal)", "±1" + nb + "dB (normal)"},
		{"\\-3 dB / +1 dB", "\\-3" + nb + "dB / +1" + nb + "dB"},
		{"45.28 %", "45.28" + nb + "%"},
		{"9.6 kbit/s.", "9.6" + nb + "kbit/s."},
		{"from 200 m to 10 km", "from 200" + nb + "m to 10" + nb + "km"},
		{"1e-4 W", "1e-4" + nb + "W"},
		{"(2 of 2).", "(2 of 2)."},               // "of" is no unit
		{"every 15 minutes", "every 15 minutes"}, // nor is "minutes"
		{"x2 dB", "x2 dB"},                       // x2 is a name, not a number
		{"10000 trials, seed 1.", "10000 trials, seed 1."},
		{"ends in 5", "ends in 5"},
		{"", ""},
	} {
		if got := string(bindUnits([]byte(c.in))); got != c.want {
			t.Errorf("bindUnits(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

func convert(t *testing.T, md string) string {
	t.Helper()
	var b bytes.Buffer
	if err := markdown.Convert([]byte(md), &b); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func table(rows int) string {
	var b strings.Builder
	b.WriteString("| x (m) | y (dB) |\n| ---: | ---: |\n")
	for i := range rows {
		b.WriteString("| " + strings.Repeat("1", i+1) + " | 2.5 dB |\n")
	}
	return b.String() + "\n"
}

func TestServedLayout(t *testing.T) {
	page := "# T\n\n## Line items\n\n" + table(20) + "## Sweeps\n\n### d from 1 m to 9 m\n\n" + table(foldRows) + "### e\n\n" + table(foldRows+1) +
		"## Solves\n\n" + table(30) + "Range `a >= 10 dB` holds at **6.076 km**.\n"
	html := convert(t, page)
	if n := strings.Count(html, `<div class="tbl">`); n != 4 || strings.Count(html, "<table>") != 4 {
		t.Errorf("every table should sit in its own scrolling box: %d boxes for %d tables", n, strings.Count(html, "<table>"))
	}
	// Only the sweep table longer than foldRows is folded, closed.
	if n := strings.Count(html, "<details"); n != 1 || !strings.Contains(html, `<details class="fold"><summary>table of 13 rows</summary>`) {
		t.Errorf("want one folded sweep table of 13 rows, got %d <details>:\n%s", n, html)
	}
	if strings.Contains(html, "<details open") {
		t.Error("a folded table must start closed")
	}
	if !strings.Contains(html, "<td align=\"right\">2.5\u00a0dB</td>") || !strings.Contains(html, "<strong>6.076\u00a0km</strong>") {
		t.Errorf("values should keep their units on the same line")
	}
	if !strings.Contains(html, "<code>a &gt;= 10 dB</code>") {
		t.Errorf("code is shown as written")
	}
	if !strings.Contains(html, `<h3 id="d-from-1-m-to-9-m">d from 1`+"\u00a0m to 9\u00a0m</h3>") {
		t.Errorf("heading ids must not change with the no-break spaces:\n%s", html)
	}
}

// age dates the sheet an hour back: a sheet saved just now is rendered twice on start (a
// save may have landed during the first render, see changedSince).
func (f *fixture) age(t *testing.T) {
	t.Helper()
	old := time.Now().Add(-time.Hour)
	if err := os.Chtimes(f.main, old, old); err != nil {
		t.Fatal(err)
	}
}

// serve runs f's watch with o, served on a loopback port.
func serve(t *testing.T, f *fixture, o Options) *served {
	t.Helper()
	ready := make(chan string, 1)
	o.Serve = ":0"
	o.Ready = func(addr string) { ready <- addr }
	s := &served{fixture: f, client: &http.Client{Timeout: 3 * time.Second, Transport: &http.Transport{DisableKeepAlives: true}}}
	s.stop = start(t, f.sh.render, o)
	select {
	case s.addr = <-ready:
	case <-time.After(3 * time.Second):
		t.Fatal("Ready was not called")
	}
	return s
}

// state fetches /state.
func (s *served) state(t *testing.T) liveState {
	t.Helper()
	resp, body := s.get(t, "GET", "/state")
	if resp.StatusCode != 200 || resp.Header.Get("Content-Type") != "application/json" {
		t.Fatalf("GET /state = %d %s", resp.StatusCode, resp.Header.Get("Content-Type"))
	}
	if csp := resp.Header.Get("Content-Security-Policy"); !strings.HasPrefix(csp, "default-src 'none'") || resp.Header.Get("Cache-Control") != "no-store" {
		t.Errorf("/state headers: CSP %q, Cache-Control %q", csp, resp.Header.Get("Cache-Control"))
	}
	var st liveState
	if err := json.Unmarshal([]byte(body), &st); err != nil {
		t.Fatalf("/state: %v: %s", err, body)
	}
	return st
}

// TestServerLiveState follows one sheet through a good save (quick page, then the refined
// one), a broken save and a fix, as the page's script sees them through /state.
func TestServerLiveState(t *testing.T) {
	f := newFixture(t, "| A | B |\n|---|---|\n| gain | 12.50 dB |")
	f.age(t) // this test counts on one render per save
	// Refinements wait until release is closed (a save that lands during the first render
	// may render again, so there may be more than one waiting), then all go through.
	release := make(chan struct{})
	o := f.opts()
	o.Summary = func() Summary {
		return Summary{Verdict: "PASS", Detail: "1 of 1 requirements hold", FocusName: "link.<margin>", FocusValue: "12.50 dB", Pending: true}
	}
	o.Refine = func() ([]byte, bool) {
		<-release
		data, _, err := f.sh.render()
		return append(data, "\nMonte Carlo median 12 dB\n"...), err == nil
	}
	s := serve(t, f, o)

	quick := s.state(t)
	if quick.Broken || !strings.Contains(quick.HTML, "<td>12.50\u00a0dB</td>") {
		t.Fatalf("first state: %+v", quick)
	}
	for _, want := range []string{`<span class="verdict pass" id="verdict" title="1 of 1 requirements hold">PASS</span>`, "<code>link.&lt;margin&gt;</code>", `<b class="nw" id="focus-value">12.50 dB</b>`, "recalculated ", `id="mc">Monte Carlo running`} {
		if !strings.Contains(quick.Bar, want) {
			t.Errorf("status bar lacks %q:\n%s", want, quick.Bar)
		}
	}
	_, page := s.get(t, "GET", "/")
	if !strings.Contains(page, `data-version="`+quick.Tag+`"`) || !strings.Contains(page, `data-report="`+quick.Report+`"`) || !strings.Contains(page, "Monte Carlo running") {
		t.Errorf("the page and /state disagree: /state %s/%s", quick.Tag, quick.Report)
	}

	close(release)
	var full liveState
	eventually(t, "the refined page", func() bool { full = s.state(t); return strings.Contains(full.HTML, "Monte Carlo median") })
	if full.Report == quick.Report || full.Tag == quick.Tag || strings.Contains(full.Bar, "Monte Carlo running") {
		t.Errorf("after the refinement: %+v", full)
	}

	saveByRename(t, s.main, "| A | B |\n|---|---|\n| gain | 13.50 dB |\nBROKEN")
	var broken liveState
	eventually(t, "the error state", func() bool { broken = s.state(t); return broken.Broken })
	if broken.Report != full.Report || broken.HTML != full.HTML {
		t.Errorf("a broken save must keep the last good report")
	}
	for _, want := range []string{`id="error" role="alert"`, "line 4: broken sheet", "last good at ", "showing the last good report", "12.50 dB"} {
		if !strings.Contains(broken.Bar, want) {
			t.Errorf("error state lacks %q:\n%s", want, broken.Bar)
		}
	}

	saveByRename(t, s.main, "| A | B |\n|---|---|\n| gain | 13.50 dB |")
	eventually(t, "the mended page", func() bool {
		st := s.state(t)
		return !st.Broken && strings.Contains(st.HTML, "13.50\u00a0dB") && !strings.Contains(st.Bar, "error")
	})
	if code := rawHostPath(t, s.addr, "evil.example", "/state"); code != http.StatusMisdirectedRequest {
		t.Errorf("/state for a foreign Host = %d, want 421", code)
	}
}

// A render that leaves nothing for Refine (Summary.Pending false) never shows the Monte Carlo
// as running, though Refine is set.
func TestServerNothingPending(t *testing.T) {
	f := newFixture(t, "one")
	o := f.opts()
	o.Summary = func() Summary { return Summary{Verdict: "FAIL", Detail: "0 of 1 requirements hold"} }
	o.Refine = func() ([]byte, bool) { return nil, false }
	s := serve(t, f, o)
	st := s.state(t)
	if strings.Contains(st.Bar, "Monte Carlo") || !strings.Contains(st.Bar, `class="verdict fail"`) || strings.Contains(st.Bar, "focus") {
		t.Errorf("status bar:\n%s", st.Bar)
	}
}

// Every demo's committed page converts for the server (a past bug: a text node taken out with
// its run was bound again, without a parent), with the same text as goldmark's own GFM.
func TestServedDemoPages(t *testing.T) {
	pages, err := filepath.Glob("../../worksheets/*.md")
	if err != nil || len(pages) == 0 {
		t.Fatalf("no pages: %v", err)
	}
	for _, p := range pages {
		md, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if msg := sameText(md); msg != "" {
			t.Errorf("%s: %s", p, msg)
		}
	}
}

// sameText converts md as the server does and with goldmark's GFM, and says how their text
// differs once tags, the folds' summaries and runs of white space (no-break ones included)
// are set aside; "" when it does not.
func sameText(md []byte) string {
	var served, plain bytes.Buffer
	if err := markdown.Convert(md, &served); err != nil {
		return err.Error()
	}
	if err := goldmark.New(goldmark.WithExtensions(extension.GFM)).Convert(md, &plain); err != nil {
		return err.Error()
	}
	text := func(html string) string {
		html = regexp.MustCompile(`<summary>table of \d+ rows</summary>`).ReplaceAllString(html, "")
		html = regexp.MustCompile(`<[^>]*>`).ReplaceAllString(html, " ")
		return strings.Join(strings.FieldsFunc(html, func(r rune) bool { return unicode.IsSpace(r) }), " ")
	}
	if a, b := text(served.String()), text(plain.String()); a != b {
		return fmt.Sprintf("served text %.200q, goldmark's %.200q", a, b)
	}
	return ""
}

// FuzzServedPage converts any text as the server does: no panic, and the same text as
// goldmark's own GFM.
func FuzzServedPage(f *testing.F) {
	pages, _ := filepath.Glob("../../worksheets/*.md")
	for _, p := range pages {
		if md, err := os.ReadFile(p); err == nil {
			f.Add(string(md))
		}
	}
	f.Add("a 5 dB\nb 6 km  x 7 %\n\n| 1 m | 2 dB |\n|---|---|\n| 3 s 4 Hz | `5 dB` |\n")
	f.Fuzz(func(t *testing.T, md string) {
		if msg := sameText([]byte(md)); msg != "" {
			t.Error(msg)
		}
	})
}
