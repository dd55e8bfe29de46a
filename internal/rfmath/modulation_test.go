package rfmath

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// Independent Gaussian tail and its inverse from gonum's standard normal.
var unit = distuv.Normal{Mu: 0, Sigma: 1}

func qG(x float64) float64    { return unit.Survival(x) }
func qInvG(p float64) float64 { return -unit.Quantile(p) }

// berTextbook is the textbook AWGN bit error expression of each scheme
// (Proakis; Sklar), written independently of the package using qG.
func berTextbook(scheme string, g float64) float64 {
	switch scheme {
	case "bpsk", "qpsk":
		return qG(math.Sqrt(2 * g))
	case "dbpsk":
		return math.Exp(-g) / 2
	case "8psk":
		return 2 * qG(math.Sqrt(6*g)*math.Sin(math.Pi/8)) / 3
	case "16qam", "64qam":
		m := 16.0
		if scheme == "64qam" {
			m = 64
		}
		k := math.Log2(m)
		p := 2 * (1 - 1/math.Sqrt(m)) * qG(math.Sqrt(3*k*g/(m-1)))
		return (1 - (1-p)*(1-p)) / k
	case "fsk", "ook":
		return qG(math.Sqrt(g))
	case "fsk-nc", "ook-nc":
		return math.Exp(-g/2) / 2
	}
	return math.NaN()
}

// ebn0Closed inverts berTextbook in closed form (dB) with gonum's normal
// quantile.
func ebn0Closed(scheme string, pb float64) float64 {
	switch scheme {
	case "bpsk", "qpsk":
		x := qInvG(pb)
		return db(x * x / 2)
	case "dbpsk":
		return db(-math.Log(2 * pb))
	case "8psk":
		x := qInvG(1.5 * pb)
		s := math.Sin(math.Pi / 8)
		return db(x * x / (6 * s * s))
	case "16qam", "64qam":
		m := 16.0
		if scheme == "64qam" {
			m = 64
		}
		k := math.Log2(m)
		p := 1 - math.Sqrt(1-k*pb)
		x := qInvG(p / (2 * (1 - 1/math.Sqrt(m))))
		return db(x * x * (m - 1) / (3 * k))
	case "fsk", "ook":
		x := qInvG(pb)
		return db(x * x)
	case "fsk-nc", "ook-nc":
		return db(-2 * math.Log(2*pb))
	}
	return math.NaN()
}

func TestBERAgainstTextbook(t *testing.T) {
	var refs []ref
	for _, s := range Schemes() {
		for _, ebn0dB := range []float64{0, 4, 8, 12} {
			g := FromDB(ebn0dB)
			got, err := BER(s, g)
			if err != nil {
				t.Fatal(err)
			}
			// Proakis / Sklar AWGN expression, Q from gonum distuv (4 levels × 10 schemes = 40 checks)
			refs = append(refs, ref{s + " @" + num(ebn0dB) + " dB", got, berTextbook(s, g), 1e-6, true})
		}
	}
	checkRefs(t, refs)
}

func TestEbN0ForClosedForm(t *testing.T) {
	var refs []ref
	for _, s := range Schemes() {
		for _, pb := range []float64{1e-3, 1e-6, 1e-9} {
			got, err := EbN0For(s, pb)
			if err != nil {
				t.Fatal(err)
			}
			// closed-form inverse of the Proakis / Sklar expression via gonum's normal quantile (3 × 10 = 30 checks)
			refs = append(refs, ref{s + " @" + num(pb), got, ebn0Closed(s, pb), 0.001, false})
		}
	}
	checkRefs(t, refs)
}

func TestEbN0ForRoundTrip(t *testing.T) {
	var refs []ref
	for _, s := range Schemes() {
		for _, pb := range []float64{1e-2, 1e-5} {
			x, err := EbN0For(s, pb)
			if err != nil {
				t.Fatal(err)
			}
			back, _ := BER(s, FromDB(x))
			// round trip through the textbook expression (Proakis / Sklar), in dB
			refs = append(refs, ref{s + " round trip @" + num(pb), ebn0Closed(s, back), x, 0.01, false})
		}
	}
	checkRefs(t, refs)
}

func TestBERTableRefs(t *testing.T) {
	e := func(s string, pb float64) float64 {
		v, err := EbN0For(s, pb)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	b := func(s string, dB float64) float64 {
		v, err := BER(s, FromDB(dB))
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	checkRefs(t, []ref{
		{"BPSK 1e-5", e("bpsk", 1e-5), 9.59, 0.01, false},                                         // value from memory: classic BPSK table, 9.59 dB for 1e-5
		{"BPSK 1e-3", e("bpsk", 1e-3), 6.79, 0.01, false},                                         // value from memory: classic BPSK table, 6.79 dB for 1e-3
		{"BPSK 1e-6", e("bpsk", 1e-6), 10.53, 0.01, false},                                        // value from memory: classic BPSK table, 10.5 dB for 1e-6
		{"BPSK 1e-4", e("bpsk", 1e-4), 8.40, 0.01, false},                                         // value from memory: classic BPSK table, 8.4 dB for 1e-4
		{"QPSK = BPSK per bit", e("qpsk", 1e-5), e("bpsk", 1e-5), 1e-9, false},                    // Proakis: Gray-coded QPSK has the BPSK bit error rate
		{"coherent FSK 3 dB worse", e("fsk", 1e-5) - e("bpsk", 1e-5), 3.01, 0.01, false},          // Sklar: orthogonal signalling needs twice the Eb/N0 of antipodal
		{"OOK = FSK (average Eb)", e("ook", 1e-4), e("fsk", 1e-4), 1e-9, false},                   // Sklar: coherent OOK and orthogonal FSK share Q(√(Eb/N0))
		{"DBPSK 1e-5 closed form", e("dbpsk", 1e-5), db(math.Log(0.5 / 1e-5)), 0.001, false},      // Proakis: ½ exp(−Eb/N0) inverted by hand
		{"NC-FSK 1e-5 closed form", e("fsk-nc", 1e-5), db(2 * math.Log(0.5/1e-5)), 0.001, false},  // Proakis: ½ exp(−Eb/2N0) inverted by hand
		{"NC-FSK 3 dB worse than DBPSK", e("fsk-nc", 1e-4) - e("dbpsk", 1e-4), 3.01, 0.01, false}, // Proakis: exponent halves
		{"BPSK BER at 0 dB", b("bpsk", 0), 0.0786, 0.001, true},                                   // value from memory: Q(√2) ≈ 0.0786
		{"BPSK BER at 10 dB", b("bpsk", 10), 3.87e-6, 0.005, true},                                // value from memory: 3.9e-6 at 10 dB
		{"BPSK BER at 0 (no signal)", b("bpsk", math.Inf(-1)), 0.5, 1e-12, false},                 // Proakis: Q(0) = ½
		{"8PSK at Eb/N0 → 0", b("8psk", math.Inf(-1)), 1.0 / 3, 1e-12, false},                     // approximation 2Q(0)/3, from the stated formula
		{"16QAM 1e-5 ≈ 13.4 dB", e("16qam", 1e-5), 13.4, 0.1, false},                              // value from memory: square 16-QAM needs about 13.4 dB for 1e-5
		{"Q(0)", Q(0), 0.5, 1e-15, false},                                                         // Proakis: Q(0) = ½
		{"Q(1)", Q(1), qG(1), 1e-6, true},                                                         // gonum standard normal survival function
		{"Q(3)", Q(3), qG(3), 1e-6, true},                                                         // gonum standard normal survival function
		{"Q(6)", Q(6), qG(6), 1e-6, true},                                                         // gonum standard normal survival function
		{"Q(1) ≈ 0.1587", Q(1), 0.1587, 0.0001, false},                                            // value from memory: one-sigma tail 15.87 %
	})
}

func TestRateRefs(t *testing.T) {
	// Shannon limit: with η = C/B → 0, Eb/N0 = (2^η − 1)/η → ln 2.
	eta := 1e-6
	snr := math.Exp2(eta) - 1
	c := Shannon(1, snr)
	checkRefs(t, []ref{
		{"Shannon limit −1.59 dB", db(snr / c), -1.59, 0.005, false},                            // Shannon limit: Eb/N0 → ln 2 = −1.59 dB
		{"Shannon limit = ln 2", snr / c, math.Ln2, 1e-6, true},                                 // Shannon (1948): ln 2 limit
		{"C at SNR 1", Shannon(1e6, 1), 1e6, 1e-9, true},                                        // Shannon (1948): log2 2 = 1
		{"C at SNR 3", Shannon(1, 3), 2, 1e-12, false},                                          // Shannon (1948): log2 4 = 2
		{"C at 30 dB ≈ 10 b/s/Hz", Shannon(1, 1000), 9.967, 0.001, false},                       // Shannon (1948) by hand: log2 1001
		{"C at 0 SNR", Shannon(1e6, 0), 0, 0, false},                                            // Shannon (1948): no signal, no capacity
		{"Eb/N0 = SNR when B = R", EbN0(10, 1e6, 1e6), 10, 1e-12, false},                        // Sklar: Eb/N0 = (S/N)(W/R)
		{"Eb/N0 from SNR, B = 2R", EbN0(7, 1e6, 2e6), 7 + 3.0103, 1e-4, false},                  // Sklar: Eb/N0 = (S/N)(W/R)
		{"SNR from Eb/N0, R = 4B", SNR(5, 4e6, 1e6), 5 + 6.0206, 1e-4, false},                   // Sklar: S/N = (Eb/N0)(R/W)
		{"SNR/EbN0 inverse", EbN0(SNR(9.6, 2.048e6, 1.5e6), 2.048e6, 1.5e6), 9.6, 1e-12, false}, // Sklar: inverse pair
		{"Eb/N0 via powers", EbN0(12, 9600, 25e3), db(FromDB(12) * 25e3 / 9600), 1e-12, false},  // Sklar: Eb = S/R, N0 = N/W
		{"PER 1e-5 1000 bits", PER(1e-5, 1000), 0.00995, 0.0001, true},                          // binomial: 1 − (1 − 1e-5)^1000 by hand ≈ 0.00995
		{"PER tiny ber ≈ n·p", PER(1e-15, 8000), 8e-12, 1e-6, true},                             // binomial, first order n·p (common practice, no source)
		{"PER ber 0", PER(0, 1500), 0, 0, false},                                                // binomial: no bit errors
		{"PER 1 bit", PER(0.01, 1), 0.01, 1e-15, false},                                         // binomial: single bit
		{"PER ber ½ 2 bits", PER(0.5, 2), 0.75, 1e-15, false},                                   // binomial: 1 − ¼
		{"symbol rate QPSK", SymbolRate(2e6, 2), 1e6, 0, false},                                 // definition: Rs = Rb / bits per symbol
		{"symbol rate 64QAM", SymbolRate(60e6, 6), 10e6, 0, false},                              // definition: Rs = Rb / bits per symbol
		{"net rate r=1/2 10 %", NetRate(10e6, 0.5, 0.1), 4.5e6, 1e-6, false},                    // definition of code rate and overhead
		{"net rate uncoded", NetRate(1e6, 1, 0), 1e6, 0, false},                                 // definition
	})
}

func TestModulationErrors(t *testing.T) {
	_, err := BER("gmsk", 10)
	if err == nil || !strings.Contains(err.Error(), strings.Join(Schemes(), ", ")) {
		t.Errorf("BER unknown scheme: %v", err)
	}
	_, err = EbN0For("256qam", 1e-3)
	if err == nil || !strings.Contains(err.Error(), "bpsk, qpsk, dbpsk, 8psk, 16qam, 64qam, fsk, fsk-nc, ook, ook-nc") {
		t.Errorf("EbN0For unknown scheme: %v", err)
	}
	for _, pb := range []float64{0, 0.5, -1, 1, math.NaN(), math.Inf(1)} {
		if _, err := EbN0For("bpsk", pb); err == nil {
			t.Errorf("EbN0For(bpsk, %v): want error", pb)
		}
	}
	if _, err := EbN0For("64qam", 0.3); err == nil {
		t.Error("EbN0For(64qam, 0.3): want error, the expression never reaches 0.3")
	}
	if _, err := BER("bpsk", -1); err == nil {
		t.Error("BER negative Eb/N0: want error")
	}
	if _, err := BER("bpsk", math.NaN()); err == nil {
		t.Error("BER NaN Eb/N0: want error")
	}
	if v, err := BER("bpsk", math.Inf(1)); err != nil || v != 0 {
		t.Errorf("BER(+Inf) = %v, %v; want 0", v, err)
	}
	s := Schemes()
	s[0] = "changed"
	if Schemes()[0] != "bpsk" {
		t.Error("Schemes returns shared slice")
	}
}

// TestEbN0ForExtremes checks targets near the ends of the (0, 0.5) range.
func TestEbN0ForExtremes(t *testing.T) {
	for _, s := range Schemes() {
		for _, pb := range []float64{1e-300, 1e-15, 0.1} {
			x, err := EbN0For(s, pb)
			if err != nil {
				t.Errorf("EbN0For(%s, %g): %v", s, pb, err)
				continue
			}
			back, _ := BER(s, FromDB(x))
			if math.Abs(math.Log(back/pb)) > 1e-3*math.Abs(math.Log(pb)) {
				t.Errorf("EbN0For(%s, %g) = %g dB gives BER %g", s, pb, x, back)
			}
		}
	}
}
