package rfmath

import (
	"math"
	"math/cmplx"
	"testing"
)

// tone returns the amplitude of the component at bin k of x (a whole number of cycles in
// len(x) samples), by a direct discrete Fourier sum.
func tone(x []float64, k int) float64 {
	var s complex128
	n := len(x)
	for i, v := range x {
		s += complex(v, 0) * cmplx.Exp(complex(0, -2*math.Pi*float64(k*i)/float64(n)))
	}
	return 2 * cmplx.Abs(s) / float64(n)
}

// distort samples y = x + a2·x² + a3·x³ for x the sum of tones of amplitude amp at the bins.
func distort(n int, amp, a2, a3 float64, bins ...int) []float64 {
	y := make([]float64, n)
	for i := range y {
		x := 0.0
		for _, k := range bins {
			x += amp * math.Cos(2*math.Pi*float64(k*i)/float64(n))
		}
		y[i] = x + a2*x*x + a3*x*x*x
	}
	return y
}

func lvl(amp float64) float64 { return 20 * math.Log10(amp) } // level of an amplitude, any fixed reference

// The harmonic relations, checked on a sampled memoryless nonlinearity: the intercepts are
// measured from a two-tone test, then the single-tone harmonics predicted by HD2 and HD3 are
// compared with the harmonics measured from the same polynomial (Razavi, RF Microelectronics,
// ch. 2, derives the same factors 2 and 3 analytically).
func TestHarmonicsAgainstSampledNonlinearity(t *testing.T) {
	const n, amp = 256, 0.05
	// Second order: two tones at bins 10 and 13, the product at 23.
	two := distort(n, amp, 0.02, 0, 10, 13)
	pt, pim2 := lvl(tone(two, 10)), lvl(tone(two, 23))
	oip2 := 2*pt - pim2 // from P_IM2 = 2·P − OIP2 (IP2 definition)
	one := distort(n, amp, 0.02, 0, 10)
	p1, hd2 := lvl(tone(one, 10)), lvl(tone(one, 20))
	// Third order: the product 2·f1 − f2 at bin 7.
	two3 := distort(n, amp, 0, 0.01, 10, 13)
	pt3, pim3 := lvl(tone(two3, 10)), lvl(tone(two3, 7))
	oip3 := (3*pt3 - pim3) / 2 // from P_IM3 = 3·P − 2·OIP3 (IP3 definition)
	one3 := distort(n, amp, 0, 0.01, 10)
	p13, hd3 := lvl(tone(one3, 10)), lvl(tone(one3, 30))
	checkRefs(t, []ref{
		{"IM2 at the measured OIP2", IM2(pt, oip2), pim2, 1e-9, false},             // IP2 definition
		{"HD2 of the sampled polynomial", HD2(p1, oip2), hd2, 0.01, false},         // DFT of y = x + a2·x²
		{"HD3 of the sampled polynomial", HD3(p13, oip3), hd3, 0.01, false},        // DFT of y = x + a3·x³
		{"HD2 offset 20·log10 2", HD2Offset, 6.0206, 1e-4, false},                  // Razavi ch. 2: a2·A²/2 against a2·A²
		{"HD3 offset 20·log10 3", HD3Offset, 9.5424, 1e-4, false},                  // Razavi ch. 2: a3·A³/4 against 3·a3·A³/4
		{"IM2 rises 2 dB per dB", IM2(-9, 30) - IM2(-10, 30), 2, 1e-12, false},     // IP2 definition
		{"IM2 equals the tone at the intercept", IM2(25, 25), 25, 1e-12, false},    // IP2 definition
		{"HD3 at the intercept", HD3(10, 10), 10 - 20*math.Log10(3), 1e-12, false}, // IP3 definition less 9.54 dB
	})
}

func TestReciprocalMixingRefs(t *testing.T) {
	// By hand in linear units: a −30 dBm blocker times 10^(−130/10) per Hz times 200 kHz.
	linear := 10 * math.Log10(1e-3*math.Pow(10, -3)*math.Pow(10, -13)*200e3/1e-3)
	floor := -120.0
	blk, err := MaxBlocker(floor, -130, 200e3, 3)
	if err != nil {
		t.Fatal(err)
	}
	blkEq, _ := MaxBlocker(floor, -130, 200e3, 10*math.Log10(2))
	checkRefs(t, []ref{
		{"recip_mix −30 dBm, −130 dBc/Hz, 200 kHz", RecipMix(-30, -130, 200e3), linear, 1e-9, false}, // Razavi ch. 8, P·L·B in linear units
		{"desense equal powers", Desense(-110, -110), 10 * math.Log10(2), 1e-12, false},              // power sum of two equal noises
		{"desense 10 dB below", Desense(-110, -120), 10 * math.Log10(1.1), 1e-12, false},             // power sum 1 + 0.1
		// A 3.01 dB rise means the added noise equals the floor: blocker = floor − L − 10·log10 B.
		{"max_blocker for a doubling", blkEq, floor + 130 - 10*math.Log10(200e3), 1e-9, false},
		// The blocker found raises the floor by the allowed 3 dB when put back through the
		// power sum (checked by hand, not by the inverse formula).
		{"max_blocker round trip", 10 * math.Log10(1+math.Pow(10, (blk-130+10*math.Log10(200e3)-floor)/10)), 3, 1e-9, false},
	})
	if _, err := MaxBlocker(floor, -130, 200e3, 0); err == nil {
		t.Error("MaxBlocker with 0 dB allowed: no error")
	}
}

func TestImageRejectRefs(t *testing.T) {
	// Independent route: the wanted and image outputs of a quadrature mixer are 1 ± g·e^{jθ}
	// (the two paths summed with and without the 90° turn), so IRR = |1 + g·e^{jθ}|²/|1 − g·e^{jθ}|².
	phasor := func(gainDB, deg float64) float64 {
		g := math.Pow(10, gainDB/20)
		z := cmplx.Rect(g, deg*math.Pi/180)
		return 20 * math.Log10(cmplx.Abs(1+z)/cmplx.Abs(1-z))
	}
	small := 4 / (0.01*0.01 + 0.01*0.01) // Razavi ch. 4: IRR ≈ 4/(ε² + θ²) for small errors
	checkRefs(t, []ref{
		{"0.5 dB, 3°", ImageReject(0.5, 3*math.Pi/180), phasor(0.5, 3), 1e-9, false},
		{"0.1 dB, 1°", ImageReject(0.1, math.Pi/180), phasor(0.1, 1), 1e-9, false},
		{"−1 dB, 5°", ImageReject(-1, 5*math.Pi/180), phasor(-1, 5), 1e-9, false},
		{"1 dB, 0°", ImageReject(1, 0), phasor(1, 0), 1e-9, false},
		{"small errors", ImageReject(20*math.Log10(1.01), 0.01), 10 * math.Log10(small), 0.05, false}, // an approximation: 0.02 dB off at 1 %
		{"perfect balance", ImageReject(0, 0), math.Inf(1), 0, false},
	})
}

func TestACIRRefs(t *testing.T) {
	checkRefs(t, []ref{
		// 3GPP TR 36.942 definition, computed by hand in linear ratios.
		{"ACLR 45, ACS 33", ACIR(45, 33), -10 * math.Log10(math.Pow(10, -4.5)+math.Pow(10, -3.3)), 1e-12, false},
		{"ACLR = ACS", ACIR(30, 30), 30 - 10*math.Log10(2), 1e-12, false},
		{"ACS dominates", ACIR(80, 33), 33, 0.001, false},
	})
}

// quantisedSNR measures the SNR of a full-scale sine quantised to bits by a mid-tread
// quantiser over [-1, 1), the whole Nyquist band (a simulation, independent of the formula).
func quantisedSNR(bits int) float64 {
	const n = 1 << 15
	q := 2 / math.Pow(2, float64(bits))
	var ps, pn float64
	for i := range n {
		x := (1 - q/2) * math.Sin(2*math.Pi*0.1234567*float64(i)) // just inside full scale
		y := q * math.Round(x/q)
		ps += x * x
		pn += (y - x) * (y - x)
	}
	return 10 * math.Log10(ps/pn)
}

func TestADCSNRRefs(t *testing.T) {
	checkRefs(t, []ref{
		{"12 bits at Nyquist", ADCSNR(12, 2e6, 1e6, 0), 6.02*12 + 1.76, 0.01, false},                 // 6.02·N + 1.76 dB (Bennett 1948)
		{"processing gain ×10", ADCSNR(12, 20e6, 1e6, 0) - ADCSNR(12, 2e6, 1e6, 0), 10, 1e-9, false}, // 10·log10(fs/2B)
		{"backoff", ADCSNR(10, 2e6, 1e6, 0) - ADCSNR(10, 2e6, 1e6, 6), 6, 1e-12, false},
		{"8-bit quantiser simulated", ADCSNR(8, 2, 1, 0), quantisedSNR(8), 0.3, false},
		{"10-bit quantiser simulated", ADCSNR(10, 2, 1, 0), quantisedSNR(10), 0.3, false},
	})
}

func TestCascadeIIP2(t *testing.T) {
	// By hand: 1/√IIP2 = 1/√(10⁴ mW) + √10/√(10⁵ mW) = 0.01 + 0.01 → IIP2 = 2500 mW.
	c := CascadeChain([]Stage{
		{Name: "LNA", GainDB: 10, IIP2: 40, HasIIP2: true},
		{Name: "mixer", GainDB: 5, IIP2: 50, HasIIP2: true},
	})
	// One stage with no IIP2 is linear in second order; the other sets it alone.
	d := CascadeChain([]Stage{{GainDB: 20}, {GainDB: 0, IIP2: 45, HasIIP2: true}})
	e := CascadeChain([]Stage{{GainDB: 20, IIP3: 10, HasIIP3: true}})
	checkRefs(t, []ref{
		{"two stages", c.IIP2, 10 * math.Log10(2500), 1e-9, false},
		{"first stage only", c.Stages[0].CumIIP2, 40, 1e-9, false},
		{"OIP2 = IIP2 + gain", c.OIP2, 10*math.Log10(2500) + 15, 1e-9, false},
		{"after 20 dB of linear gain", d.IIP2, 45 - 20, 1e-9, false}, // referred to the input through the gain
	})
	if !c.HasIIP2 || e.HasIIP2 {
		t.Errorf("HasIIP2: %v with intercepts, %v without", c.HasIIP2, e.HasIIP2)
	}
}
