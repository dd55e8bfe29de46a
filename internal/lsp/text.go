package lsp

import (
	"strings"
	"unicode/utf8"

	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/engine"
)

// text is a document's content with the byte offset of each line's start. LSP positions are
// a 0-based line and a column in UTF-16 code units; the engine's are a 1-based line and a
// column in characters; both convert through the line's text.
type text struct {
	s     string
	lines []int // byte offset where each line starts; lines[0] == 0
	// marks holds, for each line longer than markStep bytes, a mark every markStep bytes or
	// so, so that a column on it is found from the mark before it: a hostile file of 100,000
	// diagnostics on one 1 MB line otherwise walks the line from its start for each.
	marks map[int][]mark
}

// mark is a place on a long line: its byte offset (a character's start) in the line, and
// the characters and UTF-16 code units before it.
type mark struct{ b, chars, units int }

const markStep = 1024

func newText(s string) text {
	t := text{s: s, lines: []int{0}}
	for i := 0; i < len(s); i++ {
		if s[i] == '\n' {
			t.lines = append(t.lines, i+1)
		}
	}
	for i := range t.lines {
		if l, _ := t.line(i); len(l) > markStep {
			if t.marks == nil {
				t.marks = map[int][]mark{}
			}
			t.marks[i] = lineMarks(l)
		}
	}
	return t
}

func lineMarks(l string) []mark {
	ms := []mark{{}}
	m := mark{}
	for b, r := range l {
		if b-ms[len(ms)-1].b >= markStep {
			m.b = b
			ms = append(ms, m)
		}
		m.chars++
		m.units += utf16Len(r)
	}
	return ms
}

// from returns the last mark of line i for which before holds (the line's start when it
// has no marks or none holds).
func (t text) from(i int, before func(mark) bool) mark {
	ms := t.marks[i]
	lo, hi := 0, len(ms) // the first mark for which before fails
	for lo < hi {
		mid := (lo + hi) / 2
		if before(ms[mid]) {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	if lo == 0 {
		return mark{}
	}
	return ms[lo-1]
}

// unitsTo returns the UTF-16 code units of l[:b], l being line i.
func (t text) unitsTo(i int, l string, b int) int {
	m := t.from(i, func(m mark) bool { return m.b <= b })
	return m.units + utf16Count(l[m.b:b])
}

// line returns line i (0-based) without its line ending, and its start offset.
func (t text) line(i int) (string, int) {
	if i < 0 || i >= len(t.lines) {
		return "", len(t.s)
	}
	start, end := t.lines[i], len(t.s)
	if i+1 < len(t.lines) {
		end = t.lines[i+1] - 1
	}
	return strings.TrimSuffix(t.s[start:end], "\r"), start
}

// offset returns the byte offset of an LSP position, clamped into the document (a line past
// the end is the end; a column past the line's end is the line's end).
func (t text) offset(p protocol.Position) int {
	if int(p.Line) >= len(t.lines) {
		return len(t.s)
	}
	l, start := t.line(int(p.Line))
	units := int(p.Character)
	m := t.from(int(p.Line), func(m mark) bool { return m.units <= units })
	units -= m.units
	for i, r := range l[m.b:] {
		if units <= 0 {
			return start + m.b + i
		}
		units -= utf16Len(r)
	}
	return start + len(l)
}

// position returns the LSP position of a byte offset (clamped into the document; an offset
// inside a character is moved to its start).
func (t text) position(off int) protocol.Position {
	off = min(max(off, 0), len(t.s))
	i := lineOf(t.lines, off)
	l, start := t.line(i)
	col := min(off-start, len(l))
	for col > 0 && col < len(l) && !utf8.RuneStart(l[col]) {
		col--
	}
	return protocol.Position{Line: uint32(i), Character: uint32(t.unitsTo(i, l, col))}
}

// lineOf returns the index of the line holding byte offset off.
func lineOf(lines []int, off int) int {
	lo, hi := 0, len(lines)-1
	for lo < hi {
		mid := (lo + hi + 1) / 2
		if lines[mid] <= off {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	return lo
}

// enginePos converts a worksheet position (1-based line, column in characters) to an LSP
// position in this text. The zero Pos is the document's start.
func (t text) enginePos(p engine.Pos) protocol.Position {
	if p.Line < 1 {
		return protocol.Position{}
	}
	if p.Line > len(t.lines) {
		return t.position(len(t.s))
	}
	l, _ := t.line(p.Line - 1)
	chars := max(p.Col-1, 0)
	m := t.from(p.Line-1, func(m mark) bool { return m.chars <= chars })
	b, units := m.b, m.units
	for chars -= m.chars; chars > 0 && b < len(l); chars-- {
		r, size := utf8.DecodeRuneInString(l[b:])
		b += size
		units += utf16Len(r)
	}
	return protocol.Position{Line: uint32(p.Line - 1), Character: uint32(units)}
}

// engineRange converts a worksheet range to an LSP range. A range that is only a point
// covers the character there, so that editors have something to underline.
func (t text) engineRange(r engine.Range) protocol.Range {
	start := t.enginePos(r.Start)
	end := start
	if r.End.Line > 0 {
		end = t.enginePos(r.End)
	}
	if less(end, start) {
		end = start
	}
	if end == start {
		l, _ := t.line(int(start.Line))
		if n := t.unitsTo(int(start.Line), l, len(l)); int(start.Character) < n {
			r, _ := utf8.DecodeRuneInString(l[t.offset(start)-t.lines[start.Line]:])
			end.Character += uint32(utf16Len(r))
		}
	}
	return protocol.Range{Start: start, End: end}
}

// lineEnd returns the position at the end of line i (before its line ending).
func (t text) lineEnd(i int) protocol.Position {
	i = min(max(i, 0), len(t.lines)-1)
	l, _ := t.line(i)
	return protocol.Position{Line: uint32(i), Character: uint32(t.unitsTo(i, l, len(l)))}
}

// apply replaces the text of an LSP range (or the whole text when r is nil) and returns
// the new text, with the line shift the change makes: lines after the old range's end move
// by delta; first is the first line touched.
func (t text) apply(r *protocol.Range, repl string) (nt text, first, lastOld, delta int) {
	if r == nil {
		return newText(repl), 0, len(t.lines) - 1, strings.Count(repl, "\n") - (len(t.lines) - 1)
	}
	a, b := t.offset(r.Start), t.offset(r.End)
	if b < a {
		a, b = b, a
	}
	first, lastOld = lineOf(t.lines, a), lineOf(t.lines, b)
	delta = strings.Count(repl, "\n") - strings.Count(t.s[a:b], "\n")
	return newText(t.s[:a] + repl + t.s[b:]), first, lastOld, delta
}

func less(a, b protocol.Position) bool {
	return a.Line < b.Line || a.Line == b.Line && a.Character < b.Character
}

// utf16Len is the number of UTF-16 code units of r: two for a rune past U+FFFF.
func utf16Len(r rune) int {
	if r >= 0x10000 && r <= utf8.MaxRune {
		return 2
	}
	return 1
}

func utf16Count(s string) int {
	n := 0
	for _, r := range s {
		n += utf16Len(r)
	}
	return n
}
