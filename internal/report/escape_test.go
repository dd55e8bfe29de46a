package report

import (
	"bytes"
	"fmt"
	"html"
	"regexp"
	"strings"
	"testing"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	east "github.com/yuin/goldmark/extension/ast"
	gtext "github.com/yuin/goldmark/text"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// hostile is text that tries to become markup: tags, event handlers, frames, links and
// images with script schemes, autolinks of other schemes, e-mail autolinks, code-span
// escapes, table breaks and entities (issue 8, finding 7).
var hostile = []string{
	`<script>alert(1)</script>`,
	`<img src=x onerror=alert(1)>`,
	`<iframe src="javascript:alert(1)"></iframe>`,
	`[x](javascript:alert(1))`,
	`![y](javascript:alert(2))`,
	`<javascript:alert(3)>`,
	`[ref]: javascript:alert(4)`,
	`ftp://evil.example/x`,
	`mail@evil.example`,
	"`` `<b>` `` and ` <i>x</i>",
	`&lt;script&gt; &#106;avascript:alert(5)`,
	`| a | b |`,
	"- 1. > # line\nbreak <!-- c -->",
	`**bold** _em_ ~~s~~ \<u>`,
}

// hostileSheet puts payload in every piece of worksheet text that reaches the page.
func hostileSheet(payload string) string {
	q := func(s string) string { return fmt.Sprintf("%q", s) }
	return `title = ` + q(payload) + `
summary = ` + q(payload) + `
focus = "g.margin"
[g]
p = { is = "10 dBm", tol = "1 dB", note = ` + q(payload) + `, source = ` + q(payload) + ` }
d = { is = "2 km", tol = "10 %" }
margin = "= p - fspl(d, 868 MHz) + 100 dB"
nf = "= cascade_nf(chain)"
h = "= hata(3 GHz, 5 km, 50 m, 1.5 m, 'urban')"
[[g.chain]]
stage = ` + q(payload) + `
note = ` + q(payload) + `
gain = { is = "15 dB", note = ` + q(payload) + ` }
nf = { is = "1 dB", tol = "0.2 dB" }
iip3 = "-5 dBm"
[[g.chain]]
stage = ` + q(payload+"2") + `
loss = "2 dB"
[[require]]
that = "= g.margin >= 3 dBm"
note = ` + q(payload) + `
[[sweep]]
vary = "g.d"
from = "1 km"
to = "3 km"
steps = 3
plot = ["g.margin"]
[[solve]]
name = ` + q(payload) + `
vary = "g.d"
so_that = "g.margin"
equals = "0 dBm"
within = ["10 m", "1000 km"]
`
}

var chartLink = regexp.MustCompile(`^page\.[A-Za-z0-9_.\-\[\]]+\.svg$`)

// TestHostileTextStaysText renders each payload in every field and reads the page back with
// a GFM renderer (goldmark with the GFM extensions): no raw HTML node, no link or image but
// http(s) or the page's own charts, and every table row with as many cells as its header.
func TestHostileTextStaysText(t *testing.T) {
	md := goldmark.New(goldmark.WithExtensions(extension.GFM))
	for _, payload := range hostile {
		sh, diags := sheettest.Eval(hostileSheet(payload))
		if diags.HasErrors() {
			t.Fatalf("%q: %v", payload, diags)
		}
		a, ad := analysis.Analyze(sh, analysis.Options{Trials: 50, Seed: 1, Workers: 1})
		if ad.HasErrors() {
			t.Fatalf("%q: %v", payload, ad)
		}
		page, _ := Markdown(Input{Result: sh, Analysis: a, Warnings: append(diags, ad...), ChartBase: "out/page"})
		if n := strings.Count(string(page), "onerror"); n < 5 && strings.Contains(payload, "onerror") {
			t.Errorf("%q: the payload reached only %d places; the test does not cover every field", payload, n)
		}
		err := checkPage(md, page)
		if err != nil {
			t.Errorf("%q: %v", payload, err)
		}
	}
}

func sameWidth(tb *east.Table) error {
	want := -1
	for row := tb.FirstChild(); row != nil; row = row.NextSibling() {
		if n := row.ChildCount(); want < 0 {
			want = n
		} else if n != want {
			return fmt.Errorf("a table row has %d cells, its header %d", n, want)
		}
	}
	return nil
}

func nodeText(n ast.Node, src []byte) string {
	var b strings.Builder
	var segs *gtext.Segments
	if r, ok := n.(*ast.RawHTML); ok {
		segs = r.Segments
	} else {
		segs = n.Lines()
	}
	for i := range segs.Len() {
		s := segs.At(i)
		b.Write(s.Value(src))
	}
	return b.String()
}

// The escapes are plain CommonMark: the text reads back as written.
func TestTextReadsBack(t *testing.T) {
	md := goldmark.New(goldmark.WithExtensions(extension.GFM))
	for _, s := range []string{"a_b *c* `d` <e> [f](g) | h & i ~j~ #k", "1. not a list", "- not a list", "x: y@z"} {
		var got bytes.Buffer
		if err := md.Convert([]byte(text(s)), &got); err != nil {
			t.Fatal(err)
		}
		if want := "<p>" + html.EscapeString(s) + "</p>\n"; got.String() != want {
			t.Errorf("text(%q) renders as %q, want %q", s, got.String(), want)
		}
	}
}
