package chart

import (
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// StepKind says how a row of a waterfall is drawn.
type StepKind int

// The rows of a waterfall.
const (
	StepLevel  StepKind = iota // a level started from or reached: a mark at To
	StepChange                 // a gain or a loss: a bar from From to To
	StepGap                    // the difference of two levels (a margin): a bracket from From to To
)

// Step is one row of a waterfall. Text is written beside it (the change, the level, the
// margin); Good colours a bar or bracket blue (it raises what the budget is after) rather
// than vermillion.
type Step struct {
	Label    string
	Kind     StepKind
	From, To float64
	Text     string
	Good     bool
}

// WaterfallSpec describes a budget in signal order as a waterfall of levels: one row per
// step, the first at the top, on a level axis in Unit ("dBm"). Axis, when given, labels the
// axis instead ("running total (dBHz, then dB)").
type WaterfallSpec struct {
	Title, Unit, Axis string
	Steps             []Step
}

// Waterfall writes s as a horizontal waterfall chart in SVG to w: a level is a dot, a gain
// or loss a bar from the level before it to the level after it, joined to its neighbours by
// dotted lines, and a margin a bracket between the two levels it separates. Every row is
// annotated with its Text. A row with a non-finite end is left out. The chart grows taller
// than Height to keep about 5 mm per row. It returns an error wrapping ErrEmpty when there is
// no row to draw.
func Waterfall(w io.Writer, s WaterfallSpec) error {
	var steps []Step
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, st := range s.Steps {
		if !finite(st.To) || st.Kind != StepLevel && !finite(st.From) {
			continue
		}
		if st.Kind == StepLevel {
			st.From = st.To
		}
		steps = append(steps, st)
		lo, hi = math.Min(lo, math.Min(st.From, st.To)), math.Max(hi, math.Max(st.From, st.To))
	}
	if len(steps) == 0 {
		return fmt.Errorf("%w (waterfall %q)", ErrEmpty, s.Title)
	}
	if hi-lo < 1 {
		lo, hi = lo-1, hi+1
	}
	// Room on the right for the annotations.
	span := hi - lo
	lo, hi = lo-0.04*span, hi+0.3*span
	axis := s.Axis
	if axis == "" {
		axis = "level (" + s.Unit + ")"
	}
	labels := make([]string, len(steps))
	for i, st := range steps {
		labels[i] = st.Label
	}
	p := rowPlot(s.Title, axis, labels, lo, hi)
	p.Add(&waterfall{steps: steps, text: smallText(p, 9)})
	return render(w, p, Width, rowHeight(len(steps)))
}

// waterfall draws step i at y = n−1−i.
type waterfall struct {
	steps []Step
	text  draw.TextStyle
}

// Plot implements plot.Plotter.
func (wf *waterfall) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	n := len(wf.steps)
	const half = 0.32
	gap := vg.Points(4)
	joint := draw.LineStyle{Color: darkGrey, Width: vg.Points(0.8), Dashes: dashes[2]}
	fg := draw.LineStyle{Color: black, Width: vg.Points(1.2)}
	for i, st := range wf.steps {
		y := float64(n - 1 - i)
		if i > 0 {
			prev := wf.steps[i-1]
			if prev.Kind != StepGap && st.Kind != StepGap && math.Abs(prev.To-st.From) < 1e-9 {
				c.StrokeLine2(joint, trX(st.From), trY(y+1-half), trX(st.From), trY(y+half))
			}
		}
		clr := vermillion
		if st.Good {
			clr = blue
		}
		x0, x1 := trX(math.Min(st.From, st.To)), trX(math.Max(st.From, st.To))
		switch st.Kind {
		case StepLevel:
			c.DrawGlyph(draw.GlyphStyle{Color: black, Radius: vg.Points(3.2), Shape: draw.CircleGlyph{}}, vg.Point{X: x1, Y: trY(y)})
		case StepChange:
			r := vg.Rectangle{Min: vg.Point{X: x0, Y: trY(y - half)}, Max: vg.Point{X: max(x1, x0+vg.Points(0.8)), Y: trY(y + half)}}
			c.FillPolygon(clr, rectLine(r)[:4])
		case StepGap:
			sty := fg
			sty.Color = clr
			sty.Width = vg.Points(1.8)
			c.StrokeLine2(sty, x0, trY(y), x1, trY(y))
			for _, x := range []vg.Length{x0, x1} {
				c.StrokeLine2(sty, x, trY(y-half), x, trY(y+half))
			}
		}
		sty := wf.text
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YCenter
		c.FillText(sty, vg.Point{X: x1 + gap, Y: trY(y)}, st.Text)
	}
}

// DataRange implements plot.DataRanger.
func (wf *waterfall) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	for _, st := range wf.steps {
		xmin, xmax = math.Min(xmin, math.Min(st.From, st.To)), math.Max(xmax, math.Max(st.From, st.To))
	}
	return xmin, xmax, -0.5, float64(len(wf.steps)) - 0.5
}

var _ plot.DataRanger = (*waterfall)(nil)
