package rfmath

import (
	"fmt"
	"math"
)

var schemeNames = []string{"bpsk", "qpsk", "dbpsk", "8psk", "16qam", "64qam", "fsk", "fsk-nc", "ook", "ook-nc"}

// Schemes returns the modulation names accepted by BER and EbN0For, in a
// fresh slice: "bpsk", "qpsk", "dbpsk", "8psk", "16qam", "64qam", "fsk",
// "fsk-nc", "ook", "ook-nc".
func Schemes() []string {
	return append([]string(nil), schemeNames...)
}

// Q returns the Gaussian tail probability Q(x) = P(N(0,1) > x)
// = ½ erfc(x/√2) (Proakis, Digital Communications; Sklar, Digital
// Communications).
func Q(x float64) float64 {
	return 0.5 * math.Erfc(x/math.Sqrt2)
}

// qamBER is the bit error rate of square M-QAM with Gray coding.
func qamBER(m, ebn0 float64) float64 {
	k := math.Log2(m)
	es := k * ebn0
	p := 2 * (1 - 1/math.Sqrt(m)) * Q(math.Sqrt(3*es/(m-1)))
	ps := p * (2 - p) // 1 − (1 − p)², without cancellation at tiny p
	return ps / k
}

// BER returns the bit error probability of a modulation scheme on the
// additive white Gaussian noise channel for a LINEAR Eb/N0 ratio ebn0
// (Gray coding; for M-ary schemes the bit error rate is taken as the symbol
// error rate divided by log2 M). Sources: Proakis, Digital Communications,
// and Sklar, Digital Communications, standard AWGN expressions, with
// Q(x) = ½ erfc(x/√2):
//
//	bpsk, qpsk  Q(√(2 Eb/N0))
//	dbpsk       ½ exp(−Eb/N0)
//	8psk        Ps ≈ 2 Q(√(2 Es/N0) sin(π/8)), Es = 3 Eb, Pb = Ps/3
//	16qam,64qam P√M = 2(1 − 1/√M) Q(√(3 Es/((M−1) N0))), Ps = 1 − (1 − P√M)²,
//	            Es = log2 M · Eb, Pb = Ps/log2 M
//	fsk         coherent orthogonal binary FSK: Q(√(Eb/N0))
//	fsk-nc      non-coherent binary FSK: ½ exp(−Eb/(2 N0))
//	ook         coherent on-off keying, Eb = average energy per bit: Q(√(Eb/N0))
//	ook-nc      non-coherent (envelope) on-off keying: ½ exp(−Eb/(2 N0)),
//	            the high-SNR approximation with the optimum threshold
//
// An error is returned for an unknown scheme (listing the valid names) or for
// a negative or NaN ebn0. ebn0 = +Inf gives 0.
func BER(scheme string, ebn0 float64) (float64, error) {
	if !validScheme(scheme) {
		return math.NaN(), nameError("modulation scheme", scheme, schemeNames)
	}
	if math.IsNaN(ebn0) || ebn0 < 0 {
		return math.NaN(), fmt.Errorf("rfmath: Eb/N0 must be a non-negative linear ratio (got %s)", num(ebn0))
	}
	return berOf(scheme, ebn0), nil
}

func validScheme(s string) bool {
	for _, n := range schemeNames {
		if n == s {
			return true
		}
	}
	return false
}

// berOf evaluates the expressions documented on BER for a known scheme.
func berOf(scheme string, g float64) float64 {
	switch scheme {
	case "bpsk", "qpsk":
		return Q(math.Sqrt(2 * g))
	case "dbpsk":
		return 0.5 * math.Exp(-g)
	case "8psk":
		return 2 * Q(math.Sqrt(2*3*g)*math.Sin(math.Pi/8)) / 3
	case "16qam":
		return qamBER(16, g)
	case "64qam":
		return qamBER(64, g)
	case "fsk", "ook":
		return Q(math.Sqrt(g))
	case "fsk-nc", "ook-nc":
		return 0.5 * math.Exp(-g/2)
	}
	return math.NaN()
}

// Search bracket of EbN0For, dB.
const (
	ebn0LoDB = -100.0
	ebn0HiDB = 60.0
)

// EbN0For returns the Eb/N0 in dB at which BER(scheme, ·) equals ber: the
// numeric inverse of BER, found by bisection on the dB value over
// [−100, 60] dB comparing log BER, to well under 0.001 dB. An error is
// returned for an unknown scheme (listing the valid names), for ber outside
// (0, 0.5), or for a ber above the largest value the scheme's expression
// reaches as Eb/N0 → 0 (for example 1/3 for 8psk).
func EbN0For(scheme string, ber float64) (float64, error) {
	if !validScheme(scheme) {
		return math.NaN(), nameError("modulation scheme", scheme, schemeNames)
	}
	if !(ber > 0 && ber < 0.5) {
		return math.NaN(), fmt.Errorf("rfmath: target bit error rate must lie strictly between 0 and 0.5 (got %s)", num(ber))
	}
	f := func(db float64) float64 {
		return math.Log(berAt(scheme, db)) - math.Log(ber)
	}
	lo, hi := ebn0LoDB, ebn0HiDB
	if f(lo) <= 0 {
		return math.NaN(), fmt.Errorf("rfmath: bit error rate %s is not reached by %s (its expression gives at most %s as Eb/N0 → 0)",
			num(ber), scheme, num(berOf(scheme, 0)))
	}
	for hi-lo > 1e-10 {
		mid := 0.5 * (lo + hi)
		if f(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi), nil
}

func berAt(scheme string, db float64) float64 { return berOf(scheme, FromDB(db)) }

// EbN0 converts a signal-to-noise ratio in dB, measured in noise bandwidth b
// (Hz), to Eb/N0 in dB for bit rate rate (bit/s):
//
//	Eb/N0 = SNR + 10 log10(B/R)
//
// Source: Sklar, Digital Communications (S/N = (Eb/N0)(R/W)). NaN unless
// rate > 0 and b > 0.
func EbN0(snrDB, rate, b float64) float64 {
	if !positive(rate, b) {
		return math.NaN()
	}
	return snrDB + 10*math.Log10(b/rate)
}

// SNR converts Eb/N0 in dB to the signal-to-noise ratio in dB in noise
// bandwidth b (Hz) at bit rate rate (bit/s):
//
//	SNR = Eb/N0 + 10 log10(R/B)
//
// Source: Sklar, Digital Communications. NaN unless rate > 0 and b > 0.
func SNR(ebn0DB, rate, b float64) float64 {
	if !positive(rate, b) {
		return math.NaN()
	}
	return ebn0DB + 10*math.Log10(rate/b)
}

// Shannon returns the capacity in bit/s of an AWGN channel of bandwidth b
// (Hz) at LINEAR signal-to-noise ratio snr:
//
//	C = B log2(1 + S/N)
//
// Source: C. E. Shannon, "A mathematical theory of communication" (1948).
// NaN for negative or NaN b or snr.
func Shannon(b, snr float64) float64 {
	if math.IsNaN(b) || math.IsNaN(snr) || b < 0 || snr < 0 {
		return math.NaN()
	}
	return b * math.Log1p(snr) / math.Ln2
}

// PER returns the probability that a packet of bits bits contains at least
// one error for independent bit errors of probability ber:
//
//	PER = 1 − (1 − ber)^bits
//
// computed as −expm1(bits · log1p(−ber)) to stay accurate at tiny ber
// (binomial probability, common practice). NaN for ber outside [0, 1] or
// negative bits.
func PER(ber float64, bits float64) float64 {
	if !(ber >= 0 && ber <= 1) || !(bits >= 0) {
		return math.NaN()
	}
	if ber == 1 {
		if bits == 0 {
			return 0
		}
		return 1
	}
	return -math.Expm1(bits * math.Log1p(-ber))
}

// SymbolRate returns the symbol rate in symbol/s (baud) for a bit rate rate
// (bit/s) and bitsPerSymbol bits per symbol: Rs = R / bits (definition).
// NaN unless bitsPerSymbol > 0.
func SymbolRate(rate, bitsPerSymbol float64) float64 {
	if !positive(bitsPerSymbol) {
		return math.NaN()
	}
	return rate / bitsPerSymbol
}

// NetRate returns the information bit rate in bit/s left from a gross rate
// (bit/s) after forward error correction of rate codeRate (0..1) and a
// framing overhead fraction overhead (0..1):
//
//	Rnet = Rgross × codeRate × (1 − overhead)
//
// (definition of code rate). NaN for negative gross, or codeRate or overhead
// outside [0, 1].
func NetRate(gross, codeRate, overhead float64) float64 {
	if !(gross >= 0) || !(codeRate >= 0 && codeRate <= 1) || !(overhead >= 0 && overhead <= 1) {
		return math.NaN()
	}
	return gross * codeRate * (1 - overhead)
}
