package chart

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// BarSpec describes a signed horizontal bar chart, one bar per label, for
// example the gains (+) and losses (−) of a budget in dB. Unit labels the
// value axis and follows each value, unless Units (optional, one per bar)
// names the bar's own unit, as when a budget mixes dBm and dB terms.
type BarSpec struct {
	Title, Unit string
	Labels      []string
	Values      []float64
	Units       []string
}

// Bars writes a horizontal signed bar chart of s as SVG to w. The first
// label is at the top; each bar is annotated with its signed value; a zero
// line separates positive bars (blue) from negative ones (vermillion). A
// non-finite value draws no bar and is annotated "n/a". The chart grows
// taller than Height to keep about 5 mm per bar. It returns an error when
// Labels and Values differ in length, and one wrapping ErrEmpty when there
// is no label or no finite value.
func Bars(w io.Writer, s BarSpec) error {
	if len(s.Labels) != len(s.Values) {
		return fmt.Errorf("chart: bar chart %q has %d labels and %d values", s.Title, len(s.Labels), len(s.Values))
	}
	n := len(s.Labels)
	lo, hi := 0.0, 0.0
	drawable := false
	for _, v := range s.Values {
		if finite(v) {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
			drawable = true
		}
	}
	if !drawable {
		return fmt.Errorf("%w (bar chart %q)", ErrEmpty, s.Title)
	}
	if lo == hi {
		lo, hi = -1, 1
	}
	// Room for the value annotations beyond the bar ends.
	span := hi - lo
	if lo < 0 {
		lo -= 0.35 * span
	}
	if hi > 0 {
		hi += 0.35 * span
	}

	p := rowPlot(s.Title, s.Unit, s.Labels, lo, hi)
	units := make([]string, n)
	for i := range units {
		units[i] = s.Unit
		if i < len(s.Units) && s.Units[i] != "" {
			units[i] = s.Units[i]
		}
	}
	p.Add(&signedBars{values: s.Values, units: units, text: smallText(p, 9)})
	return render(w, p, Width, rowHeight(n))
}

// rowPlot returns a plot with one row per label, the first at the top (row i at y = n−1−i),
// the value axis from lo to hi, and vertical grid lines.
func rowPlot(title, xlabel string, labels []string, lo, hi float64) *plot.Plot {
	n := len(labels)
	p := newPlot(title, xlabel, "")
	ticks := make([]plot.Tick, n)
	for i, l := range labels {
		ticks[i] = plot.Tick{Value: float64(n - 1 - i), Label: l}
	}
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	p.Y.Tick.Length = 0
	p.Y.Width = 0
	p.Y.Min, p.Y.Max = -0.6, float64(n)-0.4
	p.X.Min, p.X.Max = lo, hi
	p.Add(grid(true, false))
	return p
}

// rowHeight is the height of a chart of n rows: Height, or about 5 mm per row.
func rowHeight(n int) vg.Length {
	return max(Height, 2.2*vg.Centimeter+vg.Length(n)*0.5*vg.Centimeter)
}

// signedBars draws bar i at y = n−1−i from zero to values[i], with its
// value written beyond the bar end, and the zero line.
type signedBars struct {
	values []float64
	units  []string
	text   draw.TextStyle
}

// Plot implements plot.Plotter.
func (b *signedBars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	n := len(b.values)
	const half = 0.32
	x0 := trX(0)
	gap := vg.Points(3)
	for i, v := range b.values {
		y := float64(n - 1 - i)
		sty := b.text
		sty.YAlign = draw.YCenter
		if !finite(v) {
			sty.XAlign = draw.XLeft
			c.FillText(sty, vg.Point{X: x0 + gap, Y: trY(y)}, "n/a")
			continue
		}
		x1 := trX(v)
		clr := positiveColor
		if v < 0 {
			clr = negativeColor
		}
		if v != 0 {
			r := vg.Rectangle{
				Min: vg.Point{X: min(x0, x1), Y: trY(y - half)},
				Max: vg.Point{X: max(x0, x1), Y: trY(y + half)},
			}
			c.FillPolygon(clr, rectLine(r)[:4])
		}
		label := formatValue(v, b.units[i])
		if v < 0 {
			sty.XAlign = draw.XRight
			c.FillText(sty, vg.Point{X: x1 - gap, Y: trY(y)}, label)
		} else {
			sty.XAlign = draw.XLeft
			c.FillText(sty, vg.Point{X: x1 + gap, Y: trY(y)}, label)
		}
	}
	zero := draw.LineStyle{Color: black, Width: vg.Points(1)}
	c.StrokeLine2(zero, x0, c.Min.Y, x0, c.Max.Y)
}

// DataRange implements plot.DataRanger so the zero line is always in view.
func (b *signedBars) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = 0, 0
	for _, v := range b.values {
		if finite(v) {
			xmin, xmax = math.Min(xmin, v), math.Max(xmax, v)
		}
	}
	return xmin, xmax, -0.5, float64(len(b.values)) - 0.5
}

var (
	positiveColor = blue
	negativeColor = vermillion
)

// formatValue writes v with an explicit sign, two decimals below 10 and one
// above, followed by the unit.
func formatValue(v float64, unit string) string {
	prec := 1
	if math.Abs(v) < 10 {
		prec = 2
	}
	s := strconv.FormatFloat(v, 'f', prec, 64)
	if v >= 0 && !strings.HasPrefix(s, "-") {
		s = "+" + s
	}
	if unit != "" {
		s += " " + unit
	}
	return s
}

var _ plot.DataRanger = (*signedBars)(nil)
