package rfmath

import (
	"math"
	"testing"
)

// dishRule is the parabolic-antenna gain rule in practical units:
// G(dBi) = 20.4 + 20 log f(GHz) + 20 log D(m) + 10 log η
// (common practice, no source; 20.4 = 20 log10(π·1e9/c) rounded).
func dishRule(dm, fGHz, eff float64) float64 {
	return 20.4 + 20*log10(fGHz) + 20*log10(dm) + 10*log10(eff)
}

func TestAntennaRefs(t *testing.T) {
	vr := func(v float64) float64 {
		rl, err := VSWRToRL(v)
		if err != nil {
			t.Fatal(err)
		}
		return rl
	}
	ml := func(v float64) float64 {
		m, err := MismatchLoss(v)
		if err != nil {
			t.Fatal(err)
		}
		return m
	}
	lambda1G := 299792458 / 1e9
	checkRefs(t, []ref{
		{"dish 1.2 m 12 GHz 55 %", DB(DishGain(1.2, 12e9, 0.55)), dishRule(1.2, 12, 0.55), 0.02, false},           // common practice, no source: 20.4 + 20 log f + 20 log D + 10 log η
		{"dish 1.2 m 12 GHz 55 % ≈ 41.0 dBi", DB(DishGain(1.2, 12e9, 0.55)), 40.98, 0.01, false},                  // G = η(πD/λ)² by hand: 0.55·(150.90)² = 12524
		{"dish 3 m 4 GHz 60 %", DB(DishGain(3, 4e9, 0.6)), dishRule(3, 4, 0.6), 0.02, false},                      // common practice, no source: dish gain rule
		{"dish 0.6 m 20 GHz 65 %", DB(DishGain(0.6, 20e9, 0.65)), dishRule(0.6, 20, 0.65), 0.02, false},           // common practice, no source: dish gain rule
		{"dish 2.4 m 6 GHz 70 %", DB(DishGain(2.4, 6e9, 0.7)), dishRule(2.4, 6, 0.7), 0.02, false},                // common practice, no source: dish gain rule
		{"dish 0.45 m 11.7 GHz 65 %", DB(DishGain(0.45, 11.7e9, 0.65)), dishRule(0.45, 11.7, 0.65), 0.02, false},  // common practice, no source: dish gain rule
		{"doubling D adds 6 dB", DB(DishGain(2.4, 6e9, 0.6)) - DB(DishGain(1.2, 6e9, 0.6)), 6.02, 0.005, false},   // common practice, no source: gain ∝ D²
		{"aperture of dish = η·area", Aperture(DishGain(1.8, 10e9, 0.6), 10e9), 0.6 * math.Pi * 0.81, 1e-9, true}, // Balanis: Ae = η·πD²/4, G = 4πAe/λ²
		{"isotropic aperture 1 GHz", Aperture(1, 1e9), lambda1G * lambda1G / (4 * math.Pi), 1e-12, true},          // Balanis: Ae = λ²/4π for G = 1
		{"isotropic aperture 1 GHz value", Aperture(1, 1e9), 7.152e-3, 0.001, true},                               // by hand: 0.2998²/4π
		{"half-wave dipole 0.13 λ²", Aperture(1.64, 1e9) / (lambda1G * lambda1G), 0.13, 0.01, true},               // value from memory: half-wave dipole Ae ≈ 0.13 λ²
		{"VSWR 2 → RL 9.54 dB", vr(2), 9.54, 0.005, false},                                                        // value from memory: VSWR 2:1 is 9.54 dB return loss
		{"VSWR 2 → ML 0.51 dB", ml(2), 0.51, 0.005, false},                                                        // value from memory: VSWR 2:1 loses 0.51 dB
		{"VSWR 2 → 8/9 delivered", ml(2), -db(8.0 / 9), 1e-12, false},                                             // Pozar: 1 − |Γ|², |Γ| = 1/3
		{"VSWR 2 → RL 20 log 3", vr(2), 20 * log10(3), 1e-12, false},                                              // Pozar: |Γ| = 1/3
		{"VSWR 1.5 → RL 13.98 dB", vr(1.5), 13.98, 0.005, false},                                                  // value from memory: VSWR 1.5 is 14 dB return loss
		{"VSWR 1.5 → ML 0.18 dB", ml(1.5), 0.177, 0.001, false},                                                   // value from memory: VSWR 1.5 loses 0.18 dB
		{"VSWR 1.2 → RL 20.8 dB", vr(1.2), 20.83, 0.005, false},                                                   // value from memory: VSWR 1.2 is 20.8 dB return loss
		{"VSWR 3 → RL 6.02 dB", vr(3), 6.02, 0.005, false},                                                        // value from memory: VSWR 3 is 6 dB return loss (|Γ| = ½)
		{"VSWR 3 → ML 1.25 dB", ml(3), 1.249, 0.001, false},                                                       // value from memory: VSWR 3 loses 1.25 dB
		{"VSWR 1 → no mismatch", ml(1), 0, 0, false},                                                              // Pozar: matched load, Γ = 0
		{"VSWR 1 → infinite RL", vr(1), math.Inf(1), 0, false},                                                    // Pozar: matched load, Γ = 0
		{"RL 10 dB → VSWR 1.92", RLToVSWR(10), 1.925, 0.001, false},                                               // value from memory: 10 dB return loss is VSWR 1.92
		{"RL 20 dB → VSWR 1.22", RLToVSWR(20), 1.222, 0.001, false},                                               // value from memory: 20 dB return loss is VSWR 1.22
		{"RL round trip", RLToVSWR(vr(2.7)), 2.7, 1e-12, false},                                                   // Pozar: inverse pair
		{"RL 0 dB → open/short", RLToVSWR(0), math.Inf(1), 0, false},                                              // Pozar: |Γ| = 1
	})
}

func TestSatelliteRefs(t *testing.T) {
	// Route through received power and noise density: C/N0 = Pr − 10 log(k T)
	// with Pr = EIRP − L + G and G/T = G − 10 log T.
	viaPower := func(eirp, loss, gain, tK float64) float64 {
		pr := eirp - loss + gain
		return pr - db(Thermal(1, tK))
	}
	checkRefs(t, []ref{
		{"−10 log k ≈ 228.6", CN0(0, 0, 0), 228.6, 0.01, false},                                       // value from memory: Boltzmann constant is −228.6 dBW/(K·Hz)
		{"GEO Ku example", CN0(50, 205, 20), 50 - 205 + 20 + 228.6, 0.01, false},                      // satellite link equation (Maral & Bousquet), by hand
		{"via received power", CN0(44, 196.5, 35-db(150)), viaPower(44, 196.5, 35, 150), 1e-9, false}, // satellite link equation via Thermal (Maral & Bousquet)
		{"via received power 2", CN0(60, 210, 40-db(60)), viaPower(60, 210, 40, 60), 1e-9, false},     // satellite link equation via Thermal (Maral & Bousquet)
		{"1 dB more loss", CN0(50, 206, 20) - CN0(50, 205, 20), -1, 1e-12, false},                     // link equation is linear in dB
	})
}
