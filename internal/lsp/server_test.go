package lsp

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"unicode/utf16"

	"go.lsp.dev/protocol"
)

const benchSheet = `title = "Bench test"
focus = "link.margin"
use   = { lna = "parts/lna.toml" }

[link]
a      = "3 dB"
b      = { is = "4 dB", tol = "1 dB", note = "a note" }
c      = "= a + b"
d      = "= fspl(1 km, 1 GHz)"
e      = { note = "😀", is = "= a + b" }
margin = "= c - 1 dB"
nf     = "= cascade_nf(chain)"
g      = "= lna.gain + a"

[[link.chain]]
stage = "one"
gain  = "10 dB"
nf    = "2 dB"

[[link.chain]]
stage = "two"
gain  = "20 dB"
nf    = "6 dB"

[[require]]
that = "= link.margin >= 3 dB"
`

// at finds the line that starts with prefix and the UTF-16 column of sub on it.
func at(t *testing.T, text, prefix, sub string) protocol.Position {
	t.Helper()
	for i, l := range strings.Split(text, "\n") {
		if strings.HasPrefix(l, prefix) {
			j := strings.Index(l, sub)
			if j < 0 {
				t.Fatalf("%q not on line %q", sub, l)
			}
			return pos(i, len(utf16.Encode([]rune(l[:j]))))
		}
	}
	t.Fatalf("no line starts with %q", prefix)
	return protocol.Position{}
}

// hintOn returns the label of the hint on a line, "" when there is none.
func hintOn(hs []inlayHint, line uint32) string {
	for _, h := range hs {
		if h.Position.Line == line {
			return h.Label
		}
	}
	return ""
}

func writeSheet(t *testing.T) (dir string, uri protocol.DocumentURI) {
	t.Helper()
	dir = t.TempDir()
	if err := os.MkdirAll(filepath.Join(dir, "parts"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "parts", "lna.toml"), []byte("gain = \"12 dB\"   # the part's gain\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "bench.toml")
	if err := os.WriteFile(path, []byte(benchSheet), 0o644); err != nil {
		t.Fatal(err)
	}
	return dir, fileURI(path)
}

// TestProtocol drives the server as an editor does: initialize, open, read hints, hover,
// complete, go to definition and references, type (incremental and whole-text changes,
// a typo, a broken TOML line, the fix), shut down.
func TestProtocol(t *testing.T) {
	dir, uri := writeSheet(t)
	c := newClient(t, Options{})
	c.initialize()
	c.open(uri, benchSheet)
	if ds := c.waitDiags(uri, 1); len(ds) != 0 {
		t.Fatalf("diagnostics of a good sheet: %+v", ds)
	}
	text := benchSheet
	hs := c.hints(uri, 100)
	line := func(prefix string) uint32 { return at(t, text, prefix, prefix).Line }

	// 3 dB + 4 dB of ratios is 7 dB (decibels of ratios add).
	if got := hintOn(hs, line("c ")); got != "= 7.00 dB" {
		t.Errorf("c: hint %q, want \"= 7.00 dB\"", got)
	}
	// Free-space basic transmission loss, ITU-R P.525-4 eq. (4): 20 log10(4πd/λ), computed here.
	fspl := 20 * math.Log10(4*math.Pi*1000*1e9/299792458)
	if got, want := hintOn(hs, line("d ")), fmt.Sprintf("= %.2f dB", fspl); got != want {
		t.Errorf("d: hint %q, want %q", got, want)
	}
	// The part's 12 dB plus a's 3 dB.
	if got := hintOn(hs, line("g ")); got != "= 15.00 dB" {
		t.Errorf("g: hint %q", got)
	}
	// Friis (1944): F = F1 + (F2 − 1)/G1 for the two stages, computed here.
	f := math.Pow(10, 0.2) + (math.Pow(10, 0.6)-1)/10
	wantChain := fmt.Sprintf("gain 30.00 dB · NF %.2f dB", 10*math.Log10(f))
	if got := hintOn(hs, line("[[link.chain]]")); got != wantChain {
		t.Errorf("chain: hint %q, want %q", got, wantChain)
	}
	// margin = 7 dB − 1 dB = 6 dB ≥ 3 dB.
	if got := hintOn(hs, line("that")); got != "✓ holds: link.margin = 6.00 dB" {
		t.Errorf("requirement: hint %q", got)
	}
	for _, h := range hs {
		if !inside(text, h.Position) {
			t.Errorf("hint outside the document: %+v", h)
		}
	}

	// Hover on a name in a formula, an input, a function, a unit.
	hover := func(p protocol.Position) string {
		var h *protocol.Hover
		c.call("textDocument/hover", protocol.TextDocumentPositionParams{TextDocument: protocol.TextDocumentIdentifier{URI: uri}, Position: p}, &h)
		if h == nil {
			return ""
		}
		return h.Contents.Value
	}
	for _, tc := range []struct {
		p    protocol.Position
		want []string
	}{
		{at(t, text, "c ", "b\""), []string{"**link.b** = 4.00 dB", "tolerance: 1 dB (normal)", "note: a note"}},
		{at(t, text, "c ", "c"), []string{"`= a + b`", "depends on: link.a, link.b"}},
		// margin = a + b − 1 dB: it moves 1 dB for each dB of a (common algebra).
		{at(t, text, "a ", "a"), []string{"link.margin changes by +1 dB per +1 dB"}},
		{at(t, text, "d ", "fspl"), []string{"fspl(", "P.525"}},
		{at(t, text, "d ", "GHz"), []string{"**GHz**", "Hz"}},
		{at(t, text, "margin", "dB"), []string{"**dB**", "ratio"}},
	} {
		got := hover(tc.p)
		for _, w := range tc.want {
			if !strings.Contains(got, w) {
				t.Errorf("hover at %v: %q lacks %q", tc.p, got, w)
			}
		}
	}

	// Completion: names in scope with their values and functions in a formula, units after
	// a number, the long form's keys in an inline table, stage keys in a chain.
	complete := func(p protocol.Position) map[string]protocol.CompletionItem {
		var l protocol.CompletionList
		c.call("textDocument/completion", protocol.CompletionParams{TextDocumentPositionParams: protocol.TextDocumentPositionParams{TextDocument: protocol.TextDocumentIdentifier{URI: uri}, Position: p}}, &l)
		m := map[string]protocol.CompletionItem{}
		for _, it := range l.Items {
			m[it.Label] = it
		}
		return m
	}
	items := complete(at(t, text, "c ", "b\""))
	if it, ok := items["b"]; !ok || it.Detail != "4.00 dB" {
		t.Errorf("completion in a formula: b = %+v (of %d items)", it, len(items))
	}
	for _, w := range []string{"fspl", "cascade_nf", "lna.gain", "chain", "pi"} {
		if _, ok := items[w]; !ok {
			t.Errorf("completion in a formula lacks %q", w)
		}
	}
	if items := complete(at(t, text, "d ", "km")); items["km"].Label == "" || items["dBm"].Label == "" {
		t.Errorf("completion after a number: no units (%d items)", len(items))
	}
	if items := complete(at(t, text, "b ", "is")); items["tol"].Label == "" || items["dist"].Label == "" {
		t.Errorf("completion in an inline table: %v", items)
	}
	if items := complete(at(t, text, "gain  = \"10", "gain")); items["iip3"].Label == "" || items["loss"].Label == "" {
		t.Errorf("completion in a chain stage: %v", items)
	}
	// At a group's key place: the keys a group that holds a chain may give it.
	if items := complete(at(t, text, "a ", "a")); items["chain_input"].Label == "" || items["chain_backoff"].Detail == "" {
		t.Errorf("completion at a group's key: %v", items)
	}

	// Definition across a part, and of a name in the same file; references of an input.
	var locs []protocol.Location
	c.call("textDocument/definition", protocol.TextDocumentPositionParams{TextDocument: protocol.TextDocumentIdentifier{URI: uri}, Position: at(t, text, "g ", "gain")}, &locs)
	if len(locs) != 1 || locs[0].URI != fileURI(filepath.Join(dir, "parts", "lna.toml")) || locs[0].Range.Start != pos(0, 0) || locs[0].Range.End != pos(0, 4) {
		t.Errorf("definition of lna.gain: %+v", locs)
	}
	c.call("textDocument/definition", protocol.TextDocumentPositionParams{TextDocument: protocol.TextDocumentIdentifier{URI: uri}, Position: at(t, text, "c ", "b\"")}, &locs)
	if len(locs) != 1 || locs[0].URI != uri || locs[0].Range.Start != at(t, text, "b ", "b") {
		t.Errorf("definition of b: %+v", locs)
	}
	c.call("textDocument/references", protocol.ReferenceParams{TextDocumentPositionParams: protocol.TextDocumentPositionParams{TextDocument: protocol.TextDocumentIdentifier{URI: uri}, Position: at(t, text, "a ", "a")}}, &locs)
	want := map[protocol.Position]bool{at(t, text, "c ", "a +"): true, at(t, text, "e ", "a +"): true, at(t, text, "g ", "a\""): true}
	for _, l := range locs {
		delete(want, l.Range.Start)
	}
	if len(want) != 0 {
		t.Errorf("references of a: %+v; missing %v", locs, want)
	}

	// Typing: a becomes 5 dB; c is 9 dB at once.
	p := at(t, text, "a ", "3")
	c.edit(uri, 2, protocol.Range{Start: p, End: pos(int(p.Line), int(p.Character)+1)}, "5")
	text = strings.Replace(text, `"3 dB"`, `"5 dB"`, 1)
	if ds := c.waitDiags(uri, 2); len(ds) != 0 {
		t.Errorf("after the edit: %+v", ds)
	}
	if got := hintOn(c.hints(uri, 100), line("c ")); got != "= 9.00 dB" {
		t.Errorf("after a = 5 dB: c hint %q", got)
	}

	// A typo after a character that takes two UTF-16 units: the error's range is exactly the
	// name, counted in UTF-16; the quantity keeps its last good value, marked stale.
	p = at(t, text, "e ", "b\"")
	c.edit(uri, 3, protocol.Range{Start: p, End: pos(int(p.Line), int(p.Character)+1)}, "gian")
	text = strings.Replace(text, `"= a + b" }`, `"= a + gian" }`, 1)
	ds := c.waitDiags(uri, 3)
	if len(ds) != 1 || !strings.Contains(ds[0].Message, `unknown name "gian"`) || ds[0].Severity != protocol.DiagnosticSeverityError ||
		ds[0].Range.Start != at(t, text, "e ", "gian") || ds[0].Range.End.Character != ds[0].Range.Start.Character+4 {
		t.Errorf("typo: %+v (want the range of gian at %v)", ds, at(t, text, "e ", "gian"))
	}
	if got := hintOn(c.hints(uri, 100), line("e ")); got != "= 9.00 dB (stale)" {
		t.Errorf("typo: e hint %q", got)
	}

	// A broken TOML line: diagnostics still come, and every hint is the last good one, stale.
	p = at(t, text, "a ", "B\"")
	p.Character++
	c.edit(uri, 4, protocol.Range{Start: p, End: pos(int(p.Line), int(p.Character)+1)}, "")
	text = strings.Replace(text, `"5 dB"`, `"5 dB`, 1)
	if ds := c.waitDiags(uri, 4); len(ds) == 0 || ds[0].Severity != protocol.DiagnosticSeverityError {
		t.Errorf("broken line: diagnostics %+v", ds)
	}
	hs = c.hints(uri, 100)
	if len(hs) == 0 || hintOn(hs, line("c ")) != "= 9.00 dB (stale)" {
		t.Errorf("broken line: hints %+v", hs)
	}
	for _, h := range hs {
		if !strings.HasSuffix(h.Label, "(stale)") {
			t.Errorf("broken line: hint %q not marked stale", h.Label)
		}
	}

	// The whole text replaced (full sync): fixed, diagnostics cleared, nothing stale.
	text = strings.Replace(benchSheet, `"3 dB"`, `"5 dB"`, 1)
	c.notify("textDocument/didChange", map[string]any{
		"textDocument":   map[string]any{"uri": uri, "version": 5},
		"contentChanges": []map[string]any{{"text": text}},
	})
	if ds := c.waitDiags(uri, 5); len(ds) != 0 {
		t.Errorf("fixed: diagnostics %+v", ds)
	}
	for _, h := range c.hints(uri, 100) {
		if strings.Contains(h.Label, "stale") || strings.Contains(h.Label, "unknown") {
			t.Errorf("fixed: hint %q", h.Label)
		}
	}
	c.shutdown()
}

// TestPartBufferOverridesDisk: a part open in the editor is read from its buffer, and an
// edit of it re-evaluates the worksheet that uses it.
func TestPartBufferOverridesDisk(t *testing.T) {
	dir, uri := writeSheet(t)
	c := newClient(t, Options{})
	c.initialize()
	c.open(uri, benchSheet)
	c.waitDiags(uri, 1)
	part := fileURI(filepath.Join(dir, "parts", "lna.toml"))
	c.open(part, "gain = \"20 dB\"\n")
	c.waitDiags(part, 1)
	g := at(t, benchSheet, "g ", "g").Line
	// 20 dB from the buffer plus a's 3 dB.
	deadline := 200
	for ; deadline > 0; deadline-- {
		if hintOn(c.hints(uri, 100), g) == "= 23.00 dB" {
			break
		}
		c.waitDiags(uri, 0)
	}
	if deadline == 0 {
		t.Errorf("g after the part's buffer changed: %q", hintOn(c.hints(uri, 100), g))
	}
	c.shutdown()
}

// TestBeforeInitialize: requests before initialize get the protocol's error, and a client
// that leaves without shutdown makes Serve report it.
func TestBeforeInitialize(t *testing.T) {
	c := newClient(t, Options{})
	var res any
	_, err := c.conn.Call(t.Context(), "textDocument/hover", protocol.TextDocumentPositionParams{}, &res)
	if err == nil || !strings.Contains(err.Error(), "initialize first") {
		t.Errorf("hover before initialize: %v", err)
	}
	c.notify("exit", nil)
	if err := <-c.done; err == nil {
		t.Errorf("exit without shutdown: Serve returned nil")
	}
}

// inside reports whether an LSP position lies in text (a line of it, at most at its end).
func inside(text string, p protocol.Position) bool {
	lines := strings.Split(text, "\n")
	if int(p.Line) >= len(lines) {
		return false
	}
	return int(p.Character) <= len(utf16.Encode([]rune(strings.TrimSuffix(lines[p.Line], "\r"))))
}

// TestPartsStayInsideInTheEditor: the language server reads parts as render does (issue 8,
// findings 3 and 4): a link that leads out of the worksheet's folder, a linked folder, and a
// named pipe are errors at the part's name, and no value from outside reaches a hint.
func TestPartsStayInsideInTheEditor(t *testing.T) {
	root := t.TempDir()
	dir, outside := filepath.Join(root, "sheet"), filepath.Join(root, "outside")
	for _, d := range []string{filepath.Join(dir, "parts"), outside} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(filepath.Join(outside, "secret.toml"), []byte("gain = \"42 dB\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	links := map[string]string{
		filepath.Join(dir, "parts", "evil.toml"): filepath.Join("..", "..", "outside", "secret.toml"),
		filepath.Join(dir, "linked"):             outside,
	}
	for link, target := range links {
		if err := os.Symlink(target, link); err != nil {
			t.Skipf("no symbolic links here: %v", err)
		}
	}
	if err := syscall.Mkfifo(filepath.Join(dir, "parts", "pipe.toml"), 0o644); err != nil {
		t.Skipf("no named pipes here: %v", err)
	}
	sheet := "use = { a = \"parts/evil.toml\", b = \"linked/secret.toml\", c = \"parts/pipe.toml\" }\n[m]\nx = \"= a.gain\"\n"
	path := filepath.Join(dir, "s.toml")
	if err := os.WriteFile(path, []byte(sheet), 0o644); err != nil {
		t.Fatal(err)
	}
	uri := fileURI(path)
	c := newClient(t, Options{})
	c.initialize()
	c.open(uri, sheet)
	diags := c.waitDiags(uri, 1)
	want := map[string]string{"parts/evil.toml": "leads outside the worksheet's folder", "linked/secret.toml": "leads outside the worksheet's folder", "parts/pipe.toml": "not a regular file"}
	for file, msg := range want {
		found := false
		for _, d := range diags {
			found = found || d.Range.Start.Line == 0 && strings.Contains(d.Message, "cannot read "+file+": ") && strings.Contains(d.Message, msg)
		}
		if !found {
			t.Errorf("part %s: no error %q in %v", file, msg, diags)
		}
	}
	for _, h := range c.hints(uri, 100) {
		if strings.Contains(h.Label, "42") {
			t.Errorf("a value from outside the folder reached a hint: %q", h.Label)
		}
	}
	c.shutdown()
}
