package watch

import (
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"time"

	"github.com/fsnotify/fsnotify"
)

// Render produces the output bytes for one recalculation. files lists every file the result
// depends on (the worksheet and the parts it uses) so the watcher can follow them. err != nil
// means the sheet is broken: keep the last good output, print the error.
type Render func() (out []byte, files []string, err error)

// Options configures Run.
type Options struct {
	Out      string                    // output file; written atomically (temp file in the same dir + rename), never half-written
	Debounce time.Duration             // bursts of events within this window give one recalculation (default 20ms)
	Status   io.Writer                 // one line per recalculation, e.g. "12:04:05 rendered field.md in 3.1 ms" or "12:04:05 error: <first line>…" (the error text itself goes to Errors); nil discards
	Errors   io.Writer                 // full error text when a render fails; nil discards
	Serve    string                    // "" = no server; else an address like "127.0.0.1:8080" or ":0"; a bare port or ":port" binds 127.0.0.1 only, never all interfaces unless the host is given explicitly
	Title    string                    // page title for the served page
	Ready    func(addr string)         // called once the server listens (addr is the real address, useful with ":0"); may be nil
	Extra    func(dir string) []string // optional: after each good render, files beside Out that should also be served (e.g. SVG charts linked from the Markdown); may be nil
	Written  func()                    // optional: called after each good render's output is written (e.g. to remove charts the new output no longer links); may be nil
	// Refine, when set, is called in the background after each good render and returns the
	// output again with the slow parts filled in (the Monte Carlo spread): the page appears
	// at once and is completed when they are done. Its output replaces the render's unless a
	// newer recalculation has started meanwhile; ok false leaves the render's output.
	Refine func() (out []byte, ok bool)
	// Summary, when set, is called after each good render (on Run's goroutine, before Refine
	// starts) for the verdict and focus value the served page's status bar shows.
	Summary func() Summary
}

// DefaultDebounce is the debounce window used when Options.Debounce is zero or negative.
// Editors write a save within a few milliseconds (a rename over the file, or a truncation
// and a write microseconds apart); 20 ms gathers the events of one save.
const DefaultDebounce = 20 * time.Millisecond

// maxDelayFactor bounds how long a continuous stream of events can postpone a
// recalculation: at most this many debounce windows after the first event.
const maxDelayFactor = 10

// Run renders once, writes Out, then watches until ctx is cancelled, re-rendering on every
// change to any of the files Render reported (re-reading that list after each render, since
// `use` of parts may change). Returns nil on ctx cancel.
//
// Run returns an error early if Out is empty, if the watcher or the server
// cannot be started, or if the first render fails without naming any file to
// watch (there would be nothing that could ever trigger a fix).
func Run(ctx context.Context, r Render, o Options) error {
	if r == nil {
		return errors.New("watch: nil Render")
	}
	if o.Out == "" {
		return errors.New("watch: no output file")
	}
	out, err := filepath.Abs(o.Out)
	if err != nil {
		return fmt.Errorf("watch: output path: %w", err)
	}
	if o.Debounce <= 0 {
		o.Debounce = DefaultDebounce
	}
	l := &loop{
		render:   r,
		out:      out,
		debounce: o.Debounce,
		status:   lockedWriter(o.Status),
		errs:     lockedWriter(o.Errors),
		extra:    o.Extra,
		written:  o.Written,
		refine:   o.Refine,
		summary:  o.Summary,
		refined:  make(chan refinement, 1),
		files:    map[string]bool{},
		st:       newState(),
		done:     ctx.Done(),
	}

	fw, err := fsnotify.NewWatcher()
	if err != nil {
		return fmt.Errorf("watch: %w", err)
	}
	defer fw.Close()
	l.fw = fw

	var ln net.Listener
	if o.Serve != "" {
		addr, err := listenAddr(o.Serve)
		if err != nil {
			return fmt.Errorf("watch: serve address: %w", err)
		}
		ln, err = net.Listen("tcp", addr)
		if err != nil {
			return fmt.Errorf("watch: %w", err)
		}
		defer ln.Close()
	}

	if !l.recalc() {
		// The sheet is broken from the start; the page shows the report
		// already on disk (if any) as the last good one.
		if prev, err := os.ReadFile(out); err == nil {
			l.st.seed(prev, l.extras())
		}
	}
	if len(l.files) == 0 {
		if e := l.st.lastErr(); e != "" {
			return fmt.Errorf("watch: first render failed and reported no files to watch: %s", firstLine(e))
		}
		return errors.New("watch: render reported no files to watch")
	}

	if ln != nil {
		hc := serveHosts(ln.Addr(), o.Serve)
		srv := newServer(ctx, l.st, o.Title, filepath.Base(out), l.errs, hc)
		var wg sync.WaitGroup
		wg.Go(func() { srv.Serve(ln) })
		defer func() {
			srv.stop()
			wg.Wait()
		}()
		addr := ln.Addr().String()
		fmt.Fprintf(l.status, "%s serving http://%s/\n", stamp(), addr)
		if !hc.ip.IsLoopback() {
			fmt.Fprintf(l.status, "%s warning: %s is not a loopback address: anyone who can reach this machine on it can read the budget page\n", stamp(), addr)
		}
		if o.Ready != nil {
			o.Ready(addr)
		}
	}

	return l.run(ctx)
}

// loop holds the state of the watch loop. Only the goroutine running Run
// touches its fields, except st which is shared with the server.
type loop struct {
	render   Render
	out      string
	debounce time.Duration
	status   io.Writer
	errs     io.Writer
	extra    func(dir string) []string
	written  func()
	refine   func() ([]byte, bool)
	summary  func() Summary
	refined  chan refinement // finished refinements, from their goroutines
	gen      int             // recalculations started so far
	done     <-chan struct{} // closed when Run returns
	fw       *fsnotify.Watcher
	files    map[string]bool // cleaned absolute names that trigger a recalculation
	stale    bool            // a followed file changed while the last render ran
	dirFail  map[string]string
	st       *state
}

func (l *loop) run(ctx context.Context) error {
	timer := time.NewTimer(time.Hour)
	timer.Stop()
	defer timer.Stop()
	var first time.Time // first event of the pending burst; zero when idle
	for {
		if l.stale {
			l.stale = false
			timer.Reset(l.debounce)
		}
		select {
		case <-ctx.Done():
			return nil
		case ev, ok := <-l.fw.Events:
			if !ok {
				return errors.New("watch: file watcher closed")
			}
			if !l.relevant(ev) {
				continue
			}
			now := time.Now()
			if first.IsZero() {
				first = now
			}
			wait := l.debounce
			if limit := first.Add(maxDelayFactor * l.debounce); now.Add(wait).After(limit) {
				wait = max(limit.Sub(now), 0)
			}
			timer.Reset(wait)
		case err, ok := <-l.fw.Errors:
			if !ok {
				return errors.New("watch: file watcher closed")
			}
			fmt.Fprintf(l.status, "%s watch error: %v\n", stamp(), err)
			fmt.Fprintf(l.errs, "watch: %v\n", err)
			if errors.Is(err, fsnotify.ErrEventOverflow) {
				// Events were lost; recalculate to be safe.
				timer.Reset(0)
			}
		case <-timer.C:
			first = time.Time{}
			l.recalc()
		case rf := <-l.refined:
			l.finish(rf)
		}
		if ctx.Err() != nil {
			return nil
		}
	}
}

// relevant reports whether ev concerns one of the watched files. Pure
// permission changes are ignored: editors and indexers touch them without
// changing content.
func (l *loop) relevant(ev fsnotify.Event) bool {
	if ev.Op == fsnotify.Chmod || ev.Op == 0 {
		return false
	}
	name := ev.Name
	if !filepath.IsAbs(name) {
		if abs, err := filepath.Abs(name); err == nil {
			name = abs
		}
	}
	name = filepath.Clean(name)
	if l.files[name] {
		return true
	}
	if l.onTheWay(name) {
		// A folder holding followed files (or one above it) went or came back: watch what
		// exists now, and recalculate, since its files may have changed with it.
		l.syncDirs()
		return true
	}
	return false
}

// onTheWay reports whether name is a folder that holds followed files or lies above one.
func (l *loop) onTheWay(name string) bool {
	for f := range l.files {
		d := filepath.Dir(f)
		if d == name || strings.HasPrefix(d, name+string(filepath.Separator)) {
			return true
		}
	}
	return false
}

// recalc runs one render, writes the output when it succeeded, reports the
// outcome and updates the watched file set. It reports whether the output
// was written.
func (l *loop) recalc() bool {
	l.gen++
	start := time.Now()
	data, files, err := l.callRender()
	elapsed := time.Since(start)
	name := filepath.Base(l.out)
	if err == nil {
		// Follow the files before the output appears: whoever reads the new output and saves
		// at once must not beat the watch on a folder that is new (a new part).
		l.setFiles(files, false)
		if werr := WriteLive(l.out, data); werr != nil {
			err = fmt.Errorf("writing %s: %w", name, werr)
		}
	}
	if err != nil {
		msg := err.Error()
		fmt.Fprintf(l.status, "%s error: %s\n", stamp(), firstLine(msg))
		if !strings.HasSuffix(msg, "\n") {
			msg += "\n"
		}
		io.WriteString(l.errs, msg)
		l.st.fail(err.Error())
		// Keep following what the broken sheet still names, plus what was
		// followed before, so the fix is noticed wherever it lands.
		l.setFiles(files, true)
		l.stale = l.changedSince(files, start)
		return false
	}
	if l.written != nil {
		l.written()
	}
	fmt.Fprintf(l.status, "%s rendered %s in %s\n", stamp(), name, fmtMillis(elapsed))
	sum := Summary{Pending: true}
	if l.summary != nil {
		sum = l.summary()
	}
	l.st.succeed(data, l.extras(), sum, l.refine != nil && sum.Pending)
	l.stale = l.changedSince(files, start)
	if l.refine != nil {
		gen, refine, out, done := l.gen, l.refine, l.refined, l.done
		go func() {
			data, ok := callRefine(refine)
			select {
			case out <- refinement{gen: gen, data: data, ok: ok, start: start}:
			case <-done:
			}
		}()
	}
	return true
}

// refinement is a finished Refine call.
type refinement struct {
	gen   int
	data  []byte
	ok    bool
	start time.Time
}

// finish writes a refined output, unless a newer recalculation has started since its render.
func (l *loop) finish(rf refinement) {
	if rf.gen != l.gen {
		return
	}
	if !rf.ok {
		l.st.settle()
		return
	}
	name := filepath.Base(l.out)
	if err := WriteLive(l.out, rf.data); err != nil {
		fmt.Fprintf(l.status, "%s error: writing %s: %v\n", stamp(), name, err)
		return
	}
	if l.written != nil {
		l.written()
	}
	fmt.Fprintf(l.status, "%s completed %s in %s\n", stamp(), name, fmtMillis(time.Since(rf.start)))
	l.st.complete(rf.data, l.extras())
}

// callRefine calls Refine, turning a panic into no refinement.
func callRefine(refine func() ([]byte, bool)) (data []byte, ok bool) {
	defer func() {
		if p := recover(); p != nil {
			data, ok = nil, false
		}
	}()
	return refine()
}

// changedSince reports whether any file was modified at or after t. A save that lands while
// a render runs, before its folder is watched (the first render, a new part), sends no event
// the watcher can see; this catches it. File times come from the kernel's coarse clock, which
// may run a few milliseconds behind, so the comparison allows for that; a render starts at
// least one debounce window after the last save it was told of, so the allowance does not
// re-render for a save that render already read.
func (l *loop) changedSince(files []string, t time.Time) bool {
	t = t.Add(-min(30*time.Millisecond, l.debounce/2))
	future := time.Now().Add(time.Second) // a file stamped in the future must not re-render forever
	for _, f := range files {
		if st, err := os.Stat(f); err == nil && !st.ModTime().Before(t) && st.ModTime().Before(future) {
			return true
		}
	}
	return false
}

// extras asks Options.Extra for the files to serve beside the output.
func (l *loop) extras() map[string]string {
	if l.extra == nil {
		return nil
	}
	dir := filepath.Dir(l.out)
	return extraFiles(dir, l.extra(dir))
}

// callRender calls the user's Render and turns a panic into an error so a bug
// in one recalculation does not take the watcher down.
func (l *loop) callRender() (data []byte, files []string, err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("render panicked: %v", p)
		}
	}()
	return l.render()
}

// setFiles replaces (or, with keep, extends) the set of followed files and
// brings the directory watches in line with it.
func (l *loop) setFiles(files []string, keep bool) {
	next := map[string]bool{}
	if keep {
		for f := range l.files {
			next[f] = true
		}
	}
	for _, f := range files {
		if f == "" {
			continue
		}
		abs, err := filepath.Abs(f)
		if err != nil {
			continue
		}
		abs = filepath.Clean(abs)
		if abs == l.out {
			// Never follow our own output: every write would trigger another render.
			continue
		}
		next[abs] = true
	}
	l.files = next
	l.syncDirs()
}

// syncDirs adds a watch for every directory holding a followed file and drops
// watches that are no longer needed. It consults the watcher's own list, so a
// watch the system dropped (for example because the directory was removed and
// re-created) is added again.
func (l *loop) syncDirs() {
	want := map[string]bool{}
	for f := range l.files {
		// A folder that is gone cannot be watched; watch the nearest one above it that
		// exists, so its return is seen (and the watch re-armed) without any other event.
		d := filepath.Dir(f)
		for {
			if fi, err := os.Stat(d); err == nil && fi.IsDir() {
				break
			}
			up := filepath.Dir(d)
			if up == d {
				break
			}
			d = up
		}
		want[d] = true
	}
	have := map[string]bool{}
	for _, d := range l.fw.WatchList() {
		have[filepath.Clean(d)] = true
	}
	for d := range have {
		if !want[d] {
			l.fw.Remove(d)
		}
	}
	dirs := make([]string, 0, len(want))
	for d := range want {
		dirs = append(dirs, d)
	}
	slices.Sort(dirs)
	if l.dirFail == nil {
		l.dirFail = map[string]string{}
	}
	for _, d := range dirs {
		if have[d] {
			delete(l.dirFail, d)
			continue
		}
		if err := l.fw.Add(d); err != nil {
			// Report a failing directory once per distinct error, not on every render.
			if l.dirFail[d] != err.Error() {
				l.dirFail[d] = err.Error()
				fmt.Fprintf(l.status, "%s watch error: %s\n", stamp(), d)
				fmt.Fprintf(l.errs, "watch: cannot watch %s: %v\n", d, err)
			}
			continue
		}
		delete(l.dirFail, d)
	}
}

// extraFiles turns the names returned by Options.Extra into a map from the
// served name to the file path. Only regular names that sit directly in dir
// are accepted.
func extraFiles(dir string, names []string) map[string]string {
	m := map[string]string{}
	for _, n := range names {
		if n == "" {
			continue
		}
		p := n
		if !filepath.IsAbs(p) {
			p = filepath.Join(dir, p)
		}
		p = filepath.Clean(p)
		if filepath.Dir(p) != dir {
			continue
		}
		base := filepath.Base(p)
		if !validName(base) {
			continue
		}
		m[base] = p
	}
	return m
}

// lockedWriter serialises writes to w, which may be shared between the watch
// loop and the server. A nil w discards.
func lockedWriter(w io.Writer) io.Writer {
	if w == nil {
		return io.Discard
	}
	return &syncWriter{w: w}
}

type syncWriter struct {
	mu sync.Mutex
	w  io.Writer
}

func (s *syncWriter) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.w.Write(p)
}

func stamp() string { return time.Now().Format("15:04:05") }

// firstLine returns the first non-empty line of s, marked with an ellipsis
// when more text follows.
func firstLine(s string) string {
	s = strings.TrimSpace(s)
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return strings.TrimRight(s[:i], "\r") + "…"
	}
	return s
}

func fmtMillis(d time.Duration) string {
	return fmt.Sprintf("%.1f ms", float64(d.Microseconds())/1000)
}

// serveHosts is the Host check for a server listening on addr, started with the serve
// address given.
func serveHosts(addr net.Addr, serve string) hostCheck {
	var hc hostCheck
	if ta, ok := addr.(*net.TCPAddr); ok {
		hc.ip = ta.IP
	}
	if s, err := listenAddr(serve); err == nil {
		if h, _, err := net.SplitHostPort(s); err == nil && net.ParseIP(h) == nil {
			hc.name = h
		}
	}
	return hc
}

// listenAddr turns the Serve option into a listen address. A bare port or
// ":port" becomes 127.0.0.1:port; an explicit host is kept as given.
// CheckServe reports a --serve address that cannot be listened on whatever the network
// does: no port, a port that is neither a number nor a service name. The command refuses it
// as a usage error before it renders anything.
func CheckServe(s string) error {
	addr, err := listenAddr(s)
	if err != nil {
		return err
	}
	_, port, _ := net.SplitHostPort(addr)
	if _, err := net.LookupPort("tcp", port); err != nil {
		return fmt.Errorf("%q: %v", s, err)
	}
	return nil
}

func listenAddr(s string) (string, error) {
	s = strings.TrimSpace(s)
	if !strings.Contains(s, ":") {
		s = ":" + s
	}
	host, port, err := net.SplitHostPort(s)
	if err != nil {
		return "", err
	}
	if port == "" {
		return "", fmt.Errorf("%q: missing port", s)
	}
	if host == "" {
		host = "127.0.0.1"
	}
	return net.JoinHostPort(host, port), nil
}
