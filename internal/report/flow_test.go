package report

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/chart"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// kT0B is the thermal noise power in dBm in bandwidth b: k·T0·b with k = 1.380649e-23 J/K
// (SI 2019, exact) and T0 = 290 K (IEEE standard noise temperature).
func kT0B(b float64) float64 { return 10*math.Log10(1.380649e-23*290*b) + 30 }

// TestWaterfallHasNoNoiseFloorBar: on the field probe's page the thermal noise (−126.99 dBm
// in 50 kHz) is where the sensitivity's block starts, a mark at its level, not a bar; every
// bar runs from the level before it to the level after it; and no step or page line shows
// the +126.99 dBm that subtracting it from a margin once gave.
func TestWaterfallHasNoNoiseFloorBar(t *testing.T) {
	r := sheettest.EvalFile(t, "../../worksheets/field-probe-uplink.toml")
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 10})
	if a.Flow == nil {
		t.Fatal("no signal flow for the field probe's margin")
	}
	steps, unit := flowSteps(a.Flow, 1)
	if unit != "dBm" {
		t.Errorf("axis in %q, want dBm", unit)
	}
	found := false
	prev := math.NaN()
	for _, st := range steps {
		if strings.Contains(st.Label, "thermal") {
			found = true
			if st.Kind != chart.StepLevel {
				t.Errorf("the thermal noise is drawn as %v, want a level mark", st.Kind)
			}
			if math.Abs(st.To-kT0B(50e3)) > 0.01 {
				t.Errorf("thermal noise at %.3f dBm, want %.3f (kT0B)", st.To, kT0B(50e3))
			}
		}
		if st.Kind == chart.StepChange && math.Abs(st.From-prev) > 1e-9 {
			t.Errorf("%s: bar starts at %.2f, not at the level before it (%.2f)", st.Label, st.From, prev)
		}
		if st.Kind != chart.StepGap {
			prev = st.To
		}
		if st.To > 20 || strings.Contains(st.Text, "+126.99") {
			t.Errorf("%s: step %+v lies above every level of the link", st.Label, st)
		}
	}
	if !found {
		t.Errorf("no thermal noise step in %+v", steps)
	}
	page, files := Markdown(Input{Result: r, Analysis: a, ChartBase: "p"})
	if strings.Contains(string(page), "+126.99") {
		t.Error("the page shows the thermal noise as +126.99")
	}
	for _, f := range files {
		if strings.Contains(f.Name, "budget") && strings.Contains(string(f.Data), "126.99 dB<") {
			t.Errorf("%s shows a thermal noise bar", f.Name)
		}
	}
}

// TestSignalFlowJSON: "signal_flow" carries the rows of the path and of the compared level's
// block; each term's level is the level before it plus its change (decibel arithmetic).
func TestSignalFlowJSON(t *testing.T) {
	r := sheettest.EvalFile(t, "../../worksheets/barn-silo-backhaul.toml")
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 10})
	var doc struct {
		SignalFlow []struct {
			Item, Kind, Unit, Block string
			Change, Level           *float64
		} `json:"signal_flow"`
	}
	if err := json.Unmarshal(JSON(Input{Result: r, Analysis: a}), &doc); err != nil {
		t.Fatal(err)
	}
	rows := doc.SignalFlow
	if len(rows) == 0 || rows[0].Item != "tx.power" || rows[0].Kind != "start" || rows[0].Unit != "dBm" {
		t.Fatalf("signal_flow %+v", rows)
	}
	blocks := map[string]bool{}
	for i, row := range rows {
		blocks[row.Block] = true
		if row.Level == nil {
			t.Fatalf("row %d has no level", i)
		}
		if row.Kind == "term" && rows[i-1].Block == row.Block && math.Abs(*rows[i-1].Level+*row.Change-*row.Level) > 1e-9 {
			t.Errorf("row %d %s: %.4f + %.4f is not %.4f", i, row.Item, *rows[i-1].Level, *row.Change, *row.Level)
		}
	}
	if !blocks["rx.floor"] {
		t.Errorf("no block for the noise floor the level is compared with: %+v", rows)
	}
}

// TestWaterfallOneAxis: a path in dBW compared with a sensitivity in dBm draws both on the
// dBW axis (−100 dBm is −130 dBW by the definitions of the two units), and the margin's
// bracket spans the margin.
func TestWaterfallOneAxis(t *testing.T) {
	r, diags := sheettest.Eval(`focus = "margin"
ptx    = "1 dBW"
g      = "10 dBi"
loss   = "100 dB"
sens   = "-100 dBm"
prx    = "= g + ptx - loss"
margin = "= prx - 2 dB - sens"
`)
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 10})
	if a.Flow == nil {
		t.Fatal("no signal flow")
	}
	steps, unit := flowSteps(a.Flow, 1)
	if unit != "dBW" || len(steps) < 2 {
		t.Fatalf("axis %q, steps %+v", unit, steps)
	}
	sens, gap := steps[len(steps)-2], steps[len(steps)-1]
	if sens.Label != "sens" || math.Abs(sens.To-(-130)) > 1e-9 {
		t.Errorf("sensitivity step %+v, want a mark at -130 dBW", sens)
	}
	// 1 dBW + 10 dB − 100 dB − 2 dB = −91 dBW; −91 dBW − (−130 dBW) = 39 dB.
	if gap.Kind != chart.StepGap || math.Abs(gap.To-gap.From-39) > 1e-9 {
		t.Errorf("margin step %+v, want a 39 dB bracket", gap)
	}
}

// TestSignalFlowCaseApart: a case whose budget does not follow the first case's signal order
// (here its analysed flow is one term short) gets no level column and is named above the
// table; the others keep theirs.
func TestSignalFlowCaseApart(t *testing.T) {
	src := `focus = "link.margin"
[tx]
power = "10 dBm"
[link]
loss = "80 dB"
sens = "-90 dBm"
margin = "= tx.power - loss - sens"
[[case]]
name = "lossy"
set = { "link.loss" = "90 dB" }
[[case]]
name = "other"
set = { "link.loss" = "70 dB" }
`
	r, diags := sheettest.Eval(src)
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	sh := r.Sheet()
	results, _ := sh.EvalCases(r, sh.Cases, 1)
	opt := analysis.Options{Trials: 10}
	a, _ := analysis.Analyze(r, opt)
	other, _ := analysis.Analyze(results[1], opt)
	if a.Flow == nil || other.Flow == nil {
		t.Fatal("no signal flow")
	}
	short := *other.Flow
	short.Rows = append(append([]analysis.FlowRow{}, short.Rows[:1]...), short.Rows[2:]...)
	other.Flow = &short
	in := Input{Result: r, Analysis: a, Cases: []Case{
		{Case: sh.Nominal, Result: r, Analysis: a},
		{Case: sh.Cases[0], Result: results[0]},
		{Case: sh.Cases[1], Result: results[1], Analysis: other},
	}}
	page, _ := Markdown(in)
	flow := string(page)
	flow = flow[strings.Index(flow, "## Where the budget goes"):]
	// 10 dBm − 80 dB = −70 dBm, with 90 dB −80 dBm: the margins 20 dB and 10 dB above −90 dBm
	for _, want := range []string{
		"\n“other”: not the same signal order, so no column here; see the line items.\n",
		"\n| # | item | change | nominal | lossy |\n",
		"\n| 2 | `link.loss` | -80.00 dB | -70.00 dBm | -80.00 dBm (-90.00 dB) |\n",
	} {
		if !strings.Contains(flow, want) {
			t.Errorf("no %q in\n%s", want, flow)
		}
	}
}
