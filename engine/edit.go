package engine

import (
	"reflect"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// A reload after an edit (watch, an editor) usually changes a value or two on lines that keep
// their keys. Decoding the whole TOML text again is then the largest single cost of loading
// a big sheet; patchDoc takes such an edit from the earlier load's decoded document instead,
// and decodes only the values that changed. Everything after decoding (positions, the model,
// the checks) runs as on any load, so the sheet is the one a full load gives.

// maxPatchedLines is the number of changed lines an edit may have to be patched in.
const maxPatchedLines = 16

// keysOnLine returns the index paths of the keys written on the given line. It looks
// through the index rather than building a map of every line: an edit asks about a line or
// two, once per reload, and a map of 10,000 lines cost more than the rest of the patch.
func (f *sheetFile) keysOnLine(line int) []string {
	var out []string
	for c, chunk := range f.ix.kps.chunks {
		for i := range chunk {
			if chunk[i].Key.Line == line {
				out = append(out, f.ix.order[c*chunkLen+i])
			}
		}
	}
	return out
}

// lineEdit is one line an edit changed: its number (from 1), the change of its length in
// bytes, whether it holds a key (false for a blank or comment line), and for one that does,
// the index path of the key whose value changed.
type lineEdit struct {
	line, delta int
	keyed       bool
	path        string
}

// patchDoc returns the decoded document of src, made from old's when src differs from old's
// text only in the values of keys that keep their place (or in comments and blank lines),
// and the lines that changed; ok is false when the edit is of another kind, and src must be
// decoded in full. When vet is not nil, each edited value is decoded only if vet passes the
// text decoded ("v = " and the value), for a caller that has not pre-scanned src.
func patchDoc(old *sheetFile, src string, vet func(text string) bool) (doc map[string]any, edits []lineEdit, ok bool) {
	if old == nil || old.doc == nil {
		return nil, nil, false
	}
	was, now := strings.Split(old.src, "\n"), strings.Split(src, "\n")
	if len(was) != len(now) {
		return nil, nil, false
	}
	var changed []int
	for i := range was {
		if was[i] != now[i] {
			if changed = append(changed, i); len(changed) > maxPatchedLines {
				return nil, nil, false
			}
		}
	}
	doc = old.doc
	copied := map[any]bool{} // maps and slices of doc already copied for this edit
	for _, i := range changed {
		e := lineEdit{line: i + 1, delta: len(now[i]) - len(was[i])}
		if blankOrComment(was[i]) && blankOrComment(now[i]) {
			if old.spanned(i + 1) {
				return nil, nil, false // a line of a multi-line value that reads like a comment
			}
			edits = append(edits, e)
			continue
		}
		path, valAt, ok := old.valueOnLine(i+1, was[i])
		if !ok || len(now[i]) < valAt || now[i][:valAt] != was[i][:valAt] {
			return nil, nil, false
		}
		e.keyed, e.path = true, path
		edits = append(edits, e)
		text := "v = " + now[i][valAt:]
		if vet != nil && !vet(text) {
			return nil, nil, false
		}
		var m map[string]any
		if _, err := toml.Decode(text, &m); err != nil {
			return nil, nil, false // a broken value: a full decode reports it where it stands
		}
		v, isValue := m["v"]
		if _, table := v.([]map[string]any); !isValue || table {
			return nil, nil, false
		}
		if doc, ok = setPath(doc, splitPath(path), v, copied); !ok {
			return nil, nil, false
		}
	}
	return doc, edits, true
}

// spanned reports whether a value written over several lines (a multi-line string or
// array) covers the given line after its first: what reads there like a comment is part of
// the value.
func (f *sheetFile) spanned(line int) bool {
	for _, chunk := range f.ix.kps.chunks {
		for i := range chunk {
			if kp := &chunk[i]; kp.Val.Line < line && kp.ValEnd.Line >= line {
				return true
			}
		}
	}
	return false
}

func blankOrComment(line string) bool {
	t := strings.TrimSpace(line)
	return t == "" || strings.HasPrefix(t, "#")
}

// valueOnLine finds the one key whose whole value is written on the given line, and returns
// its index path and the byte offset of its value in the line.
func (f *sheetFile) valueOnLine(line int, text string) (path string, at int, ok bool) {
	paths := f.keysOnLine(line)
	if len(paths) == 0 {
		return "", 0, false
	}
	top, best := "", -1
	for _, p := range paths {
		kp, _ := f.ix.get(p)
		if best < 0 || kp.Key.Col < best {
			top, best = p, kp.Key.Col
		}
	}
	for _, p := range paths {
		if p != top && !strings.HasPrefix(p, top+".") {
			return "", 0, false // two keys on one line
		}
	}
	kp, _ := f.ix.get(top)
	if kp.Val.Line != line || kp.ValEnd.Line != line || kp.Val.Col < 1 {
		return "", 0, false // a table header, or a value over several lines
	}
	at = runeOffset(text, kp.Val.Col-1)
	return top, at, at >= 0
}

// runeOffset returns the byte offset of rune n of s, or -1 past its end.
func runeOffset(s string, n int) int {
	for i := range s {
		if n == 0 {
			return i
		}
		n--
	}
	if n == 0 {
		return len(s)
	}
	return -1
}

// splitPath splits an index path into its keys, "[n]" marking an array element.
func splitPath(path string) []string {
	var out []string
	var b strings.Builder
	flush := func() {
		if b.Len() > 0 {
			out = append(out, b.String())
			b.Reset()
		}
	}
	for i := 0; i < len(path); i++ {
		switch c := path[i]; c {
		case '\\':
			if i+1 < len(path) {
				i++
				b.WriteByte(path[i])
			}
		case '.':
			flush()
		case '[':
			flush()
			j := strings.IndexByte(path[i:], ']')
			if j < 0 {
				return nil
			}
			out = append(out, path[i:i+j+1])
			i += j
		default:
			b.WriteByte(c)
		}
	}
	flush()
	if len(out) == 1 && out[0] == `""` {
		out[0] = ""
	}
	return out
}

// setPath returns doc with the value at keys replaced by v, copying the maps and slices on
// the way (the earlier load's document is shared, never changed). ok is false when the path
// does not lead to a value.
func setPath(doc map[string]any, keys []string, v any, copied map[any]bool) (map[string]any, bool) {
	if len(keys) == 0 {
		return nil, false
	}
	var set func(node any, keys []string) (any, bool)
	set = func(node any, keys []string) (any, bool) {
		if len(keys) == 0 {
			return v, true
		}
		k := keys[0]
		if strings.HasPrefix(k, "[") {
			switch s := node.(type) {
			case []map[string]any:
				n, ok := arrayIndex(k, len(s))
				if !ok {
					return nil, false
				}
				child, ok := set(s[n], keys[1:])
				cm, isMap := child.(map[string]any)
				if !ok || !isMap {
					return nil, false
				}
				c := append([]map[string]any(nil), s...)
				c[n] = cm
				return c, true
			case []any:
				n, ok := arrayIndex(k, len(s))
				if !ok {
					return nil, false
				}
				child, ok := set(s[n], keys[1:])
				if !ok {
					return nil, false
				}
				c := append([]any(nil), s...)
				c[n] = child
				return c, true
			}
			return nil, false
		}
		m, isMap := node.(map[string]any)
		if !isMap {
			return nil, false
		}
		old, exists := m[k]
		if !exists {
			return nil, false
		}
		child, ok := set(old, keys[1:])
		if !ok {
			return nil, false
		}
		c := m
		if !copied[mapID(m)] {
			c = make(map[string]any, len(m))
			for key, val := range m {
				c[key] = val
			}
			copied[mapID(c)] = true
		}
		c[k] = child
		return c, true
	}
	out, ok := set(doc, keys)
	if !ok {
		return nil, false
	}
	m, isMap := out.(map[string]any)
	return m, isMap
}

// arrayIndex reads an index path's array element key "[n]" for an array of length n.
func arrayIndex(k string, length int) (int, bool) {
	i, err := strconv.Atoi(strings.Trim(k, "[]"))
	return i, err == nil && i >= 0 && i < length
}

// mapID identifies a map, to copy each map of the document once per edit.
func mapID(m map[string]any) any { return reflect.ValueOf(m).UnsafePointer() }
