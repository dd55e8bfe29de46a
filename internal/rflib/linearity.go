package rflib

import (
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var linearity = []*engine.Func{
	{
		Name: "im3", Args: []engine.Arg{level("p_out", units.Power), level("oip3", units.Power)}, Result: "dBm",
		Doc:    "Output level of each two-tone third-order intermodulation product for a per-tone output level p_out: 3·p_out − 2·OIP3 (dBm); the products rise 3 dB per dB of the tones.",
		Source: "definition of the third-order intercept point (Pozar, Microwave Engineering, nonlinear distortion)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return result(rfmath.IM3(dbmOf(a, 0), dbmOf(a, 1)), uDBm, "IM3 level")
		},
	},
	{
		Name: "sfdr", Args: []engine.Arg{level("iip3", units.Power), level("floor", units.Power)}, Result: "dB",
		Doc:    "Spurious-free dynamic range: (2/3)·(IIP3 − floor), with the input-referred noise floor in the bandwidth of interest (thermal(b) + nf).",
		Source: "two-tone spurious-free dynamic range definition (Pozar, Microwave Engineering, dynamic range)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return result(rfmath.SFDR(dbmOf(a, 0), dbmOf(a, 1)), uDB, "SFDR")
		},
	},
}

// dbmOf returns power-level argument i in dBm (levels are held in dB re 1 W).
func dbmOf(a []engine.Value, i int) float64 { return q(a, i) + 30 }
