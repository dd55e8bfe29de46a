// Package units is rfledger's quantity type and unit algebra.
//
// A [Q] is a number with a dimension (exponents of m, kg, s, A, K) and a kind: a linear value
// in SI base units, a decibel level (the log of a linear value of that dimension, referred to
// one SI unit: 14 dBm is −16 dB re 1 W), or a decibel rate (dB per metre). The decibel rules
// follow from that: adding levels multiplies what they stand for, so dBm + dB is dBm,
// dBm − dBm is dB, dBm/Hz + dBHz is dBm, and dBm + dBm is an error (two powers multiplied;
// psum adds powers). Root-power dimensions (voltage, field strength) use 20·log10.
//
// [Parse] reads "14 dBm", "-174 dBm/Hz", "0.3 dB/m", "2.4 km", "38.4 kbit/s"; [ParseUnit]
// reads a unit alone. [Add], [Sub], [Mul], [Div], [Pow], [Neg] and [Compare] apply the rules
// and return an [*Error] whose Hint says what to write instead. Formatting writes decibels
// with 2 decimals and linear values in engineering notation with 4 significant digits.
//
// The package imports nothing else of rfledger's.
package units
