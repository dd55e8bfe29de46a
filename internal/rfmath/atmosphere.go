package rfmath

import (
	"fmt"
	"math"
)

// Standard surface conditions of ITU-R P.676 Annex 2 and the defaults of GasSpecific: water
// vapour density 7.5 g/m³, pressure 1013.25 hPa, temperature 15 °C (288.15 K).
const (
	StdRho      = 7.5     // g/m³
	StdPressure = 1013.25 // hPa
	StdTemp     = 288.15  // K
)

// gasInputs checks the meteorological inputs of the gas model: f in GHz, p in hPa, t in K,
// rho in g/m³.
func gasInputs(f, rho, p, t float64) error {
	switch {
	case !positive(f) || math.IsInf(f, 1):
		return fmt.Errorf("rfmath: gaseous attenuation needs a positive frequency (got %s GHz)", num(f))
	case !(rho >= 0) || math.IsInf(rho, 1):
		return fmt.Errorf("rfmath: the water vapour density must not be negative (got %s g/m³)", num(rho))
	case !positive(p) || math.IsInf(p, 1):
		return fmt.Errorf("rfmath: the pressure must be positive (got %s hPa)", num(p))
	case !(t > 73) || math.IsInf(t, 1):
		// rt = 288/(t − 0.15) in eq. (22); near 0 K the fits are meaningless.
		return fmt.Errorf("rfmath: the temperature must be above 73 K (−200 °C) (got %s K)", num(t))
	}
	return nil
}

// p676phi is φ(rp, rt, a, b, c, d) = rp^a rt^b exp[c(1 − rp) + d(1 − rt)], ITU-R P.676-10
// Annex 2 eq. (22u).
func p676phi(rp, rt, a, b, c, d float64) float64 {
	return math.Pow(rp, a) * math.Pow(rt, b) * math.Exp(c*(1-rp)+d*(1-rt))
}

// p676r returns rp = p/1013 and rt = 288/(273 + t°C) of ITU-R P.676-10 Annex 2 for a total
// pressure p in hPa and a temperature t in K (t°C = t − 273.15: the Recommendation writes the
// temperature in °C and adds 273, not 273.15).
func p676r(p, t float64) (rp, rt float64) {
	return p / 1013, 288 / (273 + (t - 273.15))
}

// GasOxygen returns the specific attenuation of dry air γo in dB/km at frequency f (GHz),
// total pressure p (hPa) and temperature t (K). Source: ITU-R P.676-10 (09/2013), Annex 2,
// §1, eq. (22): the piecewise approximation in six frequency bands with the functions ξ1…ξ7,
// γ54…γ66 and δ. Valid for 1–350 GHz; above 350 GHz the last branch is extrapolated (callers
// warn). P.676-10 is the last edition with these closed-form fits: from P.676-11 on, Annex 2
// takes γ from Annex 1's line sum (see GasSpecific).
func GasOxygen(f, p, t float64) float64 {
	rp, rt := p676r(p, t)
	phi := func(a, b, c, d float64) float64 { return p676phi(rp, rt, a, b, c, d) }
	f2rp2 := f * f * rp * rp
	switch {
	case f <= 54:
		xi1 := phi(0.0717, -1.8132, 0.0156, -1.6515)
		xi2 := phi(0.5146, -4.6368, -0.1921, -5.7416)
		xi3 := phi(0.3414, -6.5851, 0.2130, -8.5854)
		return (7.2*math.Pow(rt, 2.8)/(f*f+0.34*rp*rp*math.Pow(rt, 1.6)) +
			0.62*xi3/(math.Pow(54-f, 1.16*xi1)+0.83*xi2)) * f2rp2 * 1e-3
	case f <= 60:
		g54, g58, g60 := 2.192*phi(1.8286, -1.9487, 0.4051, -2.8509), 12.59*phi(1.0045, 3.5610, 0.1588, 1.2834), 15.0*phi(0.9003, 4.1335, 0.0427, 1.6088)
		return math.Exp(math.Log(g54)/24*(f-58)*(f-60) - math.Log(g58)/8*(f-54)*(f-60) + math.Log(g60)/12*(f-54)*(f-58))
	case f <= 62:
		g60, g62 := 15.0*phi(0.9003, 4.1335, 0.0427, 1.6088), 14.28*phi(0.9886, 3.4176, 0.1827, 1.3429)
		return g60 + (g62-g60)*(f-60)/2
	case f <= 66:
		g62, g64, g66 := 14.28*phi(0.9886, 3.4176, 0.1827, 1.3429), 6.819*phi(1.4320, 0.6258, 0.3177, -0.5914), 1.908*phi(2.0717, -4.1404, 0.4910, -4.8718)
		return math.Exp(math.Log(g62)/8*(f-64)*(f-66) - math.Log(g64)/4*(f-62)*(f-66) + math.Log(g66)/8*(f-62)*(f-64))
	case f <= 120:
		xi4 := phi(-0.0112, 0.0092, -0.1033, -0.0009)
		xi5 := phi(0.2705, -2.7192, -0.3016, -4.1033)
		xi6 := phi(0.2445, -5.9191, 0.0422, -8.0719)
		xi7 := phi(-0.1833, 6.5589, -0.2402, 6.131)
		return (3.02e-4*math.Pow(rt, 3.5) + 0.283*math.Pow(rt, 3.8)/(sq(f-118.75)+2.91*rp*rp*math.Pow(rt, 1.6)) +
			0.502*xi6*(1-0.0163*xi7*(f-66))/(math.Pow(f-66, 1.4346*xi4)+1.15*xi5)) * f2rp2 * 1e-3
	}
	delta := -0.00306 * phi(3.211, -14.94, 1.583, -16.37)
	return (3.02e-4/(1+1.9e-5*math.Pow(f, 1.5))+0.283*math.Pow(rt, 0.3)/(sq(f-118.75)+2.91*rp*rp*math.Pow(rt, 1.6)))*
		f2rp2*math.Pow(rt, 3.5)*1e-3 + delta
}

// GasWater returns the specific attenuation of water vapour γw in dB/km at frequency f
// (GHz), total pressure p (hPa), temperature t (K) and water vapour density rho (g/m³).
// Source: ITU-R P.676-10 (09/2013), Annex 2, §1, eq. (23), the line sum in η1, η2 and g(f, fi).
func GasWater(f, p, t, rho float64) float64 {
	rp, rt := p676r(p, t)
	e1 := 0.955*rp*math.Pow(rt, 0.68) + 0.006*rho
	e2 := 0.735*rp*math.Pow(rt, 0.5) + 0.0353*math.Pow(rt, 4)*rho
	g := func(fi float64) float64 { return 1 + sq((f-fi)/(f+fi)) }
	x := func(c float64) float64 { return math.Exp(c * (1 - rt)) }
	s := 3.98*e1*x(2.23)/(sq(f-22.235)+9.42*e1*e1)*g(22) +
		11.96*e1*x(0.7)/(sq(f-183.31)+11.14*e1*e1) +
		0.081*e1*x(6.44)/(sq(f-321.226)+6.29*e1*e1) +
		3.66*e1*x(1.6)/(sq(f-325.153)+9.22*e1*e1) +
		25.37*e1*x(1.09)/sq(f-380) +
		17.4*e1*x(1.46)/sq(f-448) +
		844.6*e1*x(0.17)/sq(f-557)*g(557) +
		290*e1*x(0.41)/sq(f-752)*g(752) +
		8.3328e4*e2*x(0.99)/sq(f-1780)*g(1780)
	return s * f * f * math.Pow(rt, 2.5) * rho * 1e-4
}

func sq(x float64) float64 { return x * x }

// GasSpecific returns the specific attenuation of atmospheric gases γo + γw in dB/km for
// frequency f (Hz), water vapour density rho (g/m³), total pressure p (hPa) and temperature t
// (K), by the approximate method of ITU-R P.676-10 (09/2013) Annex 2 §1. That edition is the
// last whose Annex 2 gives closed-form fits; P.676-11 to -13 compute γ in Annex 2 from Annex 1's
// spectroscopic line sum (about 80 lines), which this package does not carry. At sea level
// (7.5 g/m³, 1013.25 hPa, 15 °C) the fits lie within 0.5 % of P.676-13's line sum below 5 GHz
// and near the 22 GHz line, within 4 % in the 60 GHz oxygen band, and up to about 8 % above it
// between 10 and 45 GHz and at 80–90 GHz (hundredths of a dB per km; TestGasAgainstP676v13
// holds the comparison). Notes are
// returned outside the method's 1–350 GHz.
func GasSpecific(f, rho, p, t float64) (float64, []string, error) {
	fg := f / 1e9
	if err := gasInputs(fg, rho, p, t); err != nil {
		return math.NaN(), nil, err
	}
	notes := rangeNote("frequency", f, 1e9, 350e9, fmtHz, "1–350 GHz (ITU-R P.676 Annex 2)")
	return GasOxygen(fg, p, t) + GasWater(fg, p, t, rho), notes, nil
}

// GasHeights returns the equivalent heights ho (dry air) and hw (water vapour) in km at
// frequency f (GHz) and total pressure p (hPa). Source: ITU-R P.676-10 (09/2013), Annex 2,
// §2.2 (the edition whose γ fits GasOxygen and GasWater use): ho = 6.1/(1 + 0.17 rp^−1.1)·(1 + t1 + t2 + t3), at most 10.7 rp^0.3
// below 70 GHz, and hw = 1.66·(1 + Σ line terms in σw).
func GasHeights(f, p float64) (ho, hw float64) {
	rp := p / 1013
	t1 := 4.64 / (1 + 0.066*math.Pow(rp, -2.3)) * math.Exp(-sq((f-59.7)/(2.87+12.4*math.Exp(-7.9*rp))))
	// 2.21 as printed in P.676-10; P.676-11 prints 2.12 in the same term.
	t2 := 0.14 * math.Exp(2.21*rp) / (sq(f-118.75) + 0.031*math.Exp(2.2*rp))
	t3 := 0.0114 / (1 + 0.14*math.Pow(rp, -2.6)) * f * (-0.0247 + 0.0001*f + 1.61e-6*f*f) /
		(1 - 0.0169*f + 4.1e-5*f*f + 3.2e-7*f*f*f)
	ho = 6.1 / (1 + 0.17*math.Pow(rp, -1.1)) * (1 + t1 + t2 + t3)
	if f < 70 {
		ho = math.Min(ho, 10.7*math.Pow(rp, 0.3))
	}
	sw := 1.013 / (1 + math.Exp(-8.6*(rp-0.57)))
	hw = 1.66 * (1 + 1.39*sw/(sq(f-22.235)+2.56*sw) + 3.37*sw/(sq(f-183.31)+4.69*sw) + 1.58*sw/(sq(f-325.1)+2.89*sw))
	return ho, hw
}

// lowElevF is F(x) = 1/(0.661 x + 0.339 sqrt(x² + 5.51)) of ITU-R P.676-10 Annex 2 §2.2.2,
// the curved-Earth path factor for elevations below 5°.
func lowElevF(x float64) float64 { return 1 / (0.661*x + 0.339*math.Sqrt(x*x+5.51)) }

// GasLoss returns the attenuation in dB by atmospheric gases on an Earth–space path from a
// station near sea level at elevation elev (rad), frequency f (Hz), surface water vapour
// density rho (g/m³), total pressure p (hPa) and temperature t (K). Source: ITU-R P.676-10
// Annex 2 §2.2: for 5°–90°, A = (γo ho + γw hw)/sin φ; below 5°, the curved-Earth
// form A = sqrt(Re)·[γo sqrt(ho) F(tan φ sqrt(Re/ho)) + γw sqrt(hw) F(tan φ sqrt(Re/hw))]/cos φ
// with Re = 8500 km. Notes are returned outside 1–350 GHz and below 5°; an error
// for an elevation outside 0–90°.
func GasLoss(f, elev, rho, p, t float64) (float64, []string, error) {
	if !(elev >= 0 && elev <= math.Pi/2) {
		return math.NaN(), nil, fmt.Errorf("rfmath: elevation must lie between 0° and 90° (got %s°)", num(elev*180/math.Pi))
	}
	_, notes, err := GasSpecific(f, rho, p, t)
	if err != nil {
		return math.NaN(), nil, err
	}
	fg := f / 1e9
	go_, gw := GasOxygen(fg, p, t), GasWater(fg, p, t, rho)
	ho, hw := GasHeights(fg, p)
	if elev >= 5*math.Pi/180 {
		return (go_*ho + gw*hw) / math.Sin(elev), notes, nil
	}
	notes = append(notes, fmt.Sprintf("elevation %s° is below 5°: the curved-Earth form of ITU-R P.676 Annex 2 is used, and refraction and ground reflections make low-elevation estimates rough", num(elev*180/math.Pi)))
	const re = 8500.0
	tan := math.Tan(elev)
	a := math.Sqrt(re) * (go_*math.Sqrt(ho)*lowElevF(tan*math.Sqrt(re/ho)) + gw*math.Sqrt(hw)*lowElevF(tan*math.Sqrt(re/hw))) / math.Cos(elev)
	return a, notes, nil
}

// SkyNoise returns the rise in antenna noise temperature in K caused by an absorbing medium of
// attenuation a (dB) at mean radiating temperature tm (K): T = tm·(1 − 10^(−a/10)). Source:
// ITU-R P.618-13 §3 (sky noise temperature), with tm = 275 K suggested for rain and
// clouds when no local value is known. It returns NaN for a negative attenuation or
// temperature.
func SkyNoise(a, tm float64) float64 {
	if !(a >= 0) || !(tm >= 0) || math.IsInf(tm, 1) {
		return math.NaN()
	}
	return tm * (1 - math.Pow(10, -a/10))
}
