package rflib

import (
	"rfledger/engine"
	"rfledger/internal/rfmath"
	"rfledger/units"
)

var noise = []*engine.Func{
	{
		Name: "thermal", Args: []engine.Arg{either("b", units.Frequency), optional(either("t", units.Temperature))}, Result: "dBm",
		Doc:    "Thermal noise power k·T·B in dBm over bandwidth b at temperature t (default T0 = 290 K): −174 dBm/Hz + 10·log10(b/1 Hz) at T0.",
		Source: "IEEE Std 100 / IRE 1959 noise-figure definition (T0 = 290 K); k from the 2019 SI",
		Call: func(_ *engine.Call, a []any) (units.Q, error) {
			t := rfmath.T0
			if has(a, 1) {
				t = q(a, 1)
			}
			return result(rfmath.DBm(rfmath.Thermal(q(a, 0), t)), uDBm, "noise power")
		},
	},
}
