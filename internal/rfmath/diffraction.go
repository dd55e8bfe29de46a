package rfmath

import (
	"fmt"
	"math"
)

// FresnelV returns the dimensionless diffraction parameter ν of a single knife edge whose tip
// lies h (m) above the straight line between the terminals (negative h: below it, a
// clearance), at distances d1 and d2 (m) from them, at frequency f (Hz):
//
//	ν = h sqrt(2/λ · (1/d1 + 1/d2))
//
// Source: ITU-R P.526-15 §4.1 (single knife edge). It returns an error unless d1, d2 and f are positive.
func FresnelV(h, d1, d2, f float64) (float64, error) {
	if !positive(d1, d2, f) || math.IsInf(d1, 1) || math.IsInf(d2, 1) || math.IsNaN(h) || math.IsInf(h, 0) {
		return math.NaN(), fmt.Errorf("rfmath: the knife edge needs positive distances d1, d2 and frequency (got d1=%s, d2=%s, f=%s)", fmtM(d1), fmtM(d2), fmtHz(f))
	}
	return h * math.Sqrt(2/Wavelength(f)*(1/d1+1/d2)), nil
}

// KnifeEdgeV is the single knife-edge diffraction loss J(ν) in dB by the approximation of
// ITU-R P.526-15 §4.1:
//
//	J(ν) = 6.9 + 20 log10(sqrt((ν − 0.1)² + 1) + ν − 0.1)
//
// which the Recommendation gives for ν greater than about −0.78. For ν ≤ −0.78 the path is
// clear of the edge and 0 dB is returned with a note (the exact loss ripples within about
// 1 dB of zero there).
func KnifeEdgeV(v float64) (float64, []string) {
	if !(v > -0.78) {
		return 0, []string{fmt.Sprintf("ν = %s is at or below −0.78, where the ITU-R P.526 approximation does not apply: the edge clears the path and 0 dB is used", num(v))}
	}
	return 6.9 + 20*math.Log10(math.Sqrt(sq(v-0.1)+1)+v-0.1), nil
}
