// Package report writes an evaluated worksheet as a Markdown budget page (with SVG charts
// beside it), as the JSON contract for scripts, and as a C header for firmware. Output depends
// only on the worksheet: no timestamps, no map order, the same bytes on every run.
package report

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"path"
	"regexp"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// Input is what a report is made from.
type Input struct {
	Result   *engine.Result     // the evaluation the page shows
	Sheet    *engine.Sheet      // the result's sheet (filled in from Result when nil)
	Analysis *analysis.Analysis // nil when the analyses were not run
	Warnings engine.Diagnostics // warnings from evaluation and the analyses
	// Cases are the operating points the page shows side by side, the first as the page's
	// main evaluation (Result is Cases[0].Result); nil or one entry for a page of one.
	Cases []Case
	// ChartBase is the file name prefix for charts written beside the page ("budget" gives
	// "budget.sweep-1.<hash>.svg"); "" leaves the charts out.
	ChartBase string
}

// filled returns the input with Sheet set from Result.
func (in Input) filled() Input {
	if in.Sheet == nil && in.Result != nil {
		in.Sheet = in.Result.Sheet()
	}
	return in
}

func known(r *engine.Result, rq *engine.Require) bool {
	_, k := r.Pass(rq)
	return k
}

func passes(r *engine.Result, rq *engine.Require) bool {
	p, _ := r.Pass(rq)
	return p
}

// File is a file written beside the page.
type File struct {
	Name string
	Data []byte
}

// inputDBm is the level entering a chain, in dBm, when its group gives one.
func inputDBm(ci analysis.Cascade) (float64, bool) { return ci.InputDBm, ci.Input != nil }

// noiseInDBm is the thermal noise at a chain's input (k·T0·B) in dBm, when its group gives a
// noise bandwidth.
func noiseInDBm(ci analysis.Cascade) (float64, bool) { return ci.NoiseDBm, ci.Bandwidth != nil }

// db2 formats a decibel number with 2 decimals.
func db2(v float64) string { return units.FormatDB(v) }

// signed formats a decibel change with its sign.
func signed(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	s := units.FormatDB(v)
	if !strings.HasPrefix(s, "-") && s != "0.00" {
		s = "+" + s
	}
	return s
}

func pct(v float64) string {
	switch {
	case math.IsNaN(v):
		return "n/a"
	case v > 0 && v < 0.0001:
		return "< 0.01 %"
	}
	return fmt.Sprintf("%.2f %%", 100*v)
}

// chartName returns the file name of a chart beside the page: it carries a hash of the
// chart's content, so a new page never links an older run's chart by the same name, and the
// charts of the page on disk stay in place until the new page has replaced it.
func chartName(base, kind string, data []byte) string {
	h := sha256.Sum256(data)
	return path.Base(base) + "." + kind + "." + hex.EncodeToString(h[:6]) + ".svg"
}

// OwnChart reports whether name is a chart of the page with the given ChartBase: one with
// a content hash, or one of the names without a hash that older versions wrote. Whoever
// writes the page removes the ones the new page does not link, after writing it.
func OwnChart(base, name string) bool {
	rest, ok := strings.CutPrefix(name, path.Base(base)+".")
	return ok && ownChart.MatchString(rest)
}

var ownChart = regexp.MustCompile(`^(?:budget|montecarlo|sweep-[0-9]+|levels-[A-Za-z0-9_.\[\]-]+)(?:\.[0-9a-f]{12})?\.svg$`)

// code writes worksheet text as a code span: its content is shown as written (the renderer
// escapes it), the fence is longer than any run of backticks inside, a pipe is escaped so a
// table cell does not end there, and line breaks become spaces.
func code(s string) string {
	if s == "" {
		return ""
	}
	s = strings.Map(func(r rune) rune {
		switch {
		case r == '\n' || r == '\r' || r == '\t':
			return ' '
		case r < 0x20 || r == 0x7f:
			return -1
		}
		return r
	}, s)
	s = strings.ReplaceAll(s, "|", "\\|")
	run, longest := 0, 0
	for _, r := range s {
		if r == '`' {
			run++
			longest = max(longest, run)
		} else {
			run = 0
		}
	}
	fence := strings.Repeat("`", longest+1)
	if strings.HasPrefix(s, "`") || strings.HasSuffix(s, "`") || strings.TrimSpace(s) == "" {
		s = " " + s + " "
	}
	return fence + s + fence
}

// fmtNum formats a number in a unit as the page shows it.
func fmtNum(v float64, unit string) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if strings.HasPrefix(unit, "dB") {
		return units.FormatDB(v) + " " + unit
	}
	if unit == "" {
		return units.FormatNum(v)
	}
	return units.FormatNum(v) + " " + unit
}

type sweepResult = analysis.SweepResult

// unitOfName parses a unit name the engine reported; a failure gives the plain-number unit.
func unitOfName(sym string) *units.Unit {
	u, err := units.ParseUnit(sym)
	if err != nil {
		u, _ = units.ParseUnit("")
	}
	return u
}
