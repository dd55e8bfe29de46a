package rfmath

import (
	"fmt"
	"math"
)

// rainPolNames are the polarisations the path methods accept: linear horizontal (tilt τ = 0°),
// linear vertical (τ = 90°) and circular (τ = 45°, as ITU-R P.838-3 prescribes).
var rainPolNames = []string{"h", "v", "c"}

// RainTilt returns the polarisation tilt angle τ (rad) relative to the horizontal for pol:
// "h" 0°, "v" 90°, "c" (circular) 45°.
func RainTilt(pol string) (float64, error) {
	switch pol {
	case "h":
		return 0, nil
	case "v":
		return math.Pi / 2, nil
	case "c":
		return math.Pi / 4, nil
	}
	return math.NaN(), nameError("polarisation", pol, rainPolNames)
}

// RainCoeffsPath returns k and α of γ = k R^α for frequency f (Hz), path elevation elev (rad)
// and polarisation tilt tau (rad). Source: ITU-R P.838-3, eqs. (4) and (5):
//
//	k = [kH + kV + (kH − kV) cos²θ cos 2τ]/2
//	α = [kH αH + kV αV + (kH αH − kV αV) cos²θ cos 2τ]/(2k)
func RainCoeffsPath(f, elev, tau float64) (k, alpha float64, notes []string, err error) {
	kh, ah, notes, err := RainCoeffs(f, "h")
	if err != nil {
		return math.NaN(), math.NaN(), nil, err
	}
	kv, av, _, _ := RainCoeffs(f, "v")
	c := sq(math.Cos(elev)) * math.Cos(2*tau)
	k = (kh + kv + (kh-kv)*c) / 2
	alpha = (kh*ah + kv*av + (kh*ah-kv*av)*c) / (2 * k)
	return k, alpha, notes, nil
}

// rainInputs checks the inputs common to the path methods: r001 in mm/h, p in %.
func rainInputs(r001, p float64) error {
	if !(r001 >= 0) || math.IsInf(r001, 1) {
		return fmt.Errorf("rfmath: the rain rate must not be negative (got %s mm/h)", num(r001))
	}
	if !(p > 0 && p < 100) {
		return fmt.Errorf("rfmath: the time percentage p must lie strictly between 0 %% and 100 %% (got %s %%)", num(p))
	}
	return nil
}

// RainLOS returns the rain attenuation in dB exceeded for p % of an average year on a
// terrestrial line-of-sight path of length d (m) at frequency f (Hz), for the point rain rate
// r001 (mm/h, 1-min integration) exceeded for 0.01 % of the year, and polarisation pol ("h",
// "v" or "c"). Source: ITU-R P.530-17 §2.4.1 (the method is unchanged in P.530-18):
//
//	step 2: γR = k R0.01^α (ITU-R P.838-3, θ = 0)
//	step 3: r = 1/(0.477 d^0.633 R0.01^(0.073 α) f^0.123 − 10.579 (1 − exp(−0.024 d))), at most 2.5
//	step 4: A0.01 = γR d r
//	step 5: Ap = A0.01 C1 p^−(C2 + C3 log10 p), C0 = 0.12 + 0.4 log10((f/10)^0.8) for f ≥ 10 GHz,
//	        else 0.12; C1 = 0.07^C0 0.12^(1−C0), C2 = 0.855 C0 + 0.546 (1 − C0),
//	        C3 = 0.139 C0 + 0.043 (1 − C0)
//
// with d in km and f in GHz. Where the fit's denominator falls to 0.4 or below (long paths at
// low frequencies and rain rates) r takes its cap of 2.5, as P.530 prescribes; where it falls
// to zero or below, the fit itself has broken down and a note says so. Notes are also
// returned for p outside 0.001–1 %, f outside 1–100 GHz and d beyond 60 km; errors for d ≤ 0,
// a negative rain rate, p outside (0, 100) % and an unknown polarisation.
func RainLOS(f, d, r001, p float64, pol string) (float64, []string, error) {
	tau, err := RainTilt(pol)
	if err != nil {
		return math.NaN(), nil, err
	}
	if !positive(d) || math.IsInf(d, 1) {
		return math.NaN(), nil, fmt.Errorf("rfmath: the path length must be positive (got %s)", fmtM(d))
	}
	if err := rainInputs(r001, p); err != nil {
		return math.NaN(), nil, err
	}
	k, alpha, _, err := RainCoeffsPath(f, 0, tau)
	if err != nil {
		return math.NaN(), nil, err
	}
	fg, dk := f/1e9, d/1e3
	var notes []string
	notes = append(notes, rangeNote("frequency", f, 1e9, 100e9, fmtHz, "1–100 GHz (ITU-R P.530 rain method)")...)
	notes = append(notes, rangeNote("time percentage", p, 0.001, 1, func(x float64) string { return num(x) + " %" }, "0.001–1 % (ITU-R P.530 scaling)")...)
	if dk > 60 {
		notes = append(notes, fmt.Sprintf("path length %s is beyond the 60 km of the data behind the ITU-R P.530 distance factor", fmtM(d)))
	}
	if r001 == 0 {
		return 0, notes, nil
	}
	gamma := k * math.Pow(r001, alpha)
	den := 0.477*math.Pow(dk, 0.633)*math.Pow(r001, 0.073*alpha)*math.Pow(fg, 0.123) - 10.579*(1-math.Exp(-0.024*dk))
	r := 2.5
	if den > 0.4 {
		r = 1 / den
	} else if den <= 0 {
		notes = append(notes, "the ITU-R P.530 distance factor is outside its fit for this path (long, low frequency, light rain); its cap r = 2.5 is used")
	}
	a001 := gamma * dk * r
	c0 := 0.12
	if fg >= 10 {
		c0 = 0.12 + 0.4*math.Log10(math.Pow(fg/10, 0.8))
	}
	c1 := math.Pow(0.07, c0) * math.Pow(0.12, 1-c0)
	c2 := 0.855*c0 + 0.546*(1-c0)
	c3 := 0.139*c0 + 0.043*(1-c0)
	return a001 * c1 * math.Pow(p, -(c2+c3*math.Log10(p))), notes, nil
}

// RainES returns the rain attenuation in dB exceeded for p % of an average year on an
// Earth–space path, by ITU-R P.618-13 §2.2.1.1, steps 1 to 10. Inputs: frequency f (Hz),
// elevation elev (rad), rain rate r001 (mm/h) exceeded 0.01 % of the year, time percentage p
// (%), station height hs (km above sea level), rain height hr (km above sea level, from
// ITU-R P.839 or local data), station latitude lat (rad), polarisation pol ("h", "v", "c").
//
//	step 2: LS = (hR − hs)/sin θ for θ ≥ 5°, else 2(hR − hs)/(sqrt(sin²θ + 2(hR − hs)/Re) + sin θ), Re = 8500 km
//	step 3: LG = LS cos θ
//	step 5: γR = k R0.01^α (ITU-R P.838-3 with the path elevation and tilt)
//	step 6: r0.01 = 1/(1 + 0.78 sqrt(LG γR/f) − 0.38 (1 − exp(−2 LG)))
//	step 7: ζ = atan((hR − hs)/(LG r0.01)); LR = LG r0.01/cos θ if ζ > θ, else (hR − hs)/sin θ;
//	        χ = 36 − |φ| for |φ| < 36°, else 0;
//	        ν0.01 = 1/(1 + sqrt(sin θ)(31 (1 − exp(−θ/(1 + χ))) sqrt(LR γR)/f² − 0.45))
//	step 8: LE = LR ν0.01; step 9: A0.01 = γR LE
//	step 10: β = 0 if p ≥ 1 % or |φ| ≥ 36°; −0.005(|φ| − 36) if θ ≥ 25°; else −0.005(|φ| − 36) + 1.8 − 4.25 sin θ;
//	         Ap = A0.01 (p/0.01)^−(0.655 + 0.033 ln p − 0.045 ln A0.01 − β(1 − p) sin θ)
//
// (θ in degrees where it appears bare, f in GHz). The attenuation is zero when hR ≤ hs (step
// 4). Notes are returned for p outside 0.001–5 %, f outside 1–55 GHz and elevations below 5°;
// errors for an elevation outside 0–90°, a latitude outside ±90°, a negative rain rate, p
// outside (0, 100) % and an unknown polarisation.
func RainES(f, elev, r001, p, hs, hr, lat float64, pol string) (float64, []string, error) {
	tau, err := RainTilt(pol)
	if err != nil {
		return math.NaN(), nil, err
	}
	if !(elev > 0 && elev <= math.Pi/2) {
		return math.NaN(), nil, fmt.Errorf("rfmath: elevation must lie above 0° and at most 90° (got %s°)", num(elev*180/math.Pi))
	}
	if !(math.Abs(lat) <= math.Pi/2) {
		return math.NaN(), nil, fmt.Errorf("rfmath: latitude must lie between −90° and 90° (got %s°)", num(lat*180/math.Pi))
	}
	if math.IsNaN(hs) || math.IsNaN(hr) || math.IsInf(hs, 0) || math.IsInf(hr, 0) {
		return math.NaN(), nil, fmt.Errorf("rfmath: the station and rain heights must be numbers")
	}
	if err := rainInputs(r001, p); err != nil {
		return math.NaN(), nil, err
	}
	k, alpha, _, err := RainCoeffsPath(f, elev, tau)
	if err != nil {
		return math.NaN(), nil, err
	}
	fg := f / 1e9
	deg := elev * 180 / math.Pi
	var notes []string
	notes = append(notes, rangeNote("frequency", f, 1e9, 55e9, fmtHz, "1–55 GHz (ITU-R P.618 rain method)")...)
	notes = append(notes, rangeNote("time percentage", p, 0.001, 5, func(x float64) string { return num(x) + " %" }, "0.001–5 % (ITU-R P.618)")...)
	if deg < 5 {
		notes = append(notes, fmt.Sprintf("elevation %s° is below 5°: ITU-R P.618 uses its low-elevation path length, and the estimate is rough", num(deg)))
	}
	dh := hr - hs
	if dh <= 0 || r001 == 0 {
		return 0, notes, nil // step 4: the station lies above the rain
	}
	sinE := math.Sin(elev)
	ls := dh / sinE
	if deg < 5 {
		const re = 8500.0
		ls = 2 * dh / (math.Sqrt(sinE*sinE+2*dh/re) + sinE)
	}
	lg := ls * math.Cos(elev)
	gamma := k * math.Pow(r001, alpha)
	r := 1 / (1 + 0.78*math.Sqrt(lg*gamma/fg) - 0.38*(1-math.Exp(-2*lg)))
	zeta := math.Atan2(dh, lg*r)
	lr := dh / sinE
	if zeta > elev {
		lr = lg * r / math.Cos(elev)
	}
	latd := math.Abs(lat) * 180 / math.Pi
	chi := 0.0
	if latd < 36 {
		chi = 36 - latd
	}
	v := 1 / (1 + math.Sqrt(sinE)*(31*(1-math.Exp(-deg/(1+chi)))*math.Sqrt(lr*gamma)/(fg*fg)-0.45))
	a001 := gamma * lr * v
	beta := 0.0
	switch {
	case p >= 1 || latd >= 36:
	case deg >= 25:
		beta = -0.005 * (latd - 36)
	default:
		beta = -0.005*(latd-36) + 1.8 - 4.25*sinE
	}
	return a001 * math.Pow(p/0.01, -(0.655+0.033*math.Log(p)-0.045*math.Log(a001)-beta*(1-p)*sinE)), notes, nil
}
