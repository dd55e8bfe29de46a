package rfmath

import "math"

// Stage is one two-port in a receive or transmit chain.
type Stage struct {
	Name     string
	GainDB   float64 // available power gain, dB
	NFDB     float64 // noise figure, dB
	IIP3     float64 // input third-order intercept, dBm; valid only if HasIIP3
	HasIIP3  bool
	IP1dB    float64 // input 1 dB compression point, dBm; valid only if HasIP1dB
	HasIP1dB bool
	IIP2     float64 // input second-order intercept, dBm; valid only if HasIIP2
	HasIIP2  bool
}

// OIP3 is the stage's output third-order intercept, dBm: IIP3 + gain (valid when HasIIP3).
func (s Stage) OIP3() float64 { return s.IIP3 + s.GainDB }

// OP1dB is the stage's output 1 dB compression point, dBm: IP1dB + gain − 1 dB, since at
// that point the gain has fallen 1 dB (the definition of the 1 dB compression point;
// Razavi, RF Microelectronics, 2nd ed., §2.2.2, gain compression; section recalled from memory). Valid when HasIP1dB.
func (s Stage) OP1dB() float64 { return s.IP1dB + s.GainDB - 1 }

// StageResult holds the cascade figures from the chain input up to and
// including one stage, plus that stage's contributions to the whole chain.
type StageResult struct {
	CumGainDB, CumNFDB, CumTeK float64

	// CumIIP3 is the input-referred IIP3 (dBm) of the cascade up to and
	// including this stage; HasIIP3 is false while no stage so far has one.
	CumIIP3 float64
	HasIIP3 bool

	// CumOIP3 is the output third-order intercept (dBm) of the cascade up to
	// and including this stage: CumIIP3 + CumGainDB (valid when HasIIP3).
	CumOIP3 float64

	// CumIP1dB is the input-referred 1 dB compression point (dBm) of the
	// cascade up to and including this stage, and CumOP1dB the output one
	// (CumIP1dB + CumGainDB − 1 dB). Stages without a P1dB count as never
	// compressing, so both are upper bounds when a stage lacks one.
	CumIP1dB, CumOP1dB float64
	HasIP1dB           bool

	// CumIIP2 is the input-referred IIP2 (dBm) of the cascade up to and
	// including this stage; HasIIP2 is false while no stage so far has one.
	CumIIP2 float64
	HasIIP2 bool

	// NoiseShare is this stage's share (0..1) of the whole chain's excess
	// noise factor F−1; the shares sum to 1 (all zero if F−1 = 0).
	NoiseShare float64

	// IIP3Share is this stage's share (0..1) of 1/IIP3 of the whole chain
	// (input-referred); shares sum to 1 over the stages that have an IIP3.
	IIP3Share float64
}

// Cascade is the result of CascadeChain: per-stage results and the totals.
type Cascade struct {
	Stages []StageResult

	GainDB float64 // total gain, dB
	NFDB   float64 // total noise figure, dB
	TeK    float64 // total equivalent input noise temperature, K

	IIP3, OIP3 float64 // input / output third-order intercept, dBm
	HasIIP3    bool

	IP1dB, OP1dB float64 // input- / output-referred 1 dB compression point, dBm
	HasIP1dB     bool

	IIP2, OIP2 float64 // input / output second-order intercept, dBm
	HasIIP2    bool

	lin []linear // ComputeTotals' conversions, kept for its next call
}

// CascadeChain evaluates a chain of stages in order from input to output.
//
// Noise uses the Friis formula (H. T. Friis, "Noise figures of radio
// receivers", Proc. IRE 32, 1944), with linear noise factors Fi and gains Gi:
//
//	F = F1 + (F2 − 1)/G1 + (F3 − 1)/(G1 G2) + …,  Te = T0 (F − 1)
//
// Intercepts use the standard cascade of third-order intercepts, input
// referred, in mW (coherent worst case):
//
//	1/IIP3 = 1/IIP3_1 + G1/IIP3_2 + G1 G2/IIP3_3 + …,  OIP3 = IIP3 + G (dB)
//
// Second-order intercepts add as amplitudes, in phase (coherent worst case):
// each stage's IM2 product referred to the chain input is P²·G_before/IIP2_i,
// so
//
//	1/√IIP2 = 1/√IIP2_1 + √G1/√IIP2_2 + √(G1 G2)/√IIP2_3 + …,  OIP2 = IIP2 + G (dB)
//
// (the IIP3 derivation of Razavi, RF Microelectronics, ch. 2, for a
// second-order term; filtering between stages that removes the f1 − f2
// product is not taken into account, so this is a bound).
//
// The 1 dB compression points are cascaded with the same expression, a
// common approximation (common practice, no source: it holds when each stage
// compresses like a memoryless cubic, whose P1dB sits a fixed 9.6 dB under its
// IIP3, Razavi, RF Microelectronics, §2.2). Stages without an IIP3 (or IP1dB)
// are treated as perfectly linear, so the cascade is then an upper bound. An empty chain has 0 dB gain and 0 dB noise figure.
func CascadeChain(stages []Stage) Cascade {
	var res Cascade
	res.Compute(stages)
	return res
}

// Compute works out the cascade of stages into res, as CascadeChain does, reusing the
// storage of res.Stages (no allocation when it is large enough).
func (res *Cascade) Compute(stages []Stage) { res.compute(stages, true) }

// ComputeTotals works out only the totals of the cascade (GainDB, NFDB, TeK and the
// intercepts and compression points), as Compute gives them to the last bit, and leaves
// Stages empty. What it converts from decibels it keeps, and converts again only the values
// that differ from the last call's: on Monte Carlo trials most stages of a chain are the same.
func (res *Cascade) ComputeTotals(stages []Stage) { res.compute(stages, false) }

// linear holds a stage's values converted from decibels for the next ComputeTotals: for each
// of noise figure, gain, IIP3, IP1dB and IIP2, the dB value and its FromDB.
type linear struct {
	db, lin [5]float64
	ok      [5]bool
}

// The values linear holds.
const (
	linNF = iota
	linGain
	linIP3
	linP1
	linIP2
)

// fromDB returns FromDB(db) for value k, converting only when db differs from the last one.
func (l *linear) fromDB(k int, db float64) float64 {
	if !l.ok[k] || l.db[k] != db {
		l.db[k], l.lin[k], l.ok[k] = db, FromDB(db), true
	}
	return l.lin[k]
}

func (res *Cascade) compute(stages []Stage, perStage bool) {
	var st []StageResult
	if perStage {
		st = res.Stages
		if cap(st) < len(stages) {
			st = make([]StageResult, len(stages))
		} else {
			st = st[:len(stages)]
			clear(st)
		}
	}
	lin := res.lin
	if !perStage && len(lin) != len(stages) {
		lin = make([]linear, len(stages))
	}
	*res = Cascade{Stages: st, lin: lin}
	conv := func(i, k int, db float64) float64 {
		if perStage {
			return FromDB(db)
		}
		return lin[i].fromDB(k, db)
	}
	gPrev := 1.0 // linear gain ahead of the current stage
	// Each stage's (Fi − 1)/G_before and G_before/IIP3_i are kept in its NoiseShare and
	// IIP3Share until the sums they are shares of are known.
	var (
		gainDB  float64
		sumN    float64
		sumIP3  float64
		sumP1   float64
		sumIP2  float64 // Σ √(G_before/IIP2_i), 1/√mW
		haveIP3 bool
		haveP1  bool
		haveIP2 bool
	)
	var spare StageResult // the per-stage results of ComputeTotals, not kept
	for i, s := range stages {
		r := &spare
		if perStage {
			r = &res.Stages[i]
		}
		r.NoiseShare = (conv(i, linNF, s.NFDB) - 1) / gPrev
		sumN += r.NoiseShare
		if s.HasIIP3 {
			r.IIP3Share = gPrev / conv(i, linIP3, s.IIP3)
			sumIP3 += r.IIP3Share
			haveIP3 = true
		}
		if s.HasIP1dB {
			sumP1 += gPrev / conv(i, linP1, s.IP1dB)
			haveP1 = true
		}
		if s.HasIIP2 {
			sumIP2 += math.Sqrt(gPrev / conv(i, linIP2, s.IIP2))
			haveIP2 = true
		}
		gainDB += s.GainDB
		gPrev *= conv(i, linGain, s.GainDB)
		if !perStage {
			continue
		}

		r.CumGainDB = gainDB
		r.CumNFDB = 10 * math.Log10(1+sumN)
		r.CumTeK = T0 * sumN
		if haveIP3 {
			r.CumIIP3, r.HasIIP3 = -10*math.Log10(sumIP3), true
			r.CumOIP3 = r.CumIIP3 + gainDB
		}
		if haveP1 {
			r.CumIP1dB, r.HasIP1dB = -10*math.Log10(sumP1), true
			r.CumOP1dB = r.CumIP1dB + gainDB - 1
		}
		if haveIP2 {
			r.CumIIP2, r.HasIIP2 = -20*math.Log10(sumIP2), true
		}
	}
	for i := range res.Stages {
		r := &res.Stages[i]
		if sumN != 0 {
			r.NoiseShare /= sumN
		} else {
			r.NoiseShare = 0
		}
		if sumIP3 != 0 && stages[i].HasIIP3 {
			r.IIP3Share /= sumIP3
		} else {
			r.IIP3Share = 0
		}
	}
	res.GainDB = gainDB
	res.NFDB = 10 * math.Log10(1+sumN)
	res.TeK = T0 * sumN
	if haveIP3 {
		res.IIP3, res.HasIIP3 = -10*math.Log10(sumIP3), true
		res.OIP3 = res.IIP3 + gainDB
	}
	if haveP1 {
		res.IP1dB, res.HasIP1dB = -10*math.Log10(sumP1), true
		res.OP1dB = res.IP1dB + gainDB - 1
	}
	if haveIP2 {
		res.IIP2, res.HasIIP2 = -20*math.Log10(sumIP2), true
		res.OIP2 = res.IIP2 + gainDB
	}
}

// CubicIP3OverP1dB is how far, in dB, the input intercept IIP3 lies above the input 1 dB
// compression point of a memoryless stage y = a1·x + a3·x³ (a3 of opposite sign to a1):
// the gain falls by 1 dB at A² = (1 − 10^(−1/20))·(4/3)·|a1/a3| and the intercept is at
// A² = (4/3)·|a1/a3|, so the ratio is −10·log10(1 − 10^(−1/20)) ≈ 9.64 dB (Razavi, RF
// Microelectronics, §2.2: "IP3 is about 9.6 dB above the 1-dB compression point").
var CubicIP3OverP1dB = -10 * math.Log10(1-math.Pow(10, -1.0/20))

// IM3 returns the output level in dBm of each two-tone third-order
// intermodulation product for a per-tone output power pout (dBm) and output
// intercept oip3 (dBm):
//
//	P_IM3 = 3 Pout − 2 OIP3
//
// Source: definition of the third-order intercept point (the IM3 products
// rise 3 dB per dB of fundamental; Pozar, Microwave Engineering).
func IM3(pout, oip3 float64) float64 {
	return 3*pout - 2*oip3
}

// SFDR returns the spurious-free dynamic range in dB for an input intercept
// iip3 (dBm) and an input-referred noise floor (dBm, in the bandwidth of
// interest):
//
//	SFDR = (2/3)(IIP3 − floor)
//
// Source: standard two-tone dynamic range definition (Pozar, Microwave
// Engineering).
func SFDR(iip3, floor float64) float64 {
	return 2 * (iip3 - floor) / 3
}
