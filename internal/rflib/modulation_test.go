package rflib_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// qf is the Gaussian Q-function taken from gonum's standard normal survival function, a
// route independent of the library's erfc.
func qf(x float64) float64 { return distuv.UnitNormal.Survival(x) }

// berRef is the textbook AWGN bit error rate (Proakis & Salehi; Sklar) at linear Eb/N0 g.
func berRef(scheme string, g float64) float64 {
	qam := func(m float64) float64 {
		k := math.Log2(m)
		p := 2 * (1 - 1/math.Sqrt(m)) * qf(math.Sqrt(3*k*g/(m-1)))
		return (1 - (1-p)*(1-p)) / k
	}
	switch scheme {
	case "bpsk", "qpsk":
		return qf(math.Sqrt(2 * g))
	case "dbpsk":
		return math.Exp(-g) / 2
	case "8psk":
		return 2 * qf(math.Sqrt(6*g)*math.Sin(math.Pi/8)) / 3
	case "16qam":
		return qam(16)
	case "64qam":
		return qam(64)
	case "fsk", "ook":
		return qf(math.Sqrt(g))
	case "fsk-nc", "ook-nc":
		return math.Exp(-g/2) / 2
	}
	panic(scheme)
}

var schemes = []string{"bpsk", "qpsk", "dbpsk", "8psk", "16qam", "64qam", "fsk", "fsk-nc", "ook", "ook-nc"}

func TestBERReferences(t *testing.T) {
	var refs []ref
	// Each scheme at three Eb/N0 values against the textbook expression with gonum's Q (30 checks);
	// compared on log10 of the BER so tiny rates are checked to the same relative precision.
	for _, s := range schemes {
		for _, e := range []float64{4, 8, 12} {
			refs = append(refs, ref{fmt.Sprintf("log10(ber('%s', %g dB))", s, e), "", math.Log10(berRef(s, math.Pow(10, e/10))), 1e-6,
				"Proakis & Salehi / Sklar AWGN expression, Q from gonum distuv.UnitNormal.Survival"})
		}
	}
	refs = append(refs,
		// Values from memory: BPSK needs 9.59 dB for 1e-5 and about 10.5 dB for 1e-6.
		ref{"ebn0_for('bpsk', 1e-5)", "dB", 9.59, 0.01, "BPSK 9.59 dB at 1e-5 (value from memory)"},
		ref{"ebn0_for('qpsk', 1e-5)", "dB", 9.59, 0.01, "QPSK equals BPSK per bit (value from memory)"},
		ref{"ebn0_for('bpsk', 1e-6)", "dB", 10.53, 0.02, "BPSK 10.5 dB at 1e-6 (value from memory)"},
		ref{"ebn0_for('16qam', 1e-5)", "dB", 13.4, 0.15, "16-QAM about 13.4 dB at 1e-5 (value from memory)"},
		// Closed-form inverses of the exponential expressions (Proakis & Salehi; Sklar).
		ref{"ebn0_for('dbpsk', 1e-5)", "dB", db10(math.Log(0.5 / 1e-5)), 0.001, "DBPSK ½ e^(−γ) inverted: γ = ln(1/(2 Pb))"},
		ref{"ebn0_for('fsk-nc', 1e-4)", "dB", db10(2 * math.Log(0.5/1e-4)), 0.001, "non-coherent FSK ½ e^(−γ/2) inverted"},
		ref{"ebn0_for('ook-nc', 1e-3)", "dB", db10(2 * math.Log(0.5/1e-3)), 0.001, "non-coherent OOK ½ e^(−γ/2) inverted"},
		// Coherent FSK and OOK are 3 dB worse than BPSK (Sklar, orthogonal vs antipodal signals).
		ref{"ebn0_for('fsk', 1e-5) - ebn0_for('bpsk', 1e-5)", "dB", db10(2), 0.001, "orthogonal signalling costs 3 dB (Sklar)"},
		ref{"ber('bpsk', 0 dB)", "", qf(math.Sqrt(2)), 1e-12, "BPSK at Eb/N0 = 1, gonum Q"},
	)
	runRefs(t, "", refs)
}

// TestEbN0ForInvertsBER checks through the engine that ebn0_for(s, ber(s, E)) gives E back
// within 0.01 dB for every scheme at several Eb/N0 values.
func TestEbN0ForInvertsBER(t *testing.T) {
	var refs []ref
	for _, s := range schemes {
		for _, e := range []float64{3, 7, 11, 15} {
			refs = append(refs, ref{fmt.Sprintf("ebn0_for('%s', ber('%s', %g dB))", s, s, e), "dB", e, 0.01, "inverse of ber"})
		}
	}
	runRefs(t, "", refs)
}

func TestRateReferences(t *testing.T) {
	refs := []ref{
		// ebn0/snr: S/N = (Eb/N0)(R/W) (Sklar, ch. 3), computed here in linear terms.
		{"snr(10 dB, 38.4 kbit/s, 100 kHz)", "dB", db10(10 * 38400 / 1e5), 1e-9, "Sklar: S/N = (Eb/N0)(R/W)"},
		{"ebn0(5 dB, 1 Mbit/s, 2 MHz)", "dB", db10(math.Pow(10, 0.5) * 2), 1e-9, "Sklar: Eb/N0 = (S/N)(W/R)"},
		{"ebn0(snr(7.3 dB, 250 kbit/s, 500 kHz), 250 kbit/s, 500 kHz)", "dB", 7.3, 1e-9, "ebn0 and snr invert each other"},
		{"snr(0 dB, 1 MHz, 1 MHz)", "dB", 0, 1e-12, "Sklar: R = W gives S/N = Eb/N0"},
		{"ebn0(10 dB, 10 kbit/s, 40 dBHz)", "dB", 10, 1e-9, "Sklar; bandwidth given in dBHz"},
		// shannon: C = B log2(1 + S/N) (Shannon 1948), computed with log2.
		{"shannon(1 MHz, 0 dB)", "bit/s", 1e6, 1e-6, "Shannon 1948: log2 2 = 1"},
		{"shannon(1 MHz, 30 dB)", "Mbit/s", math.Log2(1001), 1e-9, "Shannon 1948"},
		{"shannon(1 MHz, 1000)", "Mbit/s", math.Log2(1001), 1e-9, "Shannon 1948, linear SNR"},
		{"shannon(20 MHz, 15)", "Mbit/s", 20 * 4, 1e-9, "Shannon 1948: log2 16 = 4"},
		// Shannon limit: as the spectral efficiency goes to 0, Eb/N0 → ln 2 = −1.59 dB.
		{"ebn0(db(s), shannon(1 MHz, s), 1 MHz)", "dB", db10(math.Ln2), 0.001, "Shannon limit −1.59 dB = 10 log10(ln 2)"},
		// per: 1 − (1 − ber)^bits (binomial; common practice, no source).
		{"per(1e-5, 1000)", "", 1 - math.Pow(1-1e-5, 1000), 1e-12, "common practice, no source: 1 − (1 − p)^n"},
		{"per(0.5, 1)", "", 0.5, 1e-12, "common practice, no source"},
		{"per(1e-4, 8 * 32)", "", 1 - math.Pow(1-1e-4, 256), 1e-12, "common practice, no source: a 32-byte packet"},
		{"per(ber('bpsk', 9.59 dB), 100 bit)", "", 1e-3, 2e-5, "BPSK 9.59 dB ≈ 1e-5 (value from memory), 100 bits ≈ 1e-3"},
		{"per(0, 1000)", "", 0, 0, "common practice, no source"},
		// symbol_rate and net_rate: definitions (common practice, no source).
		{"symbol_rate(1 Mbit/s, 2)", "kBd", 500, 1e-9, "common practice, no source: QPSK 2 bits per symbol"},
		{"symbol_rate(100 Mbit/s, 6)", "Bd", 1e8 / 6, 1e-6, "common practice, no source: 64-QAM"},
		{"net_rate(1 Mbit/s, 0.5, 10 %)", "kbit/s", 450, 1e-9, "common practice, no source"},
		{"net_rate(250 kbit/s, 3/4, 0)", "kbit/s", 187.5, 1e-9, "common practice, no source"},
		{"net_rate(10 Mbit/s, 1, 0.2)", "Mbit/s", 8, 1e-9, "common practice, no source"},
	}
	runRefs(t, "s = 1e-6", refs)
}

func TestModulationErrors(t *testing.T) {
	cases := []struct{ formula, want string }{
		{"ber('qam', 10 dB)", `ber: unknown modulation scheme "qam" (valid: bpsk, qpsk, dbpsk, 8psk, 16qam, 64qam, fsk, fsk-nc, ook, ook-nc)`},
		{"ebn0_for('gmsk', 1e-5)", `ebn0_for: unknown modulation scheme "gmsk" (valid: bpsk, qpsk, dbpsk, 8psk, 16qam, 64qam, fsk, fsk-nc, ook, ook-nc)`},
		{"ber('bpsk', 9.6)", "ber: ebn0: got a plain number, want a ratio in dB"},
		{"ebn0_for('bpsk', 0.7)", "ebn0_for: target bit error rate must lie strictly between 0 and 0.5"},
		{"ebn0_for('bpsk', 1e-5 dB)", "ebn0_for: ber: got dB, want a plain number"},
		{"snr(10 dB, 1 MHz, 1 km)", "snr: b: got m, want a frequency"},
		{"ebn0(10 dB, 0 bit/s, 1 MHz)", "ebn0: rate: must be positive"},
		{"shannon(1 km, 10 dB)", "shannon: b: got m, want a frequency"},
		{"per(2, 100)", "per: ber: a probability must lie between 0 and 1"},
		{"symbol_rate(1 Mbit/s, 0)", "symbol_rate: bits_per_symbol: must be positive"},
		{"net_rate(1 Mbit/s, 1.5, 0)", "net_rate: code_rate: must lie above 0 and at most 1"},
		{"net_rate(1 Mbit/s, 0.5, 100 %)", "net_rate: overhead: must lie from 0 up to below 1"},
		{"net_rate(1 km, 0.5, 0)", "net_rate: gross: got m, want a frequency"},
	}
	for _, c := range cases {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
	}
	// A scheme written without quotes is caught when the sheet is loaded.
	_, diags := load(t, "x = \"= ber(bpsk, 10 dB)\"\n")
	if !strings.Contains(diags.Error(), "ber: scheme: got a quantity, want a name") {
		t.Errorf("unquoted scheme: %v", diags)
	}
}
