package cli

import (
	"bytes"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
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
// line and a line of carets under the offending text, both indented by four spaces. Each file
// is read and split into lines once, so the time is linear in the diagnostics and the files
// however many diagnostics one file has.
func formatDiags(ds engine.Diagnostics, fsys fs.FS) string {
	var b strings.Builder
	files := map[string]*source{}
	for _, d := range ds {
		b.WriteString(d.String())
		b.WriteByte('\n')
		src, ok := files[d.Range.File]
		if !ok {
			src = newSource(readSource(fsys, d.Range.File))
			files[d.Range.File] = src
		}
		if line, carets, ok := src.excerpt(d.Range); ok {
			b.WriteString("    " + line + "\n    " + carets + "\n")
		}
	}
	return b.String()
}

// readSource reads a worksheet or part for an excerpt; nil when it cannot be read or is not
// a regular file (a named pipe the worksheet was read from would block when opened again).
func readSource(fsys fs.FS, name string) []byte {
	if name == "" || name == "--set" {
		return nil
	}
	var fi fs.FileInfo
	var err error
	if fsys == nil {
		fi, err = os.Stat(name)
	} else {
		fi, err = fs.Stat(fsys, filepath.ToSlash(name))
	}
	if err != nil || !fi.Mode().IsRegular() {
		return nil
	}
	var data []byte
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

// source is a file's text for excerpts, with where each line starts and where the last
// excerpt's column was counted to, so that many diagnostics on one long line cost no more
// than reading it once (in the order Diagnostics.Sorted gives).
type source struct {
	text   []byte
	starts []int // byte offset of each line; nil until the first excerpt
	// the last position whose column was counted: line, byte offset, characters before it
	line, at, col int
}

func newSource(text []byte) *source { return &source{text: text} }

// excerpt returns the source line a range starts on and a caret line marking the range on
// it (to the end of the line when the range goes on past it). It reports false when the
// range has no position or the source no longer agrees with it (the line and column do not
// fall on the range's byte offset: the file changed since it was loaded).
func (s *source) excerpt(r engine.Range) (line, carets string, ok bool) {
	st := r.Start
	if s.text == nil || st.Line < 1 || st.Col < 1 {
		return "", "", false
	}
	if s.starts == nil {
		s.starts = append(s.starts, 0)
		for i, c := range s.text {
			if c == '\n' {
				s.starts = append(s.starts, i+1)
			}
		}
	}
	if st.Line > len(s.starts) {
		return "", "", false
	}
	lineStart, lineEnd := s.starts[st.Line-1], len(s.text)
	if st.Line < len(s.starts) {
		lineEnd = s.starts[st.Line] - 1
	}
	text := bytes.TrimSuffix(s.text[lineStart:lineEnd], []byte("\r"))
	at := st.Byte - lineStart // the range's start in text
	if at < 0 || at > len(text) {
		return "", "", false
	}
	from, ok := s.column(st.Line, text, at)
	if !ok || from != st.Col-1 {
		return "", "", false
	}
	// The characters after the start, as far as any excerpt shows (maxExcerpt+1 tells a
	// line that is cut from one that just fits).
	after := []int{at} // byte offsets in text of the characters from the start on
	for i := at; i < len(text) && len(after) <= maxExcerpt+1; {
		c, w := utf8.DecodeRune(text[i:])
		if c == utf8.RuneError && w == 1 {
			return "", "", false
		}
		i += w
		after = append(after, i)
	}
	n := from + len(after) - 1 // the line's length in characters, or more than any excerpt shows
	to := from + 1             // a point gets one caret
	switch e := r.End; {
	case e.Line > st.Line:
		to = max(n, to)
	case e.Line == st.Line && e.Col > st.Col:
		to = min(e.Col-1, n)
	}
	// A long line is cut to a window around the start of the range.
	lo, hi := 0, n
	if n > maxExcerpt {
		lo = max(0, from-maxExcerpt/4)
		hi = min(n, lo+maxExcerpt)
		to = min(to, hi+1)
	}
	var pad []byte
	loAt := at
	for range from - lo {
		c, w := utf8.DecodeLastRune(text[:loAt])
		loAt -= w
		if c == '\t' {
			pad = append(pad, '\t') // the terminal moves both lines to the same tab stop
		} else {
			pad = append(pad, ' ')
		}
	}
	slices.Reverse(pad)
	shown := string(text[loAt:after[hi-from]])
	if lo > 0 {
		shown = "…" + shown
		pad = append(pad, ' ')
	}
	if hi < n {
		shown += "…"
	}
	return shown, string(pad) + strings.Repeat("^", max(to-from, 1)), true
}

// column counts the characters before byte at of the line (text, line number line),
// going on from the last count when it was on the same line and not past at. It reports
// false when at is not on a character boundary or the text before it is not UTF-8.
func (s *source) column(line int, text []byte, at int) (int, bool) {
	i, col := 0, 0
	if s.line == line && s.at <= at {
		i, col = s.at, s.col
	}
	for i < at {
		c, w := utf8.DecodeRune(text[i:])
		if c == utf8.RuneError && w == 1 {
			return 0, false
		}
		i += w
		col++
	}
	if i != at {
		return 0, false
	}
	s.line, s.at, s.col = line, at, col
	return col, true
}
