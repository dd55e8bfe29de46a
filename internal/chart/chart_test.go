package chart

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"testing"
)

// Sample inputs shaped like the budget page's charts.

func sampleLine() LineSpec {
	// Received power against distance for free-space loss (Friis) and a
	// steeper 3.5-exponent loss, 10 m to 100 km.
	var d, fs, steep []float64
	for i := 0; i <= 80; i++ {
		x := 10 * math.Pow(10, float64(i)/20)
		d = append(d, x)
		fs = append(fs, 20-(40+20*math.Log10(x)))
		steep = append(steep, 20-(40+35*math.Log10(x)))
	}
	steep[30] = math.NaN() // a gap, not a crash
	return LineSpec{
		Title:  "Received power vs distance",
		XLabel: "distance (m)",
		YLabel: "received power (dBm)",
		LogX:   true,
		Series: []Series{
			{Name: "free space", X: d, Y: fs},
			{Name: "exponent 3.5", X: d, Y: steep},
		},
		Thresholds: []HLine{{Label: "sensitivity −95 dBm", Y: -95}, {Label: "sensitivity + 10 dB margin", Y: -85}},
		Marks:      []Point{{Label: "range 3.16 km", X: math.Pow(10, 3.5), Y: -95}},
	}
}

func sampleHist() HistSpec {
	r := rand.New(rand.NewPCG(1, 2))
	vals := make([]float64, 5000)
	for i := range vals {
		vals[i] = 8 + 2.5*r.NormFloat64()
	}
	vals[7] = math.Inf(1)
	sorted := append([]float64(nil), vals[:7]...)
	sorted = append(sorted, vals[8:]...)
	sort.Float64s(sorted)
	q := func(p float64) float64 { return sorted[int(p*float64(len(sorted)-1))] }
	return HistSpec{
		Title:  "Link margin, 5000 trials",
		XLabel: "margin (dB)",
		Values: vals,
		VLines: []Point{
			{Label: "1 %", X: q(0.01)}, {Label: "50 %", X: q(0.5)}, {Label: "99 %", X: q(0.99)},
			{Label: "required 3 dB", X: 3},
		},
	}
}

func sampleBars() BarSpec {
	return BarSpec{
		Title:  "Budget contributions",
		Unit:   "dB",
		Labels: []string{"transmit power", "transmit antenna gain", "cable loss", "path loss (excess)", "rain fade", "receive antenna gain", "pointing loss", "implementation loss"},
		Values: []float64{3.0, 14.5, -2.1, -18.7, -4.25, 12, -0.35, math.NaN()},
	}
}

func sampleLevels() LevelSpec {
	return LevelSpec{
		Title:  "Receiver level diagram",
		Unit:   "dBm",
		Stages: []string{"antenna", "filter", "LNA", "mixer", "IF amp", "ADC input"},
		Signal: []float64{-90, -91.5, -71.5, -79.5, -59.5, -60.5},
		Noise:  []float64{-113.8, -113.8, -91.9, -99.6, -79.3, -80.1},
	}
}

// sampleWaterfall is a short link in signal order: a transmitter's power, its antenna, the
// path, the received level, the sensitivity it is compared with and the margin.
func sampleWaterfall() WaterfallSpec {
	return WaterfallSpec{
		Title: "Link in signal order",
		Unit:  "dBm",
		Steps: []Step{
			{Label: "transmit power", Kind: StepLevel, To: 20, Text: "20.00 dBm"},
			{Label: "transmit antenna", Kind: StepChange, From: 20, To: 35, Text: "+15.00 dBi", Good: true},
			{Label: "free space", Kind: StepChange, From: 35, To: -85, Text: "-120.00 dB"},
			{Label: "received level", Kind: StepLevel, To: -85, Text: "-85.00 dBm"},
			{Label: "sensitivity", Kind: StepLevel, To: -99, Text: "-99.00 dBm"},
			{Label: "margin", Kind: StepGap, From: -99, To: -85, Text: "14.00 dB", Good: true},
			{Label: "no value", Kind: StepChange, From: math.NaN(), To: 1},
		},
	}
}

type chartCase struct {
	name   string
	draw   func(io.Writer) error
	texts  []string
	expect []string // more strings that must appear in a <text> element
}

func cases() []chartCase {
	l, h, b, v, wf := sampleLine(), sampleHist(), sampleBars(), sampleLevels(), sampleWaterfall()
	return []chartCase{
		{"line", func(w io.Writer) error { return Line(w, l) }, []string{l.Title, l.XLabel, l.YLabel},
			[]string{"free space", "exponent 3.5", "range 3.16 km", "10", "100", "1k", "10k", "100k"}},
		{"histogram", func(w io.Writer) error { return Histogram(w, h) }, []string{h.Title, h.XLabel, "trials"},
			[]string{"1 %", "50 %", "99 %", "required 3 dB"}},
		{"bars", func(w io.Writer) error { return Bars(w, b) }, []string{b.Title, b.Unit},
			append(append([]string(nil), b.Labels...), "+14.5 dB", "+3.00 dB", "-18.7 dB", "n/a")},
		{"levels", func(w io.Writer) error { return Levels(w, v) }, []string{v.Title, "stage", "level (dBm)"},
			append(append([]string(nil), v.Stages...), "signal", "noise")},
		{"waterfall", func(w io.Writer) error { return Waterfall(w, wf) }, []string{wf.Title, "level (dBm)"},
			[]string{"transmit power", "free space", "margin", "+15.00 dBi", "-120.00 dB", "-99.00 dBm", "14.00 dB"}},
	}
}

// svgTexts decodes the SVG with encoding/xml and returns the content of
// every <text> element; decoding errors fail the test.
func svgTexts(t *testing.T, data []byte) []string {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	var texts []string
	inText := false
	var sb strings.Builder
	root := ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG does not parse as XML: %v", err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = e.Name.Local
			}
			if e.Name.Local == "text" {
				inText = true
				sb.Reset()
			}
		case xml.CharData:
			if inText {
				sb.Write(e)
			}
		case xml.EndElement:
			if e.Name.Local == "text" {
				inText = false
				texts = append(texts, sb.String())
			}
		}
	}
	if root != "svg" {
		t.Fatalf("root element %q, want svg", root)
	}
	return texts
}

func TestChartsRender(t *testing.T) {
	dir := os.Getenv("CHART_SAMPLES_DIR") // set to keep sample files for viewing
	for _, c := range cases() {
		t.Run(c.name, func(t *testing.T) {
			var a, b bytes.Buffer
			if err := c.draw(&a); err != nil {
				t.Fatal(err)
			}
			if err := c.draw(&b); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(a.Bytes(), b.Bytes()) {
				t.Fatal("two renders of the same input differ")
			}
			if a.Len() > 40_000 {
				t.Errorf("SVG is %d bytes, want at most 40 kB", a.Len())
			}
			texts := svgTexts(t, a.Bytes())
			have := map[string]bool{}
			for _, s := range texts {
				have[s] = true
			}
			for _, want := range append(c.texts, c.expect...) {
				if !have[want] {
					t.Errorf("no <text> element %q in %q", want, texts)
				}
			}
			s := a.String()
			// No embedded fonts, timestamps or generated ids.
			for _, bad := range []string{"@font-face", "base64", " id=", "<metadata"} {
				if strings.Contains(s, bad) {
					t.Errorf("SVG contains %q", bad)
				}
			}
			if regexp.MustCompile(`20\d\d-\d\d-\d\d|\d\d:\d\d:\d\d`).MatchString(s) {
				t.Errorf("SVG appears to contain a date or time")
			}
			if !strings.Contains(s, "font-family:Liberation Sans,sans-serif;") {
				t.Errorf("SVG text has no generic font fallback")
			}
			// Light and dark pages: no opaque white or black paint, and the
			// foreground colour follows prefers-color-scheme.
			for _, bad := range []string{"fill:#FFFFFF", "fill:#000000", "stroke:#000000", "stroke:#FFFFFF"} {
				if strings.Contains(s, bad) {
					t.Errorf("SVG paints %q, which vanishes on a light or a dark page", bad)
				}
			}
			if !strings.Contains(s, "@media (prefers-color-scheme:dark)") || !strings.Contains(s, "text{fill:currentColor}") {
				t.Errorf("SVG does not follow the viewer's colour scheme")
			}
			if dir != "" {
				if err := os.WriteFile(filepath.Join(dir, c.name+".svg"), a.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
			}
		})
	}
}

func TestDecadeTicks(t *testing.T) {
	var labels []string
	for _, tk := range (decadeTicks{}).Ticks(10, 1e5) {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
			if e := math.Log10(tk.Value); e != math.Round(e) {
				t.Errorf("labelled tick %g is not a power of ten", tk.Value)
			}
		}
	}
	if got := strings.Join(labels, " "); got != "10 100 1k 10k 100k" {
		t.Errorf("decade labels %q", got)
	}
	// Less than a decade: the 1..9 multiples are labelled.
	var short []string
	for _, tk := range (decadeTicks{}).Ticks(2, 9) {
		short = append(short, tk.Label)
	}
	if got := strings.Join(short, " "); got != "2 3 4 5 6 7 8 9" {
		t.Errorf("sub-decade labels %q", got)
	}
	for v, want := range map[float64]string{1e-3: "0.001", 0.1: "0.1", 1: "1", 1e6: "1M", 2.4e9: "2.4G", 1e16: "1e+16"} {
		if got := siLabel(v); got != want {
			t.Errorf("siLabel(%g) = %q, want %q", v, got, want)
		}
	}
}

func TestEmptyAndBadInput(t *testing.T) {
	nan := math.NaN()
	errs := map[string]error{
		"line no series":  Line(io.Discard, LineSpec{Title: "t"}),
		"line all NaN":    Line(io.Discard, LineSpec{Series: []Series{{X: []float64{1, 2}, Y: []float64{nan, math.Inf(1)}}}}),
		"line log x <= 0": Line(io.Discard, LineSpec{LogX: true, Series: []Series{{X: []float64{0, -1}, Y: []float64{1, 2}}}}),
		"hist empty":      Histogram(io.Discard, HistSpec{}),
		"hist NaN":        Histogram(io.Discard, HistSpec{Values: []float64{nan}}),
		"bars empty":      Bars(io.Discard, BarSpec{}),
		"bars NaN":        Bars(io.Discard, BarSpec{Labels: []string{"a"}, Values: []float64{nan}}),
		"levels empty":    Levels(io.Discard, LevelSpec{}),
		"levels NaN":      Levels(io.Discard, LevelSpec{Stages: []string{"a"}, Noise: []float64{nan}}),
		"waterfall empty": Waterfall(io.Discard, WaterfallSpec{}),
		"waterfall NaN":   Waterfall(io.Discard, WaterfallSpec{Steps: []Step{{Kind: StepChange, From: 1, To: nan}, {To: math.Inf(1)}}}),
	}
	for name, err := range errs {
		if !errors.Is(err, ErrEmpty) {
			t.Errorf("%s: err = %v, want ErrEmpty", name, err)
		}
	}
	mismatch := map[string]error{
		"line":   Line(io.Discard, LineSpec{Series: []Series{{X: []float64{1, 2}, Y: []float64{1}}}}),
		"bars":   Bars(io.Discard, BarSpec{Labels: []string{"a", "b"}, Values: []float64{1}}),
		"levels": Levels(io.Discard, LevelSpec{Stages: []string{"a", "b"}, Noise: []float64{1, 2}, Signal: []float64{1}}),
	}
	for name, err := range mismatch {
		if err == nil || errors.Is(err, ErrEmpty) {
			t.Errorf("%s length mismatch: err = %v", name, err)
		}
	}
}

// TestDegenerateInput: single points, constant data and partly non-finite
// data render without panicking.
func TestDegenerateInput(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(-1)
	ok := map[string]error{
		"line one point": Line(io.Discard, LineSpec{Series: []Series{{X: []float64{5}, Y: []float64{3}}}}),
		"line log one":   Line(io.Discard, LineSpec{LogX: true, Series: []Series{{X: []float64{50, nan}, Y: []float64{3, 4}}}, Thresholds: []HLine{{"t", nan}}, Marks: []Point{{"m", -1, 2}}}),
		"hist constant":  Histogram(io.Discard, HistSpec{Values: []float64{2, 2, 2}, VLines: []Point{{"x", nan, 0}}}),
		"hist one bin":   Histogram(io.Discard, HistSpec{Values: []float64{1, 2, 3}, Bins: 1}),
		"bars zeros":     Bars(io.Discard, BarSpec{Labels: []string{"a", "b"}, Values: []float64{0, inf}}),
		"levels no sig":  Levels(io.Discard, LevelSpec{Stages: []string{"a", "b"}, Noise: []float64{-100, nan}}),
		"levels one":     Levels(io.Discard, LevelSpec{Stages: []string{"only"}, Signal: []float64{-50}, Noise: []float64{-90}}),
		"waterfall one":  Waterfall(io.Discard, WaterfallSpec{Steps: []Step{{Label: "only", To: -174}}}),
		"waterfall flat": Waterfall(io.Discard, WaterfallSpec{Steps: []Step{{To: 3}, {Kind: StepChange, From: 3, To: 3}, {Kind: StepGap, From: 3, To: 3}}}),
		"levels crowded": Levels(io.Discard, LevelSpec{Stages: strings.Fields("preselector-filter low-noise-amplifier image-filter first-mixer first-IF-filter IF-amplifier second-mixer baseband-filter"), Noise: make([]float64, 8)}),
	}
	for name, err := range ok {
		if err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// TestWaterfallBarsOnlyForChanges: levels are marks and only gains and losses are bars, each
// from the level before it to the level after it, so a level (a thermal noise at −174 dBm/Hz,
// say) never becomes a bar from zero.
func TestWaterfallBarsOnlyForChanges(t *testing.T) {
	var buf bytes.Buffer
	if err := Waterfall(&buf, sampleWaterfall()); err != nil {
		t.Fatal(err)
	}
	s := buf.String()
	// Two changes: the antenna's gain (blue) and the free space loss (vermillion); the gap is
	// a stroked bracket, the levels are glyphs.
	if got := strings.Count(s, "fill:#0072B2") + strings.Count(s, "fill:#D55E00"); got != 2 {
		t.Errorf("%d filled bars, want 2 (one per change)", got)
	}
	if !strings.Contains(s, "stroke:#0072B2") {
		t.Error("the margin is not drawn as a bracket")
	}
}

// Worksheet text reaches titles and labels as written: control characters and U+FFFF,
// which XML does not allow, are dropped so that the chart stays a well-formed document
// (a NUL in a spur block's name made the file unreadable: XML 1.0, section 2.2, Char).
func TestTextOutsideXMLDropped(t *testing.T) {
	s := sampleLine()
	s.Title = "a\x00b\x07c\uffffd\x1be\tf"
	s.Series[0].Name = "free\x0bspace"
	var buf bytes.Buffer
	if err := Line(&buf, s); err != nil {
		t.Fatal(err)
	}
	texts := svgTexts(t, buf.Bytes()) // fails on a character XML refuses
	want := map[string]bool{"abcde\tf": false, "freespace": false}
	for _, x := range texts {
		if _, ok := want[x]; ok {
			want[x] = true
		}
	}
	for x, seen := range want {
		if !seen {
			t.Errorf("no text %q in %q", x, texts)
		}
	}
}
