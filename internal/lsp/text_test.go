package lsp

import (
	"strings"
	"testing"
	"time"
	"unicode/utf16"

	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/engine"
)

// Positions on long lines are found from the marks; they must equal what walking the line
// from its start gives (UTF-16 from the standard library's unicode/utf16 as the reference),
// at every character of a line of ASCII, two- and three-byte characters and characters past
// U+FFFF (two UTF-16 units each).
func TestLongLinePositions(t *testing.T) {
	unit := "ab é € 😀 x"
	line := strings.Repeat(unit, 3*markStep/len(unit)+7)
	tx := newText("short\n" + line + "\r\nend")
	if len(tx.marks[1]) < 3 {
		t.Fatalf("%d marks on a %d-byte line", len(tx.marks[1]), len(line))
	}
	start := len("short\n")
	chars := 0
	for b := range line + " " { // every character start, and the line's end
		if b > len(line) {
			break
		}
		want := protocol.Position{Line: 1, Character: uint32(len(utf16.Encode([]rune(line[:b]))))}
		if got := tx.position(start + b); got != want {
			t.Fatalf("position(%d) = %v, want %v", start+b, got, want)
		}
		if got := tx.enginePos(engine.Pos{Line: 2, Col: chars + 1}); got != want {
			t.Fatalf("enginePos(col %d) = %v, want %v", chars+1, got, want)
		}
		if got := tx.offset(want); got != start+b {
			t.Fatalf("offset(%v) = %d, want %d", want, got, start+b)
		}
		chars++
	}
	if got, want := tx.lineEnd(1).Character, uint32(len(utf16.Encode([]rune(line)))); got != want {
		t.Errorf("lineEnd: %d, want %d", got, want)
	}
}

// 100,000 diagnostics on one line of 1.2 MB (a hostile inline table of unknown keys) are
// converted in time linear in their number; walking the line from its start for each took
// minutes. The deadline is only against a hang.
func TestManyRangesOnALongLine(t *testing.T) {
	const n = 100_000
	line := strings.Repeat("k1234 = 1, ", n)
	tx := newText("[g]\n" + line + "\n")
	start := time.Now()
	for i := range n {
		col := 11*i + 1
		r := tx.engineRange(engine.Range{Start: engine.Pos{Line: 2, Col: col}, End: engine.Pos{Line: 2, Col: col}})
		if r.Start.Character != uint32(col-1) || r.End.Character != uint32(col) {
			t.Fatalf("range %d: %v", i, r)
		}
	}
	if d := time.Since(start); d > 20*time.Second {
		t.Errorf("%d ranges took %v", n, d)
	}
}
