package analysis_test

import (
	"fmt"
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

// TestWorstCaseCorners: for a sum of decibel terms, the worst case is the nominal moved by
// every term's limit in the direction that hurts (the arithmetic worst-case stack-up: exact
// for a sum, no source needed), so each corner can be written down by hand. An input with a
// tolerance that only a requirement reads does not move the focus and stays at its nominal.
func TestWorstCaseCorners(t *testing.T) {
	r := evalSrc(t, `focus = "m"
a = { is = "10 dBm", tol = "1 dB" }
b = { is = "3 dB", tol = ["-0.5 dB", "+1.5 dB"] }
c = { is = "2 dB", tol = "2 dB" }
e = { is = "5 dB", tol = "1 dB" }
m = "= a + b - c"
[[require]]
that = "= e <= 9 dB"
`)
	a, diags := analysis.Analyze(r, analysis.Options{Trials: 10, Seed: 1})
	if diags.HasErrors() || a.Tolerance == nil {
		t.Fatalf("no tolerance analysis: %v", diags)
	}
	tol := a.Tolerance
	// Nominal 10 + 3 − 2 = 11 dBm.
	near(t, "worst case low", tol.WorstLow, 11-1-0.5-2, 1e-9)
	near(t, "worst case high", tol.WorstHigh, 11+1+1.5+2, 1e-9)
	type want struct {
		input, limit string
		value        float64
		unit         string
		effect       float64
	}
	check := func(what string, got []analysis.Corner, ws []want) {
		t.Helper()
		if len(got) != len(ws) {
			t.Fatalf("%s: %+v", what, got)
		}
		for i, w := range ws {
			g := got[i]
			if g.Input != w.input || g.Limit != w.limit || g.Unit != w.unit {
				t.Errorf("%s[%d] = %+v, want %+v", what, i, g, w)
				continue
			}
			near(t, what+" "+w.input+" value", g.Value, w.value, 1e-9)
			near(t, what+" "+w.input+" effect", g.Effect, w.effect, 1e-9)
		}
	}
	// Largest effect first: c moves m by 2 dB, a by 1 dB, b by 0.5 dB (down) or 1.5 dB (up).
	check("low corner", tol.LowCorner, []want{
		{"c", "high", 4, "dB", -2},
		{"a", "low", 9, "dBm", -1},
		{"b", "low", 2.5, "dB", -0.5},
		{"e", "nominal", 5, "dB", 0},
	})
	check("high corner", tol.HighCorner, []want{
		{"c", "low", 0, "dB", 2},
		{"b", "high", 4.5, "dB", 1.5},
		{"a", "high", 11, "dBm", 1},
		{"e", "nominal", 5, "dB", 0},
	})
}

// TestSensitivityOrder: largest effect first, and effects of the same size in name order
// whatever order the sheet declares them in, so the table does not depend on the file's order.
func TestSensitivityOrder(t *testing.T) {
	r := evalSrc(t, `focus = "m"
zeta = "10 dBm"
alpha = "3 dB"
mid = "2 dB"
d = "2 km"
m = "= zeta - alpha + 2 * mid + fspl(d, 868 MHz) - fspl(1 km, 868 MHz)"
`)
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 10})
	var got []string
	for _, s := range a.Sensitivity {
		got = append(got, s.Input)
	}
	// mid moves m by 2 dB per dB; d by 20·log10(1.1) ≈ 0.83 dB per 10 % (ITU-R P.525);
	// alpha and zeta by 1 dB each.
	if fmt.Sprint(got) != "[mid alpha zeta d]" {
		t.Errorf("order %v", got)
	}
}
