package rfmath

import (
	"fmt"
	"math"
)

// Beamwidth returns the half-power (−3 dB) beamwidth in rad of a parabolic dish of diameter d
// (m) at frequency f (Hz): θ3dB = k λ/d with k in rad (k = 70° is common practice for a
// typically tapered illumination, no single source; a uniform aperture gives 58.4°). It
// returns NaN unless d, f and k are positive.
func Beamwidth(d, f, k float64) float64 {
	if !positive(d, f, k) {
		return math.NaN()
	}
	return k * Wavelength(f) / d
}

// PointingLoss returns the gain lost in dB when a parabolic antenna points off by angle off
// from its boresight, with half-power beamwidth bw (same unit): L = 12 (θ/θ3dB)², the
// parabolic fit of the main lobe (it gives 3 dB at half the beamwidth off axis). Source: the
// main-lobe approximation of satellite link texts (Maral & Bousquet, Satellite Communications
// Systems, antenna pointing loss); common practice. A note is returned past one beamwidth,
// where the main-lobe fit no longer holds; NaN unless bw > 0.
func PointingLoss(off, bw float64) (float64, []string) {
	if !positive(bw) || math.IsNaN(off) {
		return math.NaN(), nil
	}
	var notes []string
	if math.Abs(off) > bw {
		notes = []string{"the pointing offset exceeds one half-power beamwidth, beyond the main lobe where 12 (θ/θ3dB)² holds"}
	}
	return 12 * sq(off/bw), notes
}

// PolLoss returns the polarisation mismatch loss in dB between two linearly polarised
// antennas whose polarisation planes differ by angle a (rad): L = −20 log10 |cos a|, the
// projection of one field on the other (Balanis, Antenna Theory, polarisation loss factor
// PLF = cos²ψ). It returns an error when |cos a| is zero (exactly 90°), where the ideal loss is
// unbounded and a real link is limited by the antennas' cross-polar discrimination.
func PolLoss(a float64) (float64, error) {
	c := math.Abs(math.Cos(a))
	if math.IsNaN(c) {
		return math.NaN(), fmt.Errorf("rfmath: the polarisation angle must be a number")
	}
	// cos(π/2) in floating point is 6e-17, not 0: treat a mismatch within 1e-9 rad of 90° as 90°.
	if c < 1e-9 {
		return math.NaN(), fmt.Errorf("rfmath: crossed linear polarisations (90°) have an unbounded ideal mismatch loss")
	}
	return -20 * math.Log10(c), nil
}

// FieldStrength returns the free-space field strength in dB(µV/m) at distance d (m) from a
// transmitter of e.i.r.p. eirp (dBW): E = sqrt(30 p)/d V/m, i.e.
//
//	E = EIRP(dBW) − 20 log10 d(km) + 74.77
//
// Source: ITU-R P.525-4 §2.1 (written there with the rounded 74.8). NaN unless d > 0.
func FieldStrength(eirp, d float64) float64 {
	if !positive(d) {
		return math.NaN()
	}
	return eirp + 10*math.Log10(30) - 20*math.Log10(d) + 120
}

// PFD returns the power flux-density in dB(W/m²) at distance d (m) from a transmitter of
// e.i.r.p. eirp (dBW), spreading spherically: S = EIRP − 10 log10(4π d²). Source: ITU-R
// P.525-4 §2.1 (S = p/(4π d²)). NaN unless d > 0.
func PFD(eirp, d float64) float64 {
	if !positive(d) {
		return math.NaN()
	}
	return eirp - 10*math.Log10(4*math.Pi*d*d)
}

// LognormalMargin returns the fade margin in dB over the median that a log-normally
// distributed level (standard deviation sigma in dB, e.g. shadowing) exceeds with probability
// availability (0 < a < 1): M = σ Q⁻¹(1 − a), with Q the Gaussian tail probability and Q⁻¹
// computed as sqrt(2)·erfc⁻¹(2(1 − a)). Source: log-normal shadowing margin (Rappaport,
// Wireless Communications, §4.9; Jakes). It returns an error unless 0 < a < 1 and sigma ≥ 0.
func LognormalMargin(sigma, availability float64) (float64, error) {
	if !(availability > 0 && availability < 1) {
		return math.NaN(), fmt.Errorf("rfmath: availability must lie strictly between 0 and 1 (got %s)", num(availability))
	}
	if !(sigma >= 0) || math.IsInf(sigma, 1) {
		return math.NaN(), fmt.Errorf("rfmath: sigma must not be negative (got %s dB)", num(sigma))
	}
	return sigma * math.Sqrt2 * math.Erfcinv(2*(1-availability)), nil
}
