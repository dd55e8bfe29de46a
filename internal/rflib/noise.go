package rflib

import (
	"fmt"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var noise = []*engine.Func{
	{
		Name: "thermal", Args: []engine.Arg{either("b", units.Frequency), optional(either("t", units.Temperature))}, Result: "dBm",
		Doc:    "Thermal noise power k·T·B in dBm over bandwidth b at temperature t (default T0 = 290 K), with the exact k of the 2019 SI: at T0 that is −173.98 dBm/Hz + 10·log10(b/1 Hz) (often rounded to −174).",
		Source: "IEEE Std 100 / IRE 1959 noise-figure definition (T0 = 290 K); k from the 2019 SI",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			t := rfmath.T0
			if has(a, 1) {
				t = q(a, 1)
			}
			return result(rfmath.DBm(rfmath.Thermal(q(a, 0), t)), uDBm, "noise power")
		},
	},
	{
		Name: "nf_to_te", Args: []engine.Arg{ratio("nf")}, Result: "K",
		Doc:    "Equivalent input noise temperature of a noise figure: Te = T0·(10^(NF/10) − 1), T0 = 290 K; nf_to_te(3 dB) ≈ 289 K.",
		Source: "IEEE Std 100 / IRE 1959 noise-factor definition F = 1 + Te/T0, T0 = 290 K",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if nf := q(a, 0); nf < 0 {
				return units.Q{}, fmt.Errorf("nf: a noise figure cannot be negative (got %s)", units.DB(nf))
			}
			return result(rfmath.NFToTe(q(a, 0)), uK, "noise temperature")
		},
	},
	{
		Name: "te_to_nf", Args: []engine.Arg{either("te", units.Temperature)}, Result: "dB",
		Doc:    "Noise figure of an equivalent input noise temperature: NF = 10·log10(1 + Te/T0), T0 = 290 K; te_to_nf(290 K) = 3.01 dB.",
		Source: "IEEE Std 100 / IRE 1959 noise-factor definition F = 1 + Te/T0, T0 = 290 K",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if te := q(a, 0); te < 0 {
				return units.Q{}, fmt.Errorf("te: a noise temperature cannot be negative (got %s)", units.Lin(te, units.Temperature))
			}
			return result(rfmath.TeToNF(q(a, 0)), uDB, "noise figure")
		},
	},
	{
		Name: "sensitivity", Args: []engine.Arg{ratio("nf"), either("b", units.Frequency), ratio("snr")}, Result: "dBm",
		Doc:    "Receiver sensitivity: the input level that gives the required SNR, k·T0·B + NF + SNR with T0 = 290 K and the exact k: −173.98 dBm/Hz + 10·log10(B/1 Hz) + NF + SNR.",
		Source: "IEEE Std 100 / IRE 1959 noise-figure definition (T0 = 290 K); k from the 2019 SI",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return result(rfmath.Sensitivity(q(a, 0), q(a, 1), q(a, 2)), uDBm, "sensitivity")
		},
	},
}
