package engine

import (
	"fmt"
	"strings"
	"unicode/utf8"
)

// Limits the pre-scan holds before a file reaches the TOML decoder. The decoder and the key
// index cost time and memory that grow faster than the file on deep nesting and many keys,
// so a file is measured in one linear pass first and refused with a positioned error.
const (
	// maxFileSize bounds the worksheet and its parts together: 100,000 quantities in long
	// form with a tolerance and a note take about 160 bytes each.
	maxFileSize = 16 << 20
	// maxNesting bounds tables, arrays and inline tables inside one another.
	maxNesting = 32
	// maxKeyLen bounds a full dotted key ("rx.chain.gain"), in bytes.
	maxKeyLen = 256
	// maxValues bounds keys, table headers and array entries together.
	maxValues = 1_000_000
	// maxTables bounds table headers ([group] and [[chain]] entries).
	maxTables = 100_000
)

// limits is what the files of one load have used so far, so that the worksheet and its
// parts together stay inside the limits.
type limits struct {
	bytes, values, quantities, tables int
}

// prescan measures one file's text in a single pass over its bytes (no recursion deeper than
// maxNesting, no allocation per key) and returns the first limit it breaks, or nil. It does
// not check the syntax: text it does not understand is skipped to the end of its line, and
// the decoder reports it.
func (lim *limits) prescan(src, file string) *Diagnostic {
	s := &prescanner{src: src, file: file, lim: lim}
	lim.bytes += len(src)
	if lim.bytes > maxFileSize {
		return &Diagnostic{Severity: Error, Summary: fmt.Sprintf("the worksheet and its parts together are larger than %d MiB, the room 100,000 quantities need", maxFileSize>>20), Hint: "use fewer or smaller parts", Range: Range{File: file}}
	}
	s.document()
	return s.err
}

type prescanner struct {
	src  string
	file string
	i    int
	lim  *limits
	err  *Diagnostic
}

func (s *prescanner) eof() bool { return s.i >= len(s.src) || s.err != nil }

func (s *prescanner) peek() byte {
	if s.i < len(s.src) {
		return s.src[s.i]
	}
	return 0
}

// fail records the first broken limit at byte offset at.
func (s *prescanner) fail(at int, hint, format string, args ...any) {
	if s.err != nil {
		return
	}
	line := 1 + strings.Count(s.src[:at], "\n")
	start := strings.LastIndexByte(s.src[:at], '\n') + 1
	p := Pos{Line: line, Col: 1 + utf8.RuneCountInString(s.src[start:at]), Byte: at}
	s.err = &Diagnostic{Severity: Error, Summary: fmt.Sprintf(format, args...), Hint: hint, Range: Range{File: s.file, Start: p, End: p}}
}

// space skips blanks and comments, and line ends when newlines is set.
func (s *prescanner) space(newlines bool) {
	for s.i < len(s.src) {
		switch s.src[s.i] {
		case ' ', '\t', '\r':
			s.i++
		case '\n':
			if !newlines {
				return
			}
			s.i++
		case '#':
			for s.i < len(s.src) && s.src[s.i] != '\n' {
				s.i++
			}
		default:
			return
		}
	}
}

// endLine skips the rest of a line after a statement; anything but a comment there is a
// syntax error the decoder reports.
func (s *prescanner) endLine() {
	s.space(false)
	for s.i < len(s.src) && s.src[s.i] != '\n' {
		s.i++
	}
}

func (s *prescanner) document() {
	depth, nameLen := 0, 0 // of the current table
	for {
		s.space(true)
		if s.eof() {
			return
		}
		if s.peek() == '[' {
			depth, nameLen = s.header()
		} else {
			s.keyValue(depth, nameLen, true)
		}
		s.endLine()
	}
}

// header reads [a.b] or [[a.b]] and returns the depth and name length of the table it opens.
func (s *prescanner) header() (int, int) {
	at := s.i
	s.i++
	array := s.peek() == '['
	if array {
		s.i++
	}
	segs, n := s.key()
	if array {
		segs++ // the array of tables holds a table per entry
	}
	s.count(at, false)
	if s.lim.tables++; s.lim.tables > maxTables {
		s.fail(at, "split the worksheet into parts", "more than %d tables", maxTables)
	}
	s.nesting(at, segs)
	s.name(at, n)
	s.space(false)
	for range 2 {
		if s.peek() == ']' {
			s.i++
		}
	}
	return segs, n
}

func (s *prescanner) nesting(at, depth int) {
	if depth > maxNesting {
		s.fail(at, "flatten the worksheet: groups, arrays and inline tables go at most that deep", "tables, arrays and inline tables nest more than %d deep", maxNesting)
	}
}

func (s *prescanner) name(at, n int) {
	if n > maxKeyLen {
		s.fail(at, "use shorter group and quantity names", "a full key name is longer than %d characters", maxKeyLen)
	}
}

func (s *prescanner) count(at int, quantity bool) {
	if s.lim.values++; s.lim.values > maxValues {
		s.fail(at, "split the worksheet into parts", "more than %d keys, tables and array entries", maxValues)
	}
	if quantity {
		if s.lim.quantities++; s.lim.quantities > MaxQuantities {
			s.fail(at, "split the worksheet into parts", "more than %d quantities", MaxQuantities)
		}
	}
}

// key reads a dotted key and returns its number of parts and its length in bytes; 0 parts
// when there is no key here.
func (s *prescanner) key() (segs, n int) {
	for !s.eof() {
		s.space(false)
		start := s.i
		switch c := s.peek(); {
		case c == '"' || c == '\'':
			s.str(start)
		default:
			for s.i < len(s.src) && isBareKey(s.src[s.i]) {
				s.i++
			}
		}
		if s.i == start {
			return segs, n
		}
		segs++
		n += s.i - start
		s.space(false)
		if s.peek() != '.' {
			return segs, n
		}
		s.i++
		n++
	}
	return segs, n
}

// keyValue reads key = value in a table (or inline table) depth deep whose name is nameLen long.
func (s *prescanner) keyValue(depth, nameLen int, quantity bool) {
	at := s.i
	segs, n := s.key()
	if segs == 0 || s.peek() != '=' {
		return
	}
	s.i++
	s.count(at, quantity)
	depth += segs - 1 // a dotted key opens a table per dot
	s.nesting(at, depth)
	nameLen += n + 1
	s.name(at, nameLen)
	s.value(depth, nameLen)
}

// value reads one value that sits in a container depth deep.
func (s *prescanner) value(depth, nameLen int) {
	s.space(false)
	at := s.i
	switch s.peek() {
	case '"', '\'':
		s.str(at)
	case '[':
		s.container(at, depth+1, nameLen, ']')
	case '{':
		s.container(at, depth+1, nameLen, '}')
	default: // a number, a date, true or false
		for s.i < len(s.src) && !strings.ContainsRune(",]}#\n", rune(s.src[s.i])) {
			s.i++
		}
	}
}

// container reads an array (end ']') or an inline table (end '}') that is depth deep.
func (s *prescanner) container(at, depth, nameLen int, end byte) {
	s.nesting(at, depth)
	s.i++
	for {
		s.space(true)
		if s.eof() {
			return
		}
		switch s.peek() {
		case end:
			s.i++
			return
		case ',':
			s.i++
			continue
		}
		before := s.i
		if end == ']' {
			s.count(before, false)
			s.value(depth, nameLen+8) // "[12345]"
		} else {
			s.keyValue(depth, nameLen, false)
		}
		if s.i == before {
			s.i++ // not a value: the decoder reports it; move on
		}
	}
}

// str skips a string that starts at s.i and checks the length of a formula ("= …"). The
// length counts characters after the "=", an escape sequence as one, as the formula
// compiler will see them.
func (s *prescanner) str(at int) {
	q := s.src[s.i]
	delim := string([]byte{q, q, q})
	multi := strings.HasPrefix(s.src[s.i:], delim)
	if multi {
		s.i += 3
	} else {
		s.i++
	}
	lead, formula, chars, length := true, false, 0, 0
	for s.i < len(s.src) {
		c := s.src[s.i]
		if c == q && (!multi || strings.HasPrefix(s.src[s.i:], delim)) {
			if multi {
				s.i += 3
				for k := 0; k < 2 && s.peek() == q; k++ { // """a"""" ends in a quote
					s.i++
				}
			} else {
				s.i++
			}
			break
		}
		if c == '\n' && !multi {
			break // not closed: the decoder reports it
		}
		switch {
		case c == '\\' && q == '"':
			s.i += 2
			if s.i-1 < len(s.src) {
				switch s.src[s.i-1] {
				case 'u':
					s.i += 4
				case 'U':
					s.i += 8
				}
			}
			s.i = min(s.i, len(s.src))
		default:
			_, w := utf8.DecodeRuneInString(s.src[s.i:])
			s.i += w
		}
		blank := c == ' ' || c == '\t' || c == '\n' || c == '\r'
		switch {
		case lead && !blank:
			lead, formula = false, c == '='
		case formula && (chars > 0 || !blank):
			chars++
			if !blank {
				length = chars
			}
		}
	}
	// A formula a little too long gets the compiler's error, which names its quantity; one
	// far too long is stopped here, before the decoder copies it.
	if formula && length > 4*maxFormulaLen {
		s.fail(at, "split it into named intermediate quantities", "formula is %d characters long; the limit is %d", length, maxFormulaLen)
	}
}
