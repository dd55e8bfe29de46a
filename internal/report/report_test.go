package report

import (
	"bytes"
	"strings"
	"testing"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/sheettest"
)

func load(t *testing.T, src string) *engine.Result {
	t.Helper()
	sh, diags := sheettest.Eval(src)
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	return sh
}

// TestNotesCannotBreakTables: text from the worksheet (notes with pipes, stars, backticks,
// HTML) stays inside its cell and never becomes markup.
func TestNotesCannotBreakTables(t *testing.T) {
	sh := load(t, "title = \"A | B <script>\"\n[g]\nx = { is = \"3 dB\", note = \"a | b *c* `d` <b>e</b>\", source = \"x|y\" }\n")
	page, _ := Markdown(Input{Result: sh})
	var html bytes.Buffer
	if err := goldmark.New(goldmark.WithExtensions(extension.GFM)).Convert(page, &html); err != nil {
		t.Fatal(err)
	}
	h := html.String()
	if strings.Contains(h, "<script>") || strings.Contains(h, "<b>e</b>") {
		t.Errorf("raw HTML from the worksheet reached the page:\n%s", h)
	}
	// The line-items table of group g has six columns in every row.
	start := strings.Index(h, "<h3>g</h3>")
	end := strings.Index(h[start:], "</table>")
	rows := strings.Split(h[start:start+end], "<tr>")
	for _, r := range rows[1:] {
		if n := strings.Count(r, "<td") + strings.Count(r, "<th"); n != 6 {
			t.Errorf("row has %d cells, want 6: %s", n, r)
		}
	}
}

func TestMacroUnit(t *testing.T) {
	for in, want := range map[string]string{"dBm": "DBM", "dBm/Hz": "DBM_PER_HZ", "%": "PCT", "dB/K": "DB_PER_K", "": "", "kbit/s": "KBIT_PER_S", "m^2": "M2"} {
		if got := macroUnit(in); got != want {
			t.Errorf("macroUnit(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestCHeaderNeedsExports(t *testing.T) {
	sh := load(t, "x = \"3 dB\"\n")
	if _, err := CHeader(sh); err == nil {
		t.Error("a sheet without export = true gave a header")
	}
	sh = load(t, "[rx]\nfloor = { is = \"= -100 dBm + 3 dB\", export = true, note = \"a */ b\" }\n")
	h, err := CHeader(sh)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(h), "#define RX_FLOOR_DBM (-97.0f)") || strings.Count(string(h), "*/") != 3 {
		t.Errorf("header:\n%s", h)
	}
}
