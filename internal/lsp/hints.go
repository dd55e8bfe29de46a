package lsp

import (
	"encoding/json"
	"path"
	"path/filepath"
	"sort"
	"strings"

	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/units"
)

const staleMark = " (stale)"

func (s *server) inlayHints(params json.RawMessage) (any, error) {
	var p inlayHintParams
	if err := decode(params, &p); err != nil {
		return nil, err
	}
	d, err := s.fresh(p.TextDocument.URI)
	if err != nil {
		return nil, err
	}
	return d.hints(int(p.Range.Start.Line), int(p.Range.End.Line)), nil
}

// lineHint is a hint before it is placed at the end of its line.
type lineHint struct {
	line    int // 0-based, in today's text
	label   string
	tooltip string
}

// hints returns the inlay hints of lines from..to (0-based, inclusive): the value of every
// quantity at the end of its line, each requirement's outcome on its line, each chain's
// cascade on its first [[...]] line. When the document cannot be evaluated as it is, they
// are the last good evaluation's, marked stale.
func (d *document) hints(from, to int) []inlayHint {
	ev, stale := d.ev, false
	if ev == nil || !ev.loaded {
		ev, stale = d.base, true
	}
	out := []inlayHint{}
	if ev == nil || ev.sheet == nil {
		return out
	}
	place := func(l int) (int, bool) {
		if stale {
			l = d.mapLine(l)
		}
		return l, l >= from && l <= to && l < len(d.text.lines)
	}
	var hs []lineHint
	ev.index(d.name)
	for i, line := range ev.lines {
		l, ok := place(line - 1)
		if !ok {
			continue
		}
		qs := ev.lineQs[i]
		if len(qs) == 1 {
			hs = append(hs, lineHint{l, "= " + d.valueLabel(ev, qs[0], stale), qs[0].Name})
			continue
		}
		var parts, names []string
		for _, q := range qs {
			parts = append(parts, shortName(q)+" = "+d.valueLabel(ev, q, stale))
			names = append(names, q.Name)
		}
		hs = append(hs, lineHint{l, strings.Join(parts, ", "), strings.Join(names, ", ")})
	}
	for i, rq := range ev.sheet.Requires {
		if rq.Range.File != d.name {
			continue
		}
		if l, ok := place(rq.Range.Start.Line - 1); ok {
			hs = append(hs, lineHint{l, d.requireLabel(ev, i, stale), rq.That})
		}
	}
	for _, c := range ev.sheet.Chains() {
		if c.Range.File != d.name {
			continue
		}
		if l, ok := place(c.Range.Start.Line - 1); ok {
			hs = append(hs, lineHint{l, d.chainLabel(ev, c, stale), "cascade of " + c.Name})
		}
	}
	sort.SliceStable(hs, func(i, j int) bool { return hs[i].line < hs[j].line })
	for _, h := range hs {
		out = append(out, inlayHint{Position: d.text.lineEnd(h.line), Label: h.label, Tooltip: h.tooltip, PaddingLeft: true})
	}
	return out
}

// shortName is a quantity's key in its group.
func shortName(q *engine.Quantity) string {
	if q.Group == "" {
		return q.Name
	}
	return strings.TrimPrefix(q.Name, q.Group+".")
}

// valueLabel is a quantity's value in its display unit; when it is unknown, the value it had
// in the last evaluation without errors, marked stale.
func (d *document) valueLabel(ev *evaluation, q *engine.Quantity, stale bool) string {
	if ev.result.Known(q) {
		if stale {
			return ev.result.Display(q) + staleMark
		}
		return ev.result.Display(q)
	}
	if c := d.clean; c != nil && c.sheet != nil {
		if cq, ok := c.sheet.Quantity(q.Name); ok && c.result.Known(cq) {
			return c.result.Display(cq) + staleMark
		}
	}
	return "unknown"
}

// requireLabel says whether requirement i holds, with the value of its subject for a bound.
func (d *document) requireLabel(ev *evaluation, i int, stale bool) string {
	rq := ev.sheet.Requires[i]
	pass, known := ev.result.Pass(rq)
	res, mark := ev.result, ""
	if stale {
		mark = staleMark
	}
	if !known {
		c := d.clean
		if c == nil || c.sheet == nil || i >= len(c.sheet.Requires) || c.sheet.Requires[i].That != rq.That {
			return "? not evaluated"
		}
		res, mark = c.result, staleMark
		pass, _ = res.Pass(c.sheet.Requires[i])
	}
	label := "✗ fails"
	if pass {
		label = "✓ holds"
	}
	if rq.Subject != "" {
		if q, ok := res.Sheet().Quantity(rq.Subject); ok && res.Known(q) {
			label += ": " + rq.Subject + " = " + res.Display(q)
		}
	}
	return label + mark
}

// chainLabel is a chain's cascaded gain, noise figure and IIP3.
func (d *document) chainLabel(ev *evaluation, c *engine.Chain, stale bool) string {
	res, ch, mark := ev.result, c, ""
	if stale {
		mark = staleMark
	}
	if !chainKnown(res, ch) {
		cl := d.clean
		if cl == nil || cl.sheet == nil {
			return "cascade unknown"
		}
		ch = findChain(cl.sheet, c.Name)
		if ch == nil || !chainKnown(cl.result, ch) {
			return "cascade unknown"
		}
		res, mark = cl.result, staleMark
	}
	cas, _, err := rflib.Cascade(res.Chain(ch))
	if err != nil {
		return "cascade: " + err.Error()
	}
	parts := []string{"gain " + units.FormatDB(cas.GainDB) + " dB", "NF " + units.FormatDB(cas.NFDB) + " dB"}
	if cas.HasIIP3 {
		parts = append(parts, "IIP3 "+units.FormatDB(cas.IIP3)+" dBm")
	}
	return strings.Join(parts, " · ") + mark
}

func chainKnown(r *engine.Result, c *engine.Chain) bool {
	for _, st := range c.Stages {
		for _, q := range st.Values {
			if !r.Known(q) {
				return false
			}
		}
	}
	return true
}

func findChain(sh *engine.Sheet, name string) *engine.Chain {
	for _, c := range sh.Chains() {
		if c.Name == name {
			return c
		}
	}
	return nil
}

// diagnostics converts the latest evaluation's diagnostics for the editor. One in a part
// the worksheet uses is shown on the document's line that uses the part, naming the place
// in the part and pointing at it.
func (s *server) diagnostics(d *document) []protocol.Diagnostic {
	out := []protocol.Diagnostic{}
	for _, g := range d.ev.diags {
		ld := protocol.Diagnostic{Severity: protocol.DiagnosticSeverityError, Source: "rfledger", Message: message(g)}
		if g.Severity == engine.Warning {
			ld.Severity = protocol.DiagnosticSeverityWarning
		}
		if g.Range.File == d.name || g.Range.File == "" {
			ld.Range = d.text.engineRange(g.Range)
			out = append(out, ld)
			continue
		}
		ld.Range = d.useRange(g.Range.File)
		ld.Message = g.Range.String() + ": " + ld.Message
		if d.path != "" {
			fsys, _ := s.overlay(d)
			if b, err := fsys.ReadFile(g.Range.File); err == nil {
				file := joinPath(d.path, g.Range.File)
				ld.RelatedInformation = []protocol.DiagnosticRelatedInformation{{
					Location: protocol.Location{URI: fileURI(file), Range: newText(string(b)).engineRange(g.Range)},
					Message:  message(g),
				}}
			}
		}
		out = append(out, ld)
	}
	return out
}

// message is a diagnostic as the editor shows it: NAME: message; hint.
func message(g engine.Diagnostic) string {
	var b strings.Builder
	if g.Quantity != "" {
		b.WriteString(g.Quantity + ": ")
	}
	b.WriteString(g.Summary)
	if g.Hint != "" {
		b.WriteString("; " + g.Hint)
	}
	return b.String()
}

// useRange finds where the document names a part file (its use = { ... } entry): the first
// line that has the file's name in quotes, else the document's first line.
func (d *document) useRange(file string) protocol.Range {
	base := path.Base(file)
	for i := range d.text.lines {
		l, _ := d.text.line(i)
		for _, q := range []string{`"`, `'`} {
			if j := strings.Index(l, base+q); j >= 0 {
				start := strings.LastIndex(l[:j], q) + 1
				return protocol.Range{
					Start: protocol.Position{Line: uint32(i), Character: uint32(utf16Count(l[:start]))},
					End:   protocol.Position{Line: uint32(i), Character: uint32(utf16Count(l[:j+len(base)]))},
				}
			}
		}
	}
	return protocol.Range{}
}

// joinPath returns the absolute path of a path relative to the worksheet's folder, written
// with slashes as the engine names files.
func joinPath(sheetPath, rel string) string {
	return filepath.Join(filepath.Dir(sheetPath), filepath.FromSlash(rel))
}
