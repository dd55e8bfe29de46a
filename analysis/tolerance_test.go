package analysis_test

import (
	"math"
	"testing"

	"github.com/rfledger/rfledger/analysis"
)

// TestSigmaAndDecibelTolerances: sigma = "8 dB" is a standard deviation (the normal spread of
// log-normal shadowing is given so, e.g. Rappaport, Wireless Communications, §4.9.2), so a
// focus equal to that input has RSS σ = 8 dB and 3σ worst cases; a decibel tolerance on a
// linear power, 2 W ± 0.5 dB, has the limits 2 W · 10^(±0.05) (the definition of the decibel,
// IEC 60027-3).
func TestSigmaAndDecibelTolerances(t *testing.T) {
	r := evalSrc(t, `focus = "x.m"
[x]
s = { is = "0 dB", sigma = "8 dB" }
w = { is = "2 W", tol = "0.5 dB", dist = "uniform" }
m = "= s + dbw(w)"
`)
	a, diags := analysis.Analyze(r, analysis.Options{Trials: 2000, Seed: 1})
	if diags.HasErrors() || a.Tolerance == nil {
		t.Fatalf("no tolerance analysis: %v", diags)
	}
	tol := a.Tolerance
	nom := 10 * math.Log10(2)
	near(t, "worst case low", tol.WorstLow, nom-3*8-0.5, 1e-9)
	near(t, "worst case high", tol.WorstHigh, nom+3*8+0.5, 1e-9)
	// RSS: 8 dB from sigma; the uniform ±0.5 dB has σ = 0.5/√3 dB (in dB to first order).
	near(t, "RSS σ", tol.RSSSigma, math.Hypot(8, 0.5/math.Sqrt(3)), 0.01)
}
