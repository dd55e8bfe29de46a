package rfmath

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

const degr = math.Pi / 180

func TestSlantRangeRefs(t *testing.T) {
	// Independent route: the Earth-central angle γ = acos(R cos ε/(R + a)) − ε, then the law
	// of cosines d² = R² + (R + a)² − 2 R (R + a) cos γ (Maral & Bousquet, Satellite
	// Communications Systems, ch. 2, slant range from the central angle); R = 6371 km.
	byAngle := func(eps, alt float64) float64 {
		r, ra := EarthRadius, EarthRadius+alt
		g := math.Acos(r*math.Cos(eps)/ra) - eps
		return math.Sqrt(r*r + ra*ra - 2*r*ra*math.Cos(g))
	}
	s := func(e, a, h float64) float64 {
		d, err := SlantRange(e, a, h)
		if err != nil {
			t.Fatal(err)
		}
		return d
	}
	checkRefs(t, []ref{
		{"zenith 550 km", s(math.Pi/2, 550e3, 0), 550e3, 1e-6, false},                                     // geometry: straight up the distance is the height difference
		{"zenith from 1 km", s(math.Pi/2, 550e3, 1e3), 549e3, 1e-6, false},                                // geometry
		{"10° to 550 km", s(10*degr, 550e3, 0), byAngle(10*degr, 550e3), 1e-6, false},                     // central-angle route above
		{"30° to GEO", s(30*degr, 35786e3, 0), byAngle(30*degr, 35786e3), 1e-5, false},                    // central-angle route above
		{"0° to 550 km", s(0, 550e3, 0), math.Sqrt(sq(EarthRadius+550e3) - sq(EarthRadius)), 1e-6, false}, // tangent line: Pythagoras
		{"GEO at 90°", s(math.Pi/2, 35786e3, 0), 35786e3, 1e-6, false},                                    // geometry
	})
	for _, c := range []struct{ e, a, h float64 }{{-1 * degr, 550e3, 0}, {91 * degr, 550e3, 0}, {10 * degr, 100, 200}, {10 * degr, 550e3, -1}} {
		if _, err := SlantRange(c.e, c.a, c.h); err == nil {
			t.Errorf("SlantRange(%v, %v, %v): want an error", c.e, c.a, c.h)
		}
	}
}

// TestGasRefs checks the P.676 Annex 2 specific attenuations against reference values that
// the ITU-Rpy project publishes in its test suite (test/test_ITU.py, ITUR676_9TestCase, at the
// site conditions of the ITU-R validation examples), to the 5 decimals it checks. ITU-Rpy takes T in K and forms
// rt = 288/T; the Recommendation forms rt = 288/(273 + t°C), so a reference computed there at
// T corresponds here to the temperature T + 0.15 K.
func TestGasRefs(t *testing.T) {
	at := func(tITU float64) float64 { return tITU + 0.15 }
	wSite := at(5.9435147 - 0.15 + 273.15)
	checkRefs(t, []ref{
		{"γo 14.25 GHz 282.724 K", GasOxygen(14.25, 1013.25, at(282.724-0.15)), 0.00941327, 1e-5, false},     // ITU-Rpy ITUR676_9TestCase
		{"γo 14.25 GHz 287.483 K", GasOxygen(14.25, 1013.25, at(287.4834667-0.15)), 0.00898682, 1e-5, false}, // ITU-Rpy ITUR676_9TestCase
		{"γo 14.25 GHz 293.149 K", GasOxygen(14.25, 1013.25, at(293.1487022-0.15)), 0.00851359, 1e-5, false}, // ITU-Rpy ITUR676_9TestCase
		{"γo 29 GHz 282.724 K", GasOxygen(29, 1013.25, at(282.724-0.15)), 0.02043748, 1e-5, false},           // ITU-Rpy ITUR676_9TestCase
		{"γo 29 GHz 296.602 K", GasOxygen(29, 1013.25, at(296.602-0.15)), 0.01800011, 1e-5, false},           // ITU-Rpy ITUR676_9TestCase
		{"γo 29 GHz 299.097 K", GasOxygen(29, 1013.25, at(299.0966578-0.15)), 0.01761077, 1e-5, false},       // ITU-Rpy ITUR676_9TestCase
		{"γw 12 GHz site", GasWater(12, 1013.25, wSite, 4.9815429), 0.007057, 1e-5, false},                   // ITU-Rpy ITUR676_9TestCase
		{"γw 20 GHz site", GasWater(20, 1013.25, wSite, 4.9815429), 0.0674272, 1e-5, false},                  // ITU-Rpy ITUR676_9TestCase
		{"γw 60 GHz site", GasWater(60, 1013.25, wSite, 4.9815429), 0.1153802, 1e-5, false},                  // ITU-Rpy ITUR676_9TestCase
		{"γw 90 GHz site", GasWater(90, 1013.25, wSite, 4.9815429), 0.2556834, 1e-5, false},                  // ITU-Rpy ITUR676_9TestCase
		{"γw 130 GHz site", GasWater(130, 1013.25, wSite, 4.9815429), 0.5635838, 1e-5, false},                // ITU-Rpy ITUR676_9TestCase
		// The oxygen complex near 60 GHz reaches about 15 dB/km at sea level (ITU-R P.676
		// Annex 2: γ60 = 15.0 φ(…) with φ = 1 at rp = rt = 1).
		{"γo 60 GHz std", GasOxygen(60, 1013, 288.15), 15.0, 1e-9, false}, // P.676-10 Annex 2, γ60 at rp = rt = 1
	})
	// Zenith attenuation by gases at sea level, 7.5 g/m³: about 0.04 dB at 1–2 GHz and over
	// 100 dB in the 60 GHz band (ITU-R P.676 zenith figure,
	// values from memory, hence the wide tolerances).
	z := func(f float64) float64 {
		a, _, err := GasLoss(f*1e9, math.Pi/2, StdRho, StdPressure, StdTemp)
		if err != nil {
			t.Fatal(err)
		}
		return a
	}
	checkRefs(t, []ref{
		{"zenith 2 GHz", z(2), 0.04, 0.25, true}, // P.676 zenith figure, value from memory
	})
	if z(60) < 100 {
		t.Errorf("zenith 60 GHz = %v dB, want over 100 dB (P.676 zenith figure, from memory)", z(60))
	}
	// The slant path scales as 1/sin φ from 5° up (ITU-R P.676-10 Annex 2 §2.2).
	a30, _, _ := GasLoss(20e9, 30*degr, StdRho, StdPressure, StdTemp)
	checkRefs(t, []ref{{"cosecant law 30°", a30, 2 * z(20), 1e-9, true}}) // 1/sin 30° = 2
	// Below 5° the curved-Earth form stays finite and joins the flat one near 5°.
	lo, notes, _ := GasLoss(20e9, 4.999*degr, StdRho, StdPressure, StdTemp)
	hi, _, _ := GasLoss(20e9, 5*degr, StdRho, StdPressure, StdTemp)
	if len(notes) == 0 || math.Abs(lo-hi)/hi > 0.05 {
		t.Errorf("at 5°: curved %v, flat %v, notes %q (want within 5 %%, a note)", lo, hi, notes)
	}
	if a0, _, _ := GasLoss(20e9, 0, StdRho, StdPressure, StdTemp); math.IsInf(a0, 0) || math.IsNaN(a0) || a0 < hi {
		t.Errorf("horizon gas loss %v", a0)
	}
}

func TestSkyNoiseRefs(t *testing.T) {
	checkRefs(t, []ref{
		{"3 dB at 275 K", SkyNoise(3, 275), 275 * (1 - math.Pow(10, -0.3)), 1e-9, false}, // ITU-R P.618-13 §3: Tm (1 − 10^(−A/10))
		{"no loss", SkyNoise(0, 275), 0, 0, false},                                       // ITU-R P.618-13 §3
		{"opaque", SkyNoise(100, 275), 275, 1e-6, false},                                 // a black body at Tm
		{"3.01 dB half", SkyNoise(10*math.Log10(2), 280), 140, 1e-9, false},              // half the power absorbed: Tm/2
	})
}

// TestRainCoeffsPathRefs checks the tilt and elevation combination of ITU-R P.838-3 eqs. (4)
// and (5): horizontal and vertical reproduce Table 5's kH, kV at θ = 0, and circular
// polarisation is the mean of the two.
func TestRainCoeffsPathRefs(t *testing.T) {
	kh, ah, _, _ := RainCoeffs(20e9, "h")
	kv, av, _, _ := RainCoeffs(20e9, "v")
	k0, a0, _, _ := RainCoeffsPath(20e9, 0, 0)
	k90, a90, _, _ := RainCoeffsPath(20e9, 0, math.Pi/2)
	kc, ac, _, _ := RainCoeffsPath(20e9, 0, math.Pi/4)
	kz, _, _, _ := RainCoeffsPath(20e9, math.Pi/2, 0)
	checkRefs(t, []ref{
		{"τ=0 is H", k0, kh, 1e-12, true}, {"τ=0 α", a0, ah, 1e-12, false}, // P.838-3 eqs. (4), (5)
		{"τ=90 is V", k90, kv, 1e-12, true}, {"τ=90 α", a90, av, 1e-12, false}, // P.838-3 eqs. (4), (5)
		{"circular k", kc, (kh + kv) / 2, 1e-12, true},                // P.838-3 eq. (4), cos 2τ = 0
		{"circular α", ac, (kh*ah + kv*av) / (kh + kv), 1e-12, false}, // P.838-3 eq. (5), cos 2τ = 0
		{"zenith k", kz, (kh + kv) / 2, 1e-12, true},                  // P.838-3 eq. (4), cos²θ = 0 at θ = 90°
	})
}

// p530Ref is ITU-R P.530-17 §2.4.1 steps 2–5 computed step by step (d km, f GHz).
func p530Ref(f, d, r, p, k, a float64) float64 {
	rr := math.Min(1/(0.477*math.Pow(d, 0.633)*math.Pow(r, 0.073*a)*math.Pow(f, 0.123)-10.579*(1-math.Exp(-0.024*d))), 2.5)
	a001 := k * math.Pow(r, a) * d * rr
	c0 := 0.12
	if f >= 10 {
		c0 = 0.12 + 0.4*math.Log10(math.Pow(f/10, 0.8))
	}
	c1 := math.Pow(0.07, c0) * math.Pow(0.12, 1-c0)
	c2 := 0.855*c0 + 0.546*(1-c0)
	c3 := 0.139*c0 + 0.043*(1-c0)
	return a001 * c1 * math.Pow(p, -(c2+c3*math.Log10(p)))
}

func TestRainLOSRefs(t *testing.T) {
	h := must(t)
	k23, a23, _, _ := RainCoeffs(23e9, "v")
	k38, a38, _, _ := RainCoeffs(38e9, "h")
	k6, a6, _, _ := RainCoeffs(6e9, "v")
	checkRefs(t, []ref{
		{"23 GHz 5 km 0.01 %", h(RainLOS(23e9, 5e3, 42, 0.01, "v")), p530Ref(23, 5, 42, 0.01, k23, a23), 1e-9, true},    // P.530-17 steps 2–5
		{"23 GHz 5 km 0.1 %", h(RainLOS(23e9, 5e3, 42, 0.1, "v")), p530Ref(23, 5, 42, 0.1, k23, a23), 1e-9, true},       // P.530-17 steps 2–5
		{"38 GHz 2 km 0.001 %", h(RainLOS(38e9, 2e3, 30, 0.001, "h")), p530Ref(38, 2, 30, 0.001, k38, a38), 1e-9, true}, // P.530-17 steps 2–5
		{"6 GHz 30 km 0.01 %", h(RainLOS(6e9, 30e3, 50, 0.01, "v")), p530Ref(6, 30, 50, 0.01, k6, a6), 1e-9, true},      // P.530-17 steps 2–5 (C0 = 0.12 below 10 GHz)
		// At p = 0.01 % the scaling is 1 to within the fit (C1·0.01^−(C2 + C3·log 0.01) ≈ 1 for
		// f < 10 GHz: 0.07^0.12·0.12^0.88·0.01^−(0.5832 − 2·0.0546)); P.530-17 eq. (34) design.
		{"6 GHz p=0.01 ≈ A0.01", h(RainLOS(6e9, 10e3, 50, 0.01, "v")) / (k6 * math.Pow(50, a6) * 10 / (0.477*math.Pow(10, 0.633)*math.Pow(50, 0.073*a6)*math.Pow(6, 0.123) - 10.579*(1-math.Exp(-0.24)))), 1, 0.05, false},
		{"no rain", h(RainLOS(23e9, 5e3, 0, 0.01, "v")), 0, 0, false}, // P.838-3: γ = 0 without rain
	})
	// Rain fades grow as the time percentage falls (the point of an availability target).
	if h(RainLOS(23e9, 5e3, 42, 0.001, "v")) <= h(RainLOS(23e9, 5e3, 42, 0.01, "v")) {
		t.Errorf("A0.001 must exceed A0.01")
	}
	for _, c := range []struct {
		d, r, p float64
		pol     string
	}{{0, 42, 0.01, "v"}, {5e3, -1, 0.01, "v"}, {5e3, 42, 0, "v"}, {5e3, 42, 100, "v"}, {5e3, 42, 0.01, "x"}} {
		if _, _, err := RainLOS(23e9, c.d, c.r, c.p, c.pol); err == nil {
			t.Errorf("RainLOS(%v): want an error", c)
		}
	}
}

// TestRainESValidation checks RainES against the ITU-R Study Group 3 validation examples for
// P.618-13 §2.2.1.1 (CG-3M3J-13-ValEx), as extracted by the ITU-Rpy project
// (test/test_data/618/ITURP618-13_A_rain.csv: site latitude, hs, f, elevation, τ, p, R0.01,
// the slant length LS and A_rain). The ITU-R validation examples for P.618-14, as listed in
// ITU-Rpy's docs/validation/itur618_14_rain_attenuation_table.html, give the same A_rain for
// these rows (e.g. 0.495317, 6.798072 and 28.742722 dB), so the step-by-step method is
// unchanged in the current edition. The rain height hR, a P.839 map value the examples take
// from the map, is recovered from the published LS by step 2: hR = hs + LS sin θ.
func TestRainESValidation(t *testing.T) {
	rows := []struct{ lat, hs, f, el, tau, p, r001, ls, want float64 }{
		{51.5, 0.031382984, 14.25, 31.07699124, 0, 1, 26.48052, 4.690817392, 0.495317069},
		{51.5, 0.031382984, 14.25, 31.07699124, 0, 0.1, 26.48052, 4.690817392, 2.185847422},
		{51.5, 0.031382984, 14.25, 31.07699124, 0, 0.01, 26.48052, 4.690817392, 6.798072267},
		{51.5, 0.031382984, 14.25, 31.07699124, 0, 0.001, 26.48052, 4.690817392, 14.89982248},
		{41.9, 0.046122988, 29, 40.232036, 0, 0.01, 33.936232, 4.646913874, 28.74272193},
		{33.94, 0, 29, 46.35969261, 0, 0.1, 27.13586832, 3.542006965, 7.808322508},
		{22.9, 0, 14.25, 22.27833468, 0, 1, 50.639304, 10.96995451, 1.706901281},
		{22.9, 0, 29, 22.27833468, 0, 0.001, 50.639304, 10.96995451, 83.5996391},
		{25.78, 0.00861728, 14.25, 52.67898486, 0, 0.1, 78.2994993, 5.735098894, 6.297247244},
		{28.717, 0.209383699, 29, 48.24117054, 90, 0.01, 63.61888808, 6.768266217, 52.83372062},
		{3.133, 0.051251456, 14.25, 85.80459566, 90, 0.1, 99.15117186, 4.91990658, 11.00145492},
		{9.05, 2.539861878, 29, 20.14335809, 90, 1, 42.91007183, 6.516372436, 3.70158394},
		{9.05, 2.539861878, 14.25, 20.14335809, 90, 0.001, 42.91007183, 6.516372436, 17.44199306},
	}
	for _, r := range rows {
		pol := "h"
		if r.tau == 90 {
			pol = "v"
		}
		hr := r.hs + r.ls*math.Sin(r.el*degr)
		got, _, err := RainES(r.f*1e9, r.el*degr, r.r001, r.p, r.hs, hr, r.lat*degr, pol)
		if err != nil {
			t.Fatal(err)
		}
		// P.838-3's own rounding of its regression coefficients allows 1e-4 relative.
		if math.Abs(got-r.want)/r.want > 1e-4 {
			t.Errorf("lat %v f %v p %v: A = %.6f dB, want %.6f (ITU-R P.618-13 validation example)", r.lat, r.f, r.p, got, r.want)
		}
	}
	if a, _, _ := RainES(20e9, 30*degr, 50, 0.01, 3, 2, 45*degr, "c"); a != 0 {
		t.Errorf("a station above the rain height sees no rain (P.618-13 step 4), got %v", a)
	}
	for _, c := range []struct{ el, p, r, lat float64 }{{0, 0.01, 50, 0}, {91 * degr, 0.01, 50, 0}, {30 * degr, 0, 50, 0}, {30 * degr, 0.01, -1, 0}, {30 * degr, 0.01, 50, 91 * degr}} {
		if _, _, err := RainES(20e9, c.el, c.r, c.p, 0, 3, c.lat, "h"); err == nil {
			t.Errorf("RainES(%v): want an error", c)
		}
	}
}

func TestKnifeEdgeRefs(t *testing.T) {
	lambda := C0 / 10e9
	v, _ := FresnelV(10, 5e3, 5e3, 10e9)
	j := func(v float64) float64 { l, _ := KnifeEdgeV(v); return l }
	checkRefs(t, []ref{
		{"ν", v, 10 * math.Sqrt(2/lambda*(2/5e3)), 1e-12, false}, // ITU-R P.526-15 §4.1: ν = h sqrt(2/λ (1/d1 + 1/d2))
		// ν = sqrt(2)·h/r1 with r1 the first Fresnel radius (ITU-R P.526 §4.1 equivalent form).
		{"ν via r1", v, math.Sqrt2 * 10 / math.Sqrt(lambda*2.5e3), 1e-12, false},
		{"J(0) grazing", j(0), 6.9 + 20*math.Log10(math.Sqrt(1.01)-0.1), 1e-12, false}, // P.526-15 J(ν) at ν = 0
		{"J(0) ≈ 6 dB", j(0), 6.0, 0.05, false},                                        // grazing incidence: 6 dB (common practice, no source)
		{"J(1)", j(1), 6.9 + 20*math.Log10(math.Sqrt(1.81)+0.9), 1e-12, false},         // P.526-15 J(ν)
		{"J(2.4)", j(2.4), 12.95 + 20*math.Log10(2.4), 0.2, false},                     // large ν: J ≈ 12.95 + 20 log ν (Fresnel-integral asymptote, from memory)
		{"J(-0.5)", j(-0.5), 6.9 + 20*math.Log10(math.Sqrt(0.36+1)-0.6), 1e-12, false}, // P.526-15 J(ν)
		{"clear", j(-1), 0, 0, false},                                                  // ν ≤ −0.78: no loss
	})
	if _, err := FresnelV(1, 0, 1e3, 1e9); err == nil {
		t.Error("d1 = 0: want an error")
	}
}

func TestAntennaPolRefs(t *testing.T) {
	// θ3dB ≈ 70 λ/D degrees (common practice, no source): a 2.4 m dish at 2.4 GHz is 3.64°.
	checkRefs(t, []ref{
		{"beamwidth", Beamwidth(2.4, 2.4e9, 70*degr) / degr, 70 * C0 / 2.4e9 / 2.4, 1e-9, false}, // common practice: 70 λ/D
		{"pointing half bw", must0(PointingLoss(1, 2)), 3, 1e-12, false},                         // 12 (θ/θ3dB)²: 3 dB at half the beamwidth
		{"pointing 0.1 bw", must0(PointingLoss(0.1, 1)), 0.12, 1e-12, false},                     // 12 (0.1)²
		{"pol 45°", mustE(PolLoss(45 * degr)), 10 * math.Log10(2), 1e-9, false},                  // PLF = cos² 45° = 1/2 (Balanis)
		{"pol 0°", mustE(PolLoss(0)), 0, 1e-12, false},                                           // aligned: no loss
		{"pol 60°", mustE(PolLoss(60 * degr)), 20 * math.Log10(2), 1e-9, false},                  // cos 60° = 1/2
		// P.525-4 §2.1: E(dBµV/m) = EIRP(dBW) − 20 log d(km) + 74.8; at 1 km and 0 dBW, 74.77.
		{"field 0 dBW 1 km", FieldStrength(0, 1e3), 74.8, 0.05, false},
		{"field exact", FieldStrength(10, 3e3), 10 + 20*math.Log10(math.Sqrt(30)/3e3/1e-6), 1e-9, false}, // e = sqrt(30 p)/d (P.525-4)
		// P.525-4 §2.1: S(dBW/m²) = EIRP − 20 log d(km) − 71.0.
		{"pfd 0 dBW 1 km", PFD(0, 1e3), -71.0, 0.05, false},
		{"pfd GEO", PFD(50, 35786e3), 50 - 10*math.Log10(4*math.Pi*sq(35786e3)), 1e-9, false}, // spherical spreading p/(4π d²)
	})
	if _, err := PolLoss(90 * degr); err == nil {
		t.Error("pol_loss(90°) must be an error")
	}
	if _, notes := PointingLoss(3, 2); len(notes) == 0 {
		t.Error("past one beamwidth: want a note")
	}
}

func must0(v float64, _ []string) float64 { return v }

func mustE(v float64, err error) float64 {
	if err != nil {
		return math.NaN()
	}
	return v
}

// TestLognormalMarginRefs checks σ·Q⁻¹(1 − a) against gonum's normal quantile.
func TestLognormalMarginRefs(t *testing.T) {
	n := distuv.UnitNormal
	m := func(s, a float64) float64 { return mustE(LognormalMargin(s, a)) }
	checkRefs(t, []ref{
		{"8 dB 90 %", m(8, 0.9), 8 * n.Quantile(0.9), 1e-9, false},       // gonum distuv.Normal.Quantile
		{"8 dB 95 %", m(8, 0.95), 8 * n.Quantile(0.95), 1e-9, false},     // gonum
		{"6 dB 99.9 %", m(6, 0.999), 6 * n.Quantile(0.999), 1e-9, false}, // gonum
		{"median", m(8, 0.5), 0, 1e-12, false},                           // the median needs no margin
		{"95 % is 1.645σ", m(1, 0.95), 1.645, 1e-3, false},               // common practice, no source: z(95 %) = 1.645
	})
	for _, a := range []float64{0, 1, -0.1} {
		if _, err := LognormalMargin(8, a); err == nil {
			t.Errorf("availability %v: want an error", a)
		}
	}
}

// TestGasAgainstP676v13 compares the P.676-10 Annex 2 fits with the current edition's
// specific attenuation: the ITU-R Study Group 3 validation examples for ITU-R P.676-13
// (γ = γo + γw from the Annex 1 line sum at 1013.25 hPa, 7.5 g/m³, 288.15 K), as listed in
// ITU-Rpy's published validation table (docs/validation/itur676_13_gamma_table.html). The
// tolerance is the fits' own error against the line sum, which the doc of GasSpecific states:
// within 0.5 % below 5 GHz and at the 22 GHz line, 8 % from 10 to 45 GHz, 5 % in the oxygen
// band (55–70 GHz) and 10 % at 80–90 GHz.
func TestGasAgainstP676v13(t *testing.T) {
	for _, c := range []struct{ f, want, tol float64 }{
		{1, 0.005440, 0.005}, {2, 0.006920, 0.005}, {5, 0.008714, 0.005},
		{10, 0.014199, 0.08}, {15, 0.029058, 0.08}, {20, 0.108931, 0.08},
		{22, 0.187337, 0.005}, {23, 0.194289, 0.005}, {25, 0.146235, 0.08},
		{30, 0.093825, 0.08}, {38, 0.116615, 0.08}, {40, 0.131086, 0.08}, {45, 0.193481, 0.08},
		{55, 4.324956, 0.05}, {58, 12.498391, 0.05}, {60, 14.778317, 0.05}, {62, 14.161167, 0.05},
		{64, 7.020353, 0.05}, {70, 0.513993, 0.05}, {80, 0.342368, 0.1}, {90, 0.380843, 0.1},
	} {
		g, _, err := GasSpecific(c.f*1e9, StdRho, StdPressure, StdTemp)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(g/c.want-1) > c.tol {
			t.Errorf("γ(%v GHz) = %.6f dB/km, P.676-13 validation example %.6f: off by %.1f %% (allowed %.1f %%)", c.f, g, c.want, 100*(g/c.want-1), 100*c.tol)
		}
	}
}

// TestRainSpecificValidation checks γR = k R^α with P.838-3's elevation and tilt combination
// against the ITU-R Study Group 3 validation examples for ITU-R P.838-3 (CG-3M3J-13-ValEx),
// as listed in ITU-Rpy's validation table (docs/validation/itur838_3_table.html): elevation,
// frequency, rain rate, tilt τ and γR in dB/km.
func TestRainSpecificValidation(t *testing.T) {
	for _, c := range []struct{ el, f, r, tau, want float64 }{
		{31.076991, 14.25, 26.480520, 0, 1.581308},
		{40.232036, 14.25, 33.936232, 0, 2.061732},
		{46.359693, 14.25, 27.135868, 0, 1.592084},
		{31.076991, 29, 26.480520, 0, 5.021802},
		{40.232036, 29, 33.936232, 0, 6.278460},
		{22.278335, 14.25, 50.639304, 0, 3.321396},
		{52.678985, 14.25, 78.299499, 0, 5.115035},
		{22.278335, 29, 50.639304, 0, 9.424302},
		{52.678985, 29, 78.299499, 0, 13.592901},
		{48.241171, 14.25, 63.626681, 90, 3.729013},
		{85.804596, 14.25, 99.135590, 90, 6.340646},
		{20.143358, 14.25, 42.910072, 90, 2.350323},
		{48.241171, 29, 63.626681, 90, 10.286992},
		{85.804596, 29, 99.135590, 90, 16.318369},
		{20.143358, 29, 42.910072, 90, 6.833646},
	} {
		k, a, _, err := RainCoeffsPath(c.f*1e9, c.el*degr, c.tau*degr)
		if err != nil {
			t.Fatal(err)
		}
		if got := k * math.Pow(c.r, a); math.Abs(got/c.want-1) > 1e-6 {
			t.Errorf("γR(%v GHz, %v°, %v mm/h, τ %v°) = %.6f dB/km, want %.6f (ITU-R P.838-3 validation example)", c.f, c.el, c.r, c.tau, got, c.want)
		}
	}
}
