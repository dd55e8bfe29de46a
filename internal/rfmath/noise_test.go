package rfmath

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

func TestConstantsRefs(t *testing.T) {
	checkRefs(t, []ref{
		{"c", C0, 299792458, 0, false},                  // SI 2019: exact speed of light
		{"k", KB, 1.380649e-23, 0, false},               // SI 2019: exact Boltzmann constant
		{"T0", T0, 290, 0, false},                       // IEEE noise-figure definition reference temperature
		{"Earth radius", EarthRadius, 6371e3, 0, false}, // ITU-R P.452 mean Earth radius 6371 km
	})
}

func TestDecibelRefs(t *testing.T) {
	checkRefs(t, []ref{
		{"3 dB ≈ ×2", FromDB(3), 2, 0.003, true},         // common practice, no source: 3 dB is twice the power
		{"10 dB = ×10", FromDB(10), 10, 1e-12, false},    // common practice, no source: 10 dB is ten times
		{"×2 = 3.01 dB", DB(2), 3.0103, 0.0001, false},   // common practice, no source: 10 log10 2
		{"0 dBm = 1 mW", FromDBm(0), 1e-3, 1e-18, false}, // common practice, no source: dBm referred to 1 mW
		{"30 dBm = 1 W", FromDBm(30), 1, 1e-12, false},   // common practice, no source: 1 W is 30 dBm
		{"1 W = 30 dBm", DBm(1), 30, 1e-12, false},       // common practice, no source: 1 W is 30 dBm
	})
}

func TestNoiseRefs(t *testing.T) {
	checkRefs(t, []ref{
		{"kT0 density", DBm(Thermal(1, 290)), -174, 0.05, false},                                             // common practice, no source: −174 dBm/Hz at 290 K
		{"kT0 density exact", DBm(Thermal(1, 290)), -173.975, 0.001, false},                                  // 10 log10(1.380649e-23·290/1e-3) by hand (SI 2019 k)
		{"kTB 1 MHz", DBm(Thermal(1e6, 290)), -114, 0.05, false},                                             // common practice, no source: −114 dBm in 1 MHz
		{"kTB 1 Hz W", Thermal(1, 290), 4.0039e-21, 0.0001, true},                                            // k·T0 with SI 2019 k, by hand
		{"kTB 20 MHz 300 K", Thermal(20e6, 300), 1.380649e-23 * 300 * 20e6, 1e-12, true},                     // Nyquist noise kTB with SI 2019 k
		{"NF 3 dB → 289 K", NFToTe(3), 288.6, 0.1, false},                                                    // value from memory: 3 dB noise figure ≈ 289 K
		{"NF 1 dB → 75 K", NFToTe(1), 75.1, 0.1, false},                                                      // value from memory: 1 dB noise figure ≈ 75 K
		{"NF 0.5 dB → 35 K", NFToTe(0.5), 35.4, 0.1, false},                                                  // value from memory: 0.5 dB noise figure ≈ 35 K
		{"NF 2 dB → 170 K", NFToTe(2), 169.6, 0.1, false},                                                    // value from memory: 2 dB noise figure ≈ 170 K
		{"NF 10 dB → 2610 K", NFToTe(10), 2610, 1e-9, false},                                                 // IEEE definition: 290·(10 − 1) exactly
		{"NF 0 dB → 0 K", NFToTe(0), 0, 0, false},                                                            // IEEE definition: noiseless two-port
		{"Te 290 K → 3.01 dB", TeToNF(290), 3.0103, 0.0001, false},                                           // IEEE definition: F = 2 when Te = T0
		{"Te 0 K → 0 dB", TeToNF(0), 0, 0, false},                                                            // IEEE definition: noiseless two-port
		{"Te 35 K → 0.49 dB", TeToNF(35), 0.494, 0.001, false},                                               // IEEE definition F = 1 + Te/T0, by hand: 10 log10(1.1207)
		{"round trip 4.2 dB", TeToNF(NFToTe(4.2)), 4.2, 1e-12, false},                                        // IEEE definition: inverse pair
		{"sensitivity rule", Sensitivity(5, 1e6, 10), -174 + 60 + 5 + 10, 0.05, false},                       // common practice, no source: −174 + 10 log B + NF + SNR
		{"sensitivity 200 kHz", Sensitivity(8, 200e3, 9), -174 + db(200e3) + 8 + 9, 0.05, false},             // common practice, no source: −174 + 10 log B + NF + SNR
		{"sensitivity via Thermal", Sensitivity(3, 25e3, 12), DBm(Thermal(25e3, 290)) + 3 + 12, 1e-9, false}, // IEEE definition: kT0B referred to the input, plus NF
	})
}

func TestCascadeRefs(t *testing.T) {
	// Two stages: LNA 20 dB gain, 1 dB NF, IIP3 0 dBm; mixer −7 dB, 10 dB NF,
	// IIP3 +10 dBm.
	two := CascadeChain([]Stage{
		{Name: "lna", GainDB: 20, NFDB: 1, IIP3: 0, HasIIP3: true},
		{Name: "mixer", GainDB: -7, NFDB: 10, IIP3: 10, HasIIP3: true},
	})
	f1, f2, g1 := math.Pow(10, 0.1), 10.0, 100.0
	ftot := f1 + (f2-1)/g1 // Friis (1944)
	// Friis (1944) temperature form Te = Te1 + Te2/G1 + Te3/(G1 G2).
	te1, te2, te3 := 50.0, 600.0, 1500.0
	three := CascadeChain([]Stage{
		{GainDB: 15, NFDB: TeToNF(te1)},
		{GainDB: 10, NFDB: TeToNF(te2)},
		{GainDB: 30, NFDB: TeToNF(te3)},
	})
	teFriis := te1 + te2/math.Pow(10, 1.5) + te3/math.Pow(10, 2.5)
	// A matched attenuator at T0 has NF equal to its loss.
	att := CascadeChain([]Stage{{GainDB: -2, NFDB: 2}, {GainDB: 30, NFDB: 1}})
	// Input 1 dB compression, same cascade rule.
	p1 := CascadeChain([]Stage{
		{GainDB: 15, NFDB: 2, IP1dB: -10, HasIP1dB: true},
		{GainDB: 10, NFDB: 6},
		{GainDB: 0, NFDB: 8, IP1dB: 5, HasIP1dB: true},
	})
	p1Want := -db(1/math.Pow(10, -1) + math.Pow(10, 2.5)/math.Pow(10, 0.5)) // 1/P = 1/P1 + G1G2/P3 in mW
	empty := CascadeChain(nil)
	checkRefs(t, []ref{
		{"2-stage NF", two.NFDB, db(ftot), 1e-9, false},                                                                              // Friis (1944)
		{"2-stage NF ≈ 1.30 dB", two.NFDB, 1.30, 0.005, false},                                                                       // Friis (1944) by hand: 10 log10(1.2589 + 9/100)
		{"2-stage gain", two.GainDB, 13, 1e-12, false},                                                                               // gains add in dB (common practice, no source)
		{"2-stage Te", two.TeK, 290 * (ftot - 1), 1e-9, false},                                                                       // IEEE definition Te = T0 (F − 1)
		{"2-stage IIP3", two.IIP3, -db(1/1.0 + 100/10.0), 1e-9, false},                                                               // cascade of intercepts: 1/IIP3 = 1/IIP3_1 + G1/IIP3_2 (mW)
		{"2-stage IIP3 ≈ −10.4 dBm", two.IIP3, -10.41, 0.005, false},                                                                 // cascade of intercepts by hand: −10 log10 11
		{"2-stage OIP3", two.OIP3, two.IIP3 + 13, 1e-12, false},                                                                      // intercept definition: OIP3 = IIP3 + G
		{"LNA noise share", two.Stages[0].NoiseShare, (f1 - 1) / (ftot - 1), 1e-12, false},                                           // Friis (1944) terms
		{"mixer noise share", two.Stages[1].NoiseShare, 0.09 / (ftot - 1), 1e-12, false},                                             // Friis (1944) terms
		{"LNA IIP3 share", two.Stages[0].IIP3Share, 1.0 / 11, 1e-12, false},                                                          // cascade of intercepts terms
		{"mixer IIP3 share", two.Stages[1].IIP3Share, 10.0 / 11, 1e-12, false},                                                       // cascade of intercepts terms
		{"cum after LNA NF", two.Stages[0].CumNFDB, 1, 1e-12, false},                                                                 // Friis (1944): single stage
		{"cum after LNA IIP3", two.Stages[0].CumIIP3, 0, 1e-12, false},                                                               // single stage intercept
		{"cum after LNA Te", two.Stages[0].CumTeK, NFToTe(1), 1e-9, false},                                                           // IEEE definition
		{"cum after mixer gain", two.Stages[1].CumGainDB, 13, 1e-12, false},                                                          // gains add in dB (common practice, no source)
		{"3-stage Te", three.TeK, teFriis, 1e-9, false},                                                                              // Friis (1944), temperature form
		{"3-stage NF", three.NFDB, TeToNF(teFriis), 1e-9, false},                                                                     // Friis (1944), IEEE definition
		{"3-stage gain", three.GainDB, 55, 1e-12, false},                                                                             // gains add in dB (common practice, no source)
		{"3-stage share sum", three.Stages[0].NoiseShare + three.Stages[1].NoiseShare + three.Stages[2].NoiseShare, 1, 1e-12, false}, // Friis (1944): terms sum to F − 1
		{"3-stage first share", three.Stages[0].NoiseShare, te1 / teFriis, 1e-12, false},                                             // Friis (1944) temperature form terms
		{"loss in front adds to NF", att.NFDB, 3, 1e-9, false},                                                                       // common practice, no source: a passive loss at T0 adds its loss to the NF
		{"IP1dB cascade", p1.IP1dB, p1Want, 1e-9, false},                                                                             // same cascade rule as intercepts (common practice, no source)
		{"IP1dB after stage 2", p1.Stages[1].CumIP1dB, -10, 1e-12, false},                                                            // linear stages do not compress (model assumption)
		{"empty chain NF", empty.NFDB, 0, 0, false},                                                                                  // Friis (1944): no stages, F = 1
	})
	if three.HasIIP3 || p1.HasIIP3 || !p1.HasIP1dB || !two.Stages[0].HasIIP3 || p1.Stages[1].HasIIP3 {
		t.Error("Has flags wrong")
	}
}

func TestIntermodRefs(t *testing.T) {
	// Intercept geometry: the two-tone input level at which IM3 (input
	// referred) reaches the floor is (2 IIP3 + floor)/3; SFDR is that level
	// minus the floor (Pozar, Microwave Engineering).
	sfdrGeo := func(iip3, floor float64) float64 { return (2*iip3+floor)/3 - floor }
	checkRefs(t, []ref{
		{"IM3 0 dBm / 30 dBm", IM3(0, 30), -60, 1e-12, false},              // intercept definition: 3 Pout − 2 OIP3 (Pozar)
		{"IM3 10 dBm / 40 dBm", IM3(10, 40), -50, 1e-12, false},            // intercept definition (Pozar)
		{"IM3 at intercept", IM3(25, 25), 25, 1e-12, false},                // intercept definition: the lines meet at OIP3
		{"IM3 3 dB per dB", IM3(1, 30) - IM3(0, 30), 3, 1e-12, false},      // common practice, no source: IM3 rises 3 dB per dB
		{"IM3 2:1 rejection", 0 - IM3(0, 20), 2 * (20 - 0), 1e-12, false},  // intercept definition: carrier-to-IM3 = 2 (OIP3 − Pout) (Pozar)
		{"SFDR 20 / −100", SFDR(20, -100), 80, 1e-12, false},               // two-tone dynamic range (Pozar), by hand
		{"SFDR geometry", SFDR(-5, -110), sfdrGeo(-5, -110), 1e-12, false}, // intercept geometry (Pozar)
		{"SFDR geometry 2", SFDR(12, -95), sfdrGeo(12, -95), 1e-12, false}, // intercept geometry (Pozar)
	})
}

// TestCascadeOutputReferred checks the output-referred points against the output form of the
// cascade, computed here independently stage by stage: for a stage of gain G following a
// cascade with output intercept OIP3', the new output intercept is
// 1/OIP3 = 1/(G·OIP3') + 1/OIP3_stage in mW (Pozar, Microwave Engineering, 4th ed., §10.3,
// the third-order intercept of a cascade; the formula recalled from memory).
func TestCascadeOutputReferred(t *testing.T) {
	stages := []Stage{
		{GainDB: -2, NFDB: 2, IIP3: 35, HasIIP3: true, IP1dB: 25, HasIP1dB: true},
		{GainDB: 18, NFDB: 0.9, IIP3: 12, HasIIP3: true, IP1dB: 2, HasIP1dB: true},
		{GainDB: 6, NFDB: 9, IIP3: 12, HasIIP3: true},
		{GainDB: 20, NFDB: 3.5, IIP3: 15, HasIIP3: true, IP1dB: 5, HasIP1dB: true},
	}
	c := CascadeChain(stages)
	mw := func(dbm float64) float64 { return math.Pow(10, dbm/10) }
	oip3 := math.Inf(1) // the cascade before the first stage adds no distortion
	var refs []ref
	for i, s := range stages {
		g := mw(s.GainDB)
		oip3 = 1 / (1/(g*oip3) + 1/mw(s.IIP3+s.GainDB))
		refs = append(refs, ref{fmt.Sprintf("cum OIP3 after stage %d", i+1), c.Stages[i].CumOIP3, db(oip3), 1e-9, false}) // Pozar §10.3, output form
	}
	refs = append(refs,
		ref{"chain OIP3", c.OIP3, db(oip3), 1e-9, false},                                                      // Pozar §10.3, output form
		ref{"stage OIP3 = IIP3 + G", stages[1].OIP3(), 30, 1e-12, false},                                      // intercept definition (Pozar §10.3)
		ref{"stage OP1dB = IP1dB + G − 1 dB", stages[1].OP1dB(), 19, 1e-12, false},                            // 1 dB compression definition (Razavi §2.2.2)
		ref{"chain OP1dB = IP1dB + G − 1 dB", c.OP1dB, c.IP1dB + c.GainDB - 1, 1e-12, false},                  // 1 dB compression definition (Razavi §2.2.2)
		ref{"cum OP1dB after stage 2", c.Stages[1].CumOP1dB, c.Stages[1].CumIP1dB + 16 - 1, 1e-12, false},     // 1 dB compression definition (Razavi §2.2.2)
		ref{"cum IP1dB passes the P1dB-less mixer", c.Stages[2].CumIP1dB, c.Stages[1].CumIP1dB, 1e-12, false}, // a stage without P1dB is taken as never compressing (model assumption, stated on the page)
	)
	checkRefs(t, refs)
}

// TestComputeTotalsIsCompute: the totals of ComputeTotals, called again and again on one
// cascade with some stages changed each time (as on Monte Carlo trials, where it keeps its
// conversions from decibels), are Compute's to the last bit. Compute itself is checked
// against Friis's formula and the intercept cascade by the tests above; this holds the
// faster path to it.
func TestComputeTotalsIsCompute(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	stages := make([]Stage, 12)
	for i := range stages {
		stages[i] = Stage{GainDB: 20*rng.Float64() - 5, NFDB: 8 * rng.Float64(), IIP3: 20*rng.Float64() - 10, HasIIP3: i%3 != 0,
			IP1dB: 10*rng.Float64() - 20, HasIP1dB: i%4 == 1, IIP2: 40 * rng.Float64(), HasIIP2: i%5 == 2}
	}
	var fast Cascade
	for trial := range 200 {
		for range 1 + rng.IntN(3) { // a few stages change, the rest stay as they were
			s := &stages[rng.IntN(len(stages))]
			s.GainDB += rng.NormFloat64()
			s.NFDB = max(0, s.NFDB+0.3*rng.NormFloat64())
			s.IIP3 += rng.NormFloat64()
		}
		if trial == 100 {
			stages = stages[:7] // a shorter chain in the same cascade
		}
		fast.ComputeTotals(stages)
		if got, want := totalsOf(fast), totalsOf(CascadeChain(stages)); got != want {
			t.Fatalf("trial %d: ComputeTotals gives %+v, Compute %+v", trial, got, want)
		}
		if len(fast.Stages) != 0 {
			t.Fatalf("trial %d: ComputeTotals filled %d stage results", trial, len(fast.Stages))
		}
	}
}

type cascadeTotals struct {
	gain, nf, te, iip3, oip3, ip1, op1, iip2, oip2 float64
	has3, has1, has2                               bool
}

func totalsOf(c Cascade) cascadeTotals {
	return cascadeTotals{c.GainDB, c.NFDB, c.TeK, c.IIP3, c.OIP3, c.IP1dB, c.OP1dB, c.IIP2, c.OIP2, c.HasIIP3, c.HasIP1dB, c.HasIIP2}
}
