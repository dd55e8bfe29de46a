package numeric

import "math"

// Quantile returns the p-quantile of sorted (ascending) data using linear
// interpolation between order statistics: Hyndman & Fan (1996) definition 7,
// the default of R's quantile() and NumPy's percentile. With n values and
// h = (n−1)·p the result is x[⌊h⌋] + (h−⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋]) (0-based).
// p is clamped to [0,1]; empty input or NaN p gives NaN.
func Quantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 0 || math.IsNaN(p) {
		return math.NaN()
	}
	if p <= 0 {
		return sorted[0]
	}
	if p >= 1 {
		return sorted[n-1]
	}
	h := float64(n-1) * p
	i := int(h)
	if i >= n-1 {
		return sorted[n-1]
	}
	frac := h - float64(i)
	return sorted[i] + frac*(sorted[i+1]-sorted[i])
}
