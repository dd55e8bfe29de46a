package rflib_test

import (
	"math"
	"strings"
	"testing"
)

// fsplP525 is ITU-R P.525-4 eq. (4) in its practical form, Lbf = 32.4 + 20 log f(MHz) + 20 log d(km),
// with the constant worked out from 4π/c0 instead of rounded: 20·log10(4π·1e9/c0).
func fsplP525(dkm, fMHz float64) float64 {
	return 20*math.Log10(4*math.Pi*1e9/c0) + 20*math.Log10(fMHz) + 20*math.Log10(dkm)
}

// hataRef is Hata (1980) computed step by step: a(hm), the urban loss, then the suburban and
// open-area corrections (f in MHz, d in km, heights in m).
func hataRef(f, d, hb, hm float64, env string) float64 {
	lf := math.Log10(f)
	aSmall := (1.1*lf-0.7)*hm - (1.56*lf - 0.8)
	a := aSmall
	if env == "urban-large" {
		if f >= 300 {
			a = 3.2*math.Pow(math.Log10(11.75*hm), 2) - 4.97
		} else {
			a = 8.29*math.Pow(math.Log10(1.54*hm), 2) - 1.1
		}
	}
	intercept := 69.55 + 26.16*lf - 13.82*math.Log10(hb)
	slope := 44.9 - 6.55*math.Log10(hb)
	lu := intercept - a + slope*math.Log10(d)
	switch env {
	case "suburban":
		return lu - 2*math.Pow(math.Log10(f/28), 2) - 5.4
	case "open":
		return lu - 4.78*lf*lf + 18.33*lf - 40.94
	}
	return lu
}

// cost231Ref is the COST 231–Hata formula step by step (COST 231 final report).
func cost231Ref(f, d, hb, hm, cm float64) float64 {
	lf := math.Log10(f)
	a := (1.1*lf-0.7)*hm - (1.56*lf - 0.8)
	return 46.3 + 33.9*lf - 13.82*math.Log10(hb) - a + (44.9-6.55*math.Log10(hb))*math.Log10(d) + cm
}

func TestPropagationReferences(t *testing.T) {
	lambda := func(f float64) float64 { return c0 / f }
	refs := []ref{
		// wavelength: λ = c0/f, c0 exact (SI definition of the metre).
		{"wavelength(1 GHz)", "m", c0 / 1e9, 1e-9, "SI: c0 = 299 792 458 m/s"},
		{"wavelength(868 MHz)", "mm", 1e3 * c0 / 868e6, 1e-6, "SI: c0 = 299 792 458 m/s"},
		{"wavelength(2.4 GHz)", "cm", 100 * c0 / 2.4e9, 1e-7, "SI: c0 = 299 792 458 m/s"},
		{"wavelength(10 kHz)", "km", c0 / 1e4 / 1e3, 1e-9, "SI: c0 = 299 792 458 m/s"},

		// fspl: ITU-R P.525-4 practical form, 32.45 + 20 log f(MHz) + 20 log d(km).
		{"fspl(1 km, 1 GHz)", "dB", fsplP525(1, 1000), 1e-9, "ITU-R P.525-4 eq. (4)"},
		{"fspl(1 km, 1 GHz)", "dB", 92.45, 0.01, "value from memory: 92.45 dB at 1 km, 1 GHz"},
		{"fspl(10 km, 2.4 GHz)", "dB", fsplP525(10, 2400), 1e-9, "ITU-R P.525-4 eq. (4)"},
		{"fspl(2.4 km, 868 MHz)", "dB", fsplP525(2.4, 868), 1e-9, "ITU-R P.525-4 eq. (4)"},
		{"fspl(35786 km, 12 GHz)", "dB", fsplP525(35786, 12000), 1e-9, "ITU-R P.525-4 eq. (4), geostationary range"},
		{"fspl(1 mi, 915 MHz)", "dB", fsplP525(1.609344, 915), 1e-9, "ITU-R P.525-4 eq. (4); 1 mi = 1609.344 m"},
		{"fspl(100 m, 5.8 GHz)", "dB", fsplP525(0.1, 5800), 1e-9, "ITU-R P.525-4 eq. (4)"},
		// Doubling the distance adds 6.02 dB (inverse-square law; common practice, no source).
		{"fspl(2 km, 1 GHz) - fspl(1 km, 1 GHz)", "dB", 20 * math.Log10(2), 1e-9, "common practice, no source: 20 log 2"},

		// logdist: free space to d0, then 10 n log(d/d0) (Rappaport log-distance model).
		{"logdist(1 km, 1 GHz, 1 km, 3)", "dB", fsplP525(1, 1000), 1e-9, "at d = d0 the model is free space (ITU-R P.525)"},
		{"logdist(5 km, 1 GHz, 1 m, 2)", "dB", fsplP525(5, 1000), 1e-9, "n = 2 is free space (ITU-R P.525)"},
		{"logdist(2.4 km, 868 MHz, 100 m, 3.1)", "dB", 20*math.Log10(4*math.Pi*100/lambda(868e6)) + 31*math.Log10(24), 1e-9, "Rappaport log-distance: FSPL(d0) via 4π d0/λ + 10·3.1·log10(24)"},
		{"logdist(10 km, 2.4 GHz, 1 km, 4) - logdist(1 km, 2.4 GHz, 1 km, 4)", "dB", 40, 1e-9, "Rappaport log-distance: 10 n dB per decade"},

		// tworay: 40 log d − 20 log ht − 20 log hr, here as 10 log10(d⁴/(ht² hr²)) (Rappaport).
		{"tworay(10 km, 30 m, 2 m)", "dB", db10(math.Pow(1e4, 4) / (900 * 4)), 1e-9, "Rappaport two-ray: d⁴/(ht² hr²)"},
		{"tworay(5 km, 50 m, 1.5 m, 900 MHz)", "dB", db10(math.Pow(5e3, 4) / (2500 * 2.25)), 1e-9, "Rappaport two-ray: d⁴/(ht² hr²)"},
		{"tworay(20 km, 10 m, 10 m, 150 MHz) - tworay(10 km, 10 m, 10 m, 150 MHz)", "dB", 40 * math.Log10(2), 1e-9, "Rappaport two-ray: 12 dB per doubling of distance"},

		// hata: Hata (1980) formula computed step by step above.
		{"hata(900 MHz, 5 km, 50 m, 1.5 m, 'urban')", "dB", hataRef(900, 5, 50, 1.5, "urban"), 1e-9, "Hata 1980"},
		{"hata(900 MHz, 5 km, 50 m, 1.5 m, 'urban-large')", "dB", hataRef(900, 5, 50, 1.5, "urban-large"), 1e-9, "Hata 1980"},
		{"hata(900 MHz, 5 km, 50 m, 1.5 m, 'suburban')", "dB", hataRef(900, 5, 50, 1.5, "suburban"), 1e-9, "Hata 1980"},
		{"hata(900 MHz, 5 km, 50 m, 1.5 m, 'open')", "dB", hataRef(900, 5, 50, 1.5, "open"), 1e-9, "Hata 1980"},
		{"hata(150 MHz, 20 km, 200 m, 10 m, 'urban')", "dB", hataRef(150, 20, 200, 10, "urban"), 1e-9, "Hata 1980"},
		{"hata(200 MHz, 1 km, 30 m, 1 m, 'urban-large')", "dB", hataRef(200, 1, 30, 1, "urban-large"), 1e-9, "Hata 1980, large city below 300 MHz"},
		{"hata(1500 MHz, 10 km, 100 m, 3 m, 'suburban')", "dB", hataRef(1500, 10, 100, 3, "suburban"), 1e-9, "Hata 1980"},
		{"hata(450 MHz, 8 km, 40 m, 2 m, 'open')", "dB", hataRef(450, 8, 40, 2, "open"), 1e-9, "Hata 1980"},
		// The distance slope: (44.9 − 6.55 log 30) dB per decade of distance for a 30 m mast (Hata 1980).
		{"hata(900 MHz, 20 km, 30 m, 1.5 m, 'urban') - hata(900 MHz, 2 km, 30 m, 1.5 m, 'urban')", "dB", 44.9 - 6.55*math.Log10(30), 1e-9, "Hata 1980, distance slope"},

		// cost231: COST 231–Hata computed step by step above.
		{"cost231(1800 MHz, 2 km, 30 m, 1.5 m, 'medium')", "dB", cost231Ref(1800, 2, 30, 1.5, 0), 1e-9, "COST 231 final report"},
		{"cost231(1800 MHz, 2 km, 30 m, 1.5 m, 'metro')", "dB", cost231Ref(1800, 2, 30, 1.5, 3), 1e-9, "COST 231 final report, Cm = 3 dB"},
		{"cost231(2 GHz, 10 km, 60 m, 2 m, 'medium')", "dB", cost231Ref(2000, 10, 60, 2, 0), 1e-9, "COST 231 final report"},
		{"cost231(1500 MHz, 1 km, 200 m, 10 m, 'metro')", "dB", cost231Ref(1500, 1, 200, 10, 3), 1e-9, "COST 231 final report"},

		// fresnel: ITU-R P.526 practical form R1 = 550 sqrt(d1 d2 / ((d1 + d2) f)), d km, f MHz
		// (550 is rounded from sqrt(c0·1e-3) = 547.5, so 0.5 % tolerance), and the exact form.
		{"fresnel(5 km, 5 km, 2.4 GHz)", "m", 550 * math.Sqrt(5*5/(10*2400.0)), 0.005 * 550 * math.Sqrt(25/(10*2400.0)), "ITU-R P.526, R1 = 550 sqrt(d1 d2/((d1+d2) f))"},
		{"fresnel(5 km, 5 km, 2.4 GHz)", "m", math.Sqrt(lambda(2.4e9) * 5e3 * 5e3 / 10e3), 1e-9, "ITU-R P.526 Fresnel ellipsoid, sqrt(λ d1 d2/(d1+d2))"},
		{"fresnel(1 km, 9 km, 5.8 GHz)", "m", math.Sqrt(lambda(5.8e9) * 1e3 * 9e3 / 10e3), 1e-9, "ITU-R P.526 Fresnel ellipsoid"},
		{"fresnel(2 km, 3 km, 868 MHz, 2)", "m", math.Sqrt(2 * lambda(868e6) * 2e3 * 3e3 / 5e3), 1e-9, "ITU-R P.526, n-th zone sqrt(n λ d1 d2/(d1+d2))"},
		{"fresnel(10 km, 10 km, 6 GHz)", "m", 550 * math.Sqrt(100/(20*6000.0)), 0.005 * 550 * math.Sqrt(100/(20*6000.0)), "ITU-R P.526 practical form"},

		// horizon: sqrt(2 k R h), R = 6371 km (ITU-R P.452); the rule of thumb 4.12 sqrt(h) km
		// for k = 4/3 and 3.57 sqrt(h) km for k = 1 (common practice, no source).
		{"horizon(10 m)", "km", math.Sqrt(2*4.0/3*6371e3*10) / 1e3, 1e-9, "ITU-R P.452 effective Earth radius, k = 4/3"},
		{"horizon(10 m)", "km", 4.12 * math.Sqrt(10), 0.01, "common practice, no source: 4.12 sqrt(h) km"},
		{"horizon(100 m, 1)", "km", 3.57 * math.Sqrt(100), 0.05, "common practice, no source: 3.57 sqrt(h) km for k = 1"},
		{"horizon(30 m, 4/3) + horizon(2 m)", "km", (math.Sqrt(2*4.0/3*6371e3*30) + math.Sqrt(2*4.0/3*6371e3*2)) / 1e3, 1e-9, "ITU-R P.452: a link's radio horizon is the sum of both ends'"},
		{"horizon(100 ft)", "m", math.Sqrt(2 * 4.0 / 3 * 6371e3 * 30.48), 1e-6, "ITU-R P.452; 1 ft = 0.3048 m"},

		// rain: ITU-R P.838-3 γ = k R^α with Table 5 coefficients (values from memory).
		{"rain(10 GHz, 1 mm/h, 'h')", "dB/km", 0.01217, 0.0002, "ITU-R P.838-3 Table 5, kH 10 GHz (value from memory)"},
		{"rain(10 GHz, 1 mm/h, 'v')", "dB/km", 0.01129, 0.0002, "ITU-R P.838-3 Table 5, kV 10 GHz (value from memory)"},
		{"rain(20 GHz, 1 mm/h, 'h')", "dB/km", 0.09164, 0.001, "ITU-R P.838-3 Table 5, kH 20 GHz (value from memory)"},
		{"rain(20 GHz, 1 mm/h, 'v')", "dB/km", 0.09611, 0.001, "ITU-R P.838-3 Table 5, kV 20 GHz (value from memory)"},
		{"rain(30 GHz, 1 mm/h, 'h')", "dB/km", 0.2403, 0.0025, "ITU-R P.838-3 Table 5, kH 30 GHz (value from memory)"},
		{"rain(30 GHz, 1 mm/h, 'v')", "dB/km", 0.2291, 0.0025, "ITU-R P.838-3 Table 5, kV 30 GHz (value from memory)"},
		{"rain(20 GHz, 50 mm/h, 'h')", "dB/km", 0.09164 * math.Pow(50, 1.0568), 0.01 * 0.09164 * math.Pow(50, 1.0568), "ITU-R P.838-3 eq. (1), Table 5 kH, αH 20 GHz (value from memory)"},
		{"rain(30 GHz, 25 mm/h, 'v')", "dB/km", 0.2291 * math.Pow(25, 0.9129), 0.01 * 0.2291 * math.Pow(25, 0.9129), "ITU-R P.838-3 eq. (1), Table 5 kV, αV 30 GHz (value from memory)"},
		{"rain(10 GHz, 100 mm/h, 'h')", "dB/km", 0.01217 * math.Pow(100, 1.2571), 0.01 * 0.01217 * math.Pow(100, 1.2571), "ITU-R P.838-3 eq. (1), Table 5 kH, αH 10 GHz (value from memory)"},
		{"rain(20 GHz, 0 mm/h, 'h')", "dB/km", 0, 0, "ITU-R P.838-3 eq. (1): no rain, no attenuation"},
		// A rate times a length is dB (units rule of the worksheet format).
		{"rain(20 GHz, 50 mm/h, 'h') * 3 km", "dB", 3 * 0.09164 * math.Pow(50, 1.0568), 0.03 * 0.09164 * math.Pow(50, 1.0568), "ITU-R P.838-3 eq. (1) over 3 km (value from memory)"},

		// rayleigh_margin: exponential power distribution, P(p > p̄/M) = exp(−1/M), so
		// M = 1/(−ln a); and the rule of thumb 10 dB per decade of outage (common practice, no source).
		{"rayleigh_margin(0.99)", "dB", db10(1 / -math.Log(0.99)), 1e-9, "Rayleigh fading, exponential power (Sklar)"},
		{"rayleigh_margin(99 %)", "dB", 20, 0.05, "common practice, no source: 20 dB for 99 %"},
		{"rayleigh_margin(99.9 %)", "dB", 30, 0.01, "common practice, no source: 30 dB for 99.9 %"},
		{"rayleigh_margin(0.9999)", "dB", 40, 0.01, "common practice, no source: 40 dB for 99.99 %"},
		{"rayleigh_margin(0.5)", "dB", db10(1 / math.Ln2), 1e-9, "Rayleigh fading, median power −1.59 dB below the mean"},
	}
	runRefs(t, "", refs)
}

func TestPropagationWarnings(t *testing.T) {
	cases := []struct{ formula, want string }{
		{"hata(3 GHz, 5 km, 50 m, 1.5 m, 'urban')", "frequency 3 GHz is outside the model's 150–1500 MHz"},
		{"hata(900 MHz, 50 km, 50 m, 1.5 m, 'urban')", "distance 50 km is outside"},
		{"hata(900 MHz, 5 km, 10 m, 1.5 m, 'open')", "base station height 10 m is outside"},
		{"hata(900 MHz, 5 km, 50 m, 20 m, 'suburban')", "mobile antenna height 20 m is outside"},
		{"cost231(900 MHz, 5 km, 50 m, 1.5 m, 'medium')", "frequency 900 MHz is outside the model's 1500–2000 MHz"},
		{"cost231(1800 MHz, 500 m, 50 m, 1.5 m, 'metro')", "distance 500 m is outside"},
		{"rain(500 MHz, 10 mm/h, 'v')", "frequency 500 MHz is outside the model's 1–1000 GHz"},
		{"tworay(100 m, 10 m, 2 m, 2 GHz)", "shorter than the two-ray crossover distance"},
		{"logdist(50 m, 868 MHz, 100 m, 3)", "shorter than the reference distance"},
		{"fspl(10 cm, 1 GHz)", "within two wavelengths"},
	}
	for _, c := range cases {
		ws := evalWarn(t, c.formula)
		if len(ws) == 0 || !strings.Contains(strings.Join(ws, "\n"), c.want) {
			t.Errorf("%s: warnings %q, want one containing %q", c.formula, ws, c.want)
		}
		fn := c.formula[:strings.Index(c.formula, "(")]
		if len(ws) > 0 && !strings.HasPrefix(ws[0], fn+": ") && fn != "fspl" {
			t.Errorf("%s: warning %q does not name the function", c.formula, ws[0])
		}
	}
	// In range, or two-ray without a frequency: no warning.
	for _, f := range []string{
		"hata(900 MHz, 5 km, 50 m, 1.5 m, 'urban')",
		"cost231(1800 MHz, 5 km, 50 m, 1.5 m, 'metro')",
		"rain(20 GHz, 10 mm/h, 'h')",
		"tworay(100 m, 10 m, 2 m)",
		"tworay(20 km, 10 m, 2 m, 900 MHz)",
		"logdist(2 km, 868 MHz, 100 m, 3)",
	} {
		if ws := evalWarn(t, f); len(ws) != 0 {
			t.Errorf("%s: unexpected warnings %q", f, ws)
		}
	}
}

func TestPropagationErrors(t *testing.T) {
	cases := []struct{ formula, want string }{
		{"fspl(3 dBm, 1 GHz)", "fspl: d: got dBm, want a length"},
		{"fspl(1 km, 1 m)", "fspl: f: got m, want a frequency"},
		{"logdist(1 km, 1 GHz, 1 m, 3 dB)", "logdist: n: got dB, want a plain number"},
		{"hata(900 MHz, 5 km, 50 m, 1.5 m, 'city')", `hata: unknown Hata environment "city" (valid: urban, urban-large, suburban, open)`},
		{"cost231(1800 MHz, 5 km, 50 m, 1.5 m, 'urban')", `cost231: unknown COST 231 environment "urban" (valid: medium, metro)`},
		{"rain(20 GHz, 10 mm/h, 'x')", `rain: unknown polarisation "x" (valid: h, v)`},
		{"rain(20 GHz, 10 dB, 'h')", "rain: rate: got dB, want"},
		{"hata(5 km, 900 MHz, 50 m, 1.5 m, 'urban')", "hata: f: got m, want a frequency"},
		{"fresnel(1 km, 1 km, 1 GHz, 1.5)", "fresnel: n: the zone number must be a whole number"},
		{"horizon(10 m, 0)", "horizon: k: the effective Earth-radius factor must be positive"},
		{"horizon(10 dB)", "horizon: h: got dB, want a length"},
		{"rayleigh_margin(1.2)", "rayleigh_margin: availability must lie strictly between 0 and 1"},
		{"rayleigh_margin(99 dB)", "rayleigh_margin: availability: got dB, want a plain number"},
		{"tworay(0 m, 10 m, 2 m)", "tworay: two-ray loss needs positive distance and heights"},
	}
	for _, c := range cases {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) || saysTwice(c.formula, got) {
			t.Errorf("%s: error %q, want %q (the function named once)", c.formula, got, c.want)
		}
	}
}

// Issue 8, finding 9: logdist with a reference distance that is not positive, or a negative
// exponent, is an error; an exponent outside the measured range 1.6–6 (Rappaport, Table 4.2,
// recalled from memory) is a warning, n = 0 included.
func TestLogdistImpossible(t *testing.T) {
	for _, c := range []struct{ formula, want string }{
		{"logdist(1 km, 1 GHz, 0 m, 3)", "logdist: the reference distance d0 = 0 m must be positive"},
		{"logdist(1 km, 1 GHz, -1 m, 3)", "logdist: d0: a distance cannot be negative (got -1 m)"},
		{"logdist(1 km, 1 GHz, 1 m, -2)", "logdist: the path-loss exponent n = -2 is negative"},
	} {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) || saysTwice(c.formula, got) {
			t.Errorf("%s: error %q, want %q (the function named once)", c.formula, got, c.want)
		}
	}
	for _, f := range []string{"logdist(1 km, 1 GHz, 1 m, 0)", "logdist(1 km, 1 GHz, 1 m, 1.5)", "logdist(1 km, 1 GHz, 1 m, 7)"} {
		if ws := evalWarn(t, f); len(ws) != 1 || !strings.Contains(ws[0], "outside 1.6–6") {
			t.Errorf("%s: warnings %q", f, ws)
		}
	}
	for _, f := range []string{"logdist(1 km, 1 GHz, 1 m, 1.6)", "logdist(1 km, 1 GHz, 1 m, 6)"} {
		if ws := evalWarn(t, f); len(ws) != 0 {
			t.Errorf("%s: unexpected warnings %q", f, ws)
		}
	}
}

// saysTwice reports an error that names the function twice ("logdist: logdist: …"): the
// engine puts the function's name before its error, so the function must not.
func saysTwice(formula, msg string) bool {
	name, _, _ := strings.Cut(formula, "(")
	return strings.Contains(msg, name+": "+name+":")
}
