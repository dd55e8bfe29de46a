package engine

import (
	"runtime"
	"strings"
	"sync"

	"github.com/BurntSushi/toml"
)

// decodeChunk is the smallest piece of a worksheet decoded on its own: below it the cost of
// a goroutine and a decoder outweighs what the other cores give.
const decodeChunk = 32 << 10

// decodeTOML decodes a worksheet's text as toml.Decode does, on every core for a large one.
//
// The text is cut at table headers written at the start of a line where the header's first
// key differs from the one before it ([a.b] and [a.c] stay together), and the pieces are
// decoded at once. The pieces' documents are then joined. That is the decoding of the whole
// text when no top-level key comes out of two pieces: every TOML rule (a key defined twice,
// a table extended after an inline one, an array of tables) is about one key path, and all
// of one top-level key's text is in one piece. A cut that does not fall between two tables
// (a line starting with "[" inside a multi-line string or array) leaves its piece with an
// unclosed string or array, which does not decode. So when any piece fails to decode, or a
// top-level key comes out of two pieces, the whole text is decoded in one go, and its
// errors are reported exactly as they would be without the cuts.
//
// Each piece, or the whole text, is decoded by quickDecode when it is written in the plain
// TOML that quickDecode reads, and by the TOML decoder otherwise.
//
// values is the number of values that are not tables or arrays when quickDecode read all of
// the text, and -1 when the decoder read any of it.
func decodeTOML(src string) (doc map[string]any, values int, err error) {
	cuts := decodeCuts(src, runtime.GOMAXPROCS(0), decodeChunk)
	if len(cuts) > 0 {
		if doc, values, ok := decodePieces(src, cuts); ok {
			return doc, values, nil
		}
	}
	return decodePiece(src)
}

// decodePiece decodes one piece of a worksheet: by quickDecode when it can (giving its count
// of values), else by the TOML decoder (giving -1).
func decodePiece(src string) (map[string]any, int, error) {
	if doc, n, ok := quickDecode(src); ok {
		return doc, n, nil
	}
	var doc map[string]any
	_, err := toml.Decode(src, &doc)
	return doc, -1, err
}

// decodePieces decodes src cut at cuts (byte offsets of line starts), one goroutine a piece,
// and joins the documents; ok is false when a piece does not decode or two pieces give the
// same top-level key. values is as decodeTOML's.
func decodePieces(src string, cuts []int) (map[string]any, int, bool) {
	bounds := append(append([]int{0}, cuts...), len(src))
	docs := make([]map[string]any, len(bounds)-1)
	failed := make([]bool, len(docs))
	counts := make([]int, len(docs))
	var wg sync.WaitGroup
	for i := range docs {
		wg.Go(func() {
			var err error
			docs[i], counts[i], err = decodePiece(src[bounds[i]:bounds[i+1]])
			failed[i] = err != nil
		})
	}
	wg.Wait()
	n, values := 0, 0
	for i, d := range docs {
		if failed[i] {
			return nil, 0, false
		}
		n += len(d)
		if values >= 0 && counts[i] >= 0 {
			values += counts[i]
		} else {
			values = -1
		}
	}
	doc := make(map[string]any, n)
	for _, d := range docs {
		for k, v := range d {
			if _, dup := doc[k]; dup {
				return nil, 0, false
			}
			doc[k] = v
		}
	}
	return doc, values, true
}

// decodeCuts returns where src may be cut for decoding its pieces apart: about 2×procs
// pieces of at least least bytes, each cut at a line that starts a table header whose first
// key is not the previous header's. It returns nil when the text is too small to cut.
func decodeCuts(src string, procs, least int) []int {
	if procs < 2 || len(src) < 2*least {
		return nil
	}
	want := max(least, len(src)/(2*procs))
	var cuts []int
	last, prevKey := 0, ""
	for at := 0; at < len(src); {
		end := strings.IndexByte(src[at:], '\n')
		if end < 0 {
			end = len(src)
		} else {
			end += at + 1
		}
		if key, ok := headerKey(src[at:end]); ok {
			if key != prevKey && at-last >= want && at > 0 {
				cuts = append(cuts, at)
				last = at
			}
			prevKey = key
		}
		at = end
	}
	return cuts
}

// headerKey returns the first key of a table header ("[a.b]", "[[a]]", `["q.r" . s]`) as
// written, when the line starts with one at its first column; ok is false for any other line.
// It need not be exact: a wrong answer only costs the pieces' decoding (decodeTOML).
func headerKey(line string) (key string, ok bool) {
	rest, ok := strings.CutPrefix(line, "[")
	if !ok {
		return "", false
	}
	rest = strings.TrimPrefix(rest, "[")
	rest = strings.TrimLeft(rest, " \t")
	if rest == "" {
		return "", false
	}
	var n int
	switch q := rest[0]; q {
	case '"', '\'':
		i := strings.IndexByte(rest[1:], q)
		if i < 0 {
			return "", false
		}
		n = i + 2
	default:
		for n < len(rest) && isBareKey(rest[n]) {
			n++
		}
		if n == 0 {
			return "", false
		}
	}
	after := strings.TrimLeft(rest[n:], " \t")
	if after == "" || (after[0] != '.' && after[0] != ']') {
		return "", false
	}
	return rest[:n], true
}
