package engine

import (
	"strconv"
	"unicode/utf8"
)

// quickDecode decodes the plain TOML that worksheets are written in, about four times as fast
// as the TOML decoder and with a fraction of its garbage, and gives up (ok false) on anything
// else, which then goes to the decoder. What it accepts it decodes exactly as toml.Decode does
// (FuzzQuickDecode compares the two on any text); it accepts only:
//
//   - table headers [a.b] and [[a.b]] of bare or quoted keys, each table defined once;
//   - key = value lines with one bare or quoted key, each key defined once;
//   - one-line basic strings with the escapes \b \t \n \f \r \" \\ \uXXXX \UXXXXXXXX, and
//     one-line literal strings;
//   - decimal integers and floats without underscores, true and false;
//   - arrays of these (over several lines, comments between elements), and one-line inline
//     tables without a trailing comma;
//   - comments, blank lines, and LF or CRLF line ends.
//
// Multi-line strings, dotted keys on the left of "=", dates, hexadecimal, octal and binary
// integers, inf and nan, underscores in numbers, the TOML 1.1 escapes and inline tables, a
// byte-order mark, control characters, and every error go to the decoder, so its messages
// and its reading of the rarer forms stay the only ones.
//
// It also returns the number of values it read that are not tables or arrays: the most
// quantities the document can hold.
func quickDecode(src string) (doc map[string]any, values int, ok bool) {
	if !utf8.ValidString(src) || len(src) >= 3 && src[:3] == "\ufeff" {
		return nil, 0, false
	}
	d := quickDecoder{src: src, root: &quickTable{m: map[string]any{}}}
	if !d.document() {
		return nil, 0, false
	}
	return d.root.m, d.values, true
}

type quickDecoder struct {
	src    string
	i      int
	root   *quickTable
	keys   []string // a header's keys, reused
	values int      // values read that are not tables or arrays
}

// quickTable is a table made by a header (or implied by one): its keys and values, and the
// tables and arrays of tables among them, which later headers may open.
type quickTable struct {
	m        map[string]any
	kids     map[string]*quickTable
	arrays   map[string]*quickArray
	explicit bool // defined by its own header, not only implied by a longer one
}

type quickArray struct {
	elems []map[string]any
	last  *quickTable
}

func (d *quickDecoder) document() bool {
	t := d.root
	for {
		d.blank()
		if d.i >= len(d.src) {
			return true
		}
		switch c := d.src[d.i]; {
		case c == '\n':
			d.i++
			continue
		case c == '\r':
			if !d.lineEnd() {
				return false
			}
			continue
		case c == '#':
			if !d.comment() {
				return false
			}
			continue
		case c == '[':
			var ok bool
			if t, ok = d.header(); !ok {
				return false
			}
		default:
			key, ok := d.key()
			if !ok {
				return false
			}
			d.blank()
			if d.i >= len(d.src) || d.src[d.i] != '=' {
				return false
			}
			d.i++
			d.blank()
			if _, dup := t.m[key]; dup {
				return false
			}
			v, ok := d.value(0)
			if !ok {
				return false
			}
			t.m[key] = v
		}
		if !d.endOfLine() {
			return false
		}
	}
}

// header reads [a.b] or [[a.b]] and returns the table that the lines after it fill.
func (d *quickDecoder) header() (*quickTable, bool) {
	d.i++ // [
	array := d.i < len(d.src) && d.src[d.i] == '['
	if array {
		d.i++
	}
	keys := d.keys[:0]
	for {
		d.blank()
		k, ok := d.key()
		if !ok {
			return nil, false
		}
		keys = append(keys, k)
		d.blank()
		if d.i < len(d.src) && d.src[d.i] == '.' {
			d.i++
			continue
		}
		break
	}
	d.keys = keys
	close := "]"
	if array {
		close = "]]"
	}
	if len(d.src)-d.i < len(close) || d.src[d.i:d.i+len(close)] != close {
		return nil, false
	}
	d.i += len(close)

	t := d.root
	for _, k := range keys[:len(keys)-1] {
		switch kid, arr := t.kids[k], t.arrays[k]; {
		case kid != nil:
			t = kid
		case arr != nil:
			t = arr.last
		default:
			if _, taken := t.m[k]; taken {
				return nil, false
			}
			t = t.sub(k)
		}
	}
	k := keys[len(keys)-1]
	if array {
		arr := t.arrays[k]
		if arr == nil {
			if _, taken := t.m[k]; taken {
				return nil, false
			}
			arr = &quickArray{}
			if t.arrays == nil {
				t.arrays = map[string]*quickArray{}
			}
			t.arrays[k] = arr
		}
		el := &quickTable{m: map[string]any{}, explicit: true}
		arr.elems = append(arr.elems, el.m)
		arr.last = el
		t.m[k] = arr.elems
		return el, true
	}
	if kid := t.kids[k]; kid != nil {
		if kid.explicit {
			return nil, false // defined twice: the decoder says so
		}
		kid.explicit = true
		return kid, true
	}
	if _, taken := t.m[k]; taken {
		return nil, false
	}
	kid := t.sub(k)
	kid.explicit = true
	return kid, true
}

// sub makes the table k in t.
func (t *quickTable) sub(k string) *quickTable {
	kid := &quickTable{m: map[string]any{}}
	if t.kids == nil {
		t.kids = map[string]*quickTable{}
	}
	t.kids[k] = kid
	t.m[k] = kid.m
	return kid
}

// value reads one value; depth counts the arrays and inline tables around it.
func (d *quickDecoder) value(depth int) (any, bool) {
	if d.i >= len(d.src) || depth > 64 {
		return nil, false
	}
	switch c := d.src[d.i]; {
	case c == '"' || c == '\'':
		d.values++
		return d.str()
	case c == '[':
		return d.array(depth)
	case c == '{':
		return d.inline(depth)
	case c == 't':
		d.values++
		return d.word("true", true)
	case c == 'f':
		d.values++
		return d.word("false", false)
	default:
		d.values++
		return d.number()
	}
}

func (d *quickDecoder) word(w string, v bool) (any, bool) {
	if len(d.src)-d.i < len(w) || d.src[d.i:d.i+len(w)] != w {
		return nil, false
	}
	d.i += len(w)
	return v, d.valueEnds()
}

// valueEnds reports whether the text after a bare value may follow one.
func (d *quickDecoder) valueEnds() bool {
	if d.i >= len(d.src) {
		return true
	}
	switch d.src[d.i] {
	case ' ', '\t', '\n', '\r', '#', ',', ']', '}':
		return true
	}
	return false
}

// number reads a decimal integer or float: [+-] (0 | [1-9][0-9]*) [. [0-9]+] [(e|E) [+-] [0-9]+].
func (d *quickDecoder) number() (any, bool) {
	start := d.i
	if d.i < len(d.src) && (d.src[d.i] == '+' || d.src[d.i] == '-') {
		d.i++
	}
	intStart := d.i
	if d.digits() == 0 {
		return nil, false
	}
	if d.src[intStart] == '0' && d.i-intStart > 1 {
		return nil, false // leading zeros: the decoder says so
	}
	float := false
	if d.i < len(d.src) && d.src[d.i] == '.' {
		d.i++
		if d.digits() == 0 {
			return nil, false
		}
		float = true
	}
	if d.i < len(d.src) && (d.src[d.i] == 'e' || d.src[d.i] == 'E') {
		d.i++
		if d.i < len(d.src) && (d.src[d.i] == '+' || d.src[d.i] == '-') {
			d.i++
		}
		if d.digits() == 0 {
			return nil, false
		}
		float = true
	}
	if !d.valueEnds() {
		return nil, false
	}
	text := d.src[start:d.i]
	if float {
		f, err := strconv.ParseFloat(text, 64)
		return f, err == nil
	}
	n, err := strconv.ParseInt(text, 10, 64)
	return n, err == nil
}

func (d *quickDecoder) digits() int {
	n := 0
	for d.i < len(d.src) && d.src[d.i] >= '0' && d.src[d.i] <= '9' {
		d.i++
		n++
	}
	return n
}

// array reads [v, v, ...], over as many lines as it likes, with comments between elements.
func (d *quickDecoder) array(depth int) (any, bool) {
	d.i++ // [
	out := []any{}
	for {
		if !d.gap() {
			return nil, false
		}
		if d.i >= len(d.src) {
			return nil, false
		}
		if d.src[d.i] == ']' {
			d.i++
			return out, true
		}
		v, ok := d.value(depth + 1)
		if !ok {
			return nil, false
		}
		out = append(out, v)
		if !d.gap() || d.i >= len(d.src) {
			return nil, false
		}
		switch d.src[d.i] {
		case ',':
			d.i++
		case ']':
			d.i++
			return out, true
		default:
			return nil, false
		}
	}
}

// inline reads { k = v, ... } on one line, without a trailing comma.
func (d *quickDecoder) inline(depth int) (any, bool) {
	d.i++ // {
	m := map[string]any{}
	d.blank()
	if d.i < len(d.src) && d.src[d.i] == '}' {
		d.i++
		return m, true
	}
	for {
		d.blank()
		k, ok := d.key()
		if !ok {
			return nil, false
		}
		d.blank()
		if d.i >= len(d.src) || d.src[d.i] != '=' {
			return nil, false
		}
		d.i++
		d.blank()
		if _, dup := m[k]; dup {
			return nil, false
		}
		v, ok := d.value(depth + 1)
		if !ok {
			return nil, false
		}
		m[k] = v
		d.blank()
		if d.i >= len(d.src) {
			return nil, false
		}
		switch d.src[d.i] {
		case ',':
			d.i++
		case '}':
			d.i++
			return m, true
		default:
			return nil, false
		}
	}
}

// key reads one bare or quoted key.
func (d *quickDecoder) key() (string, bool) {
	if d.i >= len(d.src) {
		return "", false
	}
	if c := d.src[d.i]; c == '"' || c == '\'' {
		v, ok := d.str()
		s, _ := v.(string)
		return s, ok
	}
	start := d.i
	for d.i < len(d.src) && isBareKey(d.src[d.i]) {
		d.i++
	}
	return d.src[start:d.i], d.i > start
}

// str reads a one-line basic or literal string; a multi-line one is left to the decoder.
func (d *quickDecoder) str() (any, bool) {
	q := d.src[d.i]
	if len(d.src)-d.i >= 3 && d.src[d.i+1] == q && d.src[d.i+2] == q {
		return nil, false
	}
	d.i++
	start := d.i
	var buf []byte // the decoded text, once an escape made it differ from the raw text
	flushed := start
	for d.i < len(d.src) {
		c := d.src[d.i]
		switch {
		case c == q:
			text := d.src[start:d.i]
			if buf != nil {
				text = string(append(buf, d.src[flushed:d.i]...))
			}
			d.i++
			return text, true
		case c == '\\' && q == '"':
			buf = append(buf, d.src[flushed:d.i]...)
			var ok bool
			if buf, ok = d.escape(buf); !ok {
				return nil, false
			}
			flushed = d.i
		case c < 0x20 && c != '\t' || c == 0x7f:
			return nil, false // a line end or a control character
		default:
			d.i++
		}
	}
	return nil, false
}

// escape reads one escape of a basic string at its backslash and appends what it stands for.
func (d *quickDecoder) escape(buf []byte) ([]byte, bool) {
	if len(d.src)-d.i < 2 {
		return nil, false
	}
	c := d.src[d.i+1]
	d.i += 2
	switch c {
	case 'b':
		return append(buf, '\b'), true
	case 't':
		return append(buf, '\t'), true
	case 'n':
		return append(buf, '\n'), true
	case 'f':
		return append(buf, '\f'), true
	case 'r':
		return append(buf, '\r'), true
	case '"', '\\':
		return append(buf, c), true
	case 'u', 'U':
		n := 4
		if c == 'U' {
			n = 8
		}
		if len(d.src)-d.i < n {
			return nil, false
		}
		for _, h := range []byte(d.src[d.i : d.i+n]) {
			if !(h >= '0' && h <= '9' || h >= 'a' && h <= 'f' || h >= 'A' && h <= 'F') {
				return nil, false
			}
		}
		v, err := strconv.ParseUint(d.src[d.i:d.i+n], 16, 32)
		if err != nil || !utf8.ValidRune(rune(v)) {
			return nil, false
		}
		d.i += n
		return utf8.AppendRune(buf, rune(v)), true
	}
	return nil, false
}

// blank skips spaces and tabs.
func (d *quickDecoder) blank() {
	for d.i < len(d.src) && (d.src[d.i] == ' ' || d.src[d.i] == '\t') {
		d.i++
	}
}

// comment skips a comment up to its line end, refusing control characters in it.
func (d *quickDecoder) comment() bool {
	for d.i < len(d.src) {
		c := d.src[d.i]
		if c == '\n' || c == '\r' {
			return true
		}
		if c < 0x20 && c != '\t' || c == 0x7f {
			return false
		}
		d.i++
	}
	return true
}

// lineEnd reads LF or CRLF.
func (d *quickDecoder) lineEnd() bool {
	switch {
	case d.i < len(d.src) && d.src[d.i] == '\n':
		d.i++
		return true
	case len(d.src)-d.i >= 2 && d.src[d.i] == '\r' && d.src[d.i+1] == '\n':
		d.i += 2
		return true
	}
	return false
}

// endOfLine reads what may follow a header or a value on its line: blanks, a comment, the
// line end or the end of the text.
func (d *quickDecoder) endOfLine() bool {
	d.blank()
	if d.i < len(d.src) && d.src[d.i] == '#' && !d.comment() {
		return false
	}
	return d.i >= len(d.src) || d.lineEnd()
}

// gap skips what may stand between an array's elements: blanks, line ends and comments.
func (d *quickDecoder) gap() bool {
	for d.i < len(d.src) {
		switch d.src[d.i] {
		case ' ', '\t':
			d.i++
		case '\n', '\r':
			if !d.lineEnd() {
				return false
			}
		case '#':
			if !d.comment() {
				return false
			}
		default:
			return true
		}
	}
	return true
}
