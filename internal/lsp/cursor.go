package lsp

import (
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// spot is what stands at a place of the document, read from the text around it (the text
// may be half typed, so nothing here relies on the worksheet loading).
type spot struct {
	line     string // the line's text
	lineNo   int    // 0-based
	lineOff  int    // byte offset of the line's start in the document
	col      int    // byte offset of the place in the line
	comment  bool   // after a # outside strings
	inStr    bool   // inside a quoted string
	strStart int    // where the string's content starts in the line
	key      string // the key whose value holds the place ("is", "that", "vary", "power", ...)
	keyPos   bool   // where a key is written: before the '=' of its entry
	inline   bool   // inside an inline table { ... }
	formula  bool   // inside a formula: a string starting with "=", or a requirement's that
	header   string // the table header above: "rx" for [rx], "rx.chain" for [[rx.chain]]
	array    bool   // the header is an array of tables [[...]]
	onHeader bool   // the place is on a header line
}

// spotAt reads the place at byte offset off of t.
func spotAt(t text, off int) spot {
	off = min(max(off, 0), len(t.s))
	n := lineOf(t.lines, off)
	l, start := t.line(n)
	sp := spot{line: l, lineNo: n, lineOff: start, col: min(off-start, len(l))}
	sp.header, sp.array, sp.onHeader = headerAbove(t, n)
	if sp.onHeader {
		return sp
	}
	var quote byte
	esc, sawEq, entry := false, false, 0
	depth := 0
	for i := 0; i < sp.col; i++ {
		c := l[i]
		if quote != 0 {
			switch {
			case esc:
				esc = false
			case c == '\\' && quote == '"':
				esc = true
			case c == quote:
				quote = 0
			}
			continue
		}
		switch c {
		case '"', '\'':
			quote, sp.strStart = c, i+1
		case '#':
			sp.comment = true
			return sp
		case '{':
			depth++
			sawEq, entry = false, i+1
		case '}':
			depth--
		case ',':
			if depth > 0 {
				sawEq, entry = false, i+1
			}
		case '=':
			if !sawEq {
				sp.key = strings.Trim(strings.TrimSpace(l[entry:i]), `"'`)
				if j := strings.LastIndex(sp.key, "."); j >= 0 {
					sp.key = sp.key[j+1:]
				}
			}
			sawEq = true
		}
	}
	sp.inStr = quote != 0
	sp.inline = depth > 0
	sp.keyPos = !sp.inStr && !sawEq
	if sp.inStr {
		content := strings.TrimLeftFunc(l[sp.strStart:sp.col], unicode.IsSpace)
		sp.formula = strings.HasPrefix(content, "=") || sp.key == "that"
	}
	return sp
}

// headerAbove finds the table header that line n belongs to.
func headerAbove(t text, n int) (name string, array, on bool) {
	for i := n; i >= 0; i-- {
		l, _ := t.line(i)
		l = strings.TrimSpace(l)
		if !strings.HasPrefix(l, "[") {
			continue
		}
		array = strings.HasPrefix(l, "[[")
		end := strings.Index(l, "]")
		if end < 0 {
			end = len(l)
		}
		name = strings.TrimSpace(strings.Trim(l[:end], "[ "))
		return name, array, i == n
	}
	return "", false, false
}

// group is the group a formula at the spot is written in: a chain stage's formulas belong to
// the chain's group, requirements, sweeps and solves to the top.
func (sp spot) group() string {
	if sp.array {
		switch sp.header {
		case "require", "sweep", "solve", "spurs", "products":
			return ""
		}
		if i := strings.LastIndex(sp.header, "."); i >= 0 {
			return sp.header[:i]
		}
		return ""
	}
	return sp.header
}

func isNameByte(c byte) bool {
	return c == '_' || c == '.' || c >= '0' && c <= '9' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z'
}

// word returns the name or number around the spot's place, and its byte span in the line.
func (sp spot) word() (string, int, int) {
	a, b := sp.col, sp.col
	for a > 0 && isNameByte(sp.line[a-1]) {
		a--
	}
	for b < len(sp.line) && isNameByte(sp.line[b]) {
		b++
	}
	return sp.line[a:b], a, b
}

// prefix returns the part of the word before the place, and where it starts.
func (sp spot) prefix() (string, int) {
	a := sp.col
	for a > 0 && isNameByte(sp.line[a-1]) {
		a--
	}
	return sp.line[a:sp.col], a
}

// calls reports whether the word ending at byte b is followed by "(": a function call.
func (sp spot) calls(b int) bool {
	rest := strings.TrimLeft(sp.line[b:], " \t")
	return strings.HasPrefix(rest, "(")
}

// afterNumber reports whether the text before byte a (spaces skipped) ends a number, so
// that a word starting at a is a unit.
func (sp spot) afterNumber(a int) bool {
	if sp.inStr && a <= sp.strStart {
		return false
	}
	j := a
	for j > sp.strStart && (sp.line[j-1] == ' ' || sp.line[j-1] == '\t') {
		j--
	}
	if j == 0 || j <= sp.strStart && sp.inStr {
		return false
	}
	i := j
	for i > 0 && (isNameByte(sp.line[i-1]) || (sp.line[i-1] == '-' || sp.line[i-1] == '+') && i > 1 && (sp.line[i-2] == 'e' || sp.line[i-2] == 'E')) {
		i--
	}
	tok := sp.line[i:j]
	return tok != "" && (tok[0] >= '0' && tok[0] <= '9' || tok[0] == '.') && units.NumberLen(tok) == len(tok)
}

// isUnitRune is what a unit symbol is written with.
func isUnitRune(r rune) bool {
	return r == '/' || r == '^' || r == '%' || r == '-' || r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r) || r == '°'
}

// unitAt returns the unit symbol written at the spot's place after a number ("dBm/Hz" in
// "-174 dBm/Hz", "dB" in "6dB"), with its byte span in the line.
func (sp spot) unitAt() (*units.Unit, string, int, int) {
	a, b := sp.col, sp.col
	for a > 0 {
		r, size := utf8.DecodeLastRuneInString(sp.line[:a])
		if !isUnitRune(r) {
			break
		}
		a -= size
	}
	for b < len(sp.line) {
		r, size := utf8.DecodeRuneInString(sp.line[b:])
		if !isUnitRune(r) {
			break
		}
		b += size
	}
	if a < sp.strStart && sp.inStr {
		a = sp.strStart
	}
	run := sp.line[a:b]
	// A number written against its unit ("6dB", "-3dBm"): the unit starts after it.
	if n := units.NumberLen(strings.TrimLeft(run, "-")); n > 0 {
		skip := n + len(run) - len(strings.TrimLeft(run, "-"))
		if skip >= len(run) || a+skip > sp.col {
			return nil, "", 0, 0
		}
		a += skip
		run = sp.line[a:b]
	} else if !sp.afterNumber(a) {
		return nil, "", 0, 0
	}
	// The longest symbol from the start that parses and covers the place: "dB-Hz" whole,
	// "dB" of "dB-x" (a subtraction written without spaces).
	for end := len(run); end > 0; end-- {
		if a+end < sp.col {
			break
		}
		if u, err := units.ParseUnit(run[:end]); err == nil {
			return u, run[:end], a, a + end
		}
	}
	return nil, "", 0, 0
}

// scopeQuantity returns the quantity a formula at the spot belongs to: one whose key is on
// the spot's line (a chain stage's value, a long form), or nil.
func scopeQuantity(ev *evaluation, file string, sp spot) *engine.Quantity {
	if ev == nil || ev.sheet == nil {
		return nil
	}
	qs := ev.quantitiesAt(file, sp.lineNo+1)
	if len(qs) == 0 {
		return nil
	}
	if len(qs) == 1 || sp.key == "" {
		return qs[0]
	}
	for _, q := range qs {
		if shortName(q) == sp.key || strings.HasSuffix(q.Name, "."+sp.key) {
			return q
		}
	}
	return qs[0]
}

// resolve finds the full name a word at the spot refers to: through the formula's own
// look-up when the spot is inside a formula, as a full name in the strings that name
// quantities (vary, so_that, focus, plot).
func resolve(ev *evaluation, file string, sp spot, word string) (string, bool) {
	if ev == nil || ev.sheet == nil || word == "" {
		return "", false
	}
	if !sp.formula {
		if _, ok := ev.sheet.Quantity(word); ok {
			return word, true
		}
		return "", false
	}
	if q := scopeQuantity(ev, file, sp); q != nil && q.Formula != "" {
		return ev.sheet.ResolveFrom(word, q)
	}
	return ev.sheet.Resolve(word, sp.group())
}
