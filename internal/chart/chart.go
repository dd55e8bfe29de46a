package chart

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"io"
	"math"
	"unicode/utf8"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Width and Height are the default chart size (16 cm × 9 cm). Bars grows
// taller than Height when it has many labels.
const (
	Width  = 16 * vg.Centimeter
	Height = 9 * vg.Centimeter
)

// ErrEmpty is returned (wrapped) when a chart has no finite data to draw.
var ErrEmpty = errors.New("chart: no finite data to draw")

// Okabe–Ito colour-blind-safe palette (M. Okabe and K. Ito, "Color Universal
// Design (CUD): how to make figures and presentations that are friendly to
// colorblind people", 2008).
var (
	black         = color.RGBA{0x00, 0x00, 0x00, 0xff}
	orange        = color.RGBA{0xe6, 0x9f, 0x00, 0xff}
	skyBlue       = color.RGBA{0x56, 0xb4, 0xe9, 0xff}
	bluishGreen   = color.RGBA{0x00, 0x9e, 0x73, 0xff}
	blue          = color.RGBA{0x00, 0x72, 0xb2, 0xff}
	vermillion    = color.RGBA{0xd5, 0x5e, 0x00, 0xff}
	reddishPurple = color.RGBA{0xcc, 0x79, 0xa7, 0xff}
	// Mid grey, the one grey that reads on a white and on a near-black page
	// alike; the grid is the same grey, faint.
	darkGrey = color.RGBA{0x80, 0x80, 0x80, 0xff}
	gridGrey = color.NRGBA{0x80, 0x80, 0x80, 0x66}
)

// seriesColors is the order data series take colours in.
var seriesColors = []color.Color{blue, vermillion, bluishGreen, skyBlue, orange, reddishPurple}

// markerColors is the order threshold and marker lines take colours in.
// It starts with colours that no early series uses.
var markerColors = []color.Color{black, reddishPurple, darkGrey, bluishGreen, orange, vermillion}

// dashes are the dash patterns, in points, that lines cycle through.
var dashes = [][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2)},
	{vg.Points(6), vg.Points(2), vg.Points(1.5), vg.Points(2)},
	{vg.Points(10), vg.Points(3)},
}

func seriesStyle(i int) draw.LineStyle {
	return draw.LineStyle{
		Color:  seriesColors[i%len(seriesColors)],
		Width:  vg.Points(1.6),
		Dashes: dashes[(i/len(seriesColors)+i)%len(dashes)],
	}
}

func markerStyle(i int) draw.LineStyle {
	return draw.LineStyle{
		Color:  markerColors[i%len(markerColors)],
		Width:  vg.Points(1.3),
		Dashes: dashes[1+i%(len(dashes)-1)],
	}
}

// sans is the font all chart text is set in (from the Liberation family
// that the plotting library ships and measures text with).
var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

// newPlot returns a plot with the common title, label and grid settings.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil // transparent: the chart takes the page's light or dark background
	p.Title.Text = title
	p.Title.TextStyle.Font = font.Font{Typeface: sans.Typeface, Variant: sans.Variant, Weight: xfont.WeightBold, Size: vg.Points(12)}
	p.Title.Padding = vg.Points(6)
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sans, 11)
		a.Tick.Label.Font = font.From(sans, 9.5)
		a.Tick.Length = vg.Points(5)
		a.Padding = vg.Points(3)
		a.Tick.Marker = niceTicks{}
	}
	return p
}

// grid returns grid lines in a light grey behind the data.
func grid(vertical, horizontal bool) *plotter.Grid {
	g := plotter.NewGrid()
	sty := draw.LineStyle{Color: gridGrey, Width: vg.Points(0.5)}
	g.Vertical, g.Horizontal = draw.LineStyle{}, draw.LineStyle{}
	if vertical {
		g.Vertical = sty
	}
	if horizontal {
		g.Horizontal = sty
	}
	return g
}

// smallText returns a text style of the given size for annotations.
func smallText(p *plot.Plot, size float64) text.Style {
	s := p.X.Tick.Label
	s.Font.Size = vg.Points(size)
	s.XAlign, s.YAlign = draw.XLeft, draw.YBottom
	s.Rotation = 0
	return s
}

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// runs splits the points (x[i], y[i]) into runs of consecutive drawable
// points; a non-finite value (or x <= 0 when logX) ends a run, so the line
// shows a gap there rather than bridging it.
func runs(x, y []float64, logX bool) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	for i := range x {
		if !finite(x[i]) || !finite(y[i]) || (logX && x[i] <= 0) {
			if len(cur) > 0 {
				out = append(out, cur)
				cur = nil
			}
			continue
		}
		cur = append(cur, plotter.XY{X: x[i], Y: y[i]})
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// render draws p on an SVG canvas of the given size and writes it to w.
// Fonts are not embedded (the vgsvg default); the family name is given a
// generic sans-serif fallback. A panic inside the plotting library is
// returned as an error.
func render(w io.Writer, p *plot.Plot, width, height vg.Length) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("chart: rendering failed: %v", r)
		}
	}()
	c := vgsvg.NewWith(vgsvg.UseWH(width, height), vgsvg.EmbedFonts(false))
	// A small outer margin keeps edge labels clear of the image border.
	m := vg.Points(4)
	p.Draw(draw.Crop(draw.New(c), m, -m, m, -m))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return err
	}
	out := bytes.ReplaceAll(buf.Bytes(),
		[]byte("font-family:Liberation Sans;"),
		[]byte("font-family:Liberation Sans,sans-serif;"))
	out = adaptive(xmlChars(out))
	_, err = w.Write(out)
	return err
}

// xmlChars drops what XML 1.0 does not allow in a document (control characters other than
// tab and line ends, U+FFFE and U+FFFF, bytes that are not UTF-8): worksheet text reaches
// titles and labels as written, and one NUL in a spur block's name made the chart a file no
// viewer opens.
func xmlChars(svg []byte) []byte {
	ok := func(r rune, size int) bool {
		switch {
		case r == utf8.RuneError && size == 1, r == 0xFFFE, r == 0xFFFF:
			return false
		case r < 0x20:
			return r == '\t' || r == '\n' || r == '\r'
		}
		return true
	}
	for i := 0; i < len(svg); {
		r, n := utf8.DecodeRune(svg[i:])
		if !ok(r, n) {
			out := append([]byte(nil), svg[:i]...)
			for ; i < len(svg); i += n {
				if r, n = utf8.DecodeRune(svg[i:]); ok(r, n) {
					out = append(out, svg[i:i+n]...)
				}
			}
			return out
		}
		i += n
	}
	return svg
}

// schemeStyle makes a chart read on light and dark pages: text, axes and the
// black marker lines take the SVG's own colour, which is near-black and turns
// near-white when the viewer prefers a dark scheme. The background is left
// transparent, so the chart sits on whatever the page behind it is.
const schemeStyle = "<style>svg{color:#1b1b1b}text{fill:currentColor}" +
	"@media (prefers-color-scheme:dark){svg{color:#e4e4e4}}</style>\n"

// adaptive rewrites the drawing's black into currentColor and puts
// schemeStyle right after the opening svg tag. The black of the palette is
// only ever used for the foreground (axes, ticks, zero and threshold lines).
func adaptive(svg []byte) []byte {
	svg = bytes.ReplaceAll(svg, []byte("stroke:#000000"), []byte("stroke:currentColor"))
	svg = bytes.ReplaceAll(svg, []byte("fill:#000000"), []byte("fill:currentColor"))
	i := bytes.Index(svg, []byte("<svg"))
	if i < 0 {
		return svg
	}
	j := bytes.IndexByte(svg[i:], '>')
	if j < 0 {
		return svg
	}
	at := i + j + 1
	if at < len(svg) && svg[at] == '\n' {
		at++
	}
	out := make([]byte, 0, len(svg)+len(schemeStyle))
	out = append(out, svg[:at]...)
	out = append(out, schemeStyle...)
	return append(out, svg[at:]...)
}

// legendEntry is one line of a legend box.
type legendEntry struct {
	name   string
	thumbs []plot.Thumbnailer
}

// legendBox is a plotter, added last, that draws a legend on a faintly tinted box in
// whichever corner of the data area covers the least data. obstacles are the
// drawn polylines in data coordinates.
type legendBox struct {
	entries   []legendEntry
	obstacles []plotter.XYs
}

func (l *legendBox) add(name string, thumbs ...plot.Thumbnailer) {
	if name == "" {
		return
	}
	l.entries = append(l.entries, legendEntry{name, thumbs})
}

func (l *legendBox) avoid(xys ...plotter.XYs) { l.obstacles = append(l.obstacles, xys...) }

// Plot implements plot.Plotter.
func (l *legendBox) Plot(c draw.Canvas, p *plot.Plot) {
	if len(l.entries) == 0 {
		return
	}
	leg := plot.NewLegend()
	leg.TextStyle = smallText(p, 9)
	leg.Top, leg.Left = true, true
	leg.ThumbnailWidth = vg.Points(22)
	leg.Padding = vg.Points(2)
	sty := leg.TextStyle

	var textW, entH vg.Length
	for _, e := range l.entries {
		textW = max(textW, sty.Width(e.name))
		entH = max(entH, sty.Rectangle(e.name).Max.Y)
	}
	const inner, margin = vg.Length(4), vg.Length(5)
	n := vg.Length(len(l.entries))
	w := leg.ThumbnailWidth + sty.Width(" ") + textW + 2*inner
	h := n*entH + (n-1)*leg.Padding + 2*inner

	trX, trY := p.Transforms(&c)
	var pts []vg.Point
	for _, line := range l.obstacles {
		for i := range line {
			x0, y0 := trX(line[i].X), trY(line[i].Y)
			if i == 0 {
				pts = append(pts, vg.Point{X: x0, Y: y0})
				continue
			}
			xp, yp := trX(line[i-1].X), trY(line[i-1].Y)
			const sub = 24
			for k := 1; k <= sub; k++ {
				t := vg.Length(k) / sub
				pts = append(pts, vg.Point{X: xp + t*(x0-xp), Y: yp + t*(y0-yp)})
			}
		}
	}
	// Candidate corners in order of preference: top right, top left,
	// bottom right, bottom left.
	corners := []vg.Point{
		{X: c.Max.X - margin - w, Y: c.Max.Y - margin - h},
		{X: c.Min.X + margin, Y: c.Max.Y - margin - h},
		{X: c.Max.X - margin - w, Y: c.Min.Y + margin},
		{X: c.Min.X + margin, Y: c.Min.Y + margin},
	}
	best, bestN := 0, -1
	for i, m := range corners {
		r := vg.Rectangle{Min: m, Max: vg.Point{X: m.X + w, Y: m.Y + h}}
		cnt := 0
		for _, pt := range pts {
			if pt.X >= r.Min.X-2 && pt.X <= r.Max.X+2 && pt.Y >= r.Min.Y-2 && pt.Y <= r.Max.Y+2 {
				cnt++
			}
		}
		if bestN < 0 || cnt < bestN {
			best, bestN = i, cnt
		}
	}
	m := corners[best]
	box := vg.Rectangle{Min: m, Max: vg.Point{X: m.X + w, Y: m.Y + h}}
	c.FillPolygon(color.NRGBA{0x80, 0x80, 0x80, 0x1a}, rectLine(box)[:4])
	c.StrokeLines(draw.LineStyle{Color: color.Gray{0x99}, Width: vg.Points(0.5)}, rectLine(box))

	for _, e := range l.entries {
		leg.Add(e.name, e.thumbs...)
	}
	leg.Draw(draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
		Min: vg.Point{X: box.Min.X + inner, Y: box.Min.Y + inner},
		Max: vg.Point{X: box.Max.X - inner, Y: box.Max.Y - inner},
	}})
}

func rectLine(r vg.Rectangle) []vg.Point {
	return []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min}
}
