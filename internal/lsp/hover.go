package lsp

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strings"

	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// evalFor returns the evaluation that answers questions about d: the latest, or the last
// good one when the document cannot be evaluated as it is.
func (d *document) evalFor() *evaluation {
	if d.ev != nil && d.ev.loaded {
		return d.ev
	}
	return d.base
}

func (s *server) hover(params json.RawMessage) (any, error) {
	var p protocol.TextDocumentPositionParams
	if err := decode(params, &p); err != nil {
		return nil, err
	}
	d, err := s.fresh(p.TextDocument.URI)
	if err != nil {
		return nil, err
	}
	sp := spotAt(d.text, d.text.offset(p.Position))
	md, a, b := d.hoverText(sp)
	if md == "" {
		return nil, nil
	}
	rng := protocol.Range{Start: d.text.position(sp.lineOff + a), End: d.text.position(sp.lineOff + b)}
	return protocol.Hover{Contents: protocol.MarkupContent{Kind: protocol.Markdown, Value: md}, Range: &rng}, nil
}

// hoverText is the Markdown shown for the spot, and the span of the line it is about.
func (d *document) hoverText(sp spot) (string, int, int) {
	if sp.comment {
		return "", 0, 0
	}
	ev := d.evalFor()
	if sp.inStr {
		if u, sym, a, b := sp.unitAt(); u != nil {
			return "**" + sym + "**: " + describeUnit(u), a, b
		}
	}
	w, a, b := sp.word()
	if w == "" {
		return "", 0, 0
	}
	switch {
	case sp.inStr && sp.formula:
		if sp.calls(b) {
			if f, ok := d.lib.Lookup(w); ok {
				return funcDoc(f), a, b
			}
		}
		if doc, ok := constants[w]; ok {
			return "**" + w + "**: " + doc + " (built in)", a, b
		}
		if full, ok := resolve(ev, d.name, sp, w); ok {
			return d.nameDoc(ev, full), a, b
		}
	case sp.inStr:
		if full, ok := resolve(ev, d.name, sp, w); ok {
			return d.nameDoc(ev, full), a, b
		}
		if sp.key == "dist" {
			return keyDocs["dist"], a, b
		}
	case sp.onHeader:
		if ev != nil && ev.sheet != nil {
			if c := findChain(ev.sheet, w); c != nil {
				return d.chainDoc(ev, c), a, b
			}
		}
	case sp.keyPos:
		if sp.inline || keyContext(sp) != nil {
			if doc, ok := keyDocs[w]; ok && (sp.inline || contains(keyContext(sp), w)) {
				if q := scopeQuantity(ev, d.name, sp); q != nil && !sp.inline {
					return d.quantityDoc(ev, q), a, b
				}
				return "**" + w + "**: " + doc, a, b
			}
		}
		if q := scopeQuantity(ev, d.name, sp); q != nil && (shortName(q) == w || strings.HasSuffix(q.Name, "."+w) || strings.HasSuffix(q.Name, "]."+w)) {
			return d.quantityDoc(ev, q), a, b
		}
		if sp.header == "" {
			if doc, ok := keyDocs[w]; ok {
				return "**" + w + "**: " + doc, a, b
			}
		}
	}
	return "", 0, 0
}

// nameDoc describes a quantity or a chain by its full name.
func (d *document) nameDoc(ev *evaluation, full string) string {
	if q, ok := ev.sheet.Quantity(full); ok {
		return d.quantityDoc(ev, q)
	}
	if c := findChain(ev.sheet, full); c != nil {
		return d.chainDoc(ev, c)
	}
	return ""
}

// quantityDoc is a quantity's hover: value, how it is obtained, tolerance, note, source,
// what it depends on and how much the focus moves with it.
func (d *document) quantityDoc(ev *evaluation, q *engine.Quantity) string {
	var b strings.Builder
	fmt.Fprintf(&b, "**%s** = %s", q.Name, d.valueLabel(ev, q, ev != d.ev))
	if t, ok := q.Type(); ok {
		if u := t.UnitName(); u != "" {
			fmt.Fprintf(&b, " (%s)", u)
		}
	}
	b.WriteString("\n\n")
	if q.Formula != "" {
		fmt.Fprintf(&b, "`= %s`\n\n", q.Formula)
	} else {
		fmt.Fprintf(&b, "input, written `%s`\n\n", q.Text)
	}
	var items []string
	if q.Tol != nil {
		items = append(items, fmt.Sprintf("tolerance: %s (%s)", q.Tol.Text, q.Tol.Dist))
	}
	if q.Show != nil {
		items = append(items, "shown in "+q.Show.Sym)
	}
	if q.Note != "" {
		items = append(items, "note: "+q.Note)
	}
	if q.Source != "" {
		items = append(items, "source: "+q.Source)
	}
	if deps := ev.sheet.Dependencies(q); len(deps) > 0 {
		deps = append([]string(nil), deps...)
		sort.Strings(deps)
		deps = dedupe(deps)
		items = append(items, "depends on: "+strings.Join(deps, ", "))
	}
	if s := sensitivityOf(ev, q); s != "" {
		items = append(items, s)
	}
	for _, w := range ev.result.Warnings(q) {
		items = append(items, "warning: "+w)
	}
	for _, it := range items {
		b.WriteString("- " + it + "\n")
	}
	return strings.TrimSpace(b.String())
}

// sensitivityOf says how the focus moves when input q rises (from the analyses of the
// evaluation, run once with one Monte Carlo trial).
func sensitivityOf(ev *evaluation, q *engine.Quantity) string {
	if ev.sheet.Focus == q.Name {
		return "the focus of the analyses"
	}
	if !q.Input() {
		return ""
	}
	a := ev.analyze()
	if a == nil || a.Focus == nil {
		return ""
	}
	for _, s := range a.Sensitivity {
		if s.Input == q.Name && !math.IsNaN(s.Change) {
			return fmt.Sprintf("sensitivity: %s changes by %+.3g %s per +%s", a.Focus.Name, s.Change, a.ChangeUnit, s.Per)
		}
	}
	return ""
}

func dedupe(s []string) []string {
	out := s[:0]
	for i, x := range s {
		if i == 0 || x != s[i-1] {
			out = append(out, x)
		}
	}
	return out
}

// chainDoc is a chain's hover: its stages and its cascade.
func (d *document) chainDoc(ev *evaluation, c *engine.Chain) string {
	var b strings.Builder
	fmt.Fprintf(&b, "**%s**: chain of %d stages, %s\n\n", c.Name, len(c.Stages), d.chainLabel(ev, c, ev != d.ev))
	for i, st := range c.Stages {
		var vals []string
		for _, k := range st.Keys {
			vals = append(vals, k+" "+ev.result.Display(st.Values[k]))
		}
		fmt.Fprintf(&b, "%d. %s: %s\n", i+1, st.Label, strings.Join(vals, ", "))
	}
	return strings.TrimSpace(b.String())
}

// funcDoc is a function's hover: signature, doc and source.
func funcDoc(f *engine.Func) string {
	s := "```\n" + f.Signature() + "\n```\n\n" + f.Doc
	if f.Source != "" {
		s += "\n\nSource: " + f.Source
	}
	return s
}

// describeUnit says what a unit symbol means.
func describeUnit(u *units.Unit) string {
	switch {
	case u.K == units.Level && u.D.IsNone():
		s := "a ratio in decibels"
		if n, ok := ratioNotes[u.Sym]; ok {
			s += ", " + n
		}
		return s + "."
	case u.K == units.Level:
		ref := u.Of(0).Linear()
		exp := "10"
		if x := u.Of(20).Linear().V / ref.V; math.Abs(x-10) < 1e-9 {
			exp = "20" // a root-power level: 20 dB is ten times the reference
		}
		s := fmt.Sprintf("a decibel level: x %s stands for %s × 10^(x/%s)", u.Sym, ref, exp)
		if n, ok := ratioNotes[u.Sym]; ok {
			s += "; " + n
		}
		return s + "."
	case u.K == units.Rate:
		return fmt.Sprintf("decibels per length (1 %s = %s dB/m): times a length it gives dB.", u.Sym, units.FormatNum(u.Of(1).V))
	case u.HasOffset():
		return fmt.Sprintf("an absolute temperature: x %s is x + %s K.", u.Sym, units.FormatNum(u.Offset))
	case u.D.IsNone():
		return fmt.Sprintf("a plain number: 1 %s = %s.", u.Sym, units.FormatNum(u.Scale))
	}
	return fmt.Sprintf("1 %s = %s %s.", u.Sym, units.FormatNum(u.Scale), u.D)
}

var ratioNotes = map[string]string{
	"dBi":    "antenna gain over an isotropic radiator",
	"dBd":    "antenna gain over a half-wave dipole (dBi − 2.15 dB)",
	"dBc":    "relative to the carrier",
	"dBFS":   "relative to full scale",
	"dBc/Hz": "a density relative to the carrier (phase noise)",
	"dBHz":   "a bandwidth or C/N0 in decibels",
	"dB-Hz":  "a bandwidth or C/N0 in decibels",
}

// constants are the built-in names.
var constants = map[string]string{
	"pi": "π",
	"c0": "speed of light in vacuum, 299 792 458 m/s",
	"kB": "Boltzmann's constant, 1.380649e-23 J/K",
	"T0": "reference noise temperature, 290 K",
}
