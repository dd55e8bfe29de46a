package rfmath

import (
	"fmt"
	"math"
)

// Wavelength returns the free-space wavelength λ = c/f in m for a frequency
// f in Hz (C0 exact, SI). It returns NaN unless f > 0.
func Wavelength(f float64) float64 {
	if !positive(f) {
		return math.NaN()
	}
	return C0 / f
}

// FSPL returns the free-space basic transmission loss in dB between
// isotropic antennas at distance d (m) and frequency f (Hz):
//
//	L = 20 log10(4π d f / c)
//
// Source: ITU-R P.525 (equation for Lbf, written there as
// 32.4 + 20 log f(MHz) + 20 log d(km)). It returns NaN unless d > 0 and f > 0.
func FSPL(d, f float64) float64 {
	if !positive(d, f) {
		return math.NaN()
	}
	return 20 * math.Log10(4*math.Pi*d*f/C0)
}

// LogDistance returns the log-distance path loss in dB:
//
//	L = FSPL(d0, f) + 10 n log10(d/d0)
//
// with reference distance d0 (m), distance d (m), frequency f (Hz) and path
// loss exponent n (2 for free space). Source: the log-distance model of
// Rappaport, Wireless Communications, anchored at the ITU-R P.525 free-space
// loss. It returns NaN unless d, f and d0 are > 0 and n is a
// number.
func LogDistance(d, f, d0, n float64) float64 {
	if !positive(d, f, d0) || math.IsNaN(n) {
		return math.NaN()
	}
	return FSPL(d0, f) + 10*n*math.Log10(d/d0)
}

// TwoRayCrossover returns the crossover (breakpoint) distance in m of the
// two-ray ground-reflection model,
//
//	dc = 4π ht hr / λ
//
// for antenna heights ht, hr (m) and frequency f (Hz), beyond which the
// 40 log d asymptote applies. Source: Rappaport, Wireless Communications,
// two-ray ground reflection model. It returns NaN for negative
// heights or f ≤ 0.
func TwoRayCrossover(ht, hr, f float64) float64 {
	if math.IsNaN(ht) || math.IsNaN(hr) || ht < 0 || hr < 0 || !positive(f) {
		return math.NaN()
	}
	return 4 * math.Pi * ht * hr / Wavelength(f)
}

// TwoRay returns the large-distance asymptote of the two-ray
// ground-reflection path loss in dB,
//
//	L = 40 log10 d − 20 log10 ht − 20 log10 hr
//
// with d, ht, hr in m (isotropic antennas, perfectly reflecting flat ground).
// The asymptote is independent of f; f (Hz) is used only for the validity
// check: a note is returned when d is shorter than TwoRayCrossover, where the
// asymptote is optimistic and free-space loss is the better estimate. Source:
// Rappaport, Wireless Communications (two-ray ground reflection model). For
// impossible input (any of d, ht, hr not > 0) the loss is NaN and a note says
// why.
func TwoRay(d, ht, hr, f float64) (loss float64, notes []string) {
	if !positive(d, ht, hr) {
		return math.NaN(), []string{fmt.Sprintf("two-ray loss needs positive distance and heights (got d=%s, ht=%s, hr=%s)", fmtM(d), fmtM(ht), fmtM(hr))}
	}
	loss = 40*math.Log10(d) - 20*math.Log10(ht) - 20*math.Log10(hr)
	if !positive(f) {
		notes = append(notes, fmt.Sprintf("frequency %s is not positive: the two-ray crossover distance cannot be checked", fmtHz(f)))
		return loss, notes
	}
	if dc := TwoRayCrossover(ht, hr, f); d < dc {
		notes = append(notes, fmt.Sprintf("distance %s is shorter than the two-ray crossover distance %s (4π ht hr/λ); the 40 log d asymptote is optimistic there, free-space loss is the better estimate", fmtM(d), fmtM(dc)))
	}
	return loss, notes
}

// Environment names accepted by Hata and COST231.
var (
	hataEnvs    = []string{"urban", "urban-large", "suburban", "open"}
	cost231Envs = []string{"medium", "metro"}
)

// hataMediumA is Hata's mobile antenna height correction a(hm) in dB for a
// small or medium-sized city: (1.1 log f − 0.7) hm − (1.56 log f − 0.8),
// f in MHz, hm in m.
func hataMediumA(fMHz, hm float64) float64 {
	lf := math.Log10(fMHz)
	return (1.1*lf-0.7)*hm - (1.56*lf - 0.8)
}

// hataLargeA is Hata's a(hm) in dB for a large city:
// 8.29 (log 1.54 hm)² − 1.1 below 300 MHz, 3.2 (log 11.75 hm)² − 4.97 from
// 300 MHz up.
func hataLargeA(fMHz, hm float64) float64 {
	if fMHz < 300 {
		l := math.Log10(1.54 * hm)
		return 8.29*l*l - 1.1
	}
	l := math.Log10(11.75 * hm)
	return 3.2*l*l - 4.97
}

// hataNotes checks the shared validity ranges of Hata and COST 231–Hata.
func hataNotes(fMHz, fLo, fHi, dkm, hb, hm float64) []string {
	var notes []string
	span := fmt.Sprintf("%s–%s MHz", num(fLo), num(fHi))
	notes = append(notes, rangeNote("frequency", fMHz*1e6, fLo*1e6, fHi*1e6, fmtHz, span)...)
	notes = append(notes, rangeNote("distance", dkm*1e3, 1e3, 20e3, fmtM, "1–20 km")...)
	notes = append(notes, rangeNote("base station height", hb, 30, 200, fmtM, "30–200 m")...)
	notes = append(notes, rangeNote("mobile antenna height", hm, 1, 10, fmtM, "1–10 m")...)
	return notes
}

func hataInputs(model string, f, d, hb, hm float64) error {
	if !positive(f, d, hb, hm) {
		return fmt.Errorf("rfmath: %s needs positive frequency, distance and antenna heights (got f=%s, d=%s, hb=%s, hm=%s)",
			model, fmtHz(f), fmtM(d), fmtM(hb), fmtM(hm))
	}
	return nil
}

// Hata returns the Okumura–Hata median path loss in dB for frequency f (Hz),
// distance d (m), base station antenna height hb (m) and mobile antenna
// height hm (m). Source: M. Hata, "Empirical formula for propagation loss in
// land mobile radio services", IEEE Trans. Veh. Technol. VT-29(3), 1980:
//
//	Lu = 69.55 + 26.16 log f − 13.82 log hb − a(hm) + (44.9 − 6.55 log hb) log d
//
// with f in MHz and d in km. env selects the environment:
//
//	"urban"       small/medium city, a(hm) = (1.1 log f − 0.7) hm − (1.56 log f − 0.8)
//	"urban-large" large city, a(hm) = 8.29 (log 1.54 hm)² − 1.1 for f < 300 MHz,
//	              3.2 (log 11.75 hm)² − 4.97 for f ≥ 300 MHz
//	"suburban"    Lu − 2 (log(f/28))² − 5.4
//	"open"        Lu − 4.78 (log f)² + 18.33 log f − 40.94
//
// Suburban and open areas start from the small/medium-city Lu. The model is
// valid for 150–1500 MHz, 1–20 km, hb 30–200 m and hm 1–10 m; outside these
// ranges the formula is still evaluated and a note is returned for each
// violated range. An error is returned for an unknown env (the message lists
// the valid names) or for non-positive f, d, hb or hm.
func Hata(f, d, hb, hm float64, env string) (float64, []string, error) {
	switch env {
	case "urban", "urban-large", "suburban", "open":
	default:
		return math.NaN(), nil, nameError("Hata environment", env, hataEnvs)
	}
	if err := hataInputs("Hata", f, d, hb, hm); err != nil {
		return math.NaN(), nil, err
	}
	fMHz, dkm := f/1e6, d/1e3
	lf, lhb := math.Log10(fMHz), math.Log10(hb)
	base := 69.55 + 26.16*lf - 13.82*lhb + (44.9-6.55*lhb)*math.Log10(dkm)
	var loss float64
	switch env {
	case "urban":
		loss = base - hataMediumA(fMHz, hm)
	case "urban-large":
		loss = base - hataLargeA(fMHz, hm)
	case "suburban":
		l := math.Log10(fMHz / 28)
		loss = base - hataMediumA(fMHz, hm) - 2*l*l - 5.4
	case "open":
		loss = base - hataMediumA(fMHz, hm) - 4.78*lf*lf + 18.33*lf - 40.94
	}
	return loss, hataNotes(fMHz, 150, 1500, dkm, hb, hm), nil
}

// COST231 returns the COST 231–Hata median path loss in dB for frequency f
// (Hz), distance d (m), base station height hb (m) and mobile height hm (m).
// Source: COST Action 231 final report, "Digital mobile radio towards future
// generation systems" (1999), COST 231–Hata model:
//
//	L = 46.3 + 33.9 log f − 13.82 log hb − a(hm) + (44.9 − 6.55 log hb) log d + Cm
//
// with f in MHz, d in km, a(hm) the small/medium-city correction of Hata and
// Cm = 0 dB for env "medium" (medium-sized cities and suburban centres) or
// 3 dB for env "metro" (metropolitan centres). Valid for 1500–2000 MHz,
// 1–20 km, hb 30–200 m, hm 1–10 m; out-of-range inputs give notes. An error
// is returned for an unknown env (listing the valid names) or non-positive
// inputs.
func COST231(f, d, hb, hm float64, env string) (float64, []string, error) {
	var cm float64
	switch env {
	case "medium":
		cm = 0
	case "metro":
		cm = 3
	default:
		return math.NaN(), nil, nameError("COST 231 environment", env, cost231Envs)
	}
	if err := hataInputs("COST 231-Hata", f, d, hb, hm); err != nil {
		return math.NaN(), nil, err
	}
	fMHz, dkm := f/1e6, d/1e3
	lhb := math.Log10(hb)
	loss := 46.3 + 33.9*math.Log10(fMHz) - 13.82*lhb - hataMediumA(fMHz, hm) +
		(44.9-6.55*lhb)*math.Log10(dkm) + cm
	return loss, hataNotes(fMHz, 1500, 2000, dkm, hb, hm), nil
}

// Fresnel returns the radius in m of the nth Fresnel zone at a point d1 (m)
// from one end and d2 (m) from the other end of a path at frequency f (Hz):
//
//	rn = sqrt(n λ d1 d2 / (d1 + d2))
//
// Source: ITU-R P.526 (Fresnel ellipsoids; the Recommendation's practical
// form is R1 = 550 sqrt(d1 d2 / ((d1+d2) f)) with d in km and f in MHz). It
// returns NaN for n < 1, negative distances, d1+d2 = 0 or f ≤ 0.
func Fresnel(d1, d2, f float64, n int) float64 {
	if n < 1 || math.IsNaN(d1) || math.IsNaN(d2) || d1 < 0 || d2 < 0 || d1+d2 <= 0 || !positive(f) {
		return math.NaN()
	}
	return math.Sqrt(float64(n) * Wavelength(f) * d1 * d2 / (d1 + d2))
}

// Horizon returns the distance in m to the radio horizon from an antenna at
// height h (m) over a smooth spherical Earth with effective Earth-radius
// factor k (4/3 for the standard atmosphere):
//
//	d = sqrt(2 k R h),  R = EarthRadius
//
// Source: geometric horizon on the effective Earth of ITU-R P.452
// (ae = k · 6371 km), neglecting h² against 2kRh. It returns NaN for h < 0 or
// k ≤ 0.
func Horizon(h, k float64) float64 {
	if math.IsNaN(h) || h < 0 || !positive(k) {
		return math.NaN()
	}
	return math.Sqrt(2 * k * EarthRadius * h)
}

// p838 holds one regression of ITU-R P.838-3: Σ a_j exp(−((log f − b_j)/c_j)²)
// + m log f + c, f in GHz.
type p838 struct {
	a, b, c []float64
	m, c0   float64
}

func (p p838) eval(lf float64) float64 {
	s := p.m*lf + p.c0
	for j := range p.a {
		t := (lf - p.b[j]) / p.c[j]
		s += p.a[j] * math.Exp(-t*t)
	}
	return s
}

// Coefficients of ITU-R P.838-3, Tables 1 to 4.
var (
	p838kH = p838{
		a: []float64{-5.33980, -0.35351, -0.23789, -0.94158},
		b: []float64{-0.10008, 1.26970, 0.86036, 0.64552},
		c: []float64{1.13098, 0.45400, 0.15354, 0.16817},
		m: -0.18961, c0: 0.71147,
	}
	p838kV = p838{
		a: []float64{-3.80595, -3.44965, -0.39902, 0.50167},
		b: []float64{0.56934, -0.22911, 0.73042, 1.07319},
		c: []float64{0.81061, 0.51059, 0.11899, 0.27195},
		m: -0.16398, c0: 0.63297,
	}
	p838aH = p838{
		a: []float64{-0.14318, 0.29591, 0.32177, -5.37610, 16.1721},
		b: []float64{1.82442, 0.77564, 0.63773, -0.96230, -3.29980},
		c: []float64{-0.55187, 0.19822, 0.13164, 1.47828, 3.43990},
		m: 0.67849, c0: -1.95537,
	}
	p838aV = p838{
		a: []float64{-0.07771, 0.56727, -0.20238, -48.2991, 48.5833},
		b: []float64{2.33840, 0.95545, 1.14520, 0.791669, 0.791459},
		c: []float64{-0.76284, 0.54039, 0.26809, 0.116226, 0.116479},
		m: -0.053739, c0: 0.83433,
	}
	rainPols = []string{"h", "v"}
)

// RainCoeffs returns the coefficients k and α of the specific rain
// attenuation γ = k R^α for frequency f (Hz) and polarisation pol ("h" for
// horizontal, "v" for vertical). Source: ITU-R P.838-3, equations (2) and (3)
// with the regression coefficients of Tables 1–4:
//
//	log10 k = Σj aj exp(−((log10 f − bj)/cj)²) + mk log10 f + ck
//	α       = Σj aj exp(−((log10 f − bj)/cj)²) + mα log10 f + cα
//
// with f in GHz. The regression is valid for 1–1000 GHz; outside, the value is
// extrapolated and a note is returned. An error is returned for an unknown
// polarisation (listing the valid names) or f ≤ 0.
func RainCoeffs(f float64, pol string) (k, alpha float64, notes []string, err error) {
	var pk, pa p838
	switch pol {
	case "h":
		pk, pa = p838kH, p838aH
	case "v":
		pk, pa = p838kV, p838aV
	default:
		return math.NaN(), math.NaN(), nil, nameError("polarisation", pol, rainPols)
	}
	if !positive(f) || math.IsInf(f, 1) {
		return math.NaN(), math.NaN(), nil, fmt.Errorf("rfmath: rain coefficients need a positive finite frequency (got %s)", fmtHz(f))
	}
	lf := math.Log10(f / 1e9)
	k = math.Pow(10, pk.eval(lf))
	alpha = pa.eval(lf)
	notes = rangeNote("frequency", f, 1e9, 1000e9, fmtHz, "1–1000 GHz")
	return k, alpha, notes, nil
}

// Rain returns the specific attenuation due to rain in dB/km for frequency f
// (Hz), rain rate (mm/h) and polarisation pol ("h" or "v"):
//
//	γR = k R^α
//
// Source: ITU-R P.838-3, equation (1), with k and α from RainCoeffs. Notes
// from RainCoeffs are passed on. An error is returned for a negative or NaN
// rain rate, an unknown polarisation or f ≤ 0.
func Rain(f, rate float64, pol string) (float64, []string, error) {
	k, alpha, notes, err := RainCoeffs(f, pol)
	if err != nil {
		return math.NaN(), nil, err
	}
	if math.IsNaN(rate) || rate < 0 {
		return math.NaN(), nil, fmt.Errorf("rfmath: rain rate must be zero or positive (got %s mm/h)", num(rate))
	}
	return k * math.Pow(rate, alpha), notes, nil
}

// RayleighMargin returns the fade margin in dB that keeps a Rayleigh-faded
// signal above the threshold with probability availability (0 < a < 1):
//
//	M = −10 log10(−ln a)
//
// It follows from the exponential distribution of Rayleigh-faded power,
// P(p > p̄/M) = exp(−1/M) (Sklar, Digital Communications, fading channels;
// Proakis, Digital Communications, fading multipath channels). The margin is
// relative to the mean received power and is negative for a < 1/e. An error is returned
// unless 0 < availability < 1.
func RayleighMargin(availability float64) (float64, error) {
	if !(availability > 0 && availability < 1) {
		return math.NaN(), fmt.Errorf("rfmath: availability must lie strictly between 0 and 1 (got %s)", num(availability))
	}
	// log1p keeps precision for availabilities close to 1.
	return -10 * math.Log10(-math.Log1p(availability-1)), nil
}
