package analysis

import (
	"fmt"
	"strings"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

// Cascade is a chain's cascade as the page shows it: every stage, the cumulative gain, noise
// figure, intercepts and compression points after it, its share of the chain's excess noise
// factor (F − 1) and of its IIP3 degradation, and, when the chain's group gives them
// (chain_input, chain_bandwidth), the signal level entering the chain and the noise
// bandwidth, from which the levels along the chain and each stage's headroom to its output
// 1 dB compression point follow.
type Cascade struct {
	Chain  *engine.Chain
	Stages []rfmath.Stage // each stage's gain, noise figure and intercepts, in signal order
	Result rfmath.Cascade // the whole chain's figures, and each stage's cumulative ones and shares
	Notes  []string       // what was assumed (a stage without a noise figure, say)
	Err    error          // why the cascade could not be worked out

	Input     *engine.Quantity // the level entering the chain (nil when the group has none)
	InputDBm  float64          // Input's value in dBm
	Bandwidth *engine.Quantity // the noise bandwidth (nil when the group has none)
	NoiseDBm  float64          // thermal noise k·T0·B at the chain input, dBm
	BackoffDB float64          // the back-off from each stage's output P1dB the input must keep

	// Headroom is, for each stage with a P1dB when the input level is known, its output
	// P1dB less the level at its output (dB; negative: driven into compression).
	Headroom []Headroom
	// Warnings are the stages within the back-off of their compression point and an input
	// above the chain's input P1dB, each at the stage's P1dB key (or the chain_input).
	Warnings []engine.Diagnostic
}

// Headroom is one stage's distance to its output 1 dB compression point at the chain's
// input level.
type Headroom struct {
	Has bool    // the stage gives a P1dB
	DB  float64 // OP1dB − output level, dB
}

// Cascades works out every chain's cascade in r, in file order.
func Cascades(r *engine.Result) []Cascade {
	sh := r.Sheet()
	var out []Cascade
	for _, c := range sh.Chains() {
		cc := Cascade{Chain: c, BackoffDB: engine.DefaultBackoffDB}
		cc.Stages, cc.Notes, cc.Err = rflib.Stages(r.Chain(c))
		if cc.Err == nil {
			cc.Result = rfmath.CascadeChain(cc.Stages)
		}
		if v, ok := value(r, c.Input); ok {
			if l, err := v.ToLevel(); err == nil {
				cc.Input, cc.InputDBm = c.Input, l.V+30
			}
		}
		if v, ok := value(r, c.Bandwidth); ok {
			cc.Bandwidth, cc.NoiseDBm = c.Bandwidth, rfmath.DBm(rfmath.Thermal(v.Linear().V, rfmath.T0))
		}
		if v, ok := value(r, c.Backoff); ok {
			cc.BackoffDB = v.V
		}
		cc.Notes = append(cc.Notes, implicitNames(r, c)...)
		if cc.Err == nil {
			cc.compression()
		}
		out = append(out, cc)
	}
	return out
}

func value(r *engine.Result, q *engine.Quantity) (units.Q, bool) {
	if q == nil {
		return units.Q{}, false
	}
	return r.Value(q)
}

// compression checks each stage's output level against its output 1 dB compression point
// (OP1dB = IP1dB + G − 1 dB, Razavi, RF Microelectronics, 2nd ed., §2.2.2, gain compression; section recalled from memory) with the back-off,
// and the input level against the chain's cascaded input P1dB (1/P1dB = Σ G_before/P1dB_i,
// the form of the intercept cascade, Razavi §2.2.5; an approximation for compression,
// common practice). It also notes the stages that give no P1dB, which neither check sees.
func (cc *Cascade) compression() {
	var missing []string
	for _, st := range cc.Stages {
		if !st.HasIP1dB {
			missing = append(missing, fmt.Sprintf("%q", st.Name))
		}
	}
	switch {
	case len(missing) == len(cc.Stages) && !cc.Result.HasIIP3:
		// no linearity at all: the page says so in one line
	case len(missing) == len(cc.Stages):
		cc.Notes = append(cc.Notes, "no stage gives ip1db or op1db: compression is not checked")
	case len(missing) > 0:
		cc.Notes = append(cc.Notes, fmt.Sprintf("no P1dB given for %s: not checked for compression, and counted as never compressing in the cumulative P1dB (an upper bound)", strings.Join(missing, ", ")))
	}
	if cc.Input == nil {
		return
	}
	cc.Headroom = make([]Headroom, len(cc.Stages))
	for i, st := range cc.Stages {
		if !st.HasIP1dB {
			continue
		}
		out := cc.InputDBm + cc.Result.Stages[i].CumGainDB
		h := st.OP1dB() - out
		cc.Headroom[i] = Headroom{Has: true, DB: h}
		at := cc.p1dbQuantity(i)
		switch {
		case h < 0:
			cc.warn(at, fmt.Sprintf("stage %q is driven into compression: its output %s dBm (chain input %s dBm) is %s dB above its output P1dB %s dBm, so the levels after it are optimistic", st.Name, units.FormatDB(out), units.FormatDB(cc.InputDBm), units.FormatDB(-h), units.FormatDB(st.OP1dB())))
		case h < cc.BackoffDB:
			cc.warn(at, fmt.Sprintf("stage %q: its output %s dBm (chain input %s dBm) is %s dB under its output P1dB %s dBm, less than the %s dB back-off", st.Name, units.FormatDB(out), units.FormatDB(cc.InputDBm), units.FormatDB(h), units.FormatDB(st.OP1dB()), units.FormatDB(cc.BackoffDB)))
		}
	}
	if c := cc.Result; c.HasIP1dB && cc.InputDBm > c.IP1dB {
		cc.warn(cc.Input, fmt.Sprintf("the chain input %s dBm is above the chain's cascaded input P1dB %s dBm: the chain is compressed", units.FormatDB(cc.InputDBm), units.FormatDB(c.IP1dB)))
	}
}

// p1dbQuantity is the quantity a stage's P1dB is written as (ip1db or op1db).
func (cc *Cascade) p1dbQuantity(i int) *engine.Quantity {
	st := cc.Chain.Stages[i]
	if q, ok := st.Values["ip1db"]; ok {
		return q
	}
	return st.Values["op1db"]
}

func (cc *Cascade) warn(q *engine.Quantity, msg string) {
	d := engine.Diagnostic{Severity: engine.Warning, Quantity: cc.Chain.Name, Summary: msg, Range: cc.Chain.Range}
	if q != nil {
		d.Quantity, d.Range = q.Name, q.Range
	}
	cc.Warnings = append(cc.Warnings, d)
}

// implicitNames notes a quantity of the chain's group that sheets once had read as the
// chain's input level (level, input) or noise bandwidth (bandwidth), when the group gives no
// chain_input or chain_bandwidth: those names are not guessed any more.
func implicitNames(r *engine.Result, c *engine.Chain) []string {
	group := c.Name[:max(strings.LastIndex(c.Name, "."), 0)]
	var notes []string
	look := func(names []string, d units.Dim, key, what string) {
		for _, name := range names {
			full := name
			if group != "" {
				full = group + "." + name
			}
			q, ok := r.Sheet().Quantity(full)
			if !ok {
				continue
			}
			if v, known := r.Value(q); known && v.D == d {
				notes = append(notes, fmt.Sprintf("%s is not read as the chain's %s; to show %s along the chain, write %s = \"= %s\" in the chain's group", full, strings.TrimPrefix(key, "chain_"), what, key, name))
				return
			}
		}
	}
	if c.Input == nil {
		look([]string{"level", "input"}, units.Power, "chain_input", "the signal level and the compression headroom")
	}
	if c.Bandwidth == nil {
		look([]string{"bandwidth"}, units.Frequency, "chain_bandwidth", "the noise level")
	}
	return notes
}
