package rfmath

import (
	"fmt"
	"math"
)

// DishGain returns the LINEAR gain (ratio over isotropic, not dBi) of a
// circular aperture antenna of diameter d (m) at frequency f (Hz) with
// aperture efficiency eff (0..1):
//
//	G = eff (π d / λ)²
//
// Source: antenna effective-area relation G = 4π Ae/λ² with Ae = eff π d²/4
// (Balanis, Antenna Theory).
// Use DB for dBi. NaN for negative d, f ≤ 0 or eff outside [0, 1].
func DishGain(d, f, eff float64) float64 {
	if math.IsNaN(d) || d < 0 || !positive(f) || !(eff >= 0 && eff <= 1) {
		return math.NaN()
	}
	x := math.Pi * d / Wavelength(f)
	return eff * x * x
}

// Aperture returns the effective aperture in m² of an antenna of LINEAR gain
// g at frequency f (Hz):
//
//	Ae = g λ² / (4π)
//
// Source: antenna effective-area relation (Balanis, Antenna Theory). NaN for
// negative g or f ≤ 0.
func Aperture(g, f float64) float64 {
	if math.IsNaN(g) || g < 0 || !positive(f) {
		return math.NaN()
	}
	l := Wavelength(f)
	return g * l * l / (4 * math.Pi)
}

// gammaFromVSWR returns |Γ| = (v − 1)/(v + 1).
func gammaFromVSWR(v float64) (float64, error) {
	if math.IsNaN(v) || v < 1 {
		return math.NaN(), fmt.Errorf("rfmath: VSWR must be at least 1 (got %s)", num(v))
	}
	if math.IsInf(v, 1) {
		return 1, nil
	}
	return (v - 1) / (v + 1), nil
}

// VSWRToRL converts a voltage standing wave ratio v (≥ 1) to return loss in
// dB, as a positive number:
//
//	|Γ| = (v − 1)/(v + 1),  RL = −20 log10 |Γ|
//
// Source: transmission-line definitions (Pozar, Microwave Engineering). A
// perfect match (v = 1) gives +Inf. An error is returned for v < 1 or NaN.
func VSWRToRL(v float64) (float64, error) {
	g, err := gammaFromVSWR(v)
	if err != nil {
		return math.NaN(), err
	}
	return -20 * math.Log10(g), nil
}

// RLToVSWR converts a return loss in dB (positive number) to VSWR:
//
//	|Γ| = 10^(−RL/20),  v = (1 + |Γ|)/(1 − |Γ|)
//
// Source: transmission-line definitions (Pozar, Microwave Engineering).
// RL = 0 dB (total reflection) gives +Inf; NaN for negative or NaN rl.
func RLToVSWR(rl float64) float64 {
	if math.IsNaN(rl) || rl < 0 {
		return math.NaN()
	}
	if rl == 0 {
		return math.Inf(1)
	}
	g := math.Pow(10, -rl/20)
	return (1 + g) / (1 - g)
}

// MismatchLoss returns the mismatch loss in dB (positive number) for a VSWR
// v ≥ 1: the fraction of available power not delivered to the load,
//
//	ML = −10 log10(1 − |Γ|²),  |Γ| = (v − 1)/(v + 1)
//
// Source: transmission-line definitions (Pozar, Microwave Engineering).
// v = +Inf gives +Inf. An error is returned for v < 1 or NaN.
func MismatchLoss(v float64) (float64, error) {
	if _, err := gammaFromVSWR(v); err != nil {
		return math.NaN(), err
	}
	if math.IsInf(v, 1) {
		return math.Inf(1), nil
	}
	// 1 − |Γ|² = 4v/(v+1)², the same quantity without cancellation.
	return -10 * math.Log10(4*v/((v+1)*(v+1))), nil
}
