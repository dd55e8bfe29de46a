package engine

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// keyPos is where a key and its value stand in the source. For a string value, Content is the
// position of its first character after the quotes and Multi reports a multi-line string.
type keyPos struct {
	Key, Val, Content Pos
	Multi             bool
	Inline            bool // the value is an inline table { ... }
}

// posIndex maps full key paths ("tx.power", "tx.power.is", "rx.chain[1].gain",
// "require[0].that") to their positions, and remembers the order keys appear in.
// BurntSushi/toml decodes values but keeps key positions private; this small scanner
// recovers them. It never fails: on text it does not understand it stops, and the
// decoder reports the syntax error.
type posIndex struct {
	pos   map[string]keyPos
	order []string
	first map[string]Pos // where each path prefix first appears, for tables implied by [a.b] or [[a.c]]
}

func (ix *posIndex) get(path string) (keyPos, bool) {
	p, ok := ix.pos[path]
	return p, ok
}

type tomlScanner struct {
	src       string
	i         int
	line, col int
	ix        *posIndex
	arrays    map[string]int // array-of-tables path -> count so far
}

func indexTOML(src string) *posIndex {
	s := &tomlScanner{src: src, line: 1, col: 1, ix: &posIndex{pos: map[string]keyPos{}, first: map[string]Pos{}}, arrays: map[string]int{}}
	defer func() { _ = recover() }() // a scanner bug must never take the loader down
	s.document()
	return s.ix
}

func (s *tomlScanner) here() Pos { return Pos{s.line, s.col} }

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

func (s *tomlScanner) add(path string, kp keyPos) {
	if _, dup := s.ix.pos[path]; dup {
		return
	}
	s.ix.pos[path] = kp
	s.ix.order = append(s.ix.order, path)
	for i := 1; i < len(path); i++ {
		if path[i] == '.' || path[i] == '[' {
			if _, seen := s.ix.first[path[:i]]; !seen {
				s.ix.first[path[:i]] = kp.Key
			}
		}
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
			key, ok := s.key()
			if !ok {
				return
			}
			s.skipSpace(false)
			for s.i < len(s.src) && s.peek() == ']' {
				s.adv()
			}
			if array {
				n := s.arrays[key]
				s.arrays[key] = n + 1
				table = key + "[" + strconv.Itoa(n) + "]"
			} else {
				table = s.resolve(key)
			}
			s.add(table, keyPos{Key: start, Val: start})
			continue
		}
		if !s.keyValue(table) {
			return
		}
	}
}

// resolve maps a table header path through the arrays of tables seen so far, so that
// [rx.chain.extra] after [[rx.chain]] lands in the last element.
func (s *tomlScanner) resolve(key string) string {
	parts := strings.Split(key, ".")
	out := ""
	for i, p := range parts {
		if i > 0 {
			out += "."
		}
		out += p
		if n, ok := s.arrays[out]; ok && i < len(parts)-1 {
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
	key, ok := s.key()
	if !ok {
		return false
	}
	s.skipSpace(false)
	if s.peek() != '=' {
		return false
	}
	s.adv()
	s.skipSpace(false)
	return s.value(join(prefix, key), kpos)
}

func (s *tomlScanner) value(path string, kpos Pos) bool {
	vpos := s.here()
	switch c := s.peek(); c {
	case '"', '\'':
		content, multi := s.str()
		s.add(path, keyPos{Key: kpos, Val: vpos, Content: content, Multi: multi})
	case '{':
		s.add(path, keyPos{Key: kpos, Val: vpos, Inline: true})
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
	case '[':
		s.add(path, keyPos{Key: kpos, Val: vpos})
		s.adv()
		for n := 0; ; n++ {
			s.skipSpace(true)
			if s.peek() == ']' {
				s.adv()
				break
			}
			if s.i >= len(s.src) || !s.value(path+"["+strconv.Itoa(n)+"]", s.here()) {
				return false
			}
			s.skipSpace(true)
			if s.peek() == ',' {
				s.adv()
			}
		}
	default:
		start := s.i
		s.add(path, keyPos{Key: kpos, Val: vpos, Content: vpos})
		for s.i < len(s.src) && !strings.ContainsRune(",]}\n#", rune(s.peek())) {
			s.adv()
		}
		if s.i == start {
			return false // no value here ("[1, }"): stop rather than loop on the same character
		}
	}
	return true
}

// str skips a string and returns where its content starts.
func (s *tomlScanner) str() (Pos, bool) {
	q := s.peek()
	triple := strings.HasPrefix(s.src[s.i:], strings.Repeat(string(q), 3))
	n := 1
	if triple {
		n = 3
	}
	for k := 0; k < n; k++ {
		s.adv()
	}
	if triple && s.peek() == '\n' { // a newline right after the opening quotes is trimmed
		s.adv()
	}
	content := s.here()
	for s.i < len(s.src) {
		c := s.peek()
		if c == '\\' && q == '"' {
			s.adv()
			s.adv()
			continue
		}
		if c == '\n' && !triple {
			return content, false
		}
		if c == q && (!triple || strings.HasPrefix(s.src[s.i:], strings.Repeat(string(q), 3))) {
			for k := 0; k < n; k++ {
				s.adv()
			}
			return content, triple
		}
		s.adv()
	}
	return content, triple
}

// key reads a dotted key of bare and quoted parts.
func (s *tomlScanner) key() (string, bool) {
	var parts []string
	for {
		s.skipSpace(false)
		switch c := s.peek(); {
		case c == '"' || c == '\'':
			start := s.i
			s.str()
			raw := s.src[start:s.i]
			if c == '"' {
				if u, err := strconv.Unquote(raw); err == nil {
					raw = u
				} else {
					raw = strings.Trim(raw, "\"")
				}
			} else {
				raw = strings.Trim(raw, "'")
			}
			parts = append(parts, raw)
		case isBareKey(c):
			start := s.i
			for s.i < len(s.src) && isBareKey(s.peek()) {
				s.adv()
			}
			parts = append(parts, s.src[start:s.i])
		default:
			return "", false
		}
		s.skipSpace(false)
		if s.peek() != '.' {
			return strings.Join(parts, "."), true
		}
		s.adv()
	}
}

func isBareKey(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_' || c == '-'
}
