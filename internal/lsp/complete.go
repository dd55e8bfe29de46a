package lsp

import (
	"encoding/json"
	"sort"
	"strconv"
	"strings"

	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// maxItems caps a completion list; a longer one is marked incomplete, so that the editor
// asks again as more is typed.
const maxItems = 500

// keyDocs describe the worksheet's keys.
var keyDocs = map[string]string{
	"title":   "the page's title",
	"summary": "one paragraph under the title",
	"focus":   "full name of the quantity the analyses centre on",
	"use":     `parts: use = { name = "parts/file.toml" } brings a worksheet's quantities in under name.`,
	"is":      `the value: "14 dBm" (an input) or "= formula"`,
	"tol":     `tolerance: "1 dB" (±), "10 %" (relative) or ["-0.5 dB", "+1.5 dB"]`,
	"dist":    "distribution of the tolerance: normal (the default; tol is 3σ), uniform or triangular",
	"note":    "a note shown beside the value on the page",
	"source":  "where the number came from: datasheet, measurement, standard",
	"show":    "the unit the value is shown in",
	"export":  `true, or a macro name: the value goes into the C header`,
	"stage":   "the stage's label",
	"gain":    "the stage's gain",
	"nf":      "the stage's noise figure",
	"te":      "the stage's noise temperature (instead of nf)",
	"loss":    "a passive stage's loss: gain = −loss, NF = loss",
	"iip3":    "input third-order intercept",
	"oip3":    "output third-order intercept",
	"iip2":    "input second-order intercept",
	"oip2":    "output second-order intercept",
	"ip1db":   "input 1 dB compression point",
	"op1db":   "output 1 dB compression point",
	"that":    `the requirement: a true/false formula, "= link.margin >= 10 dB"`,
	"vary":    "the input varied (full name)",
	"from":    "the sweep's first value",
	"to":      "the sweep's last value",
	"steps":   "the number of intervals of the sweep",
	"scale":   `"lin" or "log"`,
	"plot":    "the quantities plotted against the varied input",
	"name":    "the solve's name",
	"so_that": "the quantity that must reach the target",
	"equals":  "the target value",
	"within":  `the range searched: ["10 m", "100 km"]`,
}

var (
	topKeys    = []string{"title", "summary", "focus", "use"}
	longKeys   = []string{"is", "tol", "dist", "note", "source", "show", "export"}
	stageKeys  = []string{"stage", "gain", "nf", "te", "loss", "iip3", "oip3", "iip2", "oip2", "ip1db", "op1db", "note"}
	tableKeys  = map[string][]string{"require": {"that", "note"}, "sweep": {"vary", "from", "to", "steps", "scale", "plot"}, "solve": {"name", "vary", "so_that", "equals", "within"}}
	nameKeys   = map[string]bool{"vary": true, "so_that": true, "focus": true, "plot": true}
	valueLists = map[string][]string{"dist": {"normal", "uniform", "triangular"}, "scale": {"lin", "log"}, "export": {"true", "false"}}
)

// keyContext returns the keys that may be written at a key place outside inline tables.
func keyContext(sp spot) []string {
	switch {
	case sp.header == "":
		return topKeys
	case sp.array && tableKeys[sp.header] != nil:
		return tableKeys[sp.header]
	case sp.array:
		return stageKeys
	}
	return chainGroupKeys // a group's other keys are names of its own
}

// chainGroupKeys are the keys a group that holds a chain may give it (engine.WorksheetKeys).
var chainGroupKeys = func() []string {
	var out []string
	for _, k := range engine.WorksheetKeys().ChainGroup {
		out = append(out, k.Name)
		keyDocs[k.Name] = k.Doc
	}
	return out
}()

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func (s *server) completion(params json.RawMessage) (any, error) {
	var p protocol.CompletionParams
	if err := decode(params, &p); err != nil {
		return nil, err
	}
	d, err := s.fresh(p.TextDocument.URI)
	if err != nil {
		return nil, err
	}
	sp := spotAt(d.text, d.text.offset(p.Position))
	return d.complete(sp), nil
}

// complete lists what may be written at the spot.
func (d *document) complete(sp spot) protocol.CompletionList {
	list := protocol.CompletionList{Items: []protocol.CompletionItem{}}
	if sp.comment || sp.onHeader {
		return list
	}
	pre, a := sp.prefix()
	edit := func(label string) *protocol.TextEdit {
		return &protocol.TextEdit{Range: protocol.Range{Start: d.text.position(sp.lineOff + a), End: d.text.position(sp.lineOff + sp.col)}, NewText: label}
	}
	add := func(label string, kind protocol.CompletionItemKind, detail, doc string) {
		if !strings.HasPrefix(strings.ToLower(label), strings.ToLower(pre)) {
			return
		}
		if len(list.Items) >= maxItems {
			list.IsIncomplete = true
			return
		}
		it := protocol.CompletionItem{Label: label, Kind: kind, Detail: detail, TextEdit: edit(label)}
		if doc != "" {
			it.Documentation = protocol.MarkupContent{Kind: protocol.Markdown, Value: doc}
		}
		list.Items = append(list.Items, it)
	}
	ev := d.evalFor()
	switch {
	case !sp.inStr && sp.keyPos:
		keys := keyContext(sp)
		if sp.inline {
			keys = longKeys
		}
		for _, k := range keys {
			add(k, protocol.CompletionItemKindProperty, keyDocs[k], "")
		}
	case sp.inStr && sp.afterNumber(a):
		for _, u := range units.KnownUnits() {
			if uu, err := units.ParseUnit(u); err == nil {
				add(u, protocol.CompletionItemKindUnit, describeUnit(uu), "")
			}
		}
	case sp.inStr && sp.formula:
		d.completeNames(ev, sp, pre, add)
		for _, f := range d.lib.Funcs() {
			add(f.Name, protocol.CompletionItemKindFunction, f.Signature(), f.Doc)
		}
		for _, c := range sortedKeys(constants) {
			add(c, protocol.CompletionItemKindConstant, constants[c], "")
		}
	case sp.inStr && nameKeys[sp.key]:
		if ev != nil && ev.sheet != nil {
			for _, q := range ev.sheet.Quantities() {
				if !strings.Contains(q.Name, "[") {
					add(q.Name, protocol.CompletionItemKindVariable, ev.result.Display(q), "")
				}
			}
		}
	case sp.inStr && valueLists[sp.key] != nil:
		for _, v := range valueLists[sp.key] {
			add(v, protocol.CompletionItemKindEnumMember, "", "")
		}
	case sp.inStr && sp.key == "show":
		for _, u := range units.KnownUnits() {
			add(u, protocol.CompletionItemKindUnit, "", "")
		}
	}
	return list
}

// completeNames offers the quantities and chains a formula at the spot can name, each by
// the shortest name that reaches it from there, with its current value.
func (d *document) completeNames(ev *evaluation, sp spot, pre string, add func(string, protocol.CompletionItemKind, string, string)) {
	if ev == nil || ev.sheet == nil {
		return
	}
	group := sp.group()
	if q := scopeQuantity(ev, d.name, sp); q != nil {
		group = q.Group
	}
	short := func(full string) string {
		i := strings.LastIndex(full, ".")
		if i < 0 {
			return full
		}
		if r, ok := ev.sheet.Resolve(full[i+1:], group); ok && r == full {
			return full[i+1:]
		}
		return full
	}
	dotted := strings.Contains(pre, ".")
	for _, q := range ev.sheet.Quantities() {
		if strings.Contains(q.Name, "[") {
			continue
		}
		label := q.Name
		if !dotted {
			label = short(q.Name)
		}
		add(label, protocol.CompletionItemKindVariable, ev.result.Display(q), "")
	}
	for _, c := range ev.sheet.Chains() {
		label := c.Name
		if !dotted {
			label = short(c.Name)
		}
		add(label, protocol.CompletionItemKindStruct, "chain of "+strconv.Itoa(len(c.Stages))+" stages", "")
	}
}

func sortedKeys(m map[string]string) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
