package analysis

import (
	"strings"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

// Cascade is a chain's cascade as the page shows it: every stage, the cumulative gain, noise
// figure and intercepts after it, its share of the chain's excess noise factor (F − 1) and of
// its IIP3 degradation, and, when the chain's group gives them, the signal level entering
// the chain and the noise bandwidth, from which the levels along the chain follow.
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
}

// Input and bandwidth quantities of a chain's group, by name, in the order they are looked
// for: the level entering the chain is the group's `level` (or `input`) when it is a power,
// and the noise bandwidth the group's `bandwidth` when it is a frequency.
var (
	inputNames     = []string{"level", "input"}
	bandwidthNames = []string{"bandwidth"}
)

// Cascades works out every chain's cascade in r, in file order.
func Cascades(r *engine.Result) []Cascade {
	sh := r.Sheet()
	var out []Cascade
	for _, c := range sh.Chains() {
		cc := Cascade{Chain: c}
		cc.Stages, cc.Notes, cc.Err = rflib.Stages(r.Chain(c))
		if cc.Err == nil {
			cc.Result = rfmath.CascadeChain(cc.Stages)
		}
		group := c.Name[:max(strings.LastIndex(c.Name, "."), 0)]
		if q, v, ok := groupQuantity(r, group, inputNames, units.Power); ok {
			if l, err := v.ToLevel(); err == nil {
				cc.Input, cc.InputDBm = q, l.V+30
			}
		}
		if q, v, ok := groupQuantity(r, group, bandwidthNames, units.Frequency); ok {
			cc.Bandwidth, cc.NoiseDBm = q, rfmath.DBm(rfmath.Thermal(v.Linear().V, rfmath.T0))
		}
		out = append(out, cc)
	}
	return out
}

// groupQuantity finds the first of names in group whose value has dimension d.
func groupQuantity(r *engine.Result, group string, names []string, d units.Dim) (*engine.Quantity, units.Q, bool) {
	for _, name := range names {
		full := name
		if group != "" {
			full = group + "." + name
		}
		if q, ok := r.Sheet().Quantity(full); ok {
			if v, known := r.Value(q); known && v.D == d {
				return q, v, true
			}
		}
	}
	return nil, units.Q{}, false
}
