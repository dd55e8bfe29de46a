package chart

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// HistSpec describes a Monte Carlo histogram. Bins <= 0 chooses √n bins,
// kept between 10 and 60. VLines are vertical marker lines (for example
// the 1 %, 50 % and 99 % points and the thresholds): X places the line and
// Label names it in the legend; their Y is ignored.
type HistSpec struct {
	Title, XLabel string
	Values        []float64
	Bins          int
	VLines        []Point
}

// Histogram writes a histogram of the finite values of s as SVG to w, with
// the y axis counting trials, and the vertical marker lines of s.VLines in
// distinct colours and dash patterns, named in a legend. It returns an
// error wrapping ErrEmpty when no value is finite.
func Histogram(w io.Writer, s HistSpec) error {
	vals := make([]float64, 0, len(s.Values))
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range s.Values {
		if finite(v) {
			vals = append(vals, v)
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if len(vals) == 0 {
		return fmt.Errorf("%w (histogram %q)", ErrEmpty, s.Title)
	}
	n := s.Bins
	if n <= 0 {
		n = min(max(int(math.Ceil(math.Sqrt(float64(len(vals))))), 10), 60)
	}
	if hi == lo {
		d := math.Max(math.Abs(lo)*0.01, 0.5)
		lo, hi = lo-d, hi+d
	}
	width := (hi - lo) / float64(n)
	bins := make([]plotter.HistogramBin, n)
	for i := range bins {
		bins[i].Min = lo + float64(i)*width
		bins[i].Max = lo + float64(i+1)*width
	}
	bins[n-1].Max = hi
	for _, v := range vals {
		i := min(max(int((v-lo)/width), 0), n-1)
		bins[i].Weight++
	}
	top := 0.0
	for _, b := range bins {
		top = math.Max(top, b.Weight)
	}

	p := newPlot(s.Title, s.XLabel, "trials")
	p.Add(grid(true, true))
	h := &plotter.Histogram{
		Bins:      bins,
		Width:     width,
		FillColor: color.RGBA{0x9c, 0xcf, 0xee, 0xff}, // light sky blue
		LineStyle: draw.LineStyle{Color: color.RGBA{0x3a, 0x8c, 0xbf, 0xff}, Width: vg.Points(0.4)},
	}
	p.Add(h)

	box := &legendBox{}
	for _, b := range bins {
		x := (b.Min + b.Max) / 2
		box.avoid(plotter.XYs{{X: x, Y: 0}, {X: x, Y: b.Weight}})
	}
	// Headroom above the tallest bar for the legend.
	ytop := top * 1.08
	if len(s.VLines) > 0 {
		ytop = top * 1.3
	}
	k := 0
	for _, v := range s.VLines {
		if !finite(v.X) {
			continue
		}
		xy := plotter.XYs{{X: v.X, Y: 0}, {X: v.X, Y: ytop}}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.LineStyle = markerStyle(k)
		l.LineStyle.Width = vg.Points(1.6)
		k++
		p.Add(l)
		box.add(v.Label, l)
		box.avoid(xy)
	}
	p.Add(box)
	p.Y.Min, p.Y.Max = 0, ytop
	return render(w, p, Width, Height)
}
