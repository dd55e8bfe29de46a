package rflib_test

import (
	"math"
	"strings"
	"testing"
)

// ktb is k·T·B in dBm computed from the SI Boltzmann constant (IEEE T0 = 290 K).
func ktb(b, t float64) float64 { return db10(kB * t * b / 1e-3) }

// friisF is Friis (1944): F = F1 + (F2 − 1)/G1 + (F3 − 1)/(G1 G2) + … for stages given as
// (gain dB, NF dB) pairs; it returns the noise figure in dB.
func friisF(stages ...[2]float64) float64 {
	f, g := 0.0, 1.0
	for i, s := range stages {
		fi := math.Pow(10, s[1]/10)
		if i == 0 {
			f = fi
		} else {
			f += (fi - 1) / g
		}
		g *= math.Pow(10, s[0]/10)
	}
	return db10(f)
}

// iip3Cascade is 1/IIP3 = Σ G_before/IIP3_i in mW for stages given as (gain dB, IIP3 dBm).
func iip3Cascade(stages ...[2]float64) float64 {
	inv, g := 0.0, 1.0
	for _, s := range stages {
		inv += g / math.Pow(10, s[1]/10)
		g *= math.Pow(10, s[0]/10)
	}
	return -db10(inv)
}

func TestNoiseReferences(t *testing.T) {
	refs := []ref{
		// thermal: k·T·B; −174 dBm/Hz at T0 = 290 K (IEEE T0; the trade's −174 is rounded).
		{"thermal(1 Hz)", "dBm", -174, 0.03, "IEEE T0 = 290 K: −174 dBm/Hz (common practice)"},
		{"thermal(1 Hz)", "dBm", ktb(1, 290), 1e-9, "k·T0·B, k from the 2019 SI, IEEE T0 = 290 K"},
		{"thermal(1 MHz)", "dBm", ktb(1e6, 290), 1e-9, "k·T0·B, IEEE T0 = 290 K"},
		{"thermal(125 kHz)", "dBm", ktb(125e3, 290), 1e-9, "k·T0·B, IEEE T0 = 290 K"},
		{"thermal(100 kHz, 300 K)", "dBm", ktb(1e5, 300), 1e-9, "k·T·B at 300 K"},
		{"thermal(20 MHz, 50 K)", "dBm", ktb(20e6, 50), 1e-9, "k·T·B at 50 K"},
		{"thermal(60 dBHz)", "dBm", ktb(1e6, 290), 1e-9, "k·T0·B with B written as a level"},
		{"to(thermal(1 MHz), 'dBW')", "dBW", ktb(1e6, 290) - 30, 1e-9, "k·T0·B in dBW"},

		// nf_to_te, te_to_nf: F = 1 + Te/T0, T0 = 290 K (IEEE noise-factor definition).
		{"nf_to_te(3 dB)", "K", 290 * (math.Pow(10, 0.3) - 1), 1e-9, "IEEE F = 1 + Te/T0"},
		{"nf_to_te(1 dB)", "K", 290 * (math.Pow(10, 0.1) - 1), 1e-9, "IEEE F = 1 + Te/T0"},
		{"nf_to_te(0 dB)", "K", 0, 1e-12, "IEEE F = 1 + Te/T0: a noiseless stage"},
		{"nf_to_te(0.5 dB)", "K", 35.4, 0.05, "common practice, no source: 0.5 dB ≈ 35 K"},
		{"te_to_nf(290 K)", "dB", db10(2), 1e-9, "IEEE F = 1 + Te/T0: Te = T0 is 3.01 dB"},
		{"te_to_nf(75 K)", "dB", db10(1 + 75.0/290), 1e-9, "IEEE F = 1 + Te/T0"},
		{"te_to_nf(0 K)", "dB", 0, 1e-12, "IEEE F = 1 + Te/T0"},
		{"te_to_nf(nf_to_te(2.2 dB))", "dB", 2.2, 1e-9, "round trip of the IEEE definition"},
		{"te_to_nf(dbk(500 K))", "dB", db10(1 + 500.0/290), 1e-9, "IEEE F = 1 + Te/T0, Te given in dBK"},

		// sensitivity: k·T0·B + NF + SNR.
		{"sensitivity(6 dB, 1 MHz, 10 dB)", "dBm", ktb(1e6, 290) + 16, 1e-9, "k·T0·B + NF + SNR, IEEE T0 = 290 K"},
		{"sensitivity(3 dB, 125 kHz, -7.5 dB)", "dBm", ktb(125e3, 290) + 3 - 7.5, 1e-9, "k·T0·B + NF + SNR"},
		{"sensitivity(6 dB, 1 MHz, 10 dB) - (thermal(1 MHz) + 6 dB)", "dB", 10, 1e-9, "sensitivity is the floor plus the SNR"},
	}
	runRefs(t, "", refs)
}

func TestChainReferences(t *testing.T) {
	sheet := `
[rx]
two   = "= cascade_nf(chain2)"
three = "= cascade_nf(chain3)"
gain3 = "= cascade_gain(chain3)"
te3   = "= cascade_te(chain3)"
iip3  = "= cascade_iip3(chain3)"
oip3  = "= cascade_oip3(chain3)"
p1    = "= cascade_ip1db(chain3)"
op1   = "= cascade_op1db(chain3)"
pnf   = "= cascade_nf(passive)"
pgain = "= cascade_gain(passive)"

[[rx.chain2]]
stage = "LNA"
gain  = "15 dB"
nf    = "1.5 dB"
[[rx.chain2]]
stage = "mixer"
gain  = "-7 dB"
nf    = "8 dB"

[[rx.chain3]]
stage = "filter"
loss  = "2 dB"
iip3  = "50 dBm"
ip1db = "40 dBm"
[[rx.chain3]]
stage = "LNA"
gain  = "20 dB"
te    = "75 K"
oip3  = "30 dBm"
op1db = "18 dBm"
[[rx.chain3]]
stage = "mixer"
gain  = "-6 dB"
nf    = "10 dB"
iip3  = "15 dBm"
ip1db = "5 dBm"

[[rx.passive]]
stage = "cable"
loss  = "3 dB"
`
	sh, diags := load(t, sheet)
	if err := diags.Err(); err != nil {
		t.Fatal(err)
	}
	lnaNF := db10(1 + 75.0/290) // te → NF, IEEE T0 = 290 K
	checks := []struct {
		name, unit string
		want, tol  float64
		src        string
	}{
		{"rx.two", "dB", friisF([2]float64{15, 1.5}, [2]float64{-7, 8}), 1e-9, "Friis 1944, two stages"},
		{"rx.three", "dB", friisF([2]float64{-2, 2}, [2]float64{20, lnaNF}, [2]float64{-6, 10}), 1e-9, "Friis 1944, three stages, passive loss NF = loss"},
		{"rx.gain3", "dB", -2 + 20 - 6, 1e-9, "common practice, no source: gains add in dB"},
		{"rx.te3", "K", 290 * (math.Pow(10, friisF([2]float64{-2, 2}, [2]float64{20, lnaNF}, [2]float64{-6, 10})/10) - 1), 1e-6, "Friis 1944; Te = T0 (F − 1), IEEE T0 = 290 K"},
		{"rx.iip3", "dBm", iip3Cascade([2]float64{-2, 50}, [2]float64{20, 30 - 20}, [2]float64{-6, 15}), 1e-9, "intercept cascade, LNA IIP3 = OIP3 − gain"},
		{"rx.oip3", "dBm", iip3Cascade([2]float64{-2, 50}, [2]float64{20, 10}, [2]float64{-6, 15}) + 12, 1e-9, "OIP3 = IIP3 + total gain"},
		{"rx.p1", "dBm", iip3Cascade([2]float64{-2, 40}, [2]float64{20, 18 - 20 + 1}, [2]float64{-6, 5}), 1e-9, "IP1dB cascade (common practice, no source); input P1dB = OP1dB − gain + 1 dB"},
		{"rx.op1", "dBm", iip3Cascade([2]float64{-2, 40}, [2]float64{20, 18 - 20 + 1}, [2]float64{-6, 5}) + 12 - 1, 1e-9, "output P1dB = input P1dB + gain − 1 dB (Razavi, RF Microelectronics, §2.2.2)"},
		{"rx.pnf", "dB", 3, 1e-9, "passive loss at T0: NF = loss (IEEE T0 = 290 K)"},
		{"rx.pgain", "dB", -3, 1e-9, "passive loss: gain = −loss"},
	}
	for _, c := range checks {
		if got := value(t, sh, c.name, c.unit); math.Abs(got-c.want) > c.tol {
			t.Errorf("%s = %.6g %s, want %.6g (%s)", c.name, got, c.unit, c.want, c.src)
		}
	}
}

func TestChainAndNoiseErrors(t *testing.T) {
	cases := []struct{ formula, want string }{
		{"thermal(1 km)", "thermal: b: got m, want a frequency"},
		{"nf_to_te(3)", "nf_to_te: nf: got a plain number, want a ratio in dB"},
		{"nf_to_te(-1 dB)", "nf_to_te: nf: a noise figure cannot be negative"},
		{"te_to_nf(3 dB)", "te_to_nf: te: got dB, want a temperature"},
		{"sensitivity(6 dB, 1 MHz, 10)", "sensitivity: snr: got a plain number, want a ratio in dB"},
	}
	for _, c := range cases {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
	}
	// A chain function needs a chain.
	sh, diags := load(t, "x = \"= cascade_nf(3 dB)\"\n")
	if !diags.HasErrors() || !strings.Contains(diags.Error(), "cascade_nf: chain") {
		t.Errorf("cascade_nf(3 dB): %v", diags)
	}
	_ = sh
	// cascade_iip3 with no intercepts is an error naming the cause.
	_, diags = load(t, "x = \"= cascade_iip3(c)\"\n[[c]]\nstage = \"a\"\ngain = \"10 dB\"\nnf = \"2 dB\"\n")
	if !strings.Contains(diags.Error(), "no stage has iip3 or oip3") {
		t.Errorf("cascade_iip3 without intercepts: %v", diags)
	}
}

// Issue 8, finding 9: impossible stage values are errors. A physical two-port has noise
// factor F = 1 + Te/T0 ≥ 1 (Friis 1944), so NF ≥ 0 dB and Te ≥ 0 K; a stage of −1.2 dB
// once gave a share of F−1 of −476.82 %.
func TestImpossibleStages(t *testing.T) {
	cases := []struct{ stage, want string }{
		{"nf = \"-1.2 dB\"", `stage "lna": nf -1.20 dB is below 0 dB`},
		{"te = \"-5 K\"", `stage "lna": te -5 K is negative`},
	}
	for _, c := range cases {
		for _, fn := range []string{"cascade_nf", "cascade_te", "cascade_gain"} {
			_, diags := load(t, "x = \"= "+fn+"(c)\"\n[[c]]\nstage = \"lna\"\ngain = \"10 dB\"\n"+c.stage+"\n")
			if !strings.Contains(diags.Error(), c.want) {
				t.Errorf("%s with %s: %v", fn, c.stage, diags)
			}
		}
	}
	// The edge is allowed: a noiseless stage, NF 0 dB = Te 0 K (F = 1 + 0/T0 = 1, Friis 1944).
	sh, diags := load(t, "x = \"= cascade_nf(c)\"\ny = \"= cascade_nf(d)\"\n[[c]]\ngain = \"10 dB\"\nte = \"0 K\"\n[[d]]\ngain = \"10 dB\"\nnf = \"0 dB\"\n")
	if err := diags.Err(); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"x", "y"} {
		if got := value(t, sh, name, "dB"); math.Abs(got) > 1e-12 {
			t.Errorf("%s = %g dB, want 0 (F = 1)", name, got)
		}
	}
}
