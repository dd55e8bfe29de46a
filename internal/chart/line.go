package chart

import (
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Series is one named curve of a Line chart. X and Y must have the same
// length.
type Series struct {
	Name string
	X, Y []float64
}

// HLine is a labelled horizontal threshold line (for example a required
// margin or a sensitivity level).
type HLine struct {
	Label string
	Y     float64
}

// Point is a labelled marked point (for example where a curve crosses a
// threshold). Histogram uses only X and Label.
type Point struct {
	Label string
	X, Y  float64
}

// LineSpec describes a sweep chart.
type LineSpec struct {
	Title, XLabel, YLabel string
	// LogX selects a logarithmic x axis with a labelled tick at each
	// power of ten; points with x <= 0 are then skipped.
	LogX       bool
	Series     []Series
	Thresholds []HLine
	Marks      []Point
}

// Line writes a sweep chart of s as SVG to w: one line per series,
// dashed threshold lines across the plot, and labelled marks. A legend is
// drawn when there is more than one series or threshold line. Non-finite
// points break a line into separate pieces. It returns an error (wrapping
// ErrEmpty) when no series has a drawable point, and an error when a series
// has X and Y of different lengths.
func Line(w io.Writer, s LineSpec) error {
	p := newPlot(s.Title, s.XLabel, s.YLabel)
	if s.LogX {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = decadeTicks{}
	}

	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymin, ymax := math.Inf(1), math.Inf(-1)
	grow := func(x, y float64) {
		xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
		ymin, ymax = math.Min(ymin, y), math.Max(ymax, y)
	}

	type drawn struct {
		name  string
		parts []plotter.XYs
	}
	var curves []drawn
	for i, sr := range s.Series {
		if len(sr.X) != len(sr.Y) {
			return fmt.Errorf("chart: series %d (%q) has %d x and %d y values", i, sr.Name, len(sr.X), len(sr.Y))
		}
		parts := runs(sr.X, sr.Y, s.LogX)
		for _, part := range parts {
			for _, pt := range part {
				grow(pt.X, pt.Y)
			}
		}
		curves = append(curves, drawn{sr.Name, parts})
	}
	if math.IsInf(xmin, 1) {
		return fmt.Errorf("%w (line chart %q)", ErrEmpty, s.Title)
	}

	var thresholds []HLine
	for _, t := range s.Thresholds {
		if finite(t.Y) {
			thresholds = append(thresholds, t)
			ymin, ymax = math.Min(ymin, t.Y), math.Max(ymax, t.Y)
		}
	}
	var marks []Point
	for _, m := range s.Marks {
		if finite(m.X) && finite(m.Y) && (!s.LogX || m.X > 0) {
			marks = append(marks, m)
			grow(m.X, m.Y)
		}
	}

	// Axis ranges: whole decades on a log axis, a small margin elsewhere.
	if s.LogX {
		p.X.Min, p.X.Max = decadeRange(xmin, xmax)
	} else {
		p.X.Min, p.X.Max = pad(xmin, xmax, 0)
	}
	p.Y.Min, p.Y.Max = pad(ymin, ymax, 0.06)

	p.Add(grid(true, true))
	box := &legendBox{}
	for i, c := range curves {
		sty := seriesStyle(i)
		var first *plotter.Line
		for _, part := range c.parts {
			l, err := plotter.NewLine(part)
			if err != nil {
				return err
			}
			l.LineStyle = sty
			p.Add(l)
			if first == nil {
				first = l
			}
			box.avoid(part)
		}
		if first != nil {
			box.add(c.name, first)
		}
	}
	for i, t := range thresholds {
		xy := plotter.XYs{{X: p.X.Min, Y: t.Y}, {X: p.X.Max, Y: t.Y}}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.LineStyle = markerStyle(i)
		p.Add(l)
		box.add(t.Label, l)
		box.avoid(xy)
	}
	if len(marks) > 0 {
		if err := addMarks(p, marks, box); err != nil {
			return err
		}
	}
	if len(curves)+len(thresholds) > 1 {
		p.Add(box)
	}
	return render(w, p, Width, Height)
}

// addMarks draws each mark as a ringed dot with its label beside it.
func addMarks(p *plot.Plot, marks []Point, box *legendBox) error {
	xys := make(plotter.XYs, len(marks))
	labels := make([]string, len(marks))
	for i, m := range marks {
		xys[i] = plotter.XY{X: m.X, Y: m.Y}
		labels[i] = m.Label
	}
	sc, err := plotter.NewScatter(xys)
	if err != nil {
		return err
	}
	sc.GlyphStyle = draw.GlyphStyle{Color: black, Radius: vg.Points(3.5), Shape: draw.RingGlyph{}}
	dot, _ := plotter.NewScatter(xys)
	dot.GlyphStyle = draw.GlyphStyle{Color: orange, Radius: vg.Points(2.5), Shape: draw.CircleGlyph{}}
	lb, err := plotter.NewLabels(plotter.XYLabels{XYs: xys, Labels: labels})
	if err != nil {
		return err
	}
	for i := range lb.TextStyle {
		lb.TextStyle[i] = smallText(p, 9)
	}
	lb.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(4)}
	p.Add(dot, sc, lb)
	box.avoid(xys)
	return nil
}

// pad returns [lo, hi] widened by frac of its span on each side; an empty
// span is widened to a unit (or 1 % of the value) around it.
func pad(lo, hi, frac float64) (float64, float64) {
	if hi <= lo {
		d := math.Max(math.Abs(lo)*0.01, 0.5)
		return lo - d, hi + d
	}
	d := (hi - lo) * frac
	return lo - d, hi + d
}
