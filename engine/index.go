package engine

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// keyPos is where a key and its value stand in the source. Ends are exclusive: the position
// just after the last character of the key or value.
type keyPos struct {
	Key, KeyEnd Pos   // the key as written (for a table header, the whole [header])
	Val, ValEnd Pos   // the value as written, quotes and brackets included
	Content     Pos   // for a string value, its first character after the quotes
	Inline      bool  // the value is an inline table { ... }
	str         int32 // for a string value, 1 + its index in posIndex.strs; 0 otherwise
}

// strVal is a string value as decoded, with the map back to the raw text.
type strVal struct {
	Text string // the value as decoded
	base int    // the raw byte offset of the content's first character
	segs []strSeg
}

// strSeg maps decoded bytes of a string value back to raw bytes of the file. A segment covers
// the decoded bytes from dec up to the next segment's dec. A plain segment maps them one to
// one from raw; an escape segment (esc > 0: the escape's raw length, line continuations
// included) maps them all to the escape as a whole. A string without escapes has no segments:
// decoded byte i is raw byte base+i.
type strSeg struct {
	dec, raw, esc int
}

// rawStart returns the raw byte offset where decoded byte d of the string value begins.
func (sv *strVal) rawStart(d int) int {
	if sv.segs == nil {
		return sv.base + d
	}
	sg := sv.segs[sv.seg(d)]
	if sg.esc > 0 {
		return sg.raw
	}
	return sg.raw + d - sg.dec
}

// rawEnd returns the raw byte offset just after decoded byte d-1 of the string value.
func (sv *strVal) rawEnd(d int) int {
	if d <= 0 {
		return sv.rawStart(0)
	}
	if sv.segs == nil {
		return sv.base + d
	}
	sg := sv.segs[sv.seg(d-1)]
	if sg.esc > 0 {
		return sg.raw + sg.esc
	}
	return sg.raw + d - sg.dec
}

// seg returns the index of the last segment starting at or before decoded byte d.
func (sv *strVal) seg(d int) int {
	lo, hi := 0, len(sv.segs) // invariant: segs[lo].dec <= d (segs[0].dec == 0), answer < hi
	for hi-lo > 1 {
		m := (lo + hi) / 2
		if sv.segs[m].dec <= d {
			lo = m
		} else {
			hi = m
		}
	}
	return lo
}

// posIndex maps key paths to their positions, and remembers the order keys appear in.
// A path is written as its keys joined by "." with array elements as "[n]"
// ("tx.power.is", "rx.chain[1].gain", "require[0].that"); a key that is not bare
// (letters, digits, _ and -) has its \ . [ ] and " escaped with \ (see escapeKey), so the
// quoted key "q.r" in [g] is g.q\.r and cannot collide with r in [g.q], g.q.r. For bare
// keys a path is the plain dotted path.
// BurntSushi/toml decodes values but keeps key positions private; this small scanner
// recovers them. It never fails: on text it does not understand it stops, and the
// decoder reports the syntax error.
type posIndex struct {
	pos   map[string]int32 // path -> index in kps (a small map value keeps the map cheap to build)
	kps   chunked[keyPos]
	order []string
	first map[string]Pos  // where each path prefix first appears, for tables implied by [a.b] or [[a.c]]
	strs  chunked[strVal] // the string values, as decoded
}

// str returns the decoded text of a string value, and false when the value is not a string.
func (ix *posIndex) str(kp keyPos) (*strVal, bool) {
	if kp.str <= 0 || int(kp.str) > ix.strs.n {
		return nil, false
	}
	return ix.strs.at(kp.str - 1), true
}

// chunked is a list that grows by fixed chunks, so that adding to it never copies what it holds.
type chunked[T any] struct {
	chunks [][]T
	n      int
}

const chunkLen = 256

func (c *chunked[T]) add(v T) int32 {
	if c.n%chunkLen == 0 {
		c.chunks = append(c.chunks, make([]T, 0, chunkLen))
	}
	last := &c.chunks[len(c.chunks)-1]
	*last = append(*last, v)
	c.n++
	return int32(c.n - 1)
}

func (c *chunked[T]) at(i int32) *T { return &c.chunks[i/chunkLen][i%chunkLen] }

// share appends a full chunk of another index to c as it is, its capacity cut so that
// nothing is ever appended into the other index's storage.
func (c *chunked[T]) share(chunk []T) {
	c.chunks = append(c.chunks, chunk[:len(chunk):len(chunk)])
	c.n += len(chunk)
}

// get returns the positions of the key at path (in the escaped form keyJoin builds).
func (ix *posIndex) get(path string) (keyPos, bool) {
	i, ok := ix.pos[path]
	if !ok {
		return keyPos{}, false
	}
	return *ix.kps.at(i), true
}

// lookup returns the positions of the key reached by the given decoded keys, in order; an
// element of an array is a key "[n]" (n in decimal) following the array's key.
func (ix *posIndex) lookup(keys ...string) (keyPos, bool) {
	return ix.get(keyPath(keys...))
}

// keyPath joins decoded keys into an index path; "[n]" stands for an element of an array.
func keyPath(keys ...string) string {
	var b strings.Builder
	for _, k := range keys {
		if isIndex(k) && b.Len() > 0 {
			b.WriteString(k)
			continue
		}
		if b.Len() > 0 {
			b.WriteByte('.')
		}
		b.WriteString(escapeKey(k))
	}
	return b.String()
}

func isIndex(k string) bool {
	if len(k) < 3 || k[0] != '[' || k[len(k)-1] != ']' {
		return false
	}
	_, err := strconv.Atoi(k[1 : len(k)-1])
	return err == nil
}

// keyJoin appends one decoded key to an index path.
func keyJoin(path, key string) string {
	return join(path, escapeKey(key))
}

// escapeKey writes a decoded key as one element of an index path: a bare key as it is, the
// empty key as "", any other with \ . [ ] and " escaped by \.
func escapeKey(k string) string {
	if k == "" {
		return `""`
	}
	bare := true
	for i := 0; i < len(k) && bare; i++ {
		bare = isBareKey(k[i])
	}
	if bare {
		return k
	}
	var b strings.Builder
	for i := 0; i < len(k); i++ {
		switch c := k[i]; c {
		case '\\', '.', '[', ']', '"':
			b.WriteByte('\\')
			b.WriteByte(c)
		default:
			b.WriteByte(c)
		}
	}
	return b.String()
}

// parentPath returns the path one step up (the table or array holding path), and false at the top.
func parentPath(path string) (string, bool) {
	cut := -1
	for i := 0; i < len(path); i++ {
		switch path[i] {
		case '\\':
			i++
		case '.', '[':
			cut = i
		}
	}
	if cut <= 0 {
		return "", false
	}
	return path[:cut], true
}

// keyPathOf converts a dotted key as TOML writes it (`a."b.c"`, as the decoder's messages quote
// keys) into an index path.
func keyPathOf(tomlKey string) string {
	s := &tomlScanner{src: tomlKey, line: 1, col: 1}
	parts, ok := s.key()
	if !ok || s.i != len(tomlKey) {
		return tomlKey
	}
	return keyPath(parts...)
}

// advance returns the position of byte offset target of src, counting from p (which must lie
// at or before it).
func advance(p Pos, src string, target int) Pos {
	target = min(target, len(src))
	for p.Byte < target {
		r, n := utf8.DecodeRuneInString(src[p.Byte:])
		p.Byte += n
		if r == '\n' {
			p.Line, p.Col = p.Line+1, 1
		} else {
			p.Col++
		}
	}
	return p
}

// posOfByte returns the position of a byte offset of src.
func posOfByte(src string, off int) Pos {
	return advance(Pos{Line: 1, Col: 1}, src, off)
}

type tomlScanner struct {
	src       string
	i         int
	line, col int
	ix        *posIndex
	arrays    map[string]int // array-of-tables path -> count so far
	parts     []string       // key's result, reused from key to key
	last      string         // the path added last
}

func indexTOML(src string) *posIndex {
	// Worksheets hold about one key a line, and implied tables are a few in a hundred keys:
	// sizing the maps from the line count spares their growth, which rehashed 134,000 paths
	// several times over on a 100,000-quantity sheet.
	lines := strings.Count(src, "\n") + 1
	keys := lines + lines/8
	ix := &posIndex{pos: make(map[string]int32, keys), first: make(map[string]Pos, keys/8), order: make([]string, 0, keys)}
	s := &tomlScanner{src: src, line: 1, col: 1, ix: ix, arrays: map[string]int{}}
	defer func() { _ = recover() }() // a scanner bug must never take the loader down
	s.document()
	return s.ix
}

func (s *tomlScanner) here() Pos { return Pos{Line: s.line, Col: s.col, Byte: s.i} }

func (s *tomlScanner) peek() byte {
	if s.i < len(s.src) {
		return s.src[s.i]
	}
	return 0
}

func (s *tomlScanner) adv() {
	if s.i >= len(s.src) {
		return
	}
	if c := s.src[s.i]; c < utf8.RuneSelf && c != '\n' {
		s.i++
		s.col++
		return
	}
	r, n := utf8.DecodeRuneInString(s.src[s.i:])
	s.i += n
	if r == '\n' {
		s.line, s.col = s.line+1, 1
	} else {
		s.col++
	}
}

func (s *tomlScanner) skipSpace(newlines bool) {
	for s.i < len(s.src) {
		switch c := s.peek(); {
		case c == ' ' || c == '\t' || c == '\r':
			s.adv()
		case c == '\n' && newlines:
			s.adv()
		case c == '#':
			for s.i < len(s.src) && s.peek() != '\n' {
				s.adv()
			}
		default:
			return
		}
	}
}

// add records a key's positions unless the path is already known (the first definition
// wins; the decoder reports the second), and returns its place in kps.
func (s *tomlScanner) add(path string, kp keyPos) (int32, bool) {
	if i, dup := s.ix.pos[path]; dup {
		return i, false
	}
	at := s.ix.kps.add(kp)
	s.ix.pos[path] = at
	s.ix.order = append(s.ix.order, path)
	// The prefixes this path shares with the one added before it were recorded with that one
	// (or earlier), so only the prefixes past the shared part are looked up.
	shared := commonPrefix(path, s.last)
	s.last = path
	for i := 1; i < len(path); i++ {
		switch path[i] {
		case '\\':
			i++
		case '.', '[':
			if i < shared {
				continue
			}
			if _, seen := s.ix.first[path[:i]]; !seen {
				s.ix.first[path[:i]] = kp.Key
			}
		}
	}
	return at, true
}

// commonPrefix returns the length of the longest common prefix of a and b.
func commonPrefix(a, b string) int {
	n := min(len(a), len(b))
	for i := 0; i < n; i++ {
		if a[i] != b[i] {
			return i
		}
	}
	return n
}

// setValEnd records where a table or array value added before its contents ends.
func (s *tomlScanner) setValEnd(path string, end Pos) {
	if i, ok := s.ix.pos[path]; ok {
		kp := s.ix.kps.at(i)
		if kp.KeyEnd == kp.Key { // an element of an array has no key: its value stands for it
			kp.KeyEnd = end
		}
		kp.ValEnd = end
	}
}

func (s *tomlScanner) document() {
	table := ""
	for {
		s.skipSpace(true)
		if s.i >= len(s.src) {
			return
		}
		if s.peek() == '[' {
			start := s.here()
			s.adv()
			array := s.peek() == '['
			if array {
				s.adv()
			}
			s.skipSpace(false)
			keys, ok := s.key()
			if !ok {
				return
			}
			s.skipSpace(false)
			for s.i < len(s.src) && s.peek() == ']' {
				s.adv()
			}
			table = s.resolve(keys)
			if array {
				n := s.arrays[table]
				s.arrays[table] = n + 1
				table += "[" + strconv.Itoa(n) + "]"
			}
			end := s.here()
			s.add(table, keyPos{Key: start, KeyEnd: end, Val: start, ValEnd: end})
			continue
		}
		if !s.keyValue(table) {
			return
		}
	}
}

// resolve maps a table header's keys through the arrays of tables seen so far, so that
// [rx.chain.extra] after [[rx.chain]] lands in the last element.
func (s *tomlScanner) resolve(keys []string) string {
	out := ""
	for i, k := range keys {
		out = keyJoin(out, k)
		if n, ok := s.arrays[out]; ok && i < len(keys)-1 {
			out += "[" + strconv.Itoa(n-1) + "]"
		}
	}
	return out
}

func join(prefix, key string) string {
	if prefix == "" {
		return key
	}
	return prefix + "." + key
}

func (s *tomlScanner) keyValue(prefix string) bool {
	kpos := s.here()
	keys, ok := s.key()
	if !ok {
		return false
	}
	kend := s.here()
	s.skipSpace(false)
	if s.peek() != '=' {
		return false
	}
	s.adv()
	s.skipSpace(false)
	path := prefix
	for _, k := range keys {
		path = keyJoin(path, k)
	}
	return s.value(path, kpos, kend)
}

func (s *tomlScanner) value(path string, kpos, kend Pos) bool {
	vpos := s.here()
	switch c := s.peek(); c {
	case '"', '\'':
		kp := keyPos{Key: kpos, KeyEnd: kend, Val: vpos}
		var sv strVal
		kp.Content, sv.Text, sv.segs = s.str()
		sv.base = kp.Content.Byte
		kp.ValEnd = s.here()
		if kend == kpos { // an element of an array has no key: its value stands for it
			kp.KeyEnd = kp.ValEnd
		}
		if i, added := s.add(path, kp); added {
			s.ix.kps.at(i).str = s.ix.strs.add(sv) + 1
		}
	case '{':
		s.add(path, keyPos{Key: kpos, KeyEnd: kend, Val: vpos, Inline: true})
		s.adv()
		for {
			s.skipSpace(false)
			if s.peek() == '}' {
				s.adv()
				break
			}
			if !s.keyValue(path) {
				return false
			}
			s.skipSpace(false)
			if s.peek() == ',' {
				s.adv()
			}
		}
		s.setValEnd(path, s.here())
	case '[':
		s.add(path, keyPos{Key: kpos, KeyEnd: kend, Val: vpos})
		s.adv()
		for n := 0; ; n++ {
			s.skipSpace(true)
			if s.peek() == ']' {
				s.adv()
				break
			}
			el := s.here()
			if s.i >= len(s.src) || !s.value(path+"["+strconv.Itoa(n)+"]", el, el) {
				return false
			}
			s.skipSpace(true)
			if s.peek() == ',' {
				s.adv()
			}
		}
		s.setValEnd(path, s.here())
	default:
		start := s.i
		for s.i < len(s.src) && !strings.ContainsRune(",]}\n#", rune(s.peek())) {
			s.adv()
		}
		if s.i == start {
			return false // no value here ("[1, }"): stop rather than loop on the same character
		}
		end := s.here()
		for end.Byte > start && strings.IndexByte(" \t\r", s.src[end.Byte-1]) >= 0 {
			end.Byte, end.Col = end.Byte-1, end.Col-1 // trailing blanks are one byte, one column each
		}
		if kend == kpos {
			kend = end
		}
		s.add(path, keyPos{Key: kpos, KeyEnd: kend, Val: vpos, ValEnd: end, Content: vpos})
	}
	return true
}

// str reads a string (basic or literal, one line or multi-line) and returns where its content
// starts, its decoded text and, when decoding changed anything but the quotes, the map from
// decoded to raw offsets. It decodes as TOML does: escapes (\t \"
// \\ \e \xHH \uHHHH \UHHHHHHHH ...) in basic strings, a line-ending \ in a multi-line basic
// string dropping the line break and the blanks after it, up to two quotes just before a
// multi-line string's closing quotes belonging to its content.
func (s *tomlScanner) str() (content Pos, text string, segs []strSeg) {
	q := s.peek()
	triple := s.three(q)
	n := 1
	if triple {
		n = 3
	}
	for k := 0; k < n; k++ {
		s.adv()
	}
	if triple && strings.HasPrefix(s.src[s.i:], "\r\n") {
		s.adv()
	}
	if triple && s.peek() == '\n' { // a newline right after the opening quotes is trimmed
		s.adv()
	}
	content = s.here()
	var buf []byte // the decoded text, once an escape has made it differ from the raw text
	flushed := s.i // raw text before this is in buf
	finish := func(end int) (Pos, string, []strSeg) {
		if segs == nil {
			return content, s.src[content.Byte:end], nil
		}
		buf = append(buf, s.src[flushed:end]...)
		return content, string(buf), segs
	}
	for s.i < len(s.src) {
		c := s.peek()
		if c == '\\' && q == '"' {
			at := s.i
			if segs == nil {
				segs = []strSeg{{dec: 0, raw: content.Byte}}
			}
			buf = append(buf, s.src[flushed:at]...)
			dec := len(buf)
			buf = s.escape(buf, triple)
			segs = append(segs, strSeg{dec: dec, raw: at, esc: s.i - at}, strSeg{dec: len(buf), raw: s.i})
			flushed = s.i
			continue
		}
		if c == '\n' && !triple {
			return finish(s.i)
		}
		if c == q && (!triple || s.three(q)) {
			run := 0
			for s.i+run < len(s.src) && s.src[s.i+run] == q {
				run++
			}
			if !triple {
				run = 1
			}
			end := s.i + run - n
			for k := 0; k < run; k++ {
				s.adv()
			}
			return finish(end)
		}
		s.adv()
	}
	return finish(s.i)
}

// three reports whether the text at the scanner is the quote q three times.
func (s *tomlScanner) three(q byte) bool {
	return len(s.src)-s.i >= 3 && s.src[s.i] == q && s.src[s.i+1] == q && s.src[s.i+2] == q
}

// escape reads one escape of a basic string (at the backslash), appends what it stands for
// to buf and returns buf. A line-ending backslash in a multi-line string stands for nothing.
func (s *tomlScanner) escape(buf []byte, triple bool) []byte {
	s.adv() // the backslash
	if triple {
		j := s.i
		for j < len(s.src) && strings.IndexByte(" \t\r\n", s.src[j]) >= 0 {
			j++
		}
		if strings.Contains(s.src[s.i:j], "\n") {
			for s.i < j {
				s.adv()
			}
			return buf
		}
	}
	c := s.peek()
	s.adv()
	digits := 0
	switch c {
	case 'b':
		return append(buf, '\b')
	case 't':
		return append(buf, '\t')
	case 'n':
		return append(buf, '\n')
	case 'f':
		return append(buf, '\f')
	case 'r':
		return append(buf, '\r')
	case 'e':
		return append(buf, 0x1b)
	case 'x':
		digits = 2
	case 'u':
		digits = 4
	case 'U':
		digits = 8
	default: // \" and \\ stand for themselves; anything else is not an escape, and the decoder reports it
		return append(buf, c)
	}
	end := min(s.i+digits, len(s.src))
	v, err := strconv.ParseUint(s.src[s.i:end], 16, 32)
	for s.i < end {
		s.adv()
	}
	if err != nil || !utf8.ValidRune(rune(v)) {
		return utf8.AppendRune(buf, utf8.RuneError)
	}
	return utf8.AppendRune(buf, rune(v))
}

// key reads a dotted key of bare and quoted parts and returns the parts decoded, in a slice
// that the next call reuses.
func (s *tomlScanner) key() ([]string, bool) {
	parts := s.parts[:0]
	defer func() { s.parts = parts[:0] }()
	for {
		s.skipSpace(false)
		switch c := s.peek(); {
		case c == '"' || c == '\'':
			_, text, _ := s.str()
			parts = append(parts, text)
		case isBareKey(c):
			start := s.i
			for s.i < len(s.src) && isBareKey(s.peek()) {
				s.adv()
			}
			parts = append(parts, s.src[start:s.i])
		default:
			return nil, false
		}
		save, line, col := s.i, s.line, s.col
		s.skipSpace(false)
		if s.peek() != '.' {
			s.i, s.line, s.col = save, line, col // the key ends at its last character, not after the blanks
			return parts, true
		}
		s.adv()
	}
}

func isBareKey(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_' || c == '-'
}

// tomlErrorPos places a decoder syntax error given as a line, a byte offset and a length. The
// byte offset decides (columns then count characters); the decoder counts a newline it stopped
// at as the start of the next line, so the offset may fall on the line before. When the offset
// does not fit the line at all, the error is placed at the start of the line.
func tomlErrorPos(src string, line, start, n int) (Pos, Pos) {
	if start >= 0 && start <= len(src) {
		if p := posOfByte(src, start); p.Line == line || p.Line == line-1 {
			return p, advance(p, src, start+n)
		}
	}
	p := Pos{Line: 1, Col: 1}
	for p.Line < line {
		i := strings.IndexByte(src[p.Byte:], '\n')
		if i < 0 {
			break
		}
		p = Pos{Line: p.Line + 1, Col: 1, Byte: p.Byte + i + 1}
	}
	return p, p
}
