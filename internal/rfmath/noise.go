package rfmath

import "math"

// Thermal returns the available thermal noise power k T B in W for a
// bandwidth b (Hz) and noise temperature t (K). Source: Nyquist (1928),
// thermal noise of a resistor; KB exact (SI 2019). It returns NaN for
// negative or NaN b or t.
func Thermal(b, t float64) float64 {
	if math.IsNaN(b) || math.IsNaN(t) || b < 0 || t < 0 {
		return math.NaN()
	}
	return KB * t * b
}

// NFToTe converts a noise figure in dB to the equivalent input noise
// temperature in K:
//
//	Te = T0 (10^(NF/10) − 1),  T0 = 290 K
//
// Source: IEEE definition of noise factor, F = 1 + Te/T0. A negative NF gives
// a negative Te (unphysical but returned as computed).
func NFToTe(nfDB float64) float64 {
	return T0 * (FromDB(nfDB) - 1)
}

// TeToNF converts an equivalent input noise temperature in K to a noise
// figure in dB:
//
//	NF = 10 log10(1 + Te/T0),  T0 = 290 K
//
// Source: IEEE definition of noise factor. It returns NaN for te < 0.
func TeToNF(te float64) float64 {
	if math.IsNaN(te) || te < 0 {
		return math.NaN()
	}
	return 10 * math.Log10(1+te/T0)
}

// Sensitivity returns the receiver sensitivity in dBm: the input power at
// which a receiver with noise figure nfDB (dB) and noise bandwidth b (Hz)
// reaches the signal-to-noise ratio snrDB (dB):
//
//	S = 10 log10(k T0 B / 1 mW) + NF + SNR
//
// (−173.98 dBm/Hz with the exact k, often rounded to −174, + 10 log10 B + NF + SNR). Source: IEEE noise-figure definition
// with T0 = 290 K. It returns NaN unless b > 0.
func Sensitivity(nfDB, b, snrDB float64) float64 {
	if !positive(b) {
		return math.NaN()
	}
	return DBm(KB*T0*b) + nfDB + snrDB
}
