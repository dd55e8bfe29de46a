package rflib

import (
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var linearity = []*engine.Func{
	{
		Name: "im3", Args: []engine.Arg{level("p_out", units.Power), level("oip3", units.Power), optional(level("op1db", units.Power))}, Result: "dBm",
		Doc:    "Output level of each two-tone third-order intermodulation product for a per-tone output level p_out: 3·p_out − 2·OIP3 (dBm); the products rise 3 dB per dB of the tones. That holds only below compression: a warning when p_out is above the output 1 dB compression point op1db (e.g. cascade_op1db(chain)), or, without op1db, above OIP3 − 10.6 dB, where a memoryless cubic stage is 1 dB compressed.",
		Source: "definition of the third-order intercept point (Pozar, Microwave Engineering, nonlinear distortion); P1dB 9.6 dB under IIP3 for a cubic stage (Razavi, RF Microelectronics, §2.2)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			pout, oip3 := dbmOf(a, 0), dbmOf(a, 1)
			if has(a, 2) {
				if op1 := dbmOf(a, 2); pout > op1 {
					c.Warn("im3: each tone's output %s dBm is above the output P1dB %s dBm: the stage compresses, and 3·p_out − 2·OIP3 does not hold there", units.FormatDB(pout), units.FormatDB(op1))
				}
			} else if op1 := oip3 - rfmath.CubicIP3OverP1dB - 1; pout > op1 {
				c.Warn("im3: each tone's output %s dBm is above OIP3 − %s dB = %s dBm, where a cubic stage is 1 dB compressed: 3·p_out − 2·OIP3 does not hold there (give the part's op1db as a third argument to check against it)", units.FormatDB(pout), units.FormatDB(rfmath.CubicIP3OverP1dB+1), units.FormatDB(op1))
			}
			return result(rfmath.IM3(pout, oip3), uDBm, "IM3 level")
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
