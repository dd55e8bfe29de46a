package lsp

import (
	"fmt"
	"path/filepath"
	"slices"
	"sort"
	"time"

	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// document is an open worksheet: its text as the editor has it and its evaluations.
type document struct {
	uri     protocol.DocumentURI
	path    string // the file's absolute path; "" when the URI names no file
	name    string // the file's name in its folder, as the worksheet is loaded
	version int32
	text    text
	lib     *engine.Library

	dirty bool // edited since the last evaluation
	gen   int  // counts edits, so that a debounce timer knows whether it is the latest
	timer *time.Timer

	ev    *evaluation // the latest evaluation
	base  *evaluation // the latest whose load gave a sheet: the next load starts from it
	clean *evaluation // the latest without errors: where stale values come from
	moved []lineMove  // edits since base, to find its lines in today's text
	parts []string    // absolute paths of the parts the latest load read
}

// lineMove is one edit's effect on line numbers: the lines first..lastOld were replaced,
// and the lines after lastOld moved by delta.
type lineMove struct{ first, lastOld, delta int }

func newDocument(uri protocol.DocumentURI, content string, version int32) *document {
	d := &document{uri: uri, version: version, text: newText(content), path: uriPath(uri)}
	d.name = "untitled.toml"
	if d.path != "" {
		d.name = filepath.Base(d.path)
	}
	return d
}

// change applies one edit of the editor's.
func (d *document) change(r *protocol.Range, s string) {
	nt, first, lastOld, delta := d.text.apply(r, s)
	d.text = nt
	if delta != 0 || lastOld != first {
		d.moved = append(d.moved, lineMove{first, lastOld, delta})
	}
}

// mapLine follows a 0-based line of the base evaluation's text through the edits since.
func (d *document) mapLine(l int) int {
	for _, m := range d.moved {
		switch {
		case l > m.lastOld:
			l += m.delta
		case l > m.first:
			l = m.first
		}
	}
	return l
}

func (d *document) stopTimer() {
	if d.timer != nil {
		d.timer.Stop()
		d.timer = nil
	}
}

// uses reports whether the latest load of d read the file at path as a part.
func (d *document) uses(path string) bool {
	for _, p := range d.parts {
		if p == path {
			return true
		}
	}
	return false
}

// evaluation is one load and evaluation of a document.
type evaluation struct {
	sheet  *engine.Sheet // nil only when the engine failed outright
	result *engine.Result
	diags  engine.Diagnostics
	loaded bool // the load gave quantities of the document's own file, or no error at all

	indexed bool
	lines   []int                // the 1-based lines of the file that hold quantities, in order (built on first use)
	lineQs  [][]*engine.Quantity // the quantities of each of lines, in file order

	analysis *analysis.Analysis // the analyses (sensitivity), on first use
	analyzed bool
}

// evaluate loads and evaluates d as it is now, starting from its last good load.
func (s *server) evaluate(d *document) {
	d.dirty = false
	fsys, name := s.overlay(d)
	ev := &evaluation{}
	func() {
		defer func() {
			if p := recover(); p != nil {
				ev = &evaluation{diags: engine.Diagnostics{{Severity: engine.Error, Summary: fmt.Sprintf("rfledger could not evaluate this worksheet: %v", p), Range: engine.Range{File: name}}}}
			}
		}()
		opt := engine.Options{Library: s.opt.Library, FS: fsys}
		if d.base != nil {
			opt.Previous = d.base.sheet
		}
		sh, loadDiags := engine.Load(name, opt)
		var r *engine.Result
		var evalDiags engine.Diagnostics
		if d.base != nil {
			r, evalDiags = sh.EvalFrom(d.base.result)
		} else {
			r, evalDiags = sh.Eval()
		}
		all := append(append(engine.Diagnostics(nil), loadDiags...), evalDiags...)
		ev.sheet, ev.result, ev.diags = sh, r, all.Sorted()
		ev.loaded = !ev.diags.HasErrors()
		for _, q := range sh.Quantities() {
			if q.Range.File == name {
				ev.loaded = true
				break
			}
		}
	}()
	d.ev = ev
	if ev.sheet != nil && ev.loaded {
		d.base, d.moved = ev, nil
		if !ev.diags.HasErrors() {
			d.clean = ev
		}
		d.parts = d.parts[:0]
		if d.path != "" {
			for _, p := range ev.sheet.Parts {
				d.parts = append(d.parts, joinPath(d.path, p))
			}
		}
	}
}

// index builds the line index of the file's quantities.
func (ev *evaluation) index(file string) {
	if ev.indexed || ev.sheet == nil {
		return
	}
	ev.indexed = true
	// Sorted slices rather than a map: a big sheet is indexed again after every keystroke.
	var qs []*engine.Quantity
	for _, q := range ev.sheet.Quantities() {
		if q.Range.File == file && q.Range.Start.Line > 0 {
			qs = append(qs, q)
		}
	}
	sort.SliceStable(qs, func(i, j int) bool { return qs[i].Range.Start.Line < qs[j].Range.Start.Line })
	for i, q := range qs {
		if line := q.Range.Start.Line; i == 0 || line != qs[i-1].Range.Start.Line {
			ev.lines = append(ev.lines, line)
			ev.lineQs = append(ev.lineQs, qs[i:i+1:i+1])
		} else {
			last := &ev.lineQs[len(ev.lineQs)-1]
			*last = qs[i-len(*last) : i+1 : i+1]
		}
	}
}

// quantitiesAt returns the quantities whose key is on a 1-based line.
func (ev *evaluation) quantitiesAt(file string, line int) []*engine.Quantity {
	ev.index(file)
	if i, found := slices.BinarySearch(ev.lines, line); found {
		return ev.lineQs[i]
	}
	return nil
}

// analyze runs the analyses once per evaluation, with one Monte Carlo trial: the language
// server wants the sensitivities, not the tolerance spread.
func (ev *evaluation) analyze() *analysis.Analysis {
	if !ev.analyzed && ev.sheet != nil && ev.sheet.Focus != "" {
		ev.analyzed = true
		func() {
			defer func() { _ = recover() }()
			ev.analysis, _ = analysis.Analyze(ev.result, analysis.Options{Trials: 1, Workers: 1})
		}()
	}
	return ev.analysis
}
