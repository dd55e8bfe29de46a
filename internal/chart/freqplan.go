package chart

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Kind is what a frequency-plan mark stands for; it sets the mark's colour and legend entry.
type Kind uint8

// Kinds of marks, in legend order.
const (
	KindWanted Kind = iota // the wanted conversion
	KindInBand             // a spurious response inside the preselector passband
	KindImage              // the image response
	KindHalfIF             // the half-IF response
	KindOther              // any other response
	KindHit                // a product landing in a protected band
)

var kindStyle = []struct {
	name  string
	color color.Color
}{
	{"wanted", blue}, {"spur in band", vermillion}, {"image", orange}, {"half-IF", reddishPurple},
	{"other response", darkGrey}, {"product in band", vermillion},
}

// Span is a shaded frequency band (a passband or a protected band) drawn across the plot.
type Span struct {
	Label  string
	Lo, Hi float64
}

// Mark is one response (a segment from Lo to Hi) or one product (Lo = Hi, drawn as a dot) at
// height Y, usually its order.
type Mark struct {
	Lo, Hi, Y float64
	Kind      Kind
}

// Tone is a labelled vertical line (a known transmitter tone or the LO).
type Tone struct {
	Label string
	X     float64
}

// FreqPlanSpec describes a frequency-plan chart: frequency across, order up.
type FreqPlanSpec struct {
	Title, XLabel, YLabel string
	Spans                 []Span
	Marks                 []Mark
	Tones                 []Tone
}

// FreqPlan writes a frequency-plan chart of s as SVG to w: the spans shaded behind (labelled
// at their foot), each
// response as a horizontal segment (a product as a dot) at its order, coloured by kind, and
// the tones as dashed vertical lines, with a legend of the kinds drawn. It returns an error
// wrapping ErrEmpty when there is nothing finite to draw.
func FreqPlan(w io.Writer, s FreqPlanSpec) error {
	xmin, xmax, ymax := math.Inf(1), math.Inf(-1), 1.0
	grow := func(lo, hi float64) {
		if finite(lo) && finite(hi) {
			xmin, xmax = math.Min(xmin, lo), math.Max(xmax, hi)
		}
	}
	for _, sp := range s.Spans {
		grow(sp.Lo, sp.Hi)
	}
	for _, m := range s.Marks {
		grow(m.Lo, m.Hi)
		if finite(m.Y) {
			ymax = math.Max(ymax, m.Y)
		}
	}
	for _, t := range s.Tones {
		grow(t.X, t.X)
	}
	if !(xmax >= xmin) {
		return fmt.Errorf("%w (frequency plan %q)", ErrEmpty, s.Title)
	}
	p := newPlot(s.Title, s.XLabel, s.YLabel)
	p.X.Min, p.X.Max = planXRange(xmin, xmax)
	p.Y.Min, p.Y.Max = 0, ymax+1
	p.Add(grid(true, true))
	fp := &planPlotter{spec: s}
	p.Add(fp)
	box := &legendBox{}
	seen := make([]bool, len(kindStyle))
	for _, m := range s.Marks {
		if int(m.Kind) < len(seen) {
			seen[m.Kind] = true
		}
		if finite(m.Lo) && finite(m.Hi) && finite(m.Y) {
			box.avoid(plotter.XYs{{X: m.Lo, Y: m.Y}, {X: m.Hi, Y: m.Y}})
		}
	}
	for k, ok := range seen {
		if ok {
			box.add(kindStyle[k].name, kindThumb{Kind(k)})
		}
	}
	p.Add(box)
	return render(w, p, Width, Height)
}

// planPlotter draws the spans, marks and tones in one pass.
type planPlotter struct{ spec FreqPlanSpec }

var spanFill = color.NRGBA{0x56, 0xb4, 0xe9, 0x40} // sky blue, light

// Plot implements plot.Plotter.
func (pp *planPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, sp := range pp.spec.Spans {
		if !finite(sp.Lo) || !finite(sp.Hi) {
			continue
		}
		x0, x1 := trX(sp.Lo), trX(sp.Hi)
		if x1-x0 < vg.Points(1) { // keep a narrow band visible
			x1 = x0 + vg.Points(1)
		}
		r := vg.Rectangle{Min: vg.Point{X: x0, Y: c.Min.Y}, Max: vg.Point{X: x1, Y: c.Max.Y}}
		c.FillPolygon(spanFill, rectLine(r)[:4])
		c.FillText(smallText(p, 8), vg.Point{X: x0 + vg.Points(2), Y: c.Min.Y + vg.Points(3)}, sp.Label)
	}
	for _, t := range pp.spec.Tones {
		if !finite(t.X) {
			continue
		}
		x := trX(t.X)
		c.StrokeLine2(markerStyle(0), x, c.Min.Y, x, c.Max.Y)
		sty := smallText(p, 8)
		c.FillText(sty, vg.Point{X: x + vg.Points(2), Y: c.Max.Y - vg.Points(10)}, t.Label)
	}
	// The segments of one kind go into one path, stroked once: an order-15 plan has hundreds
	// of them, and a stroke each was most of the chart's time. The kinds are stroked from the
	// last to the first, so the wanted and in-band responses lie on top.
	segs := make([]vg.Path, len(kindStyle))
	for _, m := range pp.spec.Marks {
		if !finite(m.Lo) || !finite(m.Hi) || !finite(m.Y) || int(m.Kind) >= len(kindStyle) {
			continue
		}
		y := trY(m.Y)
		x0, x1 := trX(m.Lo), trX(m.Hi)
		if m.Lo == m.Hi {
			c.DrawGlyph(draw.GlyphStyle{Color: kindStyle[m.Kind].color, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}, vg.Point{X: x0, Y: y})
			continue
		}
		if x1-x0 < vg.Points(2) {
			x1 = x0 + vg.Points(2)
		}
		segs[m.Kind].Move(vg.Point{X: x0, Y: y})
		segs[m.Kind].Line(vg.Point{X: x1, Y: y})
	}
	for k := len(segs) - 1; k >= 0; k-- {
		if len(segs[k]) > 0 {
			c.SetLineStyle(draw.LineStyle{Color: kindStyle[k].color, Width: vg.Points(3.5)})
			c.Stroke(segs[k])
		}
	}
}

type kindThumb struct{ k Kind }

// Thumbnail implements plot.Thumbnailer.
func (t kindThumb) Thumbnail(c *draw.Canvas) {
	col := kindStyle[t.k].color
	y := (c.Min.Y + c.Max.Y) / 2
	if t.k == KindHit {
		c.DrawGlyph(draw.GlyphStyle{Color: col, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}, vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: y})
		return
	}
	c.StrokeLine2(draw.LineStyle{Color: col, Width: vg.Points(3.5)}, c.Min.X, y, c.Max.X, y)
}

// planXRange pads the frequency axis by 6 % each side, but never below 0: no frequency in a
// plan is negative, so a plan reaching down near 0 Hz starts its axis there.
func planXRange(xmin, xmax float64) (float64, float64) {
	lo, hi := pad(xmin, xmax, 0.06)
	if xmin >= 0 && lo < 0 {
		lo = 0
	}
	return lo, hi
}
