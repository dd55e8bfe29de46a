package engine_test

import (
	"math"
	"testing"

	"github.com/rfledger/rfledger/internal/rfmath"
)

// demoInputs are the inputs of worksheets/field-probe-uplink.toml, in SI units and dB, as a
// program would hold them (passed in, so the compiler cannot fold the arithmetic away).
type demoInputs struct {
	txPower, txVSWR, txCable, txAntenna                                  float64
	frequency, distance, ref, exponent, clutter                          float64
	rxAntenna, rxCableRate, rxCableLength, bandwidth, bitrate, berTarget float64
	stages                                                               [3]rfmath.Stage
	oip3LNA, op1dbLNA                                                    float64
	packetBits                                                           float64
}

// demoValues is every quantity of the demo, and its requirements.
type demoValues struct {
	in                                                     demoInputs
	match, eirp, loss, rxCable, ebn0Req, snrReq, nf, floor float64
	level, sensitivity, margin, per                        float64
	chainInput, chainBandwidth                             float64
	marginOK, eirpOK                                       bool
}

func demoIn() demoInputs {
	return demoInputs{
		txPower: 14, txVSWR: 1.8, txCable: 0.3, txAntenna: -2,
		frequency: 868e6, distance: 2400, ref: 100, exponent: 3.1, clutter: 6,
		rxAntenna: 5, rxCableRate: 0.22, rxCableLength: 12, bandwidth: 50e3, bitrate: 9600, berTarget: 1e-4,
		stages: [3]rfmath.Stage{
			{Name: "band filter", GainDB: -1.5, NFDB: 1.5, IIP3: 35, HasIIP3: true},
			{Name: "LNA", GainDB: 16, NFDB: 1.2, HasIIP3: true},
			{Name: "radio", GainDB: 10, NFDB: 7, IIP3: -12, HasIIP3: true, IP1dB: -22, HasIP1dB: true},
		},
		oip3LNA:    20,
		op1dbLNA:   8,
		packetBits: 256,
	}
}

// handDemo evaluates the demo worksheet in plain Go over the same models the function library
// calls (internal/rfmath), so that BenchmarkEvalDemo's ratio measures the engine's own cost.
func handDemo(in *demoInputs, v *demoValues) {
	v.in = *in
	v.match, _ = rfmath.MismatchLoss(in.txVSWR)
	v.eirp = in.txPower - v.match - in.txCable + in.txAntenna
	v.loss = rfmath.LogDistance(in.distance, in.frequency, in.ref, in.exponent) + in.clutter
	v.rxCable = in.rxCableRate * in.rxCableLength
	v.ebn0Req, _ = rfmath.EbN0For("fsk-nc", in.berTarget)
	v.snrReq = rfmath.SNR(v.ebn0Req, in.bitrate, in.bandwidth)
	st := in.stages
	st[1].IIP3 = in.oip3LNA - st[1].GainDB // an output intercept referred to the input
	v.nf = rfmath.CascadeChain(st[:]).NFDB
	v.floor = rfmath.DBm(rfmath.Thermal(in.bandwidth, rfmath.T0)) + v.nf
	v.level = v.eirp - v.loss + in.rxAntenna - v.rxCable
	v.sensitivity = v.floor + v.snrReq
	v.chainInput, v.chainBandwidth = v.level, in.bandwidth
	v.margin = v.level - v.sensitivity
	v.per = rfmath.PER(in.berTarget, in.packetBits)
	v.marginOK = v.margin >= 10
	v.eirpOK = v.eirp <= rfmath.DBm(25e-3)
}

// expected lists every quantity of the demo with the hand-written value and the unit it is in.
func (v *demoValues) expected() map[string]struct {
	value float64
	unit  string
} {
	type vu = struct {
		value float64
		unit  string
	}
	in := v.in
	return map[string]vu{
		"tx.power": {in.txPower, "dBm"}, "tx.vswr": {in.txVSWR, ""}, "tx.match": {v.match, "dB"},
		"tx.cable": {in.txCable, "dB"}, "tx.antenna": {in.txAntenna, "dBi"}, "tx.eirp": {v.eirp, "dBm"},
		"path.frequency": {in.frequency, "Hz"}, "path.distance": {in.distance, "m"}, "path.ref": {in.ref, "m"},
		"path.exponent": {in.exponent, ""}, "path.clutter": {in.clutter, "dB"}, "path.loss": {v.loss, "dB"},
		"rx.antenna": {in.rxAntenna, "dBi"}, "rx.cable": {v.rxCable, "dB"}, "rx.bandwidth": {in.bandwidth, "Hz"},
		"rx.bitrate": {in.bitrate, "bit/s"}, "rx.ber_target": {in.berTarget, ""}, "rx.ebn0_req": {v.ebn0Req, "dB"},
		"rx.snr_req": {v.snrReq, "dB"}, "rx.nf": {v.nf, "dB"}, "rx.floor": {v.floor, "dBm"},
		"rx.level": {v.level, "dBm"}, "rx.sensitivity": {v.sensitivity, "dBm"},
		"rx.chain[1].loss": {-in.stages[0].GainDB, "dB"}, "rx.chain[1].iip3": {in.stages[0].IIP3, "dBm"},
		"rx.chain[2].gain": {in.stages[1].GainDB, "dB"}, "rx.chain[2].nf": {in.stages[1].NFDB, "dB"},
		"rx.chain[2].oip3": {in.oip3LNA, "dBm"}, "rx.chain[2].op1db": {in.op1dbLNA, "dBm"},
		"rx.chain[3].ip1db": {in.stages[2].IP1dB, "dBm"},
		"rx.chain_input":    {v.chainInput, "dBm"}, "rx.chain_bandwidth": {v.chainBandwidth, "Hz"},
		"rx.chain[3].gain": {in.stages[2].GainDB, "dB"}, "rx.chain[3].nf": {in.stages[2].NFDB, "dB"},
		"rx.chain[3].iip3": {in.stages[2].IIP3, "dBm"},
		"link.margin":      {v.margin, "dB"}, "link.packet_bits": {in.packetBits, "bit"}, "link.per": {v.per, ""},
	}
}

// TestDemoMatchesHandWritten checks the hand-written baseline against the engine for every
// quantity of the demo, so neither can drift from the worksheet unnoticed: a quantity added
// to the demo fails here until the baseline computes it too. The hand-written values follow
// the published models in internal/rfmath (each sourced there); independently of both, the
// margin is also checked against the closed forms below.
func TestDemoMatchesHandWritten(t *testing.T) {
	sh := evalFile(t, demo)
	var v demoValues
	in := demoIn()
	handDemo(&in, &v)
	want := v.expected()
	seen := map[string]bool{}
	for _, q := range sh.Sheet().Quantities() {
		w, ok := want[q.Name]
		if !ok {
			t.Errorf("%s: in the demo but not in the hand-written baseline", q.Name)
			continue
		}
		seen[q.Name] = true
		got := value(t, sh, q.Name, w.unit)
		if math.Abs(got-w.value) > 1e-9*math.Abs(w.value) {
			t.Errorf("%s = %.15g %s, hand-written %.15g", q.Name, got, w.unit, w.value)
		}
	}
	for name := range want {
		if !seen[name] {
			t.Errorf("%s: in the hand-written baseline but not in the demo", name)
		}
	}
	pass := []bool{v.marginOK, v.eirpOK}
	if len(sh.Sheet().Requires) != len(pass) {
		t.Fatalf("%d requirements, the baseline has %d", len(sh.Sheet().Requires), len(pass))
	}
	for i, rq := range sh.Sheet().Requires {
		if p, known := sh.Pass(rq); !known || p != pass[i] {
			t.Errorf("requirement %q: known %v pass %v, hand-written %v", rq.That, known, p, pass[i])
		}
	}
	near(t, "link.margin (closed forms)", v.margin, closedFormMargin(), 1e-6)
}

// closedFormMargin is the demo's margin written out from the published formulas without
// rfmath: mismatch loss from Γ = (VSWR−1)/(VSWR+1), L = −10·log10(1 − Γ²) (Pozar, Microwave
// Engineering); free space to d0 by ITU-R P.525-4, then 10·n·log10(d/d0); non-coherent
// binary FSK, BER = ½·exp(−Eb/N0 / 2), so Eb/N0 = −2·ln(2·BER) (Proakis, Digital
// Communications; rfmath finds it by bisection, hence the looser tolerance); SNR = Eb/N0 ·
// Rb/B; Friis over the three stages; k·T0·B with T0 = 290 K.
func closedFormMargin() float64 {
	db := func(x float64) float64 { return 10 * math.Log10(x) }
	lin := func(x float64) float64 { return math.Pow(10, x/10) }
	gamma := (1.8 - 1) / (1.8 + 1)
	eirp := 14 - (-db(1 - gamma*gamma)) - 0.3 + (-2)
	loss := fsplDB(100, 868e6) + 10*3.1*math.Log10(2400/100.0) + 6
	snr := db(-2*math.Log(2*1e-4)) + db(9600/50e3)
	g1, g2 := lin(-1.5), lin(16)
	f := lin(1.5) + (lin(1.2)-1)/g1 + (lin(7)-1)/(g1*g2)
	floor := ktbDBm(50e3, 290) + db(f)
	level := eirp - loss + 5 - 0.22*12
	return level - (floor + snr)
}
