package lsp

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"go.lsp.dev/protocol"
)

// fuzzSheets are the worksheets the fuzzer edits: the demos, and a sheet with parts.
var fuzzSheets = []string{
	"../../worksheets/field-probe-uplink.toml",
	"../../worksheets/club-ground-station.toml",
	"../../worksheets/hill-relay-backhaul.toml",
	"../../worksheets/orchard-receiver.toml",
	"../../worksheets/orchard-gateway-rx.toml",
	"../../testdata/valid/parts.toml",
}

// FuzzDidChange opens a demo worksheet, replaces a random span of it by random text (a
// half-typed document), and asks for diagnostics, inlay hints, hover, completion and the
// definition at a random place: the server must answer every request, and every range it
// sends must lie inside the document.
func FuzzDidChange(f *testing.F) {
	f.Add(uint8(0), uint16(900), uint8(1), `"`, uint16(900))
	f.Add(uint8(1), uint16(2000), uint8(30), "= fspl(", uint16(2005))
	f.Add(uint8(2), uint16(50), uint8(0), "[[x.chain]]\ngain = ", uint16(60))
	f.Add(uint8(3), uint16(400), uint8(5), "😀\r\n{ is = '", uint16(402))
	f.Add(uint8(5), uint16(10), uint8(200), "", uint16(0))
	f.Fuzz(func(t *testing.T, sheet uint8, off uint16, del uint8, ins string, probe uint16) {
		path, err := filepath.Abs(fuzzSheets[int(sheet)%len(fuzzSheets)])
		if err != nil {
			t.Fatal(err)
		}
		src, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if len(ins) > 200 {
			ins = ins[:200]
		}
		ins = strings.ToValidUTF8(ins, "\uFFFD") // what JSON carries of invalid bytes
		uri := fileURI(path)
		c := newClient(t, Options{})
		c.initialize()
		c.open(uri, string(src))
		c.waitDiags(uri, 1)

		doc := newText(string(src))
		a := doc.position(int(off) % (len(src) + 1))
		b := doc.position(doc.offset(a) + int(del))
		r := protocol.Range{Start: a, End: b}
		doc, _, _, _ = doc.apply(&r, ins)
		c.edit(uri, 2, r, ins)
		within := func(what string, rg protocol.Range) {
			t.Helper()
			if !inside(doc.s, rg.Start) || !inside(doc.s, rg.End) || less(rg.End, rg.Start) {
				t.Errorf("%s: range %+v outside the document or reversed", what, rg)
			}
		}
		for _, d := range c.waitDiags(uri, 2) {
			within("diagnostic "+d.Message, d.Range)
			if d.Message == "" {
				t.Errorf("diagnostic without a message at %+v", d.Range)
			}
		}
		for _, h := range c.hints(uri, len(doc.lines)) {
			within("hint "+h.Label, protocol.Range{Start: h.Position, End: h.Position})
			if h.Label == "" {
				t.Errorf("empty hint at %+v", h.Position)
			}
		}
		at := protocol.TextDocumentPositionParams{TextDocument: protocol.TextDocumentIdentifier{URI: uri}, Position: doc.position(int(probe) % (len(doc.s) + 1))}
		var h *protocol.Hover
		c.call("textDocument/hover", at, &h)
		if h != nil && h.Range != nil {
			within("hover", *h.Range)
		}
		var l protocol.CompletionList
		c.call("textDocument/completion", protocol.CompletionParams{TextDocumentPositionParams: at}, &l)
		for _, it := range l.Items {
			if it.TextEdit != nil {
				within("completion "+it.Label, it.TextEdit.Range)
			}
		}
		var locs []protocol.Location
		c.call("textDocument/definition", at, &locs)
		for _, loc := range locs {
			if loc.URI == uri {
				within("definition", loc.Range)
			}
		}
		c.call("textDocument/references", protocol.ReferenceParams{TextDocumentPositionParams: at, Context: protocol.ReferenceContext{IncludeDeclaration: true}}, &locs)
		for _, loc := range locs {
			if loc.URI == uri {
				within("reference", loc.Range)
			}
		}
		c.shutdown()
	})
}
