package rflib

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var (
	uDBi = unit("dBi")
	uM2  = unit("m^2")
)

var antennas = []*engine.Func{
	{
		Name: "dish_gain", Args: []engine.Arg{lin("d", units.Length), lin("f", units.Frequency), lin("efficiency", units.None)}, Result: "dBi",
		Doc:    "Gain of a circular aperture (parabolic dish) of diameter d: 10·log10(η·(π·d/λ)²) dBi with aperture efficiency η (0.55–0.70 typical; 55 % allowed).",
		Source: "antenna effective-area relation G = 4π·Ae/λ², Ae = η·π·d²/4 (Balanis, Antenna Theory)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if e := q(a, 2); !(e > 0 && e <= 1) {
				return units.Q{}, fmt.Errorf("efficiency: must lie above 0 and at most 1 (got %s)", units.FormatNum(e))
			}
			if d := q(a, 0); !(d > 0) {
				return units.Q{}, fmt.Errorf("d: the diameter must be positive (got %s)", units.Lin(d, units.Length))
			}
			return result(rfmath.DB(rfmath.DishGain(q(a, 0), q(a, 1), q(a, 2))), uDBi, "gain")
		},
	},
	{
		Name: "aperture", Args: []engine.Arg{either("g", units.None), lin("f", units.Frequency)}, Result: "m^2",
		Doc:    "Effective aperture of an antenna of gain g (in dBi/dB, or a plain linear ratio): Ae = G·λ²/(4π).",
		Source: "antenna effective-area relation (Balanis, Antenna Theory); Friis (1944), A simple transmission formula",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if g := q(a, 0); g < 0 {
				return units.Q{}, fmt.Errorf("g: a linear gain cannot be negative (got %s)", units.FormatNum(g))
			}
			return result(rfmath.Aperture(q(a, 0), q(a, 1)), uM2, "aperture")
		},
	},
	{
		Name: "vswr_to_rl", Args: []engine.Arg{lin("v", units.None)}, Result: "dB",
		Doc:    "Return loss of a VSWR, as a positive number: |Γ| = (v − 1)/(v + 1), RL = −20·log10|Γ|; vswr_to_rl(2) = 9.54 dB. A perfect match (v = 1) has no finite return loss.",
		Source: "transmission-line definitions (Pozar, Microwave Engineering, ch. 2)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			rl, err := rfmath.VSWRToRL(q(a, 0))
			if err != nil {
				return units.Q{}, clean(err)
			}
			if math.IsInf(rl, 1) {
				return units.Q{}, fmt.Errorf("v = 1 is a perfect match: the return loss is infinite")
			}
			return result(rl, uDB, "return loss")
		},
	},
	{
		Name: "rl_to_vswr", Args: []engine.Arg{ratio("rl")}, Result: "1",
		Doc:    "VSWR of a return loss given as a positive number of dB: |Γ| = 10^(−RL/20), v = (1 + |Γ|)/(1 − |Γ|); rl_to_vswr(20 dB) = 1.22.",
		Source: "transmission-line definitions (Pozar, Microwave Engineering, ch. 2)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			rl := q(a, 0)
			if rl < 0 {
				return units.Q{}, fmt.Errorf("rl: return loss is written as a positive number of dB (got %s; S11 = −RL)", units.DB(rl))
			}
			if rl == 0 {
				return units.Q{}, fmt.Errorf("rl: 0 dB is total reflection: the VSWR is infinite")
			}
			return result(rfmath.RLToVSWR(rl), uNum, "VSWR")
		},
	},
	{
		Name: "mismatch_loss", Args: []engine.Arg{lin("v", units.None)}, Result: "dB",
		Doc:    "Mismatch loss of a VSWR, as a positive number: −10·log10(1 − |Γ|²), |Γ| = (v − 1)/(v + 1); mismatch_loss(2) = 0.51 dB.",
		Source: "transmission-line definitions (Pozar, Microwave Engineering, ch. 2)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			ml, err := rfmath.MismatchLoss(q(a, 0))
			if err != nil {
				return units.Q{}, clean(err)
			}
			return result(ml, uDB, "mismatch loss")
		},
	},
}
