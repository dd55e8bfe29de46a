package report

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"net/url"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	east "github.com/yuin/goldmark/extension/ast"
	gtext "github.com/yuin/goldmark/text"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// FuzzRender: for a worksheet that evaluates, the writers run within a time limit; the page
// carries no raw HTML and no link but http(s) or its charts, the JSON parses with every
// number finite, and every chart is well-formed XML.
func FuzzRender(f *testing.F) {
	files, _ := filepath.Glob("../../testdata/valid/*.toml")
	ws, _ := filepath.Glob("../../worksheets/*.toml")
	for _, p := range append(files, ws...) {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	for _, h := range hostile {
		f.Add([]byte(hostileSheet(h)))
	}
	md := goldmark.New(goldmark.WithExtensions(extension.GFM))
	f.Fuzz(func(t *testing.T, data []byte) {
		done := make(chan struct{})
		go func() {
			defer close(done)
			sh, diags := sheettest.Eval(string(data))
			if diags.HasErrors() {
				return
			}
			a, ad := analysis.Analyze(sh, analysis.Options{Trials: 20, Seed: 1, Workers: 1})
			if ad.HasErrors() {
				return
			}
			in := Input{Result: sh, Analysis: a, Warnings: append(diags, ad...), ChartBase: "out/page"}
			page, charts := Markdown(in)
			if err := checkPage(md, page); err != nil {
				t.Errorf("page: %v", err)
			}
			if err := finiteJSON(JSON(in)); err != nil {
				t.Errorf("JSON: %v", err)
			}
			for _, c := range charts {
				if err := wellFormed(c.Data); err != nil {
					t.Errorf("chart %s: %v", c.Name, err)
				}
			}
		}()
		select {
		case <-done:
		case <-time.After(5 * time.Second):
			t.Fatal("no answer in 5 s")
		}
	})
}

// checkPage reads the page back as GFM and reports raw HTML, an e-mail autolink, a link or
// image that is neither http(s) nor one of the page's charts, and a table row with another
// number of cells than its header.
func checkPage(md goldmark.Markdown, page []byte) error {
	doc := md.Parser().Parse(gtext.NewReader(page))
	return ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		var dest string
		switch n := n.(type) {
		case *ast.RawHTML, *ast.HTMLBlock:
			return ast.WalkStop, fmt.Errorf("raw HTML %q", nodeText(n, page))
		case *ast.Link:
			dest = string(n.Destination)
		case *ast.Image:
			dest = string(n.Destination)
		case *ast.AutoLink:
			dest = string(n.URL(page))
			if n.AutoLinkType == ast.AutoLinkEmail {
				return ast.WalkStop, fmt.Errorf("e-mail autolink %q", dest)
			}
		case *east.Table:
			if err := sameWidth(n); err != nil {
				return ast.WalkStop, err
			}
		default:
			return ast.WalkContinue, nil
		}
		if dest != "" && !chartLink.MatchString(dest) {
			u, err := url.Parse(dest)
			if err != nil || u.Scheme != "http" && u.Scheme != "https" {
				return ast.WalkStop, fmt.Errorf("link to %q", dest)
			}
		}
		return ast.WalkContinue, nil
	})
}

// finiteJSON reports JSON that does not parse, or a number in it that is not finite.
func finiteJSON(b []byte) error {
	var v any
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.UseNumber()
	if err := dec.Decode(&v); err != nil {
		return err
	}
	var walk func(any) error
	walk = func(v any) error {
		switch v := v.(type) {
		case json.Number:
			if x, err := v.Float64(); err != nil || math.IsInf(x, 0) || math.IsNaN(x) {
				return fmt.Errorf("number %s", v)
			}
		case []any:
			for _, e := range v {
				if err := walk(e); err != nil {
					return err
				}
			}
		case map[string]any:
			for _, e := range v {
				if err := walk(e); err != nil {
					return err
				}
			}
		}
		return nil
	}
	return walk(v)
}

func wellFormed(b []byte) error {
	d := xml.NewDecoder(bytes.NewReader(b))
	for {
		_, err := d.Token()
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return err
		}
	}
}
