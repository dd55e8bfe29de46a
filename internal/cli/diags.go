package cli

import (
	"bytes"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"unicode/utf8"

	"github.com/rfledger/rfledger/engine"
)

// sourceFS is where a sheet was read from (nil: the operating system's files).
type sourceFS = fs.FS

// maxExcerpt is how many characters of a source line an excerpt shows at most.
const maxExcerpt = 120

// formatDiags renders diagnostics for people: each on its own first line, exactly
// FILE:LINE:COL: NAME: message; hint (scripts read those lines), followed, when the file can be
// read from fsys (nil: the operating system's files) and still holds that text, by the source
// line and a line of carets under the offending text, both indented by four spaces.
func formatDiags(ds engine.Diagnostics, fsys fs.FS) string {
	var b strings.Builder
	files := map[string][]byte{}
	for _, d := range ds {
		b.WriteString(d.String())
		b.WriteByte('\n')
		src, ok := files[d.Range.File]
		if !ok {
			src = readSource(fsys, d.Range.File)
			files[d.Range.File] = src
		}
		if line, carets, ok := excerpt(src, d.Range); ok {
			b.WriteString("    " + line + "\n    " + carets + "\n")
		}
	}
	return b.String()
}

// readSource reads a worksheet or part for an excerpt; nil when it cannot be read.
func readSource(fsys fs.FS, name string) []byte {
	if name == "" || name == "--set" {
		return nil
	}
	var data []byte
	var err error
	if fsys == nil {
		data, err = os.ReadFile(name)
	} else {
		data, err = fs.ReadFile(fsys, filepath.ToSlash(name))
	}
	if err != nil {
		return nil
	}
	return data
}

// excerpt returns the source line a range starts on and a caret line marking the range on
// it (to the end of the line when the range goes on past it). It reports false when the
// range has no position or the source no longer agrees with it (the line and column do not
// fall on the range's byte offset: the file changed since it was loaded).
func excerpt(src []byte, r engine.Range) (line, carets string, ok bool) {
	s := r.Start
	if src == nil || s.Line < 1 || s.Col < 1 {
		return "", "", false
	}
	lineStart := 0
	for n := 1; n < s.Line; n++ {
		i := bytes.IndexByte(src[lineStart:], '\n')
		if i < 0 {
			return "", "", false
		}
		lineStart += i + 1
	}
	text := src[lineStart:]
	if i := bytes.IndexByte(text, '\n'); i >= 0 {
		text = text[:i]
	}
	text = bytes.TrimSuffix(text, []byte("\r"))
	rs := []rune(string(text))
	from := s.Col - 1
	if from > len(rs) || lineStart+len(string(rs[:from])) != s.Byte {
		return "", "", false
	}
	to := from + 1 // a point gets one caret
	switch e := r.End; {
	case e.Line > s.Line:
		to = max(len(rs), to)
	case e.Line == s.Line && e.Col > s.Col:
		to = min(e.Col-1, len(rs))
	}
	// A long line is cut to a window around the start of the range.
	lo, hi := 0, len(rs)
	if len(rs) > maxExcerpt {
		lo = max(0, from-maxExcerpt/4)
		hi = min(len(rs), lo+maxExcerpt)
		to = min(to, hi+1)
	}
	var pad strings.Builder
	for _, c := range rs[lo:from] {
		if c == '\t' {
			pad.WriteByte('\t') // the terminal moves both lines to the same tab stop
		} else {
			pad.WriteByte(' ')
		}
	}
	shown := string(rs[lo:hi])
	if lo > 0 {
		shown = "…" + shown
		pad.WriteString(" ")
	}
	if hi < len(rs) {
		shown += "…"
	}
	if !utf8.ValidString(shown) {
		return "", "", false
	}
	return shown, pad.String() + strings.Repeat("^", max(to-from, 1)), true
}
