package rfmath

import (
	"errors"
	"math"
)

// Receiver impairments beyond the noise floor: reciprocal mixing, desensitisation,
// second-order and harmonic distortion, quadrature image rejection, adjacent-channel
// interference and quantisation noise. Levels are in dBm, ratios in dB, bandwidths in Hz.

// RecipMix returns the noise (dBm) that a blocker at pBlocker (dBm) puts into a channel of
// width b (Hz) by mixing with the LO's phase noise pn (dBc/Hz at the blocker's offset from
// the LO), taking the phase noise as flat across the channel:
//
//	P_n = P_blocker + L(Δf) + 10·log10(B)
//
// Source: Razavi, RF Microelectronics (2nd ed.), reciprocal mixing (ch. 8).
func RecipMix(pBlocker, pn, b float64) float64 {
	return pBlocker + pn + DB(b)
}

// Desense returns the rise (dB) of a noise floor at floor (dBm) when a noise-like power
// added (dBm) is summed with it in power:
//
//	ΔN = 10·log10(1 + 10^((added − floor)/10))
//
// Source: power addition of uncorrelated noise (common practice, no source).
func Desense(floor, added float64) float64 {
	return 10 * math.Log10(1+FromDB(added-floor))
}

// MaxBlocker returns the blocker level (dBm) whose reciprocal mixing raises a floor (dBm in
// bandwidth b) by allowed dB: the added noise may be floor + 10·log10(10^(allowed/10) − 1),
// and the blocker is that less L(Δf) + 10·log10(B). allowed must be positive.
func MaxBlocker(floor, pn, b, allowed float64) (float64, error) {
	if !(allowed > 0) {
		return math.NaN(), errors.New("rfmath: the allowed rise must be more than 0 dB")
	}
	added := floor + DB(math.Expm1(allowed*math.Ln10/10))
	return added - pn - DB(b), nil
}

// IM2 returns the output level (dBm) of each two-tone second-order intermodulation product
// (at f1 ± f2) for a per-tone output level pOut and output intercept oip2, both dBm:
//
//	P_IM2 = 2·P_out − OIP2
//
// Source: definition of the second-order intercept point (Razavi, RF Microelectronics,
// 2nd ed., ch. 2: the products rise 2 dB per dB of the tones and meet them at IP2).
func IM2(pOut, oip2 float64) float64 { return 2*pOut - oip2 }

// HD2Offset and HD3Offset are how far a single tone's harmonic lies below the two-tone
// product of the same order at the same per-tone level. For y = a1·x + a2·x² + a3·x³ and
// tones of amplitude A: the second harmonic is a2·A²/2 and the f1 ± f2 product a2·A², a
// factor 2 (20·log10 2 = 6.02 dB); the third harmonic is a3·A³/4 and the 2f1 − f2 product
// 3·a3·A³/4, a factor 3 (20·log10 3 = 9.54 dB). Source: Razavi, RF Microelectronics
// (2nd ed.), ch. 2, harmonic distortion and intermodulation of a memoryless nonlinearity.
var (
	HD2Offset = 20 * math.Log10(2)
	HD3Offset = 20 * math.Log10(3)
)

// HD2 returns the output level (dBm) of the second harmonic of one tone at pOut (dBm) for an
// output intercept oip2 (dBm, two-tone definition): 2·P_out − OIP2 − 6.02 dB.
func HD2(pOut, oip2 float64) float64 { return IM2(pOut, oip2) - HD2Offset }

// HD3 returns the output level (dBm) of the third harmonic of one tone at pOut (dBm) for an
// output intercept oip3 (dBm, two-tone definition): 3·P_out − 2·OIP3 − 9.54 dB.
func HD3(pOut, oip3 float64) float64 { return IM3(pOut, oip3) - HD3Offset }

// ImageReject returns the image rejection ratio (dB) of a quadrature (Hartley-type) mixer
// whose I and Q paths differ in gain by gainDB (dB) and in phase by phase (rad):
//
//	IRR = (1 + 2g·cos θ + g²) / (1 − 2g·cos θ + g²),  g = 10^(ΔA/20)
//
// Perfect balance gives an infinite ratio, returned as +Inf.
// Source: Razavi, RF Microelectronics (2nd ed.), image-reject receivers (ch. 4).
func ImageReject(gainDB, phase float64) float64 {
	g := math.Pow(10, gainDB/20)
	c := 2 * g * math.Cos(phase)
	den := 1 - c + g*g
	if den <= 0 {
		return math.Inf(1)
	}
	return DB((1 + c + g*g) / den)
}

// ACIR returns the adjacent-channel interference ratio (dB) from the transmitter's
// adjacent-channel leakage ratio and the receiver's adjacent-channel selectivity (both dB):
//
//	ACIR = 1 / (1/ACLR + 1/ACS)   (linear ratios)
//
// Source: 3GPP TR 36.942 (E-UTRA RF system scenarios), definition of ACIR.
func ACIR(aclr, acs float64) float64 {
	return -DB(FromDB(-aclr) + FromDB(-acs))
}

// ADCSNR returns the quantisation-limited SNR (dB) of an ideal N-bit converter sampling at fs
// (Hz), for a full-scale sine less backoff (dB), in a band b (Hz):
//
//	SNR = 6.02·N + 1.76 dB + 10·log10(fs / 2B) − backoff
//
// The quantisation noise q²/12 spreads evenly over 0…fs/2 (Bennett, "Spectra of quantized
// signals", Bell System Technical Journal 27, 1948); a full-scale sine has power
// (2^N·q)²/8, whence 10·log10(1.5·4^N) = 6.02·N + 1.76 dB.
func ADCSNR(bits, fs, b, backoff float64) float64 {
	return 20*math.Log10(2)*bits + DB(1.5) + DB(fs/(2*b)) - backoff
}
