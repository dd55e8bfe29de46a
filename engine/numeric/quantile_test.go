package numeric

import (
	"math"
	"testing"
)

// TestQuantileType7 checks Hyndman & Fan definition 7 ("Sample quantiles in
// statistical packages", The American Statistician 50(4), 1996).
// Reference values: R's quantile(1:10, c(0, .1, .25, .5, .75, 1), type = 7)
// gives 1, 1.9, 3.25, 5.5, 7.75, 10 (NumPy's default linear method agrees),
// and the worked example of the C = 1 variant in the "Percentile" article of
// the English Wikipedia gives the 40th percentile of {15, 20, 35, 40, 50}
// as 29.
func TestQuantileType7(t *testing.T) {
	oneToTen := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10}
	cases := []struct {
		data []float64
		p    float64
		want float64
	}{
		{oneToTen, 0, 1},
		{oneToTen, 0.1, 1.9},
		{oneToTen, 0.25, 3.25},
		{oneToTen, 0.5, 5.5},
		{oneToTen, 0.75, 7.75},
		{oneToTen, 1, 10},
		{[]float64{15, 20, 35, 40, 50}, 0.4, 29},
		{[]float64{15, 20, 35, 40, 50}, 0.5, 35},
		{[]float64{42}, 0.3, 42},
		{oneToTen, -0.5, 1}, // clamped
		{oneToTen, 1.5, 10}, // clamped
	}
	for _, c := range cases {
		if got := Quantile(c.data, c.p); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("Quantile(%v, %g) = %g, want %g", c.data, c.p, got, c.want)
		}
	}
	if got := Quantile(nil, 0.5); !math.IsNaN(got) {
		t.Errorf("Quantile(nil) = %g, want NaN", got)
	}
}
