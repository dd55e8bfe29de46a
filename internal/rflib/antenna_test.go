package rflib_test

import (
	"math"
	"strings"
	"testing"
)

func TestAntennaReferences(t *testing.T) {
	lambda := func(f float64) float64 { return c0 / f }
	// dishRef is G = 4π Ae/λ² with Ae = η π d²/4 (Balanis), in dBi.
	dishRef := func(d, f, eta float64) float64 {
		ae := eta * math.Pi * d * d / 4
		return db10(4 * math.Pi * ae / (lambda(f) * lambda(f)))
	}
	// gamma is |Γ| = (v − 1)/(v + 1) (Pozar, transmission lines).
	gamma := func(v float64) float64 { return (v - 1) / (v + 1) }
	refs := []ref{
		{"dish_gain(1.2 m, 12 GHz, 0.6)", "dBi", dishRef(1.2, 12e9, 0.6), 1e-9, "Balanis: G = 4π Ae/λ², Ae = η π d²/4"},
		{"dish_gain(3 m, 4 GHz, 55 %)", "dBi", dishRef(3, 4e9, 0.55), 1e-9, "Balanis: G = 4π Ae/λ²"},
		{"dish_gain(60 cm, 10 GHz, 0.65)", "dBi", dishRef(0.6, 10e9, 0.65), 1e-9, "Balanis: G = 4π Ae/λ²"},
		{"dish_gain(2 m, 12 GHz, 0.6) - dish_gain(1 m, 12 GHz, 0.6)", "dB", db10(4), 1e-9, "Balanis: gain grows with d², +6.02 dB per doubling"},
		{"aperture(0 dBi, 1 GHz)", "m^2", lambda(1e9) * lambda(1e9) / (4 * math.Pi), 1e-12, "isotropic aperture λ²/4π (Friis 1946)"},
		{"aperture(2.15 dBi, 868 MHz)", "cm^2", 1e4 * math.Pow(10, 0.215) * lambda(868e6) * lambda(868e6) / (4 * math.Pi), 1e-9, "Balanis: Ae = G λ²/4π, dipole 2.15 dBi"},
		{"aperture(10, 2.4 GHz)", "m^2", 10 * lambda(2.4e9) * lambda(2.4e9) / (4 * math.Pi), 1e-12, "Balanis: Ae = G λ²/4π, linear gain"},
		{"aperture(dish_gain(1.2 m, 12 GHz, 0.6), 12 GHz)", "m^2", 0.6 * math.Pi * 1.44 / 4, 1e-9, "Balanis: aperture of a dish is η π d²/4"},
		{"vswr_to_rl(2)", "dB", -20 * math.Log10(gamma(2)), 1e-9, "Pozar: RL = −20 log |Γ|"},
		{"vswr_to_rl(2)", "dB", 9.54, 0.005, "common practice, no source: VSWR 2 is 9.54 dB return loss"},
		{"vswr_to_rl(1.5)", "dB", -20 * math.Log10(gamma(1.5)), 1e-9, "Pozar: RL = −20 log |Γ|"},
		{"vswr_to_rl(1.2)", "dB", 20.83, 0.005, "common practice, no source: VSWR 1.2 ≈ 20.8 dB"},
		{"rl_to_vswr(20 dB)", "", (1 + 0.1) / (1 - 0.1), 1e-9, "Pozar: |Γ| = 10^(−RL/20) = 0.1"},
		{"rl_to_vswr(10 dB)", "", (1 + math.Pow(10, -0.5)) / (1 - math.Pow(10, -0.5)), 1e-9, "Pozar"},
		{"rl_to_vswr(vswr_to_rl(3))", "", 3, 1e-9, "round trip of the Pozar definitions"},
		{"mismatch_loss(2)", "dB", -db10(1 - gamma(2)*gamma(2)), 1e-9, "Pozar: ML = −10 log(1 − |Γ|²)"},
		{"mismatch_loss(2)", "dB", 0.51, 0.005, "common practice, no source: VSWR 2 loses 0.51 dB"},
		{"mismatch_loss(1.5)", "dB", -db10(1 - gamma(1.5)*gamma(1.5)), 1e-9, "Pozar"},
		{"mismatch_loss(1)", "dB", 0, 1e-12, "Pozar: a perfect match loses nothing"},
	}
	runRefs(t, "", refs)
	for _, c := range []struct{ formula, want string }{
		{"dish_gain(1 m, 12 GHz, 1.2)", "dish_gain: efficiency: must lie above 0 and at most 1"},
		{"dish_gain(1 GHz, 1 m, 0.6)", "dish_gain: d: got Hz, want a length"},
		{"aperture(3 dBm, 1 GHz)", "aperture: g: got dBm, want a plain number"},
		{"vswr_to_rl(0.5)", "vswr_to_rl: VSWR must be at least 1"},
		{"vswr_to_rl(1)", "vswr_to_rl: v = 1 is a perfect match"},
		{"rl_to_vswr(-14 dB)", "rl_to_vswr: rl: return loss is written as a positive number of dB"},
		{"rl_to_vswr(14)", "rl_to_vswr: rl: got a plain number, want a ratio in dB"},
		{"mismatch_loss(2 dB)", "mismatch_loss: v: got dB, want a plain number"},
	} {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
	}
}

func TestSatelliteReferences(t *testing.T) {
	kdb := db10(kB) // 10 log10 k, −228.6 dBW/K/Hz (k from the 2019 SI)
	refs := []ref{
		{"cn0(50 dBW, 200 dB, 20 dB/K)", "dBHz", 50 - 200 + 20 - kdb, 1e-9, "link equation C/N0 = EIRP − L + G/T − k (Maral & Bousquet)"},
		{"cn0(50 dBW, 200 dB, 20 dB/K)", "dBHz", 98.6, 0.01, "link equation with k = −228.6 dBW/K/Hz (common practice)"},
		{"cn0(80 dBm, 200 dB, 20 dB/K)", "dBHz", 50 - 200 + 20 - kdb, 1e-9, "link equation; 80 dBm = 50 dBW"},
		{"cn0(eirp, fspl(35786 km, 12 GHz) + 0.5 dB, gt)", "dBHz", 52 - (fsplP525(35786, 12000) + 0.5) + 12 - kdb, 1e-9, "link equation with the ITU-R P.525 loss"},
		// The worksheet algebra EIRP − L + G/T − k lands on the same C/N0 (units rules of the format).
		{"cn0(eirp, 205 dB, gt) - (eirp - 205 dB + gt - k)", "dB", 0, 1e-4, // k written to 4 decimals
			"the function and the decibel algebra agree"},
		// C/N0 − 10 log Rb = Eb/N0.
		{"cn0(eirp, 205 dB, gt) - dbhz(2 Mbit/s)", "dB", 52 - 205 + 12 - kdb - 60 - db10(2), 1e-9, "Eb/N0 = C/N0 − 10 log Rb (Maral & Bousquet)"},
	}
	runRefs(t, "eirp = \"52 dBW\"\ngt = \"12 dB/K\"\nk = \"-228.5991 dBW/K/Hz\"", refs)
	for _, c := range []struct{ formula, want string }{
		{"cn0(50 dB, 200 dB, 20 dB/K)", "cn0: eirp: got dB, want a power"},
		{"cn0(50 dBW, 200 dB, 20 dBK)", "cn0: g_over_t: got dBK, want"},
		{"cn0(50 dBW, 200, 20 dB/K)", "cn0: loss: got a plain number, want a ratio in dB"},
	} {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
	}
}
