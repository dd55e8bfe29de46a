package rflib

import (
	"fmt"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var chains = []*engine.Func{
	cascadeFunc("cascade_gain", "dB", "Total gain of a chain: the sum of the stage gains in dB.", "common practice, no source (gains multiply)",
		func(c rfmath.Cascade) (units.Q, error) { return result(c.GainDB, uDB, "gain") }),
	cascadeFunc("cascade_nf", "dB", "Noise figure of a chain by Friis: F = F1 + (F2−1)/G1 + (F3−1)/(G1·G2) + …", "Friis (1944), Noise figures of radio receivers, Proc. IRE 32(7)",
		func(c rfmath.Cascade) (units.Q, error) { return result(c.NFDB, uDB, "noise figure") }),
	cascadeFunc("cascade_te", "K", "Noise temperature of a chain: Te = Te1 + Te2/G1 + Te3/(G1·G2) + …", "Friis (1944); IEEE T0 = 290 K",
		func(c rfmath.Cascade) (units.Q, error) { return result(c.TeK, uK, "noise temperature") }),
	cascadeFunc("cascade_iip3", "dBm", "Input third-order intercept of a chain: 1/IIP3 = Σ (gain before stage i)/IIP3ᵢ, in linear power.", "standard cascade of intercept points (Razavi, RF Microelectronics, ch. 2)",
		func(c rfmath.Cascade) (units.Q, error) {
			if !c.HasIIP3 {
				return units.Q{}, fmt.Errorf("no stage has iip3 or oip3")
			}
			return result(c.IIP3, uDBm, "IIP3")
		}),
	cascadeFunc("cascade_oip3", "dBm", "Output third-order intercept of a chain: the cascaded IIP3 plus the total gain.", "standard cascade of intercept points (Razavi, RF Microelectronics, ch. 2)",
		func(c rfmath.Cascade) (units.Q, error) {
			if !c.HasIIP3 {
				return units.Q{}, fmt.Errorf("no stage has iip3 or oip3")
			}
			return result(c.OIP3, uDBm, "OIP3")
		}),
	cascadeFunc("cascade_ip1db", "dBm", "Input 1 dB compression point of a chain, cascaded like the intercepts (a common approximation); stages without ip1db or op1db count as never compressing, so it is then an upper bound (the cascade table names them).", "common practice, no source",
		func(c rfmath.Cascade) (units.Q, error) {
			if !c.HasIP1dB {
				return units.Q{}, fmt.Errorf("no stage has ip1db or op1db")
			}
			return result(c.IP1dB, uDBm, "IP1dB")
		}),
	cascadeFunc("cascade_op1db", "dBm", "Output 1 dB compression point of a chain: the cascaded input P1dB plus the total gain less 1 dB (the gain is 1 dB compressed there); stages without ip1db or op1db count as never compressing, as in cascade_ip1db.", "1 dB compression point definition (Razavi, RF Microelectronics, §2.2.2); cascade: common practice, no source",
		func(c rfmath.Cascade) (units.Q, error) {
			if !c.HasIP1dB {
				return units.Q{}, fmt.Errorf("no stage has ip1db or op1db")
			}
			return result(c.OP1dB, uDBm, "OP1dB")
		}),
}

func cascadeFunc(name, res, doc, src string, pick func(rfmath.Cascade) (units.Q, error)) *engine.Func {
	return &engine.Func{
		Name: name, Args: []engine.Arg{chainArg()}, Result: res, Doc: doc, Source: src,
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			cas, notes, err := Cascade(a[0].Chain)
			if err != nil {
				return units.Q{}, err
			}
			warnAll(c, notes)
			return pick(cas)
		},
	}
}

// Stages converts a chain's evaluated stages into the cascade model: gain and noise figure in
// dB (te converted through T0, a passive `loss` giving gain −loss and NF = loss), IIP3 from
// iip3 or oip3 − gain, IIP2 from iip2 or oip2 − gain, IP1dB from ip1db or op1db − gain + 1 dB (the gain is 1 dB compressed
// at that point; common practice). Notes say what was assumed.
func Stages(cv *engine.ChainValue) ([]rfmath.Stage, []string, error) {
	return stagesInto(nil, nil, cv)
}

// stagesInto is Stages appending to out and notes (so that their storage can be reused).
func stagesInto(out []rfmath.Stage, notes []string, cv *engine.ChainValue) ([]rfmath.Stage, []string, error) {
	if len(cv.Stages) == 0 {
		return nil, nil, fmt.Errorf("chain %s has no stages", cv.Name)
	}
	for i := range cv.Stages {
		sv := &cv.Stages[i]
		st := rfmath.Stage{Name: sv.Label}
		g, ok := sv.Get("gain")
		if !ok {
			return nil, nil, fmt.Errorf("stage %q has neither gain nor loss", sv.Label)
		}
		if !g.IsRatio() {
			return nil, nil, fmt.Errorf("stage %q: gain is %s, want dB", sv.Label, nameOf(g))
		}
		st.GainDB = g.V
		if nf, ok := sv.Get("nf"); ok {
			if !nf.IsRatio() {
				return nil, nil, fmt.Errorf("stage %q: nf is %s, want dB", sv.Label, nameOf(nf))
			}
			if nf.V < 0 {
				// F = 1 + Te/T0 ≥ 1 for a physical two-port (Friis 1944): NF ≥ 0 dB.
				return nil, nil, fmt.Errorf("stage %q: nf %s is below 0 dB: no two-port adds less than no noise", sv.Label, nf)
			}
			st.NFDB = nf.V
		} else if te, ok := sv.Get("te"); ok {
			if te.D != units.Temperature {
				return nil, nil, fmt.Errorf("stage %q: te is %s, want a temperature", sv.Label, nameOf(te))
			}
			if te.Linear().V < 0 {
				return nil, nil, fmt.Errorf("stage %q: te %s is negative: a noise temperature is 0 K or more", sv.Label, te)
			}
			st.NFDB = rfmath.TeToNF(te.Linear().V)
		} else {
			notes = append(notes, fmt.Sprintf("stage %q has no nf, te or loss; taken as noiseless", sv.Label))
		}
		var err error
		st.IIP3, st.HasIIP3, err = intercept(sv, "iip3", "oip3", g.V, 0)
		if err != nil {
			return nil, nil, err
		}
		st.IP1dB, st.HasIP1dB, err = intercept(sv, "ip1db", "op1db", g.V, 1)
		if err != nil {
			return nil, nil, err
		}
		st.IIP2, st.HasIIP2, err = intercept(sv, "iip2", "oip2", g.V, 0)
		if err != nil {
			return nil, nil, err
		}
		out = append(out, st)
	}
	return out, notes, nil
}

// intercept reads an input-referred point, or derives it from the output-referred one.
func intercept(sv *engine.StageValue, inKey, outKey string, gain, compression float64) (float64, bool, error) {
	v, ok := sv.Get(inKey)
	key := inKey
	if !ok {
		v, ok = sv.Get(outKey)
		key = outKey
	}
	if !ok {
		return 0, false, nil
	}
	if v.D != units.Power {
		return 0, false, fmt.Errorf("stage %q: %s is %s, want a power level (dBm)", sv.Label, key, nameOf(v))
	}
	l, err := v.ToLevel()
	if err != nil {
		return 0, false, err
	}
	dbm := l.V + 30
	if key == outKey {
		dbm = dbm - gain + compression
	}
	return dbm, true, nil
}

// Cascade computes a chain's cascade: its totals, and without the chain's memo also the
// per-stage cumulative values and shares. With the memo, the totals are worked out once per
// evaluation of the chain, in reused storage; the returned cascade is then valid until the
// chain is evaluated again.
func Cascade(cv *engine.ChainValue) (rfmath.Cascade, []string, error) {
	if cv.Memo == nil {
		st, notes, err := Stages(cv)
		if err != nil {
			return rfmath.Cascade{}, nil, err
		}
		return rfmath.CascadeChain(st), notes, nil
	}
	m, _ := cv.Memo.Data.(*cascadeMemo)
	if m == nil {
		m = &cascadeMemo{}
		cv.Memo.Data = m
	}
	if !cv.Memo.Valid {
		m.stages, m.notes, m.err = stagesInto(m.stages[:0], m.notes[:0], cv)
		if m.err == nil {
			m.cas.ComputeTotals(m.stages) // the chain functions read only the totals
		}
		cv.Memo.Valid = true
	}
	if m.err != nil {
		return rfmath.Cascade{}, nil, m.err
	}
	return m.cas, m.notes, nil
}

// cascadeMemo is what Cascade keeps in a chain's memo.
type cascadeMemo struct {
	stages []rfmath.Stage
	notes  []string
	cas    rfmath.Cascade
	err    error
}
