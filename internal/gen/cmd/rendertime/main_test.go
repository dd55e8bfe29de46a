//go:build unix

package main

import (
	"math"
	"testing"
)

// An exact power law y = 3·x^1.5 has slope 1.5 on log-log axes and R² = 1 (least squares
// recovers a straight line exactly); N·log N over 1,000…100,000 has a log-log slope of
// 1 + 1/ln(N) averaged over the range, between 1 + 1/ln(100,000) ≈ 1.087 and
// 1 + 1/ln(1,000) ≈ 1.145.
func TestFitPowerLaw(t *testing.T) {
	xs := []float64{1e3, 2e3, 5e3, 1e4, 2e4, 5e4, 1e5}
	var ys, nlogn []float64
	for _, x := range xs {
		ys = append(ys, 3*math.Pow(x, 1.5))
		nlogn = append(nlogn, x*math.Log(x))
	}
	if k, r2 := fitPowerLaw(xs, ys); math.Abs(k-1.5) > 1e-12 || math.Abs(r2-1) > 1e-12 {
		t.Errorf("3·x^1.5: k = %g, R² = %g; want 1.5 and 1", k, r2)
	}
	if k, _ := fitPowerLaw(xs, nlogn); k < 1.087 || k > 1.145 {
		t.Errorf("N·log N: k = %g, want between 1.087 and 1.145", k)
	}
	if m := median([]float64{3, 1, 2, 10}); m != 2.5 {
		t.Errorf("median of 3, 1, 2, 10 = %g, want 2.5", m)
	}
}

func TestRunUsage(t *testing.T) {
	for _, args := range [][]string{{}, {"-bin", "x", "-runs", "0"}, {"-bin", "x", "-cmd", "draw"}, {"-bin", "x", "-sizes", "a"}} {
		if code := run(args, nil, discard{}); code != 2 {
			t.Errorf("%q: exit %d, want 2", args, code)
		}
	}
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }
