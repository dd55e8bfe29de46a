package analysis_test

import (
	"math"
	"testing"

	"github.com/rfledger/rfledger/analysis"
)

// handbookLink is a free-space link budget written the way it is read: transmitter, antenna,
// path, receive antenna, then the receiver's sensitivity from its noise floor.
const handbookLink = `focus = "link.margin"
[tx]
power   = "20 dBm"
antenna = "15 dBi"
[path]
distance  = "10 km"
frequency = "2.4 GHz"
fspl      = "= fspl(distance, frequency)"
rain      = "1 dB"
[rx]
antenna     = "12 dBi"
level       = "= tx.power + tx.antenna - path.fspl - path.rain + antenna"
bandwidth   = "1 MHz"
nf          = "5 dB"
snr_req     = "10 dB"
noise_floor = "= thermal(bandwidth) + nf"
sensitivity = "= noise_floor + snr_req"
[link]
margin = "= rx.level - rx.sensitivity"
`

// TestSignalFlowHandbookLink checks the running levels of a free-space link against the
// handbook formulas computed here: the Friis transmission formula Pr = Pt·Gt·Gr·(λ/4πd)²
// (Pozar, Microwave Engineering, 4th ed., ch. 14, from memory), with the free-space loss
// 20·log10(4πd/λ) of ITU-R P.525-4 eq. (4), and the noise floor kT0B·F with
// k = 1.380649e-23 J/K (SI 2019, exact) and T0 = 290 K (IEEE standard noise temperature).
func TestSignalFlowHandbookLink(t *testing.T) {
	r := evalSrc(t, handbookLink)
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 10})
	if a.Flow == nil {
		t.Fatalf("no signal flow for a link written in signal order; budget %+v", a.Budget)
	}
	fspl := fsplDB(10e3, 2.4e9) // ≈ 120.05 dB
	prx := 20 + 15 - fspl - 1 + 12
	kT0B := 10*math.Log10(1.380649e-23*290*1e6) + 30 // dBm in 1 MHz, ≈ −113.98
	sens := kT0B + 5 + 10
	type row struct {
		item  string
		kind  analysis.FlowKind
		level float64
		unit  string
	}
	want := []row{
		{"tx.power", analysis.FlowStart, 20, "dBm"},
		{"tx.antenna", analysis.FlowTerm, 35, "dBm"},
		{"path.fspl", analysis.FlowTerm, 35 - fspl, "dBm"},
		{"path.rain", analysis.FlowTerm, 34 - fspl, "dBm"},
		{"rx.antenna", analysis.FlowTerm, prx, "dBm"},
		{"rx.level", analysis.FlowTotal, prx, "dBm"},
		{"rx.sensitivity", analysis.FlowCompare, prx - sens, "dB"},
		{"link.margin", analysis.FlowTotal, prx - sens, "dB"},
	}
	if len(a.Flow.Rows) != len(want) {
		t.Fatalf("rows %+v, want %d", a.Flow.Rows, len(want))
	}
	for i, w := range want {
		g := a.Flow.Rows[i]
		if g.Item != w.item || g.Kind != w.kind || g.Unit != w.unit {
			t.Errorf("row %d: %s %s in %s, want %s %s in %s", i, g.Kind, g.Item, g.Unit, w.kind, w.item, w.unit)
		}
		near(t, "level after "+w.item, g.Level, w.level, 0.01)
	}
	near(t, "compared level", a.Flow.Rows[6].Compared, sens, 0.01)
	// The sensitivity is not on the signal path: its own terms form a block under it.
	if len(a.Flow.Blocks) != 1 || a.Flow.Blocks[0].Quantity != "rx.sensitivity" {
		t.Fatalf("blocks %+v", a.Flow.Blocks)
	}
	block := a.Flow.Blocks[0].Rows
	wantBlock := []row{
		{"rx.noise_floor: thermal(bandwidth)", analysis.FlowStart, kT0B, "dBm"},
		{"rx.nf", analysis.FlowTerm, kT0B + 5, "dBm"},
		{"rx.noise_floor", analysis.FlowTotal, kT0B + 5, "dBm"},
		{"rx.snr_req", analysis.FlowTerm, sens, "dBm"},
		{"rx.sensitivity", analysis.FlowTotal, sens, "dBm"},
	}
	if len(block) != len(wantBlock) {
		t.Fatalf("block rows %+v", block)
	}
	for i, w := range wantBlock {
		if block[i].Item != w.item || block[i].Kind != w.kind {
			t.Errorf("block row %d: %s %s, want %s %s", i, block[i].Kind, block[i].Item, w.kind, w.item)
		}
		near(t, "block level after "+w.item, block[i].Level, w.level, 0.01)
	}
	near(t, "path loss change", a.Flow.Rows[2].Change, -fspl, 0.01)
}

// TestSignalFlowStartsAtTheFirstLevel: a formula that writes a gain before the power still
// starts from the power (the first level term), and the gain follows it.
func TestSignalFlowStartsAtTheFirstLevel(t *testing.T) {
	r := evalSrc(t, `focus = "eirp"
gain  = "6 dBi"
power = "27 dBm"
eirp  = "= gain + power - 1 dB"
`)
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 10})
	if a.Flow == nil || len(a.Flow.Rows) != 4 {
		t.Fatalf("flow %+v", a.Flow)
	}
	// 27 dBm + 6 dB − 1 dB = 32 dBm (decibel arithmetic, no source needed beyond the definition of dBm).
	for i, w := range []struct {
		item  string
		level float64
	}{{"power", 27}, {"gain", 33}, {"eirp: 1.00 dB", 32}, {"eirp", 32}} {
		if a.Flow.Rows[i].Item != w.item {
			t.Errorf("row %d is %q, want %q", i, a.Flow.Rows[i].Item, w.item)
		}
		near(t, "level after "+w.item, a.Flow.Rows[i].Level, w.level, 1e-9)
	}
}

// TestSignalFlowFallback: a C/N0 is not a level carried along a path (its terms are a dBW,
// a dB/K and a dBW/K/Hz), so it has no signal flow; the sorted contribution list is kept,
// and its running total ends in dBHz at the value of the satellite link equation
// C/N0 = EIRP − L + G/T − 10·log10(k), k = 1.380649e-23 J/K (SI 2019, exact) (Maral and
// Bousquet, Satellite Communications Systems, ch. 5, from memory).
func TestSignalFlowFallback(t *testing.T) {
	r := evalSrc(t, `focus = "cn0"
eirp     = "7 dBW"
loss     = "180 dB"
g_over_t = "20 dB/K"
k        = "-228.5991 dBW/K/Hz"
cn0      = "= eirp - loss + g_over_t - k"
`)
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 10})
	if a.Flow != nil {
		t.Fatalf("a C/N0 got a signal flow: %+v", a.Flow.Rows)
	}
	if len(a.Budget) != 4 {
		t.Fatalf("budget %+v", a.Budget)
	}
	want := 7 - 180 + 20 - 10*math.Log10(1.380649e-23)
	last := a.Budget[len(a.Budget)-1]
	near(t, "running total", last.Total, want, 0.01)
	if last.TotalUnit != "dBHz" {
		t.Errorf("running total in %q, want dBHz", last.TotalUnit)
	}
	// Largest first: k, then the loss; after the two the references leave a dB(K·Hz/W)…
	// whatever they leave, each running total names a unit.
	for _, c := range a.Budget {
		if c.TotalUnit == "" {
			t.Errorf("%s: running total without a unit", c.Item)
		}
	}
}
