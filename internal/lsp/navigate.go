package lsp

import (
	"encoding/json"
	"strings"

	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/engine"
)

func (s *server) definition(params json.RawMessage) (any, error) {
	var p protocol.TextDocumentPositionParams
	if err := decode(params, &p); err != nil {
		return nil, err
	}
	d, err := s.fresh(p.TextDocument.URI)
	if err != nil {
		return nil, err
	}
	ev, full, ok := d.target(d.text.offset(p.Position))
	if !ok {
		return []protocol.Location{}, nil
	}
	return []protocol.Location{s.location(d, ev, full)}, nil
}

// target finds the full name of the quantity or chain named at a byte offset: a name in a
// formula or in a string that names quantities, or the key of a quantity.
func (d *document) target(off int) (*evaluation, string, bool) {
	ev := d.evalFor()
	sp := spotAt(d.text, off)
	if ev == nil || ev.sheet == nil || sp.comment {
		return nil, "", false
	}
	w, _, b := sp.word()
	switch {
	case w == "":
	case sp.inStr && (sp.formula || nameKeys[sp.key]):
		if sp.formula && sp.calls(b) {
			return nil, "", false
		}
		if full, ok := resolve(ev, d.name, sp, w); ok {
			return ev, full, true
		}
	case sp.onHeader:
		if c := findChain(ev.sheet, w); c != nil {
			return ev, c.Name, true
		}
	case sp.keyPos:
		if q := scopeQuantity(ev, d.name, sp); q != nil && strings.HasSuffix("."+q.Name, "."+w) {
			return ev, q.Name, true
		}
	}
	return nil, "", false
}

// location is where a quantity or chain is defined, in the document or in a part.
func (s *server) location(d *document, ev *evaluation, full string) protocol.Location {
	var r engine.Range
	if q, ok := ev.sheet.Quantity(full); ok {
		r = q.Range
	} else if c := findChain(ev.sheet, full); c != nil {
		r = c.Range
	}
	return s.locate(d, r)
}

// locate converts a worksheet range of d's load (in d's file or a part) to a location.
func (s *server) locate(d *document, r engine.Range) protocol.Location {
	if r.File == d.name || d.path == "" {
		return protocol.Location{URI: d.uri, Range: d.text.engineRange(r)}
	}
	file := joinPath(d.path, r.File)
	if o := s.docs[fileURI(file)]; o != nil {
		return protocol.Location{URI: o.uri, Range: o.text.engineRange(r)}
	}
	fsys, _ := s.overlay(d)
	b, err := fsys.ReadFile(r.File)
	if err != nil {
		return protocol.Location{URI: fileURI(file)}
	}
	return protocol.Location{URI: fileURI(file), Range: newText(string(b)).engineRange(r)}
}

func (s *server) references(params json.RawMessage) (any, error) {
	var p protocol.ReferenceParams
	if err := decode(params, &p); err != nil {
		return nil, err
	}
	d, err := s.fresh(p.TextDocument.URI)
	if err != nil {
		return nil, err
	}
	out := []protocol.Location{}
	ev, full, ok := d.target(d.text.offset(p.Position))
	if !ok {
		return out, nil
	}
	if p.Context.IncludeDeclaration {
		out = append(out, s.location(d, ev, full))
	}
	return append(out, s.uses(d, ev, full)...), nil
}

// uses finds every place the worksheet and its parts name full: in the formulas that depend
// on it, in requirements, and in the strings of sweeps, solves and focus.
func (s *server) uses(d *document, ev *evaluation, full string) []protocol.Location {
	var out []protocol.Location
	texts := map[string]text{d.name: d.text}
	textOf := func(file string) (text, bool) {
		if t, ok := texts[file]; ok {
			return t, true
		}
		fsys, _ := s.overlay(d)
		b, err := fsys.ReadFile(file)
		if err != nil {
			return text{}, false
		}
		texts[file] = newText(string(b))
		return texts[file], true
	}
	scan := func(file string, line int, from *engine.Quantity, group string) {
		t, ok := textOf(file)
		if !ok {
			return
		}
		l, start := t.line(line)
		var quote byte
		formula := false
		for i := 0; i < len(l); i++ {
			c := l[i]
			if quote == 0 {
				if c == '"' || c == '\'' {
					quote = c
					rest := strings.TrimLeft(l[i+1:], " \t")
					formula = from == nil || strings.HasPrefix(rest, "=")
				} else if c == '#' {
					return
				}
				continue
			}
			if c == quote {
				quote = 0
				continue
			}
			if !formula || !isNameByte(c) || i > 0 && isNameByte(l[i-1]) {
				continue
			}
			j := i
			for j < len(l) && isNameByte(l[j]) {
				j++
			}
			w := l[i:j]
			var r string
			var found bool
			if from != nil {
				r, found = ev.sheet.ResolveFrom(w, from)
			} else {
				r, found = ev.sheet.Resolve(w, group)
			}
			if found && r == full && !(j < len(l) && strings.HasPrefix(strings.TrimLeft(l[j:], " "), "(")) {
				rng := protocol.Range{Start: t.position(start + i), End: t.position(start + j)}
				uri := d.uri
				if file != d.name {
					uri = fileURI(joinPath(d.path, file))
				}
				out = append(out, protocol.Location{URI: uri, Range: rng})
			}
			i = j - 1
		}
	}
	for _, q := range ev.sheet.Quantities() {
		if q.Formula == "" || !contains(ev.sheet.Dependencies(q), full) {
			continue
		}
		// The formula is on the key's line, or (a long form written as a table) on a
		// line below it.
		before := len(out)
		for l := q.Range.Start.Line - 1; l < q.Range.Start.Line+8 && len(out) == before; l++ {
			scan(q.Range.File, l, q, "")
		}
	}
	for _, rq := range ev.sheet.Requires {
		scan(rq.Range.File, rq.Range.Start.Line-1, nil, "")
	}
	// Sweeps, solves and focus name quantities in full, in strings of their own.
	for i := range d.text.lines {
		l, start := d.text.line(i)
		for _, q := range []string{`"` + full + `"`, `'` + full + `'`} {
			if j := strings.Index(l, q); j >= 0 {
				k := strings.TrimSpace(l[:j])
				if strings.HasSuffix(k, "=") || strings.HasSuffix(k, "[") || strings.HasSuffix(k, ",") {
					out = append(out, protocol.Location{URI: d.uri, Range: protocol.Range{Start: d.text.position(start + j + 1), End: d.text.position(start + j + 1 + len(full))}})
				}
			}
		}
	}
	return out
}
