package watch

import (
	"bytes"
	"context"
	"crypto/rand"
	"encoding/base64"
	"encoding/json"
	"fmt"
	"html/template"
	"io"
	"log"
	"net"
	"net/http"
	"os"
	"strconv"
	"strings"
	"sync"
	"time"
)

// state is the part of the watch loop the server reads: the last good output,
// the last error and a version counter that changes on every recalculation.
type state struct {
	mu       sync.Mutex
	boot     string // distinguishes runs so a page from an earlier run reloads
	version  uint64
	report   uint64 // changes when md does
	md       []byte
	errText  string
	extras   map[string]string
	sum      Summary   // the status bar's figures of md
	goodAt   time.Time // when md was recalculated
	errAt    time.Time // when errText was found
	refining bool      // md lacks the Monte Carlo, which is being computed
	html     []byte    // rendered md, cached for htmlFor
	htmlFor  uint64
	changed  chan struct{} // closed and replaced on every version change
}

// Summary is what the served page's status bar shows of a good render: its verdict and
// the value of its focus.
type Summary struct {
	Verdict    string // "PASS", "FAIL", "AT RISK" (passes at nominal, too few Monte Carlo trials hold), or "" when there is nothing to check
	Detail     string // what the verdict counts, e.g. "2 of 2 requirements hold"
	FocusName  string // the focus quantity's name; "" when the sheet has none
	FocusValue string // its value in the page's display unit, e.g. "12.50 dB"
	// Pending says the render left the Monte Carlo out for Options.Refine to fill in; the
	// bar says so until it is done. Without a Summary, any render with a Refine is pending.
	Pending bool
}

func newState() *state {
	var b [6]byte
	rand.Read(b[:])
	return &state{boot: base64.RawURLEncoding.EncodeToString(b[:]), changed: make(chan struct{})}
}

func (s *state) bumpLocked() {
	s.version++
	close(s.changed)
	s.changed = make(chan struct{})
}

// succeed records a good render; refining says its Monte Carlo is still being computed.
func (s *state) succeed(md []byte, extras map[string]string, sum Summary, refining bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.setLocked(md, extras)
	s.errText = ""
	s.sum = sum
	s.goodAt = time.Now()
	s.refining = refining
	s.bumpLocked()
}

// complete records the refinement of the last good render.
func (s *state) complete(md []byte, extras map[string]string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.setLocked(md, extras)
	s.refining = false
	s.bumpLocked()
}

// settle records that the last render's refinement ended without changing it.
func (s *state) settle() {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.refining {
		s.refining = false
		s.bumpLocked()
	}
}

func (s *state) setLocked(md []byte, extras map[string]string) {
	s.md = bytes.Clone(md)
	s.extras = extras
	s.report++
}

// seed sets the report shown before any good render without changing the
// version.
func (s *state) seed(md []byte, extras map[string]string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.setLocked(md, extras)
}

func (s *state) fail(msg string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.errText = msg
	s.errAt = time.Now()
	s.refining = false // a newer save overtook it: its result is dropped
	s.bumpLocked()
}

func (s *state) lastErr() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.errText
}

// tag returns the current version as an opaque string and a channel closed on
// the next change.
func (s *state) tag() (string, <-chan struct{}) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.tagLocked(), s.changed
}

func (s *state) tagLocked() string { return s.boot + "-" + strconv.FormatUint(s.version, 10) }

// view is what the page shows at one moment.
type view struct {
	Tag      string
	Report   string // changes when Body does
	Body     template.HTML
	Ready    bool // Body holds a report
	Error    string
	ErrorAt  string
	At       string
	Refining bool
	Summary
}

// VerdictClass is the status bar's class for the verdict.
func (v view) VerdictClass() string {
	switch v.Verdict {
	case "PASS":
		return "pass"
	case "FAIL":
		return "fail"
	case "AT RISK":
		return "risk"
	}
	return "none"
}

// snapshot returns what the page shows: the rendered HTML of the last good
// output, the current error (if any), the status bar's figures and the version tag.
func (s *state) snapshot() view {
	s.mu.Lock()
	defer s.mu.Unlock()
	v := view{Tag: s.tagLocked(), Report: strconv.FormatUint(s.report, 10), Error: s.errText, Refining: s.refining, Summary: s.sum}
	if !s.goodAt.IsZero() {
		v.At = s.goodAt.Format("15:04:05")
	}
	if !s.errAt.IsZero() {
		v.ErrorAt = s.errAt.Format("15:04:05")
	}
	if s.md == nil {
		return v
	}
	if s.html == nil || s.htmlFor != s.report {
		var buf bytes.Buffer
		if err := markdown.Convert(s.md, &buf); err != nil {
			buf.Reset()
			fmt.Fprintf(&buf, "<pre>%s</pre>", template.HTMLEscapeString(string(s.md)))
		}
		s.html = buf.Bytes()
		s.htmlFor = s.report
	}
	v.Body = template.HTML(s.html) // produced by goldmark without raw HTML
	v.Ready = true
	return v
}

func (s *state) extra(name string) (string, bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	p, ok := s.extras[name]
	return p, ok
}

// server wraps http.Server with a stop that ends long-lived event streams.
type server struct {
	*http.Server
	cancel context.CancelFunc
}

func newServer(ctx context.Context, st *state, title, outName string, errs io.Writer, hosts hostCheck) *server {
	sctx, cancel := context.WithCancel(ctx)
	if title == "" {
		title = outName
	}
	h := &handler{st: st, title: title, done: sctx.Done(), hosts: hosts}
	return &server{
		Server: &http.Server{
			Handler:           h,
			ReadHeaderTimeout: 5 * time.Second,
			IdleTimeout:       60 * time.Second,
			BaseContext:       func(net.Listener) context.Context { return sctx },
			ErrorLog:          log.New(errs, "watch: http: ", 0),
		},
		cancel: cancel,
	}
}

// stop ends open event streams and shuts the server down, waiting briefly for
// in-flight requests before closing the remaining connections.
func (s *server) stop() {
	s.cancel()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Second)
	defer cancel()
	if err := s.Shutdown(ctx); err != nil {
		s.Close()
	}
}

type handler struct {
	st    *state
	title string
	done  <-chan struct{}
	hosts hostCheck
}

// hostCheck says which Host headers the server answers. A page on another origin can point a
// name it controls at 127.0.0.1 (DNS rebinding) and then read the budget as same-origin; the
// browser still sends that name as Host, so only loopback names, IP addresses the server
// listens on, and the host name given to --serve are answered.
type hostCheck struct {
	ip   net.IP // the address bound; unspecified (0.0.0.0, ::) accepts any IP literal
	name string // the host name given in the serve address, "" when an IP or none was given
}

// allows reports whether a request's Host names this server.
func (c hostCheck) allows(host string) bool {
	if h, _, err := net.SplitHostPort(host); err == nil {
		host = h
	}
	host = strings.TrimSuffix(strings.ToLower(strings.Trim(host, "[]")), ".")
	if host == "" {
		return false
	}
	if ip := net.ParseIP(host); ip != nil {
		return ip.IsLoopback() || ip.Equal(c.ip) || c.ip != nil && c.ip.IsUnspecified()
	}
	return host == "localhost" || strings.HasSuffix(host, ".localhost") || c.name != "" && host == strings.ToLower(c.name)
}

// heartbeat keeps idle event streams alive through proxies and lets the
// server notice clients that went away.
const heartbeat = 20 * time.Second

func (h *handler) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	hdr := w.Header()
	hdr.Set("X-Content-Type-Options", "nosniff")
	hdr.Set("Referrer-Policy", "no-referrer")
	hdr.Set("Cross-Origin-Resource-Policy", "same-origin")
	hdr.Set("Content-Security-Policy", "default-src 'none'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'")
	if !h.hosts.allows(r.Host) {
		http.Error(w, "misdirected request: this page answers only to its own address (loopback or the address it was started on)", http.StatusMisdirectedRequest)
		return
	}
	if r.Method != http.MethodGet && r.Method != http.MethodHead {
		hdr.Set("Allow", "GET, HEAD")
		http.Error(w, "method not allowed", http.StatusMethodNotAllowed)
		return
	}
	switch r.URL.Path {
	case "/":
		h.page(w, r)
	case "/events":
		h.events(w, r)
	case "/state":
		h.state(w, r)
	default:
		h.file(w, r)
	}
}

func (h *handler) page(w http.ResponseWriter, r *http.Request) {
	v := h.st.snapshot()
	nonce := newNonce()
	hdr := w.Header()
	hdr.Set("Content-Security-Policy", "default-src 'none'; img-src 'self' data:; style-src 'nonce-"+nonce+"'; script-src 'nonce-"+nonce+"'; connect-src 'self'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'")
	hdr.Set("Content-Type", "text/html; charset=utf-8")
	hdr.Set("Cache-Control", "no-store")
	var buf bytes.Buffer
	if err := pageTmpl.Execute(&buf, pageData{Title: h.title, Nonce: nonce, view: v}); err != nil {
		http.Error(w, "page template failed", http.StatusInternalServerError)
		return
	}
	hdr.Set("Content-Length", strconv.Itoa(buf.Len()))
	if r.Method == http.MethodHead {
		return
	}
	w.Write(buf.Bytes())
}

// liveState is what /state answers: the page's changing parts, for the page's script to
// put in place without a reload.
type liveState struct {
	Tag    string `json:"tag"`    // the version, as /events sends it
	Report string `json:"report"` // changes when HTML does
	HTML   string `json:"html"`   // the report (goldmark's output, no raw HTML)
	Bar    string `json:"bar"`    // the status bar's contents
	Broken bool   `json:"broken"` // the sheet does not evaluate now
}

// state answers the page's changing parts as JSON.
func (h *handler) state(w http.ResponseWriter, r *http.Request) {
	v := h.st.snapshot()
	var bar bytes.Buffer
	if err := pageTmpl.ExecuteTemplate(&bar, "bar", v); err != nil {
		http.Error(w, "page template failed", http.StatusInternalServerError)
		return
	}
	body := v.Body
	if !v.Ready {
		body = noReport
	}
	b, err := json.Marshal(liveState{Tag: v.Tag, Report: v.Report, HTML: string(body), Bar: bar.String(), Broken: v.Error != ""})
	if err != nil {
		http.Error(w, "state failed", http.StatusInternalServerError)
		return
	}
	hdr := w.Header()
	hdr.Set("Content-Type", "application/json")
	hdr.Set("Cache-Control", "no-store")
	hdr.Set("Content-Length", strconv.Itoa(len(b)))
	if r.Method == http.MethodHead {
		return
	}
	w.Write(b)
}

// events streams the version tag as Server-Sent Events: once on connect and
// again after every recalculation.
func (h *handler) events(w http.ResponseWriter, r *http.Request) {
	hdr := w.Header()
	hdr.Set("Content-Type", "text/event-stream")
	hdr.Set("Cache-Control", "no-store")
	if r.Method == http.MethodHead {
		return
	}
	rc := http.NewResponseController(w)
	tick := time.NewTicker(heartbeat)
	defer tick.Stop()
	tag, changed := h.st.tag()
	if _, err := fmt.Fprintf(w, "retry: 1000\ndata: %s\n\n", tag); err != nil {
		return
	}
	if rc.Flush() != nil {
		return
	}
	for {
		select {
		case <-r.Context().Done():
			return
		case <-h.done:
			return
		case <-tick.C:
			if _, err := io.WriteString(w, ": ping\n\n"); err != nil {
				return
			}
		case <-changed:
			tag, changed = h.st.tag()
			if _, err := fmt.Fprintf(w, "data: %s\n\n", tag); err != nil {
				return
			}
		}
		if rc.Flush() != nil {
			return
		}
	}
}

// file serves one of the names reported by Options.Extra. Only bare names
// are accepted: nothing with a slash, a backslash or "..".
func (h *handler) file(w http.ResponseWriter, r *http.Request) {
	name := strings.TrimPrefix(r.URL.Path, "/")
	if !validName(name) {
		http.NotFound(w, r)
		return
	}
	p, ok := h.st.extra(name)
	if !ok {
		http.NotFound(w, r)
		return
	}
	f, err := os.Open(p)
	if err != nil {
		http.NotFound(w, r)
		return
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil || !fi.Mode().IsRegular() {
		http.NotFound(w, r)
		return
	}
	hdr := w.Header()
	// Served files are shown as documents too (e.g. an SVG opened on its own):
	// allow their inline styles, never scripts.
	hdr.Set("Content-Security-Policy", "default-src 'none'; style-src 'unsafe-inline'; img-src 'self' data:; sandbox")
	hdr.Set("Cache-Control", "no-cache")
	http.ServeContent(w, r, name, fi.ModTime(), f)
}

// validName reports whether name is a plain file name that may be served.
func validName(name string) bool {
	return name != "" && name != "." &&
		!strings.Contains(name, "..") &&
		!strings.ContainsAny(name, `/\:`+"\x00") &&
		!strings.HasPrefix(name, ".")
}

func newNonce() string {
	var b [18]byte
	rand.Read(b[:])
	return base64.RawURLEncoding.EncodeToString(b[:])
}

type pageData struct {
	Title string
	Nonce string
	view
}

// noReport stands in for the report before any render succeeded.
const noReport template.HTML = "<p>No report rendered yet.</p>"

// pageTmpl is the served page: a status bar that stays at the top however far the page is
// scrolled (verdict, focus value, time of the last recalculation, whether the Monte Carlo
// is still running, and the error while the sheet does not evaluate), then the report.
// Its script follows /events and, on each new version, fetches /state and puts the bar
// and the report in place, keeping the scroll position and which tables are unfolded.
// Colours follow the system's light or dark setting, and so do the charts: their
// backgrounds are transparent and their text takes a light colour in dark mode.
var pageTmpl = template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="color-scheme" content="light dark">
<link rel="icon" href="data:,">
<title>{{.Title}}</title>
<style nonce="{{.Nonce}}">
:root{color-scheme:light dark;--fg:#1b1b1b;--bg:#fff;--muted:#5f6368;--line:#c8c8c8;--head:#f1f1f1;--code:#f3f3f3;--bar:#fafafa;--pass:#1b6e2d;--passbg:#e3f3e6;--fail:#a3231a;--failbg:#fbe4e2;--risk:#7a4b00;--riskbg:#fdf0d5;--link:#0b57d0}
@media (prefers-color-scheme:dark){:root{--fg:#e3e3e3;--bg:#151719;--muted:#a0a6ad;--line:#3c4046;--head:#222529;--code:#23262a;--bar:#1d2023;--pass:#8fdc9b;--passbg:#183d20;--fail:#ffb4ab;--failbg:#4a1a16;--risk:#ffd38a;--riskbg:#3f2e0c;--link:#a8c7fa}}
*{box-sizing:border-box}
html{-webkit-text-size-adjust:100%;scroll-padding-top:4.5rem}
body{font:15px/1.5 system-ui,sans-serif;margin:0;color:var(--fg);background:var(--bg)}
a{color:var(--link)}
main{max-width:60rem;margin:0 auto;padding:.5rem 1rem 3rem}
main p,main li,main h1,main h2,main h3{overflow-wrap:break-word}
.tbl{overflow-x:auto;margin:1rem 0;max-width:100%}
table{border-collapse:collapse}
th,td{border:1px solid var(--line);padding:.25rem .6rem;vertical-align:top}
th{background:var(--head)}
td{font-variant-numeric:tabular-nums}
td[align=right],th[align=right]{white-space:nowrap}
code,pre{font-family:ui-monospace,monospace;font-size:.92em}
code{background:var(--code);border-radius:3px;padding:0 .2em}
pre{background:var(--code);padding:.6rem;overflow:auto}
img{max-width:100%;height:auto}
@media (max-width:40rem){.tbl table{width:max-content}th,td{max-width:15rem}}
details.fold{margin:1rem 0}
details.fold>summary{cursor:pointer;color:var(--muted)}
.bar{position:sticky;top:0;z-index:1;background:var(--bar);border-bottom:1px solid var(--line);padding:.35rem 1rem;font-size:14px}
.bar .row{max-width:58rem;margin:0 auto;display:flex;align-items:baseline;gap:1rem}
.bar .info{flex:1 1 auto;min-width:0;display:flex;flex-wrap:wrap;align-items:baseline;gap:.2rem 1rem}
.bar.broken{border-bottom:3px solid var(--fail)}
.verdict{font-weight:700;padding:0 .45rem;border-radius:3px}
.verdict.pass{color:var(--pass);background:var(--passbg)}
.verdict.fail{color:var(--fail);background:var(--failbg)}
.verdict.risk{color:var(--risk);background:var(--riskbg)}
.verdict.none{color:var(--muted)}
.nw{white-space:nowrap}
.when,.mc,.live{color:var(--muted)}
.live{flex:none}
.live.off{color:var(--fail)}
.err{flex-basis:100%;color:var(--fg);background:var(--failbg);border:1px solid var(--fail);padding:.4rem .7rem;max-height:35vh;overflow:auto}
.err pre{background:none;padding:0;margin:.3rem 0 0;white-space:pre-wrap;overflow-wrap:anywhere}
</style>
</head>
<body data-version="{{.Tag}}" data-report="{{.Report}}">
<header class="bar{{if .Error}} broken{{end}}" id="bar"><div class="row"><div class="info" id="info">{{template "bar" .}}</div><span class="live" id="live">live</span></div></header>
<main id="report">
{{if .Ready}}{{.Body}}{{else}}` + string(noReport) + `{{end}}</main>
<script nonce="{{.Nonce}}">
(function(){
  var body = document.body, v = body.getAttribute("data-version"), report = body.getAttribute("data-report");
  var boot = v.split("-")[0];
  var bar = document.getElementById("bar"), info = document.getElementById("info");
  var main = document.getElementById("report"), live = document.getElementById("live");
  if (!window.EventSource || !window.fetch || !window.JSON) { live.textContent = ""; return; }
  function apply(s) {
    v = s.tag;
    body.setAttribute("data-version", v);
    bar.className = s.broken ? "bar broken" : "bar";
    info.innerHTML = s.bar;
    if (s.report !== report) {
      report = s.report;
      body.setAttribute("data-report", report);
      var open = [], ds = main.querySelectorAll("details");
      for (var i = 0; i < ds.length; i++) { if (ds[i].open) { open.push(i); } }
      var x = window.scrollX, y = window.scrollY;
      main.innerHTML = s.html;
      ds = main.querySelectorAll("details");
      for (var j = 0; j < open.length; j++) { if (ds[open[j]]) { ds[open[j]].open = true; } }
      window.scrollTo(x, y);
    }
  }
  var busy = false, again = false;
  function refresh() {
    if (busy) { again = true; return; }
    busy = true;
    fetch("/state", {cache: "no-store", credentials: "same-origin"})
      .then(function(r){ if (!r.ok) { throw new Error("state " + r.status); } return r.json(); })
      .then(apply)
      .catch(function(){ live.textContent = "update failed"; live.className = "live off"; })
      .then(function(){ busy = false; if (again) { again = false; refresh(); } });
  }
  var es = new EventSource("/events");
  es.onopen = function(){ live.textContent = "live"; live.className = "live"; };
  es.onerror = function(){ live.textContent = "disconnected"; live.className = "live off"; };
  es.onmessage = function(e){
    if (!e.data || e.data === v) { return; }
    if (e.data.split("-")[0] !== boot) { es.close(); location.reload(); return; }
    refresh();
  };
})();
</script>
</body>
</html>
{{define "bar"}}{{if .Verdict}}<span class="verdict {{.VerdictClass}}" id="verdict" title="{{.Detail}}">{{.Verdict}}</span>{{else}}<span class="verdict none" id="verdict">{{if .Ready}}no requirements{{else}}no report yet{{end}}</span>{{end}}
{{- if .FocusName}} <span class="focus" id="focus"><code>{{.FocusName}}</code> = <b class="nw" id="focus-value">{{.FocusValue}}</b></span>{{end}}
{{- if .At}} <span class="when" id="when">{{if .Error}}last good at {{.At}}{{else}}recalculated {{.At}}{{end}}</span>{{end}}
{{- if .Refining}} <span class="mc" id="mc">Monte Carlo running…</span>{{end}}
{{- if .Error}} <div class="err" id="error" role="alert"><strong>The sheet does not evaluate{{if .ErrorAt}} (since {{.ErrorAt}}){{end}}{{if .Ready}}; showing the last good report{{end}}.</strong><pre>{{.Error}}</pre></div>{{end}}
{{- end}}`))
