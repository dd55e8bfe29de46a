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

// LevelSpec describes a level diagram: the signal and integrated noise
// level at the output of each stage of a receive (or transmit) chain.
// Signal may be nil (noise only); otherwise Signal and Noise have one value
// per stage. Unit labels the level axis ("dBm" when empty).
type LevelSpec struct {
	Title, Unit   string
	Stages        []string
	Signal, Noise []float64
}

// Levels writes a level diagram of s as SVG to w: level against stage,
// with the stage names on the x axis (slanted when they would not fit
// side by side), the signal as a solid line with dots and the noise as a
// dashed line with squares, and a legend when both are drawn. Non-finite
// levels leave a gap. It returns an error when a slice length does not match
// Stages, and one wrapping ErrEmpty when there are no stages or no finite
// level.
func Levels(w io.Writer, s LevelSpec) error {
	n := len(s.Stages)
	if n == 0 {
		return fmt.Errorf("%w (level diagram %q has no stages)", ErrEmpty, s.Title)
	}
	if len(s.Noise) != n {
		return fmt.Errorf("chart: level diagram %q has %d stages and %d noise levels", s.Title, n, len(s.Noise))
	}
	if s.Signal != nil && len(s.Signal) != n {
		return fmt.Errorf("chart: level diagram %q has %d stages and %d signal levels", s.Title, n, len(s.Signal))
	}
	unit := s.Unit
	if unit == "" {
		unit = "dBm"
	}
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = float64(i)
	}

	type trace struct {
		name  string
		parts []plotter.XYs
		line  draw.LineStyle
		glyph draw.GlyphStyle
	}
	var traces []trace
	ymin, ymax := math.Inf(1), math.Inf(-1)
	addTrace := func(name string, ys []float64, line draw.LineStyle, glyph draw.GlyphStyle) {
		if ys == nil {
			return
		}
		parts := runs(xs, ys, false)
		for _, part := range parts {
			for _, pt := range part {
				ymin, ymax = math.Min(ymin, pt.Y), math.Max(ymax, pt.Y)
			}
		}
		if len(parts) > 0 {
			traces = append(traces, trace{name, parts, line, glyph})
		}
	}
	addTrace("signal", s.Signal,
		draw.LineStyle{Color: blue, Width: vg.Points(1.8)},
		draw.GlyphStyle{Color: blue, Radius: vg.Points(3), Shape: draw.CircleGlyph{}})
	addTrace("noise", s.Noise,
		draw.LineStyle{Color: vermillion, Width: vg.Points(1.8), Dashes: dashes[1]},
		draw.GlyphStyle{Color: vermillion, Radius: vg.Points(3), Shape: draw.SquareGlyph{}})
	if len(traces) == 0 {
		return fmt.Errorf("%w (level diagram %q)", ErrEmpty, s.Title)
	}

	p := newPlot(s.Title, "stage", "level ("+unit+")")
	ticks := make([]plot.Tick, n)
	for i, name := range s.Stages {
		ticks[i] = plot.Tick{Value: float64(i), Label: name}
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	p.X.Min, p.X.Max = -0.4, float64(n)-0.6
	p.Y.Min, p.Y.Max = pad(ymin, ymax, 0.08)

	// Slant the stage names when the widest would not fit in its slot.
	slot := (Width - 3*vg.Centimeter) / vg.Length(n)
	widest := vg.Length(0)
	for _, name := range s.Stages {
		widest = max(widest, p.X.Tick.Label.Width(name))
	}
	if widest > 0.9*slot {
		p.X.Tick.Label.Rotation = math.Pi / 6
		p.X.Tick.Label.XAlign = draw.XRight
		p.X.Tick.Label.YAlign = draw.YTop
	}

	p.Add(grid(true, true))
	box := &legendBox{}
	for _, t := range traces {
		var thumbs []plot.Thumbnailer
		for _, part := range t.parts {
			l, sc, err := plotter.NewLinePoints(part)
			if err != nil {
				return err
			}
			l.LineStyle = t.line
			sc.GlyphStyle = t.glyph
			p.Add(l, sc)
			box.avoid(part)
			if thumbs == nil {
				thumbs = []plot.Thumbnailer{l, sc}
			}
		}
		box.add(t.name, thumbs...)
	}
	if len(traces) > 1 {
		p.Add(box)
	}
	return render(w, p, Width, Height)
}
