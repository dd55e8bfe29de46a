// Package report writes an evaluated worksheet as a Markdown budget page (with SVG charts
// beside it), as the JSON contract for scripts, and as a C header for firmware. Output depends
// only on the worksheet: no timestamps, no map order, the same bytes on every run.
package report

import (
	"fmt"
	"math"
	"path"
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
	// "budget.sweep-1.svg"); "" leaves the charts out.
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

// chartName returns the file name of a chart beside the page.
func chartName(base, kind string) string {
	return path.Base(base) + "." + kind + ".svg"
}

// cell escapes text for a Markdown table cell.
func cell(s string) string {
	s = strings.ReplaceAll(s, "\\", "\\\\")
	s = strings.ReplaceAll(s, "|", "\\|")
	s = strings.ReplaceAll(s, "\n", " ")
	return s
}

// code writes text as inline code in a table cell.
func code(s string) string {
	if s == "" {
		return ""
	}
	s = strings.ReplaceAll(s, "|", "\\|")
	s = strings.ReplaceAll(s, "\n", " ")
	if strings.Contains(s, "`") {
		return "``" + s + "``"
	}
	return "`" + s + "`"
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
