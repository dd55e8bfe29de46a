package numeric

import (
	"errors"
	"math"
	"testing"
)

func noErr(f func(float64) float64) func(float64) (float64, error) {
	return func(x float64) (float64, error) { return f(x), nil }
}

// TestBrentClosedForm checks roots that have an independent closed form.
func TestBrentClosedForm(t *testing.T) {
	// x³ − 2x − 5 = 0 is the cubic Wallis used to demonstrate Newton's
	// method; its one real root follows from Cardano's formula for the
	// depressed cubic x³ + px + q = 0: x = ∛(−q/2 + √D) + ∛(−q/2 − √D),
	// D = (q/2)² + (p/3)³, here p = −2, q = −5.
	D := 6.25 - 8.0/27
	cardano := math.Cbrt(2.5+math.Sqrt(D)) + math.Cbrt(2.5-math.Sqrt(D))

	cases := []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
	}{
		{"cubic (Cardano)", func(x float64) float64 { return x*x*x - 2*x - 5 }, 2, 3, cardano},
		{"cos x = 0 at π/2", math.Cos, 1, 2, math.Pi / 2},
		{"x² − 2 = 0 at √2", func(x float64) float64 { return x*x - 2 }, 0, 2, math.Sqrt2},
		{"reversed bracket", func(x float64) float64 { return x*x - 2 }, 2, 0, math.Sqrt2},
		{"root at zero (absolute floor)", func(x float64) float64 { return x }, -1, 3, 0},
		{"root on an end point", func(x float64) float64 { return x - 1 }, 1, 4, 1},
	}
	for _, c := range cases {
		x, found, err := Brent(noErr(c.f), c.a, c.b, false, 1e-12)
		if err != nil || !found {
			t.Fatalf("%s: found=%v err=%v", c.name, found, err)
		}
		tol := 1e-11 * math.Max(math.Abs(c.want), 1e-3)
		if math.Abs(x-c.want) > tol {
			t.Errorf("%s: x=%.17g want %.17g (|Δ|=%g)", c.name, x, c.want, math.Abs(x-c.want))
		}
	}
}

// TestBrentScanFindsCrossing: cos has no sign change between 0 and 2π
// at the end points (both +1) but crosses zero at π/2 and 3π/2; the scan
// must return the first.
func TestBrentScanFindsCrossing(t *testing.T) {
	x, found, err := Brent(noErr(math.Cos), 0, 2*math.Pi, false, 1e-12)
	if err != nil || !found {
		t.Fatalf("found=%v err=%v", found, err)
	}
	if math.Abs(x-math.Pi/2) > 1e-10 {
		t.Errorf("x=%.15g want π/2", x)
	}
}

func TestBrentNoCrossing(t *testing.T) {
	calls := 0
	f := func(x float64) (float64, error) { calls++; return x*x + 1, nil }
	x, found, err := Brent(f, -3, 3, false, 1e-9)
	if err != nil || found {
		t.Fatalf("x=%g found=%v err=%v, want found=false err=nil", x, found, err)
	}
	if calls != ScanPoints {
		t.Errorf("scan evaluated f %d times, want %d", calls, ScanPoints)
	}
}

// TestBrentLogRange uses the free-space path-loss law L(d) = 20·log10(d) + k
// (Friis transmission equation): the distance where L reaches c has the
// closed form d = 10^((c−k)/20).
func TestBrentLogRange(t *testing.T) {
	c := 20 * math.Log10(15) // root at 15 m, near the low end of 10 m..100 km
	f := noErr(func(d float64) float64 { return 20*math.Log10(d) - c })
	want := math.Pow(10, c/20)
	x, found, err := Brent(f, 10, 100e3, true, 1e-9)
	if err != nil || !found {
		t.Fatalf("found=%v err=%v", found, err)
	}
	if math.Abs(x-want)/want > 1e-8 {
		t.Errorf("d=%.12g want %.12g", x, want)
	}
}

// TestBrentLogScanNearLowEnd: a margin that is negative only between 12 m
// and 14 m (product of two 20·log10(d) − c factors). Both ends of
// 10 m..100 km have the same sign, so a scan is needed; the log-spaced scan
// resolves the narrow window near the low end, a linear 200-point scan
// (step ≈ 500 m) steps straight over it.
func TestBrentLogScanNearLowEnd(t *testing.T) {
	c1, c2 := 20*math.Log10(12), 20*math.Log10(14)
	f := noErr(func(d float64) float64 {
		l := 20 * math.Log10(d)
		return (l - c1) * (l - c2)
	})
	x, found, err := Brent(f, 10, 100e3, true, 1e-9)
	if err != nil || !found {
		t.Fatalf("log scan: found=%v err=%v", found, err)
	}
	if math.Abs(x-12) > 12e-8 {
		t.Errorf("log scan: d=%.12g want 12 (the first crossing)", x)
	}
	if _, found, _ := Brent(f, 10, 100e3, false, 1e-9); found {
		t.Errorf("linear scan unexpectedly resolved the 12..14 m window")
	}
}

func TestBrentErrors(t *testing.T) {
	boom := errors.New("model failed")
	f := func(x float64) (float64, error) {
		if x > 1.5 {
			return 0, boom
		}
		return x - 1.7, nil
	}
	if _, _, err := Brent(f, 0, 2, false, 0); !errors.Is(err, boom) {
		t.Errorf("err=%v, want wrapped %v", err, boom)
	}
	if _, _, err := Brent(noErr(math.Log10), 0, 10, true, 0); err == nil {
		t.Errorf("log scan with a=0 should fail")
	}
	if _, _, err := Brent(noErr(math.Sin), math.NaN(), 1, false, 0); err == nil {
		t.Errorf("NaN bracket should fail")
	}
}

// TestBrentNaNSkipped: NaN samples (outside the model's domain) are
// skipped by the scan rather than treated as a sign.
func TestBrentNaNSkipped(t *testing.T) {
	f := noErr(func(x float64) float64 {
		if x < 1 {
			return math.NaN()
		}
		return x - 2
	})
	x, found, err := Brent(f, 0, 5, false, 1e-12)
	if err != nil || !found || math.Abs(x-2) > 1e-10 {
		t.Errorf("x=%g found=%v err=%v, want 2", x, found, err)
	}
}
