package rflib

import (
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var satellite = []*engine.Func{
	{
		Name: "cn0", Args: []engine.Arg{level("eirp", units.Power), ratio("loss"), {Name: "g_over_t", Dim: units.Temperature.Pow(-1), Form: engine.LevelOnly}}, Result: "dBHz",
		Doc:    "Carrier-to-noise-density ratio of a link: C/N0 = EIRP − L + G/T − 10·log10(k), 10·log10(k) = −228.60 dBW/K/Hz (the exact k of the 2019 SI, −228.599…); eirp as a power level (dBW or dBm), loss the total path and other losses in dB, G/T in dB/K.",
		Source: "satellite link equation (Maral & Bousquet, Satellite Communications Systems, link budget); k from the 2019 SI",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return result(rfmath.CN0(q(a, 0), q(a, 1), q(a, 2)), uDBHz, "C/N0")
		},
	},
}
