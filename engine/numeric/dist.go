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
	s := NewSampler(d, nom, lo, hi)
	return s.Draw(r)
}

// Sampler draws the samples Draw gives for one input, bit for bit and from the same
// random numbers, with the arithmetic on its limits done once rather than per sample (a
// Monte Carlo run draws each input thousands of times).
type Sampler struct {
	d                Dist
	nom, low         float64 // low = nom − below
	below, above     float64
	s1, s2, s12, pLo float64 // normal: σ₁, σ₂, σ₁+σ₂; triangular: below/(below+above)
	w                float64 // below + above
	fixed            bool    // lo == hi == nom
}

// NewSampler returns the sampler of Draw(·, d, nom, lo, hi).
func NewSampler(d Dist, nom, lo, hi float64) Sampler {
	below, above := halfWidths(nom, lo, hi)
	s := Sampler{d: d, nom: nom, low: nom - below, below: below, above: above, w: below + above}
	s.fixed = below == 0 && above == 0
	s.s1, s.s2 = below/3, above/3
	s.s12 = s.s1 + s.s2
	if !s.fixed {
		s.pLo = below / s.w
	}
	return s
}

// Draw returns one sample.
func (s *Sampler) Draw(r *rand.Rand) float64 {
	if s.fixed {
		return s.nom
	}
	switch s.d {
	case Uniform:
		return s.low + s.w*r.Float64()
	case Triangular:
		// Inverse CDF of the triangular distribution with a = nom−below,
		// c = nom, b = nom+above.
		u := r.Float64()
		if u < s.pLo {
			return s.low + math.Sqrt(u*s.w*s.below)
		}
		return s.nom + s.above - math.Sqrt((1-u)*s.w*s.above)
	default:
		z := math.Abs(r.NormFloat64())
		if r.Float64()*s.s12 < s.s1 {
			return s.nom - s.s1*z
		}
		return s.nom + s.s2*z
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
