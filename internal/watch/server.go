package watch

import (
	"bytes"
	"context"
	"crypto/rand"
	"encoding/base64"
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

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/parser"
)

// state is the part of the watch loop the server reads: the last good output,
// the last error and a version counter that changes on every recalculation.
type state struct {
	mu      sync.Mutex
	boot    string // distinguishes runs so a page from an earlier run reloads
	version uint64
	md      []byte
	errText string
	extras  map[string]string
	html    []byte // rendered md, cached for htmlVersion
	htmlFor uint64
	changed chan struct{} // closed and replaced on every version change
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

func (s *state) succeed(md []byte, extras map[string]string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.md = bytes.Clone(md)
	s.errText = ""
	s.extras = extras
	s.bumpLocked()
}

// seed sets the report shown before any good render without changing the
// version.
func (s *state) seed(md []byte, extras map[string]string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.md = bytes.Clone(md)
	s.extras = extras
}

func (s *state) fail(msg string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.errText = msg
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
	return s.boot + "-" + strconv.FormatUint(s.version, 10), s.changed
}

// snapshot returns what the page shows: the rendered HTML of the last good
// output, the current error (if any) and the version tag.
func (s *state) snapshot() (body []byte, errText, tag string, ok bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	tag = s.boot + "-" + strconv.FormatUint(s.version, 10)
	if s.md == nil {
		return nil, s.errText, tag, false
	}
	if s.html == nil || s.htmlFor != s.version {
		var buf bytes.Buffer
		if err := markdown.Convert(s.md, &buf); err != nil {
			buf.Reset()
			fmt.Fprintf(&buf, "<pre>%s</pre>", template.HTMLEscapeString(string(s.md)))
		}
		s.html = buf.Bytes()
		s.htmlFor = s.version
	}
	return s.html, s.errText, tag, true
}

func (s *state) extra(name string) (string, bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	p, ok := s.extras[name]
	return p, ok
}

// markdown converts the report with the GitHub-flavoured extensions. Raw HTML
// is not passed through (no html.WithUnsafe) and dangerous link schemes are
// dropped by goldmark. Table alignment is written as align attributes rather
// than style attributes, which the page's Content-Security-Policy would block.
var markdown = goldmark.New(
	goldmark.WithExtensions(
		extension.Linkify,
		extension.NewTable(extension.WithTableCellAlignMethod(extension.TableCellAlignAttribute)),
		extension.Strikethrough,
		extension.TaskList,
	),
	goldmark.WithParserOptions(parser.WithAutoHeadingID()),
)

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
	default:
		h.file(w, r)
	}
}

func (h *handler) page(w http.ResponseWriter, r *http.Request) {
	body, errText, tag, ok := h.st.snapshot()
	nonce := newNonce()
	hdr := w.Header()
	hdr.Set("Content-Security-Policy", "default-src 'none'; img-src 'self' data:; style-src 'nonce-"+nonce+"'; script-src 'nonce-"+nonce+"'; connect-src 'self'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'")
	hdr.Set("Content-Type", "text/html; charset=utf-8")
	hdr.Set("Cache-Control", "no-store")
	var buf bytes.Buffer
	err := pageTmpl.Execute(&buf, pageData{
		Title: h.title,
		Nonce: nonce,
		Tag:   tag,
		Error: errText,
		Ready: ok,
		Body:  template.HTML(body), // produced by goldmark without raw HTML
	})
	if err != nil {
		http.Error(w, "page template failed", http.StatusInternalServerError)
		return
	}
	hdr.Set("Content-Length", strconv.Itoa(buf.Len()))
	if r.Method == http.MethodHead {
		return
	}
	w.Write(buf.Bytes())
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
	Tag   string
	Error string
	Ready bool
	Body  template.HTML
}

var pageTmpl = template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style nonce="{{.Nonce}}">
body{font:15px/1.5 system-ui,sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;color:#1b1b1b;background:#fff}
table{border-collapse:collapse;margin:1rem 0}
th,td{border:1px solid #c8c8c8;padding:.25rem .6rem}
th{background:#f1f1f1}
td{font-variant-numeric:tabular-nums}
code,pre{font-family:ui-monospace,monospace}
pre{background:#f6f6f6;padding:.6rem;overflow:auto}
img{max-width:100%}
.err{border:1px solid #c0392b;background:#fdecea;padding:.6rem 1rem;margin-bottom:1.5rem}
.err pre{background:none;padding:0;margin:.4rem 0 0;white-space:pre-wrap}
.live{position:fixed;top:.4rem;right:.6rem;font-size:12px;color:#777}
.live.off{color:#c0392b}
</style>
</head>
<body data-version="{{.Tag}}">
<div class="live" id="live">live</div>
{{if .Error}}<div class="err"><strong>The sheet does not evaluate{{if .Ready}}; showing the last good report{{end}}.</strong><pre>{{.Error}}</pre></div>
{{end}}{{if .Ready}}<main>
{{.Body}}</main>{{else}}<p>No report rendered yet.</p>{{end}}
<script nonce="{{.Nonce}}">
(function(){
  var v = document.body.getAttribute("data-version");
  var live = document.getElementById("live");
  if (!window.EventSource) { live.textContent = ""; return; }
  var es = new EventSource("/events");
  es.onopen = function(){ live.textContent = "live"; live.className = "live"; };
  es.onerror = function(){ live.textContent = "disconnected"; live.className = "live off"; };
  es.onmessage = function(e){ if (e.data && e.data !== v) { es.close(); location.reload(); } };
})();
</script>
</body>
</html>
`))
