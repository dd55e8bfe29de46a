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
	if _, err := CHeader(sh, HeaderOptions{}); err == nil {
		t.Error("a sheet without export = true gave a header")
	}
	// -100 dBm + 3 dB = -97 dBm (decibel addition).
	sh = load(t, "[rx]\nfloor = { is = \"= -100 dBm + 3 dB\", export = true, note = \"a */ b /* c ??/\" }\n")
	h, err := CHeader(sh, HeaderOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// sheettest loads "sheet.toml": the prefix is SHEET.
	if !strings.Contains(string(h), "#define SHEET_RX_FLOOR_DBM (-97.0f)") {
		t.Errorf("header:\n%s", h)
	}
	// Every comment opens once and closes once on its line: the note cannot end or nest one.
	for _, line := range strings.Split(string(h), "\n") {
		if strings.Count(line, "/*") > 1 || strings.Count(line, "*/") > 1 || strings.Contains(line, "??") {
			t.Errorf("comment broken: %s", line)
		}
	}
}

// TestCHeaderLiterals: whole counts and frequencies are integer literals in the base unit
// (868.1 MHz = 868 100 000 Hz, 38.4 kbit/s = 38 400 bit/s by the SI prefixes); other values are
// float, double or long literals as asked; the macro names carry the prefix.
func TestCHeaderLiterals(t *testing.T) {
	sh := load(t, `[path]
frequency = { is = "868.1 MHz", export = true }
[rx]
bits = { is = "256", export = true }
bitrate = { is = "38.4 kbit/s", export = true }
floor = { is = "= -100 dBm + 3.25 dB", export = true }
threshold = { is = "= floor + 2 dB", export = "RSSI_MIN_DBM" }
big = { is = "5 GHz", export = true }
`)
	for _, c := range []struct {
		opt  HeaderOptions
		want []string
	}{
		{HeaderOptions{Prefix: "FIELD"}, []string{
			"#define FIELD_PATH_FREQUENCY_HZ 868100000UL", "#define FIELD_RX_BITS 256UL", "#define FIELD_RX_BITRATE_BIT_PER_S 38400UL",
			"#define FIELD_RX_FLOOR_DBM (-96.75f)", "#define FIELD_RSSI_MIN_DBM (-94.75f)",
			// 5e9 Hz does not fit the 32 bits unsigned long is sure to have (C89 5.2.4.2.1).
			"#define FIELD_RX_BIG_GHZ 5.0f", "#define FIELD_SHEET_HASH \"" + sh.Sheet().Hash + "\"", "#ifndef RFLEDGER_FIELD_H"}},
		{HeaderOptions{Type: "double"}, []string{"#define SHEET_RX_FLOOR_DBM (-96.75)", "#define SHEET_PATH_FREQUENCY_HZ 868100000UL"}},
		{HeaderOptions{Type: "int"}, []string{"#define SHEET_RX_FLOOR_DBM (-97L)", "#define SHEET_RSSI_MIN_DBM (-95L)"}},
	} {
		h, err := CHeader(sh, c.opt)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range c.want {
			if !strings.Contains(string(h), w+"\n") {
				t.Errorf("%+v: no %q in\n%s", c.opt, w, h)
			}
		}
	}
	if _, err := CHeader(sh, HeaderOptions{Prefix: "9X"}); err == nil {
		t.Error("a prefix that cannot start a C name was accepted")
	}
}

func TestCHeaderNameClash(t *testing.T) {
	sh := load(t, "[a]\nb = { is = \"1 dB\", export = true }\n[a_b]\nx = { is = \"2 dB\", export = \"A_B_DB\" }\n")
	if _, err := CHeader(sh, HeaderOptions{}); err == nil || !strings.Contains(err.Error(), "SHEET_A_B_DB") {
		t.Errorf("two quantities with one macro name: %v", err)
	}
}

func TestExportName(t *testing.T) {
	_, diags := sheettest.Eval("x = { is = \"1 dB\", export = \"9bad\" }\ny = { is = \"1 dB\", export = 3 }\n")
	if got := diags.Error(); !strings.Contains(got, `sheet.toml:1:29: x: export name "9bad" is not a C macro name`) || !strings.Contains(got, "y: export must be true, false or a macro name") {
		t.Errorf("diagnostics:\n%s", got)
	}
}

func TestDefaultPrefix(t *testing.T) {
	for in, want := range map[string]string{"worksheets/field-probe-uplink.toml": "FIELD_PROBE_UPLINK", "2024 link.toml": "SHEET_2024_LINK", "a.b.toml": "A_B"} {
		if got := DefaultPrefix(in); got != want {
			t.Errorf("DefaultPrefix(%q) = %q, want %q", in, got, want)
		}
	}
}
