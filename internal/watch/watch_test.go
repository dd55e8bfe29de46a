package watch

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// syncBuffer is a bytes.Buffer safe for the concurrent writes Run may make.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

// sheet is a fake worksheet renderer. The main file is copied to the output;
// a line "use NAME" pulls in NAME from partsDir (and reports it as a
// dependency); a line "BROKEN" makes the render fail.
type sheet struct {
	main     string
	partsDir string
	renders  atomic.Int64
}

func (s *sheet) render() ([]byte, []string, error) {
	s.renders.Add(1)
	files := []string{s.main}
	data, err := os.ReadFile(s.main)
	if err != nil {
		return nil, files, err
	}
	var out bytes.Buffer
	for i, line := range strings.Split(string(data), "\n") {
		switch {
		case line == "BROKEN":
			return nil, files, fmt.Errorf("line %d: broken sheet\nsecond line of detail", i+1)
		case strings.HasPrefix(line, "use "):
			p := filepath.Join(s.partsDir, strings.TrimPrefix(line, "use "))
			files = append(files, p)
			part, err := os.ReadFile(p)
			if err != nil {
				return nil, files, err
			}
			out.Write(part)
		default:
			out.WriteString(line)
		}
		out.WriteByte('\n')
	}
	return out.Bytes(), files, nil
}

// eventually polls cond until it holds or the deadline passes.
func eventually(t *testing.T, what string, cond func() bool) {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatalf("timed out waiting for %s", what)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

func readString(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil && !errors.Is(err, os.ErrNotExist) {
		t.Fatal(err)
	}
	return string(b)
}

func writeFile(t *testing.T, path, data string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
}

// saveByRename saves like many editors do: write a temp file, rename it over
// the original.
func saveByRename(t *testing.T, path, data string) {
	t.Helper()
	tmp := path + ".swp~"
	writeFile(t, tmp, data)
	if err := os.Rename(tmp, path); err != nil {
		t.Fatal(err)
	}
}

// start runs Run in the background and registers a cleanup that cancels it
// and checks that it returns nil promptly.
func start(t *testing.T, r Render, o Options) (stop func()) {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- Run(ctx, r, o) }()
	var once sync.Once
	stop = func() {
		once.Do(func() {
			cancel()
			select {
			case err := <-done:
				if err != nil {
					t.Errorf("Run returned %v after cancel, want nil", err)
				}
			case <-time.After(3 * time.Second):
				t.Errorf("Run did not return after cancel")
			}
		})
	}
	t.Cleanup(stop)
	return stop
}

type fixture struct {
	dir, parts, main, out string
	sh                    *sheet
	status, errs          *syncBuffer
}

func newFixture(t *testing.T, content string) *fixture {
	t.Helper()
	f := &fixture{dir: t.TempDir(), parts: t.TempDir(), status: &syncBuffer{}, errs: &syncBuffer{}}
	f.main = filepath.Join(f.dir, "field.toml")
	f.out = filepath.Join(t.TempDir(), "field.md")
	f.sh = &sheet{main: f.main, partsDir: f.parts}
	writeFile(t, f.main, content)
	return f
}

func (f *fixture) opts() Options {
	return Options{Out: f.out, Debounce: 40 * time.Millisecond, Status: f.status, Errors: f.errs}
}

func (f *fixture) waitOut(t *testing.T, want string) {
	t.Helper()
	eventually(t, fmt.Sprintf("output %q", want), func() bool { return readString(t, f.out) == want })
}

// writers are the two atomic writers: WriteAtomic (forced to the disk) and WriteLive (not),
// which must behave alike for every reader.
var writers = []struct {
	name  string
	write func(string, []byte) error
}{{"WriteAtomic", WriteAtomic}, {"WriteLive", WriteLive}}

func TestWriteAtomic(t *testing.T) {
	for _, w := range writers {
		t.Run(w.name, func(t *testing.T) { testWriteAtomic(t, w.write) })
	}
}

func testWriteAtomic(t *testing.T, write func(string, []byte) error) {
	dir := t.TempDir()
	p := filepath.Join(dir, "report.md")
	if err := write(p, []byte("first\n")); err != nil {
		t.Fatal(err)
	}
	if got := readString(t, p); got != "first\n" {
		t.Fatalf("read back %q", got)
	}
	if err := os.Chmod(p, 0o600); err != nil {
		t.Fatal(err)
	}
	if err := write(p, []byte("second\n")); err != nil {
		t.Fatal(err)
	}
	if got := readString(t, p); got != "second\n" {
		t.Fatalf("read back %q", got)
	}
	if fi, err := os.Stat(p); err != nil || (runtime.GOOS != "windows" && fi.Mode().Perm() != 0o600) {
		t.Fatalf("mode not kept: %v %v", fi.Mode(), err)
	}
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(ents) != 1 || ents[0].Name() != "report.md" {
		var names []string
		for _, e := range ents {
			names = append(names, e.Name())
		}
		t.Fatalf("directory holds %v, want only report.md (temp file left behind?)", names)
	}

	// Failure: missing directory gives an error and creates nothing.
	if err := write(filepath.Join(dir, "missing", "x.md"), []byte("x")); err == nil {
		t.Fatal("write into a missing directory succeeded")
	}
	// Failure: the target is a directory; it stays and no temp file remains.
	sub := filepath.Join(dir, "sub")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := write(sub, []byte("x")); err == nil {
		t.Fatal("write over a directory succeeded")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 2 {
		t.Fatalf("failed writes left %d entries, want 2", len(ents))
	}
}

// TestWriteAtomicNoPartialReads has a reader race a writer that alternates
// two large contents; every read must see one of them whole.
func TestWriteAtomicNoPartialReads(t *testing.T) {
	for _, w := range writers {
		t.Run(w.name, func(t *testing.T) { testNoPartialReads(t, w.write) })
	}
}

func testNoPartialReads(t *testing.T, write func(string, []byte) error) {
	p := filepath.Join(t.TempDir(), "big.md")
	a := bytes.Repeat([]byte("a"), 1<<20)
	b := bytes.Repeat([]byte("b"), 1<<20+7)
	if err := write(p, a); err != nil {
		t.Fatal(err)
	}
	stop := make(chan struct{})
	var wg sync.WaitGroup
	wg.Go(func() {
		for i := 0; ; i++ {
			select {
			case <-stop:
				return
			default:
			}
			data := a
			if i%2 == 1 {
				data = b
			}
			if err := write(p, data); err != nil {
				t.Error(err)
				return
			}
		}
	})
	for range 200 {
		got, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, a) && !bytes.Equal(got, b) {
			t.Fatalf("read a partial file of %d bytes", len(got))
		}
	}
	close(stop)
	wg.Wait()
}

func TestRunRenameOverAndStatus(t *testing.T) {
	f := newFixture(t, "alpha")
	start(t, f.sh.render, f.opts())
	f.waitOut(t, "alpha\n")

	saveByRename(t, f.main, "beta")
	f.waitOut(t, "beta\n")

	// A second rename-over still works: the directory watch survived the first.
	saveByRename(t, f.main, "gamma")
	f.waitOut(t, "gamma\n")

	// Remove then create, as some tools save.
	if err := os.Remove(f.main); err != nil {
		t.Fatal(err)
	}
	time.Sleep(100 * time.Millisecond)
	writeFile(t, f.main, "delta")
	f.waitOut(t, "delta\n")

	line := regexp.MustCompile(`(?m)^\d\d:\d\d:\d\d rendered field\.md in \d+\.\d ms$`)
	if !line.MatchString(f.status.String()) {
		t.Fatalf("status lines lack a render line:\n%s", f.status.String())
	}
}

func TestRunDebounce(t *testing.T) {
	f := newFixture(t, "v0")
	// Output beside the sheet: writing it must not trigger renders.
	f.out = filepath.Join(f.dir, "field.md")
	o := f.opts()
	o.Debounce = 120 * time.Millisecond
	start(t, f.sh.render, o)
	f.waitOut(t, "v0\n")
	time.Sleep(2 * o.Debounce)
	before := f.sh.renders.Load()

	for i := 1; i <= 5; i++ {
		writeFile(t, f.main, fmt.Sprintf("v%d", i)) // truncate + write
		time.Sleep(5 * time.Millisecond)
	}
	f.waitOut(t, "v5\n")
	time.Sleep(3 * o.Debounce)
	if n := f.sh.renders.Load() - before; n < 1 || n > 2 {
		t.Fatalf("a burst of 5 writes gave %d renders, want 1 (at most 2)", n)
	}
}

func TestRunBrokenKeepsLastGood(t *testing.T) {
	f := newFixture(t, "good")
	start(t, f.sh.render, f.opts())
	f.waitOut(t, "good\n")
	outFi, err := os.Stat(f.out)
	if err != nil {
		t.Fatal(err)
	}

	before := f.sh.renders.Load()
	saveByRename(t, f.main, "x\nBROKEN")
	eventually(t, "error text", func() bool {
		return strings.Contains(f.errs.String(), "line 2: broken sheet\nsecond line of detail")
	})
	if f.sh.renders.Load() <= before {
		t.Fatal("no render happened")
	}
	if got := readString(t, f.out); got != "good\n" {
		t.Fatalf("broken render changed the output to %q", got)
	}
	if fi, err := os.Stat(f.out); err != nil || !os.SameFile(fi, outFi) {
		t.Fatalf("output file was replaced by a failed render")
	}
	if !regexp.MustCompile(`(?m)^\d\d:\d\d:\d\d error: line 2: broken sheet…$`).MatchString(f.status.String()) {
		t.Fatalf("status lacks the error line:\n%s", f.status.String())
	}
	if strings.Contains(f.status.String(), "second line of detail") {
		t.Fatalf("status holds more than the first line of the error:\n%s", f.status.String())
	}

	saveByRename(t, f.main, "fixed")
	f.waitOut(t, "fixed\n")
}

func TestRunFollowsParts(t *testing.T) {
	f := newFixture(t, "head")
	start(t, f.sh.render, f.opts())
	f.waitOut(t, "head\n")

	part := filepath.Join(f.parts, "lna.toml")
	writeFile(t, part, "lna v1")
	saveByRename(t, f.main, "head\nuse lna.toml")
	f.waitOut(t, "head\nlna v1\n")

	// The part lives in a directory that was not watched before.
	saveByRename(t, part, "lna v2")
	f.waitOut(t, "head\nlna v2\n")

	// Drop the part: changes to it no longer cause renders.
	saveByRename(t, f.main, "head only")
	f.waitOut(t, "head only\n")
	time.Sleep(150 * time.Millisecond)
	before := f.sh.renders.Load()
	writeFile(t, part, "lna v3")
	time.Sleep(300 * time.Millisecond)
	if n := f.sh.renders.Load() - before; n != 0 {
		t.Fatalf("a dropped part still caused %d renders", n)
	}
}

func TestRunMissingPartRecovers(t *testing.T) {
	f := newFixture(t, "use later.toml")
	start(t, f.sh.render, f.opts())
	eventually(t, "missing-part error", func() bool { return strings.Contains(f.errs.String(), "later.toml") })
	if _, err := os.Stat(f.out); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("output written despite failure: %v", err)
	}
	// Creating the missing part is noticed because the failed render named it.
	writeFile(t, filepath.Join(f.parts, "later.toml"), "now here")
	f.waitOut(t, "now here\n")
}

func TestRunNothingToWatch(t *testing.T) {
	r := func() ([]byte, []string, error) { return nil, nil, errors.New("cannot open sheet") }
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Second)
	defer cancel()
	err := Run(ctx, r, Options{Out: filepath.Join(t.TempDir(), "x.md")})
	if err == nil || !strings.Contains(err.Error(), "cannot open sheet") {
		t.Fatalf("Run = %v, want an error naming the render failure", err)
	}
	if err := Run(ctx, r, Options{}); err == nil {
		t.Fatal("Run without Out succeeded")
	}
}

func TestRunRenderPanic(t *testing.T) {
	f := newFixture(t, "ok")
	var boom atomic.Bool
	r := func() ([]byte, []string, error) {
		if boom.Load() {
			panic("boom")
		}
		return f.sh.render()
	}
	start(t, r, f.opts())
	f.waitOut(t, "ok\n")
	boom.Store(true)
	writeFile(t, f.main, "ok2")
	eventually(t, "panic reported", func() bool { return strings.Contains(f.errs.String(), "render panicked: boom") })
	boom.Store(false)
	writeFile(t, f.main, "ok3")
	f.waitOut(t, "ok3\n")
}

func TestListenAddr(t *testing.T) {
	for in, want := range map[string]string{
		"8080":           "127.0.0.1:8080",
		":8080":          "127.0.0.1:8080",
		":0":             "127.0.0.1:0",
		"127.0.0.1:9000": "127.0.0.1:9000",
		"localhost:9000": "localhost:9000",
		"[::1]:9000":     "[::1]:9000",
		"0.0.0.0:9000":   "0.0.0.0:9000",
	} {
		got, err := listenAddr(in)
		if err != nil || got != want {
			t.Errorf("listenAddr(%q) = %q, %v; want %q", in, got, err, want)
		}
	}
	for _, bad := range []string{"host:", "a:b:c"} {
		if got, err := listenAddr(bad); err == nil {
			t.Errorf("listenAddr(%q) = %q, want error", bad, got)
		}
	}
}

func TestValidNameAndExtraFiles(t *testing.T) {
	for name, want := range map[string]bool{
		"chart.svg": true, "a-b_c.1.png": true,
		"": false, ".": false, "..": false, "../x": false, "a/b": false, `a\b`: false,
		"..svg": false, ".hidden": false, "c:x": false,
	} {
		if got := validName(name); got != want {
			t.Errorf("validName(%q) = %v", name, got)
		}
	}
	dir := t.TempDir()
	got := extraFiles(dir, []string{"a.svg", filepath.Join(dir, "b.svg"), "sub/c.svg", "../d.svg", filepath.Join(t.TempDir(), "e.svg"), ""})
	if len(got) != 2 || got["a.svg"] != filepath.Join(dir, "a.svg") || got["b.svg"] != filepath.Join(dir, "b.svg") {
		t.Fatalf("extraFiles = %v", got)
	}
}

// --- server ---

type served struct {
	*fixture
	addr   string
	client *http.Client
	stop   func()
}

func startServed(t *testing.T, content string) *served {
	t.Helper()
	f := newFixture(t, content)
	outDir := filepath.Dir(f.out)
	writeFile(t, filepath.Join(outDir, "sweep.svg"), `<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"/>`)
	writeFile(t, filepath.Join(outDir, "secret.txt"), "not listed")
	o := f.opts()
	o.Title = "Field link <budget>"
	o.Extra = func(dir string) []string {
		if dir != outDir {
			t.Errorf("Extra got dir %q, want %q", dir, outDir)
		}
		return []string{"sweep.svg"}
	}
	return serve(t, f, o)
}

func (s *served) get(t *testing.T, method, path string) (*http.Response, string) {
	t.Helper()
	req, err := http.NewRequest(method, "http://"+s.addr+path, nil)
	if err != nil {
		t.Fatal(err)
	}
	resp, err := s.client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		t.Fatal(err)
	}
	return resp, string(b)
}

// rawGet sends a request line exactly as given, so no client cleans the path.
func rawGet(t *testing.T, addr, target string) int {
	t.Helper()
	return rawHostPath(t, addr, addr, target)
}

const tableMD = "# Field link\n\n| Item | Value |\n|---|---:|\n| EIRP | 43.0 dBm |\n\n<script>alert(1)</script>\n\n[x](javascript:alert(2))\n\n![sweep](sweep.svg)"

func TestServerPage(t *testing.T) {
	s := startServed(t, tableMD)
	host, _, err := net.SplitHostPort(s.addr)
	if err != nil || host != "127.0.0.1" {
		t.Fatalf("Ready reported %q, want 127.0.0.1:PORT", s.addr)
	}

	resp, body := s.get(t, "GET", "/")
	if resp.StatusCode != 200 || !strings.HasPrefix(resp.Header.Get("Content-Type"), "text/html") {
		t.Fatalf("GET / = %d %s", resp.StatusCode, resp.Header.Get("Content-Type"))
	}
	for _, want := range []string{"<table>", "<td>EIRP</td>", "<title>Field link &lt;budget&gt;</title>", `<img src="sweep.svg"`, "new EventSource(\"/events\")"} {
		if !strings.Contains(body, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if !strings.Contains(body, "<td align=\"right\">43.0\u00a0dBm</td>") || strings.Contains(body, "style=") {
		t.Errorf("table alignment should use align attributes, not style attributes (blocked by the CSP)")
	}
	if strings.Contains(body, "<script>alert(1)") || strings.Contains(body, "javascript:alert") {
		t.Errorf("page passes raw HTML or a script link through:\n%s", body)
	}
	csp := resp.Header.Get("Content-Security-Policy")
	m := regexp.MustCompile(`script-src 'nonce-([A-Za-z0-9_-]+)'`).FindStringSubmatch(csp)
	if m == nil || !strings.Contains(csp, "default-src 'none'") {
		t.Fatalf("CSP %q lacks default-src 'none' or a script nonce", csp)
	}
	if !strings.Contains(body, `<script nonce="`+m[1]+`">`) {
		t.Errorf("inline script does not carry the CSP nonce %s", m[1])
	}
	if resp.Header.Get("X-Content-Type-Options") != "nosniff" {
		t.Error("missing nosniff")
	}
	if _, body2 := s.get(t, "GET", "/"); strings.Contains(body2, m[1]) {
		t.Error("nonce reused across responses")
	}

	resp, body = s.get(t, "HEAD", "/")
	if resp.StatusCode != 200 || body != "" {
		t.Errorf("HEAD / = %d with %d body bytes", resp.StatusCode, len(body))
	}
	for _, method := range []string{"POST", "PUT", "DELETE"} {
		resp, _ = s.get(t, method, "/")
		if resp.StatusCode != http.StatusMethodNotAllowed || resp.Header.Get("Allow") != "GET, HEAD" {
			t.Errorf("%s / = %d (Allow %q), want 405", method, resp.StatusCode, resp.Header.Get("Allow"))
		}
	}

	resp, body = s.get(t, "GET", "/sweep.svg")
	if resp.StatusCode != 200 || resp.Header.Get("Content-Type") != "image/svg+xml" || !strings.Contains(body, "<svg") {
		t.Errorf("GET /sweep.svg = %d %q", resp.StatusCode, resp.Header.Get("Content-Type"))
	}
	if !strings.Contains(resp.Header.Get("Content-Security-Policy"), "sandbox") || resp.Header.Get("X-Content-Type-Options") != "nosniff" {
		t.Errorf("served file lacks strict headers: %v", resp.Header)
	}
	for _, target := range []string{"/../etc/passwd", "/%2e%2e/etc/passwd", "/..%2fetc%2fpasswd", "/secret.txt", "/field.md", "/nope.svg", "/sub/sweep.svg", "//sweep.svg", "/.sweep.svg"} {
		if code := rawGet(t, s.addr, target); code != http.StatusNotFound {
			t.Errorf("GET %s = %d, want 404", target, code)
		}
	}
}

func TestServerErrorBanner(t *testing.T) {
	s := startServed(t, "| A | B |\n|---|---|\n| 1 | 2 |")
	saveByRename(t, s.main, "<b>bold</b>\nBROKEN")
	eventually(t, "error", func() bool { return strings.Contains(s.errs.String(), "broken sheet") })
	_, body := s.get(t, "GET", "/")
	if !strings.Contains(body, "line 2: broken sheet") || !strings.Contains(body, "<table>") {
		t.Fatalf("page should show the error above the last good report:\n%s", body)
	}
}

// sseData reads the next "data:" field from an event stream.
func sseData(t *testing.T, r *bufio.Reader) string {
	t.Helper()
	for {
		line, err := r.ReadString('\n')
		if err != nil {
			t.Fatalf("event stream: %v", err)
		}
		if v, ok := strings.CutPrefix(line, "data: "); ok {
			return strings.TrimSpace(v)
		}
	}
}

func TestServerEvents(t *testing.T) {
	s := startServed(t, "one")
	resp, err := s.client.Get("http://" + s.addr + "/events")
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	if ct := resp.Header.Get("Content-Type"); ct != "text/event-stream" {
		t.Fatalf("events content type %q", ct)
	}
	br := bufio.NewReader(resp.Body)
	first := sseData(t, br)
	_, page := s.get(t, "GET", "/")
	if !strings.Contains(page, `data-version="`+first+`"`) {
		t.Fatalf("page version does not match the stream's %q", first)
	}

	saveByRename(t, s.main, "two")
	next := make(chan string, 1)
	go func() { next <- sseData(t, br) }()
	select {
	case v := <-next:
		if v == first {
			t.Fatalf("change notification repeated version %q", v)
		}
	case <-time.After(3 * time.Second):
		t.Fatal("no change notification after a re-render")
	}
}

// TestRunStopsCleanly cancels Run while an event stream is open and checks
// that Run returns and its goroutines are gone.
func TestRunStopsCleanly(t *testing.T) {
	base := runtime.NumGoroutine()
	s := startServed(t, "x")
	resp, err := s.client.Get("http://" + s.addr + "/events")
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	sseData(t, bufio.NewReader(resp.Body))

	s.stop()
	if _, err := io.ReadAll(resp.Body); err != nil && !errors.Is(err, io.ErrUnexpectedEOF) {
		t.Logf("stream ended with %v", err)
	}
	resp.Body.Close()
	if _, err := s.client.Get("http://" + s.addr + "/"); err == nil {
		t.Error("server still answers after cancel")
	}
	s.client.CloseIdleConnections()
	deadline := time.Now().Add(2 * time.Second)
	for runtime.NumGoroutine() > base {
		if time.Now().After(deadline) {
			buf := make([]byte, 1<<16)
			t.Fatalf("goroutines: %d before, %d after\n%s", base, runtime.NumGoroutine(), buf[:runtime.Stack(buf, true)])
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// TestServerShowsPreviousReport starts on a broken sheet with a report from
// an earlier run on disk: the page shows that report under the error.
func TestServerShowsPreviousReport(t *testing.T) {
	f := newFixture(t, "BROKEN")
	writeFile(t, f.out, "| Earlier | Run |\n|---|---|\n| a | b |\n")
	ready := make(chan string, 1)
	o := f.opts()
	o.Serve = "127.0.0.1:0"
	o.Ready = func(addr string) { ready <- addr }
	start(t, f.sh.render, o)
	var addr string
	select {
	case addr = <-ready:
	case <-time.After(3 * time.Second):
		t.Fatal("Ready was not called")
	}
	s := &served{fixture: f, addr: addr, client: &http.Client{Timeout: 3 * time.Second, Transport: &http.Transport{DisableKeepAlives: true}}}
	_, body := s.get(t, "GET", "/")
	if !strings.Contains(body, "<td>a</td>") || !strings.Contains(body, "showing the last good report") || !strings.Contains(body, "line 1: broken sheet") {
		t.Fatalf("page lacks the earlier report or the error:\n%s", body)
	}
	if got := readString(t, f.out); !strings.HasPrefix(got, "| Earlier") {
		t.Fatalf("broken first render touched the output: %q", got)
	}
}

// rawHost sends GET / with the Host header given.
func rawHost(t *testing.T, addr, host string) int {
	t.Helper()
	return rawHostPath(t, addr, host, "/")
}

// rawHostPath sends GET path with the Host header given.
func rawHostPath(t *testing.T, addr, host, path string) int {
	t.Helper()
	c, err := net.DialTimeout("tcp", addr, 3*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	c.SetDeadline(time.Now().Add(3 * time.Second))
	fmt.Fprintf(c, "GET %s HTTP/1.1\r\nHost: %s\r\nConnection: close\r\n\r\n", path, host)
	resp, err := http.ReadResponse(bufio.NewReader(c), nil)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	return resp.StatusCode
}

// Issue 8, finding 6: a rebinding name pointed at 127.0.0.1 must not read the page; the
// server answers only loopback names and the address it listens on (421 otherwise).
func TestServerChecksHost(t *testing.T) {
	s := startServed(t, tableMD)
	_, port, _ := net.SplitHostPort(s.addr)
	for host, want := range map[string]int{
		s.addr:                     200,
		"localhost:" + port:        200,
		"LOCALHOST.:" + port:       200,
		"app.localhost:" + port:    200,
		"127.0.0.1":                200,
		"[::1]:" + port:            200,
		"evil.example:" + port:     http.StatusMisdirectedRequest,
		"127.0.0.1.nip.io:" + port: http.StatusMisdirectedRequest,
		"localhost.evil.example":   http.StatusMisdirectedRequest,
		"192.168.1.20:" + port:     http.StatusMisdirectedRequest,
	} {
		if got := rawHost(t, s.addr, host); got != want {
			t.Errorf("Host %s: %d, want %d", host, got, want)
		}
	}
	for _, path := range []string{"/events", "/sweep.svg"} {
		req, _ := http.NewRequest("GET", "http://"+s.addr+path, nil)
		req.Host = "rebind.example"
		resp, err := s.client.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		if resp.StatusCode != http.StatusMisdirectedRequest {
			t.Errorf("%s with a foreign Host: %d", path, resp.StatusCode)
		}
	}
}

// The rules for other binds: an unspecified address accepts any IP literal (the machine's
// own addresses, whichever interface) but still no foreign name; a host name given to
// --serve is accepted.
func TestHostCheckRules(t *testing.T) {
	any := serveHosts(&net.TCPAddr{IP: net.IPv4zero, Port: 80}, "0.0.0.0:80")
	named := serveHosts(&net.TCPAddr{IP: net.ParseIP("192.168.1.5"), Port: 80}, "barn-pc.lan:80")
	for _, c := range []struct {
		hc   hostCheck
		host string
		want bool
	}{
		{any, "192.168.1.5:80", true},
		{any, "[fe80::1]:80", true},
		{any, "evil.example:80", false},
		{named, "barn-pc.lan:80", true},
		{named, "BARN-PC.LAN", true},
		{named, "192.168.1.5", true},
		{named, "192.168.1.6", false},
		{named, "evil.example", false},
		{named, "", false},
	} {
		if got := c.hc.allows(c.host); got != c.want {
			t.Errorf("%+v allows %q = %v", c.hc, c.host, got)
		}
	}
}

// Binding a non-loopback address prints a warning line; loopback does not.
func TestServeWarnsOffLoopback(t *testing.T) {
	for _, c := range []struct {
		serve string
		warn  bool
	}{{"127.0.0.1:0", false}, {"0.0.0.0:0", true}} {
		f := newFixture(t, "# x")
		status := f.status
		o := f.opts()
		o.Serve = c.serve
		_ = o
		ready := make(chan string, 1)
		o.Ready = func(a string) { ready <- a }
		stop := start(t, f.sh.render, o)
		select {
		case <-ready:
		case <-time.After(3 * time.Second):
			t.Fatal("Ready was not called")
		}
		stop()
		if got := strings.Contains(status.String(), "warning: ") && strings.Contains(status.String(), "not a loopback address"); got != c.warn {
			t.Errorf("%s: warning printed %v, want %v:\n%s", c.serve, got, c.warn, status.String())
		}
	}
}

// Issue 8, finding 8: the sheet's folder or a parts folder is deleted and made again; the
// watch follows the new folder, and the saves after it are rendered.
func TestRunFollowsRecreatedFolder(t *testing.T) {
	for _, which := range []string{"sheet", "parts"} {
		t.Run(which, func(t *testing.T) {
			f := newFixture(t, "use lna.txt\nfirst")
			part := filepath.Join(f.parts, "lna.txt")
			writeFile(t, part, "gain 15")
			start(t, f.sh.render, f.opts())
			f.waitOut(t, "gain 15\nfirst\n")
			dir := f.dir
			if which == "parts" {
				dir = f.parts
			}
			if err := os.RemoveAll(dir); err != nil {
				t.Fatal(err)
			}
			eventually(t, "the error for the missing folder", func() bool { return strings.Contains(f.status.String(), " error: ") })
			time.Sleep(100 * time.Millisecond) // let the watch settle on the folder above
			if err := os.Mkdir(dir, 0o755); err != nil {
				t.Fatal(err)
			}
			if which == "parts" {
				writeFile(t, part, "gain 20")
				f.waitOut(t, "gain 20\nfirst\n")
				saveByRename(t, part, "gain 21")
				f.waitOut(t, "gain 21\nfirst\n")
			} else {
				writeFile(t, f.main, "use lna.txt\nsecond")
				f.waitOut(t, "gain 15\nsecond\n")
				saveByRename(t, f.main, "use lna.txt\nthird")
				f.waitOut(t, "gain 15\nthird\n")
			}
		})
	}
}

// TestRunRefinesInTheBackground: the render's output appears first and Refine's replaces it
// when it is done; a refinement that a newer save overtook is dropped, so the page on disk
// is never older than the sheet.
func TestRunRefinesInTheBackground(t *testing.T) {
	f := newFixture(t, "alpha")
	f.age(t) // a second start-up render would make the slow refinement the first one's
	release := make(chan struct{})
	var calls atomic.Int64
	o := f.opts()
	o.Refine = func() ([]byte, bool) {
		n := calls.Add(1)
		data, err := os.ReadFile(f.main)
		if err != nil {
			return nil, false
		}
		if n == 2 {
			<-release // the second refinement is slow: a newer save overtakes it
		}
		return []byte(string(data) + " refined\n"), true
	}
	start(t, f.sh.render, o)
	f.waitOut(t, "alpha refined\n")

	saveByRename(t, f.main, "beta")
	f.waitOut(t, "beta\n") // the render's output, while its refinement waits
	saveByRename(t, f.main, "gamma")
	f.waitOut(t, "gamma refined\n")
	close(release) // the overtaken refinement of "beta" now finishes, and must be dropped
	time.Sleep(200 * time.Millisecond)
	if got := readString(t, f.out); got != "gamma refined\n" {
		t.Fatalf("after the stale refinement finished the page is %q", got)
	}
	if !regexp.MustCompile(`(?m)^\d\d:\d\d:\d\d completed field\.md in \d+\.\d ms$`).MatchString(f.status.String()) {
		t.Errorf("status lines lack a completion line:\n%s", f.status.String())
	}
}
