package watch

import (
	"bytes"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/rfledger/rfledger/units"
	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	east "github.com/yuin/goldmark/extension/ast"
	"github.com/yuin/goldmark/parser"
	"github.com/yuin/goldmark/renderer"
	"github.com/yuin/goldmark/text"
	"github.com/yuin/goldmark/util"
)

// markdown converts the report with the GitHub-flavoured extensions. Raw HTML
// is not passed through (no html.WithUnsafe) and dangerous link schemes are
// dropped by goldmark. Table alignment is written as align attributes rather
// than style attributes, which the page's Content-Security-Policy would block.
//
// For a page read in a narrow window, every table is put in a box of its own that scrolls
// sideways (the page itself never does), a long table under "Sweeps" is folded into a
// <details> that opens on a click, and the space between a number and its unit becomes a
// no-break space, so "12.50 dB" never splits across lines. These touch only the served
// HTML; the page on disk stays as written.
var markdown = goldmark.New(
	goldmark.WithExtensions(
		extension.Linkify,
		extension.NewTable(extension.WithTableCellAlignMethod(extension.TableCellAlignAttribute)),
		extension.Strikethrough,
		extension.TaskList,
	),
	goldmark.WithParserOptions(
		parser.WithAutoHeadingID(),
		parser.WithASTTransformers(util.Prioritized(liveLayout{}, 1000)),
	),
	goldmark.WithRendererOptions(renderer.WithNodeRenderers(util.Prioritized(boxRenderer{}, 1000))),
)

// foldRows is the number of body rows above which a sweep table is folded.
const foldRows = 12

// kindBox is the node that wraps a table: a scrolling box, folded when long.
var kindBox = ast.NewNodeKind("TableBox")

type tableBox struct {
	ast.BaseBlock
	rows int
	fold bool
}

func (n *tableBox) Kind() ast.NodeKind { return kindBox }

func (n *tableBox) Dump(source []byte, level int) { ast.DumpHelper(n, source, level, nil, nil) }

// liveLayout boxes the tables, folds the long sweep tables and binds numbers to their units.
type liveLayout struct{}

func (liveLayout) Transform(doc *ast.Document, reader text.Reader, _ parser.Context) {
	src := reader.Source()
	var tables []*east.Table
	var folds []bool
	var texts []*ast.Text
	section := ""
	ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		switch n := n.(type) {
		case *ast.Heading:
			if n.Level <= 2 {
				section = plainText(n, src)
			}
		case *east.Table:
			tables = append(tables, n)
			folds = append(folds, section == "Sweeps")
		case *ast.CodeSpan:
			return ast.WalkSkipChildren, nil
		case *ast.Text:
			texts = append(texts, n)
		}
		return ast.WalkContinue, nil
	})
	// The tree changes only after the walk.
	for i, t := range tables {
		rows := 0
		for c := t.FirstChild(); c != nil; c = c.NextSibling() {
			if c.Kind() == east.KindTableRow {
				rows++
			}
		}
		b := &tableBox{rows: rows, fold: folds[i] && rows > foldRows}
		t.Parent().ReplaceChild(t.Parent(), t, b)
		b.AppendChild(b, t)
	}
	for _, t := range texts {
		bindRun(t, src)
	}
}

// bindRun binds numbers to units in the run of text nodes that starts at t (the parser
// splits text at spaces, so "12.50 dB" is two nodes), replacing the run by one string when
// anything changed. Only the first node of a run does anything: a later one is skipped,
// whether it is still in place (the run is unchanged) or was taken out with its run.
func bindRun(t *ast.Text, src []byte) {
	if t.Parent() == nil {
		return // taken out with the run it belonged to
	}
	if prev, ok := t.PreviousSibling().(*ast.Text); ok && !prev.SoftLineBreak() && !prev.HardLineBreak() {
		return // part of the run that starts before it
	}
	var run []ast.Node
	var v []byte
	for n := ast.Node(t); n != nil; n = n.NextSibling() {
		x, ok := n.(*ast.Text)
		if !ok || x.IsRaw() {
			break
		}
		run = append(run, x)
		v = append(v, x.Segment.Value(src)...)
		if x.HardLineBreak() {
			return
		}
		if x.SoftLineBreak() {
			v = append(v, '\n')
			break
		}
	}
	bound := bindUnits(v)
	if len(bound) == len(v) {
		return
	}
	p := t.Parent()
	p.InsertBefore(p, t, ast.NewString(bound))
	for _, n := range run {
		p.RemoveChild(p, n)
	}
}

// plainText is the text of n's inline children.
func plainText(n ast.Node, src []byte) string {
	var b bytes.Buffer
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		if t, ok := c.(*ast.Text); ok {
			b.Write(t.Segment.Value(src))
		} else {
			b.WriteString(plainText(c, src))
		}
	}
	return b.String()
}

// bindUnits replaces the space between a number and the unit after it with a no-break
// space. A word counts as a unit when units.ParseUnit reads it (after dropping closing
// punctuation), or when it is "%".
func bindUnits(s []byte) []byte {
	var b []byte
	last := 0
	for i := 1; i < len(s); i++ {
		if s[i] == ' ' && s[i-1] >= '0' && s[i-1] <= '9' && afterNumber(s[:i]) && isUnit(s[i+1:]) {
			b = append(b, s[last:i]...)
			b = append(b, "\u00a0"...)
			last = i + 1
		}
	}
	if b == nil {
		return s
	}
	return append(b, s[last:]...)
}

// afterNumber reports whether s ends in a number that starts a word: digits, a decimal
// point, an exponent, a sign, preceded by nothing or by a space or punctuation (not by a
// letter, so "x2 of" is not a number).
func afterNumber(s []byte) bool {
	i := len(s)
	for i > 0 {
		c := s[i-1]
		if c >= '0' && c <= '9' || c == '.' || c == 'e' || c == 'E' || c == '+' || c == '-' {
			i--
			continue
		}
		break
	}
	if i == 0 {
		return true
	}
	r, _ := utf8.DecodeLastRune(s[:i])
	return !unicode.IsLetter(r) && r != '_'
}

// isUnit reports whether s starts with a unit word.
func isUnit(s []byte) bool {
	end := bytes.IndexAny(s, " \n\t")
	if end < 0 {
		end = len(s)
	}
	w := strings.TrimRight(string(s[:end]), ".,;:)]*")
	if w == "%" {
		return true
	}
	if w == "" || w[0] >= '0' && w[0] <= '9' {
		return false
	}
	_, err := units.ParseUnit(w)
	return err == nil
}

// boxRenderer writes a tableBox.
type boxRenderer struct{}

func (boxRenderer) RegisterFuncs(reg renderer.NodeRendererFuncRegisterer) {
	reg.Register(kindBox, func(w util.BufWriter, _ []byte, n ast.Node, entering bool) (ast.WalkStatus, error) {
		b := n.(*tableBox)
		switch {
		case entering && b.fold:
			w.WriteString("<details class=\"fold\"><summary>table of " + strconv.Itoa(b.rows) + " rows</summary>\n<div class=\"tbl\">\n")
		case entering:
			w.WriteString("<div class=\"tbl\">\n")
		case b.fold:
			w.WriteString("</div>\n</details>\n")
		default:
			w.WriteString("</div>\n")
		}
		return ast.WalkContinue, nil
	})
}
