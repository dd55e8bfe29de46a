// Package rfmath is the RF formula library behind the link-budget
// evaluator: plain float64 functions for propagation loss, receiver noise,
// cascaded stages, modulation error rates, antennas, matching and satellite
// carrier-to-noise density.
//
// Every argument and result is in SI base units (Hz, m, s, W, K) unless the
// quantity is conventionally expressed in decibels, in which case the doc
// comment says so (dB, dBm, dBi, dB-Hz, dBW). Ratios documented as "linear"
// are plain power ratios, not decibels.
//
// Each function names the published source of its formula. Empirical models
// with a stated range of validity (Okumura–Hata, COST 231–Hata, ITU-R
// P.838-3) still return a value outside that range but also return
// human-readable notes saying which input is out of range. Errors are reserved
// for impossible input (logarithm of zero or a negative number, unknown
// environment, polarisation or modulation names). Functions without an error
// result return NaN for impossible input and never panic.
//
// The package has no unit types; a higher layer binds these functions to
// unit-checked quantities.
package rfmath
