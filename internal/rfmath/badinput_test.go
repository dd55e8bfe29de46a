package rfmath

import (
	"math"
	"testing"
)

var badValues = []float64{0, -1, -1e300, math.NaN(), math.Inf(1), math.Inf(-1), 1e-320}

// TestNoPanicOnBadInput calls every exported function with zero, negative,
// NaN, infinite and subnormal arguments in every position and checks that
// nothing panics and that impossible input never yields a silent finite
// result where the doc promises NaN or an error.
func TestNoPanicOnBadInput(t *testing.T) {
	calls := map[string]func(a, b, c, d float64){
		"Wavelength":      func(a, _, _, _ float64) { Wavelength(a) },
		"FSPL":            func(a, b, _, _ float64) { FSPL(a, b) },
		"LogDistance":     func(a, b, c, d float64) { LogDistance(a, b, c, d) },
		"TwoRay":          func(a, b, c, d float64) { TwoRay(a, b, c, d) },
		"TwoRayCrossover": func(a, b, c, _ float64) { TwoRayCrossover(a, b, c) },
		"Hata": func(a, b, c, d float64) {
			for _, e := range hataEnvs {
				Hata(a, b, c, d, e)
			}
		},
		"COST231": func(a, b, c, d float64) {
			for _, e := range cost231Envs {
				COST231(a, b, c, d, e)
			}
		},
		"Fresnel":        func(a, b, c, d float64) { Fresnel(a, b, c, int(math.Max(-5, math.Min(5, d)))) },
		"Horizon":        func(a, b, _, _ float64) { Horizon(a, b) },
		"RainCoeffs":     func(a, _, _, _ float64) { RainCoeffs(a, "h"); RainCoeffs(a, "v") },
		"Rain":           func(a, b, _, _ float64) { Rain(a, b, "h"); Rain(a, b, "v") },
		"RayleighMargin": func(a, _, _, _ float64) { RayleighMargin(a) },
		"Thermal":        func(a, b, _, _ float64) { Thermal(a, b) },
		"NFToTe":         func(a, _, _, _ float64) { NFToTe(a) },
		"TeToNF":         func(a, _, _, _ float64) { TeToNF(a) },
		"Sensitivity":    func(a, b, c, _ float64) { Sensitivity(a, b, c) },
		"CascadeChain": func(a, b, c, d float64) {
			CascadeChain([]Stage{{GainDB: a, NFDB: b, IIP3: c, HasIIP3: true, IP1dB: d, HasIP1dB: true}, {GainDB: d, NFDB: c, IIP3: b, HasIIP3: true}})
		},
		"IM3":  func(a, b, _, _ float64) { IM3(a, b) },
		"SFDR": func(a, b, _, _ float64) { SFDR(a, b) },
		"BER": func(a, _, _, _ float64) {
			for _, s := range schemeNames {
				BER(s, a)
			}
		},
		"EbN0For": func(a, _, _, _ float64) {
			for _, s := range schemeNames {
				EbN0For(s, a)
			}
		},
		"EbN0":         func(a, b, c, _ float64) { EbN0(a, b, c) },
		"SNR":          func(a, b, c, _ float64) { SNR(a, b, c) },
		"Shannon":      func(a, b, _, _ float64) { Shannon(a, b) },
		"PER":          func(a, b, _, _ float64) { PER(a, b) },
		"SymbolRate":   func(a, b, _, _ float64) { SymbolRate(a, b) },
		"NetRate":      func(a, b, c, _ float64) { NetRate(a, b, c) },
		"DishGain":     func(a, b, c, _ float64) { DishGain(a, b, c) },
		"Aperture":     func(a, b, _, _ float64) { Aperture(a, b) },
		"VSWRToRL":     func(a, _, _, _ float64) { VSWRToRL(a) },
		"RLToVSWR":     func(a, _, _, _ float64) { RLToVSWR(a) },
		"MismatchLoss": func(a, _, _, _ float64) { MismatchLoss(a) },
		"CN0":          func(a, b, c, _ float64) { CN0(a, b, c) },
	}
	good := [4]float64{1e9, 1e3, 30, 2}
	for name, call := range calls {
		for pos := 0; pos < 4; pos++ {
			for _, bad := range badValues {
				args := good
				args[pos] = bad
				func() {
					defer func() {
						if r := recover(); r != nil {
							t.Errorf("%s%v panicked: %v", name, args, r)
						}
					}()
					call(args[0], args[1], args[2], args[3])
				}()
			}
		}
	}
}

// TestImpossibleInputIsFlagged checks the documented NaN results for
// impossible input of functions without an error result.
func TestImpossibleInputIsFlagged(t *testing.T) {
	nan := map[string]float64{
		"Wavelength(0)":            Wavelength(0),
		"Wavelength(-1)":           Wavelength(-1),
		"FSPL(0, f)":               FSPL(0, 1e9),
		"FSPL(d, -f)":              FSPL(1e3, -1e9),
		"FSPL(NaN, f)":             FSPL(math.NaN(), 1e9),
		"LogDistance(d0=0)":        LogDistance(100, 1e9, 0, 2),
		"LogDistance(n=NaN)":       LogDistance(100, 1e9, 1, math.NaN()),
		"TwoRayCrossover(ht<0)":    TwoRayCrossover(-1, 2, 1e9),
		"Fresnel(n=0)":             Fresnel(1e3, 1e3, 1e9, 0),
		"Fresnel(d1<0)":            Fresnel(-1, 1e3, 1e9, 1),
		"Fresnel(0,0)":             Fresnel(0, 0, 1e9, 1),
		"Horizon(h<0)":             Horizon(-1, 4.0/3),
		"Horizon(k=0)":             Horizon(10, 0),
		"Thermal(b<0)":             Thermal(-1, 290),
		"TeToNF(-1)":               TeToNF(-1),
		"Sensitivity(b=0)":         Sensitivity(3, 0, 10),
		"EbN0(rate=0)":             EbN0(10, 0, 1e6),
		"SNR(b=-1)":                SNR(10, 1e6, -1),
		"Shannon(snr<0)":           Shannon(1e6, -0.5),
		"PER(ber>1)":               PER(1.5, 100),
		"PER(bits<0)":              PER(0.1, -1),
		"SymbolRate(0 bits)":       SymbolRate(1e6, 0),
		"NetRate(code rate 2)":     NetRate(1e6, 2, 0),
		"NetRate(overhead -0.1)":   NetRate(1e6, 0.5, -0.1),
		"DishGain(eff 1.5)":        DishGain(1, 1e9, 1.5),
		"Aperture(g<0)":            Aperture(-1, 1e9),
		"RLToVSWR(-3)":             RLToVSWR(-3),
		"DB(-1)":                   DB(-1),
		"CascadeChain NaN gain NF": CascadeChain([]Stage{{GainDB: math.NaN(), NFDB: 3}, {NFDB: 3}}).NFDB,
	}
	for name, v := range nan {
		if !math.IsNaN(v) {
			t.Errorf("%s = %v, want NaN", name, v)
		}
	}
	if _, err := VSWRToRL(0.5); err == nil {
		t.Error("VSWRToRL(0.5): want error")
	}
	if _, err := MismatchLoss(math.NaN()); err == nil {
		t.Error("MismatchLoss(NaN): want error")
	}
}

// FuzzBER checks that BER and EbN0For never panic, that BER stays in
// [0, 0.5], and that EbN0For inverts BER.
func FuzzBER(f *testing.F) {
	f.Add(uint8(0), 10.0, 1e-5)
	f.Add(uint8(5), 0.0, 0.1)
	f.Add(uint8(9), -3.0, 0.49)
	f.Add(uint8(3), math.Inf(1), 1e-300)
	f.Fuzz(func(t *testing.T, idx uint8, ebn0, pb float64) {
		s := schemeNames[int(idx)%len(schemeNames)]
		v, err := BER(s, ebn0)
		if err == nil && !(v >= 0 && v <= 0.5) {
			t.Fatalf("BER(%s, %g) = %g outside [0, 0.5]", s, ebn0, v)
		}
		if err != nil && !(math.IsNaN(ebn0) || ebn0 < 0) {
			t.Fatalf("BER(%s, %g): unexpected error %v", s, ebn0, err)
		}
		x, err := EbN0For(s, pb)
		if err != nil {
			return
		}
		back, err := BER(s, FromDB(x))
		if err != nil {
			t.Fatalf("BER at EbN0For result %g: %v", x, err)
		}
		if math.Abs(math.Log(back)-math.Log(pb)) > 1e-6*math.Max(1, math.Abs(math.Log(pb))) {
			t.Fatalf("EbN0For(%s, %g) = %g dB, BER there %g", s, pb, x, back)
		}
	})
}

// FuzzCascade checks that CascadeChain never panics and that noise shares
// sum to one whenever the inputs are finite.
func FuzzCascade(f *testing.F) {
	f.Add(20.0, 1.0, 0.0, -7.0, 10.0, 10.0)
	f.Add(-3.0, 3.0, 5.0, 30.0, 0.5, -20.0)
	f.Fuzz(func(t *testing.T, g1, nf1, ip1, g2, nf2, ip2 float64) {
		c := CascadeChain([]Stage{
			{GainDB: g1, NFDB: nf1, IIP3: ip1, HasIIP3: true},
			{GainDB: g2, NFDB: nf2, IIP3: ip2, HasIIP3: true},
		})
		for _, x := range []float64{g1, nf1, ip1, g2, nf2, ip2} {
			if math.IsNaN(x) || math.Abs(x) > 100 {
				return
			}
		}
		if nf1 <= 0 || nf2 <= 0 {
			return
		}
		sum := c.Stages[0].NoiseShare + c.Stages[1].NoiseShare
		if math.Abs(sum-1) > 1e-9 {
			t.Fatalf("noise shares sum to %g", sum)
		}
		sum = c.Stages[0].IIP3Share + c.Stages[1].IIP3Share
		if math.Abs(sum-1) > 1e-9 {
			t.Fatalf("IIP3 shares sum to %g", sum)
		}
	})
}
