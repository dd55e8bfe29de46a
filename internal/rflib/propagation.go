package rflib

import (
	"rfledger/engine"
	"rfledger/internal/rfmath"
	"rfledger/units"
)

var uM = unit("m")
var uDB = unit("dB")

var propagation = []*engine.Func{
	{
		Name: "wavelength", Args: []engine.Arg{lin("f", units.Frequency)}, Result: "length",
		Doc: "Free-space wavelength λ = c0 / f.", Source: "ITU-R P.525 (c0 = 299 792 458 m/s, SI definition)",
		Call: func(_ *engine.Call, a []any) (units.Q, error) {
			return result(rfmath.Wavelength(q(a, 0)), uM, "wavelength")
		},
	},
	{
		Name: "fspl", Args: []engine.Arg{lin("d", units.Length), lin("f", units.Frequency)}, Result: "dB",
		Doc: "Free-space path loss between isotropic antennas, 20·log10(4π d f / c0) (Friis transmission formula).", Source: "ITU-R P.525-4, eq. (4)",
		Call: func(c *engine.Call, a []any) (units.Q, error) {
			d, f := q(a, 0), q(a, 1)
			if d < 2*rfmath.Wavelength(f) {
				c.Warn("distance %s is within two wavelengths: the far-field free-space formula does not hold", units.Lin(d, units.Length))
			}
			return result(rfmath.FSPL(d, f), uDB, "path loss")
		},
	},
}
