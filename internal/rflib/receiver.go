package rflib

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

func init() { extra = append(extra, receiver...) }

// phaseNoiseDim is the dimension of a phase-noise density (dBc/Hz: a ratio per hertz).
var phaseNoiseDim = units.Frequency.Pow(-1)

// receiver holds the functions for what limits a receiver beyond its noise floor: blocking
// through LO phase noise, second-order and harmonic distortion, image rejection, adjacent
// channel interference and quantisation.
var receiver = []*engine.Func{
	{
		Name: "recip_mix", Args: []engine.Arg{level("p_blocker", units.Power), anyQ("pn"), either("b", units.Frequency)}, ResultDoc: "dBm", Infer: inferPhaseNoiseDBm,
		Doc:    "Noise a blocker puts into the channel by reciprocal mixing with the LO's phase noise pn (dBc/Hz at the blocker's offset), flat across the channel of width b: P_blocker + L(Δf) + 10·log10(B/1 Hz).",
		Source: "Razavi, RF Microelectronics (2nd ed.), reciprocal mixing (ch. 8)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			pn, err := phaseNoise(a[1])
			if err != nil {
				return units.Q{}, err
			}
			warnIntegrated(c, "recip_mix", pn, q(a, 2))
			return result(rfmath.RecipMix(dbmOf(a, 0), pn, q(a, 2)), uDBm, "reciprocal-mixing noise")
		},
	},
	{
		Name: "desense", Args: []engine.Arg{level("floor", units.Power), level("added", units.Power)}, Result: "dB",
		Doc:    "Rise of a noise floor when a noise-like power is added to it: 10·log10(1 + 10^((added − floor)/10)); equal powers give 3.01 dB.",
		Source: "power addition of uncorrelated noise (common practice, no source)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return result(rfmath.Desense(dbmOf(a, 0), dbmOf(a, 1)), uDB, "desensitisation")
		},
	},
	{
		Name: "max_blocker", Args: []engine.Arg{level("floor", units.Power), anyQ("pn"), either("b", units.Frequency), ratio("allowed")}, ResultDoc: "dBm", Infer: inferPhaseNoiseDBm,
		Doc:    "Largest blocker whose reciprocal mixing raises the floor (in bandwidth b) by no more than allowed dB: floor + 10·log10(10^(allowed/10) − 1) − L(Δf) − 10·log10(B/1 Hz).",
		Source: "Razavi, RF Microelectronics (2nd ed.), reciprocal mixing (ch. 8), solved for the blocker",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			pn, err := phaseNoise(a[1])
			if err != nil {
				return units.Q{}, err
			}
			warnIntegrated(c, "max_blocker", pn, q(a, 2))
			v, err := rfmath.MaxBlocker(dbmOf(a, 0), pn, q(a, 2), q(a, 3))
			if err != nil {
				return units.Q{}, fmt.Errorf("allowed: the rise must be more than 0 dB (got %s)", units.DB(q(a, 3)))
			}
			return result(v, uDBm, "blocker level")
		},
	},
	{
		Name: "im2", Args: []engine.Arg{level("p_out", units.Power), level("oip2", units.Power)}, Result: "dBm",
		Doc:    "Output level of the two-tone second-order product (at f1 ± f2) for a per-tone output level p_out: 2·p_out − OIP2; it rises 2 dB per dB of the tones.",
		Source: "definition of the second-order intercept point (Razavi, RF Microelectronics, 2nd ed., ch. 2)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			warnNearIntercept(c, "im2", dbmOf(a, 0), dbmOf(a, 1))
			return result(rfmath.IM2(dbmOf(a, 0), dbmOf(a, 1)), uDBm, "IM2 level")
		},
	},
	{
		Name: "hd2", Args: []engine.Arg{level("p_out", units.Power), level("oip2", units.Power)}, Result: "dBm",
		Doc:    "Output level of the second harmonic of one tone at p_out: 2·p_out − OIP2 − 6.02 dB; for the same per-tone level the harmonic (a2·A²/2) is 20·log10 2 = 6.02 dB below the two-tone f1 ± f2 product (a2·A²).",
		Source: "Razavi, RF Microelectronics (2nd ed.), ch. 2: harmonics and intermodulation of y = a1·x + a2·x² + a3·x³",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			warnNearIntercept(c, "hd2", dbmOf(a, 0), dbmOf(a, 1))
			return result(rfmath.HD2(dbmOf(a, 0), dbmOf(a, 1)), uDBm, "second harmonic level")
		},
	},
	{
		Name: "hd3", Args: []engine.Arg{level("p_out", units.Power), level("oip3", units.Power)}, Result: "dBm",
		Doc:    "Output level of the third harmonic of one tone at p_out: 3·p_out − 2·OIP3 − 9.54 dB; for the same per-tone level the harmonic (a3·A³/4) is 20·log10 3 = 9.54 dB below the two-tone 2f1 − f2 product (3·a3·A³/4).",
		Source: "Razavi, RF Microelectronics (2nd ed.), ch. 2: harmonics and intermodulation of y = a1·x + a2·x² + a3·x³",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			warnNearIntercept(c, "hd3", dbmOf(a, 0), dbmOf(a, 1))
			return result(rfmath.HD3(dbmOf(a, 0), dbmOf(a, 1)), uDBm, "third harmonic level")
		},
	},
	cascadeFunc("cascade_iip2", "dBm", "Input second-order intercept of a chain, the stages' products added in phase (coherent worst case): 1/√IIP2 = Σ √(gain before stage i / IIP2ᵢ), in linear power.", "the intercept cascade of Razavi, RF Microelectronics (2nd ed., ch. 2), carried out for a second-order term",
		func(c rfmath.Cascade) (units.Q, error) {
			if !c.HasIIP2 {
				return units.Q{}, fmt.Errorf("no stage has iip2 or oip2")
			}
			return result(c.IIP2, uDBm, "IIP2")
		}),
	{
		Name: "image_reject", Args: []engine.Arg{ratio("gain_imbalance"), angleArg("phase_error")}, Result: "dB",
		Doc:    "Image rejection of a quadrature mixer from the I/Q gain imbalance (dB) and phase error (an angle with its unit, e.g. 2 deg): IRR = (1 + 2g·cos θ + g²)/(1 − 2g·cos θ + g²), g = 10^(ΔA/20).",
		Source: "Razavi, RF Microelectronics (2nd ed.), image-reject receivers (ch. 4)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			g, th := q(a, 0), q(a, 1)
			if math.Abs(th) > math.Pi/4 || math.Abs(g) > 6 {
				c.Warn("image_reject: an imbalance of %s and %.3g deg is far outside a working quadrature mixer", units.DB(g), th*180/math.Pi)
			}
			v := rfmath.ImageReject(g, th)
			if math.IsInf(v, 1) {
				return units.Q{}, fmt.Errorf("perfect balance gives unlimited rejection; give the imbalance the design is held to")
			}
			return result(v, uDB, "image rejection")
		},
	},
	{
		Name: "acir", Args: []engine.Arg{ratio("aclr"), ratio("acs")}, Result: "dB",
		Doc:    "Adjacent-channel interference ratio from the transmitter's leakage ratio and the receiver's selectivity: ACIR = 1/(1/ACLR + 1/ACS) in linear ratios.",
		Source: "3GPP TR 36.942 (E-UTRA RF system scenarios), definition of ACIR",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			if q(a, 0) < 0 || q(a, 1) < 0 {
				c.Warn("acir: ACLR and ACS are normally positive dB (the adjacent channel below the wanted one)")
			}
			return result(rfmath.ACIR(q(a, 0), q(a, 1)), uDB, "ACIR")
		},
	},
	{
		Name: "adc_snr", Args: []engine.Arg{lin("bits", units.None), either("fs", units.Frequency), either("b", units.Frequency), optional(ratio("backoff"))}, Result: "dB",
		Doc:    "Quantisation-limited SNR of an ideal converter in band b: 6.02·N + 1.76 dB for a full-scale sine, plus the processing gain 10·log10(fs/2B), less the back-off from full scale (default 0 dB). Clock jitter and thermal noise are not included.",
		Source: "Bennett (1948), Spectra of quantized signals, Bell System Technical Journal 27: noise q²/12 spread over fs/2",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			bits, fs, b := q(a, 0), q(a, 1), q(a, 2)
			if !(bits > 0) || !(fs > 0) || !(b > 0) {
				return units.Q{}, fmt.Errorf("bits, fs and b must be positive")
			}
			back := 0.0
			if has(a, 3) {
				back = q(a, 3)
			}
			switch {
			case bits > 24:
				c.Warn("adc_snr: %g bits is beyond any converter's real resolution; thermal noise and jitter set the SNR", bits)
			case fs < 2*b:
				c.Warn("adc_snr: fs below 2·b: the band does not fit in one Nyquist zone of a real-sampling converter")
			case back < 0:
				c.Warn("adc_snr: a negative back-off drives the converter past full scale, where it clips")
			}
			return result(rfmath.ADCSNR(bits, fs, b, back), uDB, "ADC SNR")
		},
	},
}

// inferPhaseNoiseDBm checks the phase-noise argument's unit when the sheet loads; the
// result is a power level in dBm.
func inferPhaseNoiseDBm(a []engine.Value) (units.Q, error) {
	if _, err := phaseNoise(a[1]); err != nil {
		return units.Q{}, err
	}
	return units.DBm(0), nil
}

// phaseNoise reads a phase-noise argument: a level per hertz relative to the carrier (dBc/Hz).
func phaseNoise(v engine.Value) (float64, error) {
	if v.Q.K != units.Level || v.Q.D != phaseNoiseDim {
		return 0, fmt.Errorf("pn: got %s, want phase noise in dBc/Hz", nameOf(v.Q))
	}
	return v.Q.V, nil
}

// warnIntegrated warns when the phase noise integrated over the channel is no longer small
// against the carrier, where the flat, small-angle model stops holding (common practice, no
// source).
func warnIntegrated(c *engine.Call, fn string, pn, b float64) {
	if pn+rfmath.DB(b) > -10 {
		c.Warn("%s: the phase noise integrated over the channel (%.1f dBc) is not small against the carrier; the model assumes it is", fn, pn+rfmath.DB(b))
	}
}

// warnNearIntercept warns when a tone is within 10 dB of its intercept, where the power-series
// model that defines the intercept no longer holds (common practice, no source).
func warnNearIntercept(c *engine.Call, fn string, p, ip float64) {
	if p > ip-10 {
		c.Warn("%s: p_out is within 10 dB of the intercept, near compression; the intercept model overstates the accuracy there", fn)
	}
}
