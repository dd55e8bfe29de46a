package report

import (
	"bytes"
	"fmt"
	"strconv"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/chart"
)

// addChart renders a chart into a file beside the page and links it.
func (p *page) addChart(kind, alt string, draw func(*bytes.Buffer) error) {
	if p.in.ChartBase == "" {
		return
	}
	// The chart is drawn on a goroutine of its own while the page goes on; its link (whose
	// name holds a hash of the drawing) is set in its place when the page is done.
	c := &pendingChart{at: p.b.Len(), kind: kind, alt: alt, done: make(chan struct{})}
	go func() {
		defer close(c.done)
		c.err = draw(&c.svg)
	}()
	p.charts = append(p.charts, c)
}

// pendingChart is a chart being drawn and the place of its link on the page.
type pendingChart struct {
	at        int // the offset in the page where its link goes
	kind, alt string
	done      chan struct{}
	svg       bytes.Buffer
	err       error
}

// link waits for the chart and returns what goes in its place on the page, adding its file
// to the page's files (in the order the charts were added).
func (p *page) link(c *pendingChart) []byte {
	<-c.done
	if c.err != nil {
		return fmt.Appendf(nil, "_(The %s chart could not be drawn: %s.)_\n\n", text(c.alt), text(c.err.Error()))
	}
	name := chartName(p.in.ChartBase, c.kind, c.svg.Bytes())
	p.files = append(p.files, File{Name: name, Data: c.svg.Bytes()})
	return fmt.Appendf(nil, "![%s](%s)\n\n", text(c.alt), name)
}

func (p *page) levelChart(ci analysis.Cascade) {
	in, hasIn := inputDBm(ci)
	nin, hasNoise := noiseInDBm(ci)
	if !hasIn && !hasNoise {
		return
	}
	spec := chart.LevelSpec{Title: "Levels along " + ci.Chain.Name, Unit: "dBm"}
	spec.Stages = append(spec.Stages, "input")
	if hasIn {
		spec.Signal = append(spec.Signal, in)
	}
	if hasNoise {
		spec.Noise = append(spec.Noise, nin)
	}
	for i, st := range ci.Stages {
		r := ci.Result.Stages[i]
		spec.Stages = append(spec.Stages, st.Name)
		if hasIn {
			spec.Signal = append(spec.Signal, in+r.CumGainDB)
		}
		if hasNoise {
			spec.Noise = append(spec.Noise, nin+r.CumNFDB+r.CumGainDB)
		}
	}
	p.addChart("levels-"+ci.Chain.Name, "level diagram of "+ci.Chain.Name, func(b *bytes.Buffer) error { return chart.Levels(b, spec) })
}

// budgetChart draws a focus that is not in signal order as a waterfall of its running total
// (the units of which the table gives), in the order of the table.
func (p *page) budgetChart() {
	a := p.in.Analysis
	var axis []string
	spec := chart.WaterfallSpec{Title: "Where the budget goes: " + a.Focus.Name}
	prev, up := 0.0, p.focusUp()
	for i, c := range a.Budget {
		st := chart.Step{Label: shorten(c.Item, 34), Kind: chart.StepChange, From: prev, To: c.Total, Text: contribution(c), Good: up*c.Value > 0}
		if i == 0 {
			st.Kind, st.Text = chart.StepLevel, fmtNum(c.Total, c.TotalUnit)
		}
		spec.Steps = append(spec.Steps, st)
		prev = c.Total
		if len(axis) == 0 || axis[len(axis)-1] != c.TotalUnit {
			axis = append(axis, c.TotalUnit)
		}
	}
	spec.Steps = append(spec.Steps, chart.Step{Label: shorten(a.Focus.Name, 34), Kind: chart.StepLevel, To: prev, Text: fmtNum(prev, a.Unit)})
	spec.Axis = "running total (" + strings.Join(axis, ", then ") + ")"
	p.addChart("budget", "running total of "+a.Focus.Name, func(b *bytes.Buffer) error { return chart.Waterfall(b, spec) })
}

func (p *page) histChart() {
	a := p.in.Analysis
	t := a.Tolerance
	spec := chart.HistSpec{
		Title:  fmt.Sprintf("Monte Carlo, %d trials", t.Trials),
		XLabel: unitHead(a.Focus.Name, a.Unit),
		Values: t.Samples,
		Bins:   40,
		VLines: []chart.Point{{Label: "1 %", X: t.P01}, {Label: "median", X: t.P50}, {Label: "99 %", X: t.P99}},
	}
	spread := 3 * (t.P99 - t.P01)
	for _, rq := range p.in.Sheet.Requires {
		if rq.Subject == a.Focus.Name && len(t.Samples) > 0 {
			// A bound far outside the spread would squash the histogram into a line; the
			// tolerance table already says how far away it is.
			if v, err := rq.Bound.In(unitOfName(a.Unit)); err == nil && v >= t.Samples[0]-spread && v <= t.Samples[len(t.Samples)-1]+spread {
				spec.VLines = append(spec.VLines, chart.Point{Label: "bound " + rq.Op + " " + rq.Bound.String(), X: v})
			}
		}
	}
	p.addChart("montecarlo", "Monte Carlo histogram of "+a.Focus.Name, func(b *bytes.Buffer) error { return chart.Histogram(b, spec) })
}

func (p *page) sweepChart(i int, sw sweepResult) {
	spec := chart.LineSpec{
		Title:  "Sweep of " + sw.Sweep.Vary,
		XLabel: unitHead(sw.Sweep.Vary, sw.Unit),
		LogX:   sw.Sweep.Log,
	}
	ylabel := ""
	for _, s := range sw.Series {
		spec.Series = append(spec.Series, chart.Series{Name: s.Quantity, X: sw.X, Y: s.Y})
		ylabel = unitHead(s.Quantity, s.Unit)
	}
	if len(sw.Series) > 1 {
		ylabel = sw.Series[0].Unit
	}
	spec.YLabel = ylabel
	for _, rq := range p.in.Sheet.Requires {
		for _, s := range sw.Series {
			if rq.Subject == s.Quantity {
				if v, err := rq.Bound.In(unitOfName(s.Unit)); err == nil {
					spec.Thresholds = append(spec.Thresholds, chart.HLine{Label: rq.That, Y: v})
				}
			}
		}
	}
	for _, c := range sw.Crossings {
		spec.Marks = append(spec.Marks, chart.Point{Label: fmtNum(c.X, sw.Unit), X: c.X, Y: c.Y})
	}
	p.addChart("sweep-"+strconv.Itoa(i+1), "sweep of "+sw.Sweep.Vary, func(b *bytes.Buffer) error { return chart.Line(b, spec) })
}

// shorten keeps a chart label to n characters (the table beside the chart has it in full).
func shorten(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}
