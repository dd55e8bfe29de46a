package numeric

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
)

// Dist names the distribution an uncertain input follows between its
// tolerance limits.
type Dist int

const (
	// Normal treats the tolerance limits as the ±3σ points of a normal
	// distribution (a split normal when the limits are asymmetric).
	Normal Dist = iota
	// Uniform spreads the input evenly between its limits.
	Uniform
	// Triangular peaks at the nominal value and falls linearly to zero at
	// the limits.
	Triangular
)

var distNames = [...]string{Normal: "normal", Uniform: "uniform", Triangular: "triangular"}

// String returns the lower-case name ParseDist accepts.
func (d Dist) String() string {
	if d >= 0 && int(d) < len(distNames) {
		return distNames[d]
	}
	return fmt.Sprintf("Dist(%d)", int(d))
}

// ParseDist returns the Dist named s ("normal", "uniform" or "triangular",
// case-insensitive, surrounding space ignored). The error lists the valid
// names.
func ParseDist(s string) (Dist, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for i, n := range distNames {
		if t == n {
			return Dist(i), nil
		}
	}
	return Normal, fmt.Errorf("numeric: unknown distribution %q (valid: %s)", s, strings.Join(distNames[:], ", "))
}

// halfWidths returns the widths below and above nom, never negative.
func halfWidths(nom, lo, hi float64) (below, above float64) {
	return math.Max(nom-lo, 0), math.Max(hi-nom, 0)
}

// Draw returns one sample for an input with nominal value nom and absolute
// limits lo <= nom <= hi (tolerance already applied, possibly asymmetric).
//
//   - Normal: the limits are the 3σ points. Asymmetric limits give a split
//     normal with σ₁ = (nom−lo)/3 below and σ₂ = (hi−nom)/3 above; the lower
//     half is chosen with probability σ₁/(σ₁+σ₂), which keeps the density
//     continuous at nom. Samples are not truncated at the limits.
//   - Uniform: uniform on [lo,hi].
//   - Triangular: mode nom, support [lo,hi].
//
// lo == hi == nom returns nom. An unknown Dist is drawn as Normal.
func Draw(r *rand.Rand, d Dist, nom, lo, hi float64) float64 {
	below, above := halfWidths(nom, lo, hi)
	if below == 0 && above == 0 {
		return nom
	}
	switch d {
	case Uniform:
		return (nom - below) + (below+above)*r.Float64()
	case Triangular:
		// Inverse CDF of the triangular distribution with a = nom−below,
		// c = nom, b = nom+above.
		w := below + above
		u := r.Float64()
		if u < below/w {
			return nom - below + math.Sqrt(u*w*below)
		}
		return nom + above - math.Sqrt((1-u)*w*above)
	default:
		s1, s2 := below/3, above/3
		z := math.Abs(r.NormFloat64())
		if r.Float64()*(s1+s2) < s1 {
			return nom - s1*z
		}
		return nom + s2*z
	}
}

// Sigma returns the standard deviation of the distribution Draw samples for
// the same arguments (used for root-sum-square budgets). It is exact for all
// three shapes: uniform (hi−lo)/√12; triangular
// √((a²+b²+c²−ab−ac−bc)/18); split normal √((1−2/π)(σ₂−σ₁)² + σ₁σ₂).
func Sigma(d Dist, nom, lo, hi float64) float64 {
	below, above := halfWidths(nom, lo, hi)
	switch d {
	case Uniform:
		return (below + above) / math.Sqrt(12)
	case Triangular:
		// With a = −below, c = 0, b = above the variance formula reduces to
		// (below² + above² + below·above)/18.
		return math.Sqrt((below*below + above*above + below*above) / 18)
	default:
		s1, s2 := below/3, above/3
		return math.Sqrt((1-2/math.Pi)*(s2-s1)*(s2-s1) + s1*s2)
	}
}

// Mean returns the expected value of the distribution Draw samples for the
// same arguments. It differs from nom for asymmetric limits.
func Mean(d Dist, nom, lo, hi float64) float64 {
	below, above := halfWidths(nom, lo, hi)
	switch d {
	case Uniform:
		return nom + (above-below)/2
	case Triangular:
		return nom + (above-below)/3
	default:
		return nom + math.Sqrt(2/math.Pi)*(above-below)/3
	}
}
