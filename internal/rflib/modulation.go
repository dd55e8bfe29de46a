package rflib

import (
	"fmt"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var (
	uBitS = unit("bit/s")
	uBd   = unit("Bd")
)

var modulation = []*engine.Func{
	{
		Name: "ber", Args: []engine.Arg{text("scheme"), ratio("ebn0")}, Result: "1",
		Doc: "Bit error rate on the AWGN channel at Eb/N0 (a ratio in dB), Gray coding, Q(x) = ½·erfc(x/√2): " +
			"'bpsk', 'qpsk' Q(√(2γ)); 'dbpsk' ½·e^(−γ); '8psk' (2/3)·Q(√(6γ)·sin(π/8)); '16qam', '64qam' Ps/log2 M with Ps = 1 − (1 − 2(1 − 1/√M)·Q(√(3·log2 M·γ/(M − 1))))²; " +
			"'fsk' (coherent orthogonal binary FSK) and 'ook' (coherent, Eb the average energy per bit) Q(√γ); 'fsk-nc' (non-coherent) and 'ook-nc' (envelope detection, high-SNR approximation) ½·e^(−γ/2).",
		Source: "Proakis & Salehi, Digital Communications, 5th ed., ch. 4; Sklar, Digital Communications, 2nd ed., ch. 4 and 9 (AWGN error-probability expressions)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			p, err := rfmath.BER(a[0].Text, rfmath.FromDB(q(a, 1)))
			if err != nil {
				return units.Q{}, clean(err)
			}
			return result(p, uNum, "bit error rate")
		},
	},
	{
		Name: "ebn0_for", Args: []engine.Arg{text("scheme"), lin("ber", units.None)}, Result: "dB",
		Doc:    "Eb/N0 in dB that a scheme needs for a target bit error rate: the inverse of ber(scheme, ·), found by bisection to better than 0.001 dB; same schemes as ber.",
		Source: "inverse of the expressions of ber (Proakis & Salehi, Digital Communications; Sklar, Digital Communications)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			db, err := rfmath.EbN0For(a[0].Text, q(a, 1))
			if err != nil {
				return units.Q{}, clean(err)
			}
			return result(db, uDB, "Eb/N0")
		},
	},
	{
		Name: "ebn0", Args: []engine.Arg{ratio("snr"), either("rate", units.Frequency), either("b", units.Frequency)}, Result: "dB",
		Doc:    "Eb/N0 of a signal-to-noise ratio measured in noise bandwidth b at bit rate rate: Eb/N0 = SNR + 10·log10(b/rate).",
		Source: "Sklar, Digital Communications, 2nd ed., ch. 3 (S/N = (Eb/N0)·(R/W))",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if err := ratesPositive(a); err != nil {
				return units.Q{}, err
			}
			return result(rfmath.EbN0(q(a, 0), q(a, 1), q(a, 2)), uDB, "Eb/N0")
		},
	},
	{
		Name: "snr", Args: []engine.Arg{ratio("ebn0"), either("rate", units.Frequency), either("b", units.Frequency)}, Result: "dB",
		Doc:    "Signal-to-noise ratio in noise bandwidth b of a signal at bit rate rate with the given Eb/N0: SNR = Eb/N0 + 10·log10(rate/b).",
		Source: "Sklar, Digital Communications, 2nd ed., ch. 3 (S/N = (Eb/N0)·(R/W))",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if err := ratesPositive(a); err != nil {
				return units.Q{}, err
			}
			return result(rfmath.SNR(q(a, 0), q(a, 1), q(a, 2)), uDB, "SNR")
		},
	},
	{
		Name: "shannon", Args: []engine.Arg{either("b", units.Frequency), either("snr", units.None)}, Result: "bit/s",
		Doc:    "Capacity of an AWGN channel: C = B·log2(1 + S/N). snr may be a ratio in dB (20 dB) or a plain linear ratio (100); both mean the same.",
		Source: "C. E. Shannon, A mathematical theory of communication, Bell Syst. Tech. J. 27, 1948",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if b := q(a, 0); b < 0 {
				return units.Q{}, fmt.Errorf("b: the bandwidth cannot be negative")
			}
			if s := q(a, 1); s < 0 {
				return units.Q{}, fmt.Errorf("snr: a linear ratio cannot be negative (got %s)", units.FormatNum(s))
			}
			return result(rfmath.Shannon(q(a, 0), q(a, 1)), uBitS, "capacity")
		},
	},
	{
		Name: "per", Args: []engine.Arg{lin("ber", units.None), lin("bits", units.None)}, Result: "1",
		Doc:    "Packet error rate for independent bit errors: 1 − (1 − ber)^bits, the chance that a packet of that many bits holds at least one error.",
		Source: "common practice, no source (binomial probability of at least one error)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if p := q(a, 0); !(p >= 0 && p <= 1) {
				return units.Q{}, fmt.Errorf("ber: a probability must lie between 0 and 1 (got %s)", units.FormatNum(p))
			}
			if n := q(a, 1); !(n >= 0) {
				return units.Q{}, fmt.Errorf("bits: the packet length cannot be negative (got %s)", units.FormatNum(n))
			}
			return result(rfmath.PER(q(a, 0), q(a, 1)), uNum, "packet error rate")
		},
	},
	{
		Name: "symbol_rate", Args: []engine.Arg{either("rate", units.Frequency), lin("bits_per_symbol", units.None)}, Result: "Bd",
		Doc:    "Symbol rate of a bit rate: rate / bits_per_symbol (2 for QPSK, 4 for 16-QAM).",
		Source: "common practice, no source (definition of the symbol rate)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if n := q(a, 1); !(n > 0) {
				return units.Q{}, fmt.Errorf("bits_per_symbol: must be positive (got %s)", units.FormatNum(n))
			}
			return result(rfmath.SymbolRate(q(a, 0), q(a, 1)), uBd, "symbol rate")
		},
	},
	{
		Name: "net_rate", Args: []engine.Arg{either("gross", units.Frequency), lin("code_rate", units.None), lin("overhead", units.None)}, Result: "bit/s",
		Doc:    "Information bit rate after coding and framing: gross·code_rate·(1 − overhead), code_rate a fraction such as 0.5 or 3/4, overhead a fraction such as 0.1 or 10 %.",
		Source: "common practice, no source (definition of the code rate)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if g := q(a, 0); g < 0 {
				return units.Q{}, fmt.Errorf("gross: the rate cannot be negative")
			}
			if r := q(a, 1); !(r > 0 && r <= 1) {
				return units.Q{}, fmt.Errorf("code_rate: must lie above 0 and at most 1 (got %s)", units.FormatNum(r))
			}
			if o := q(a, 2); !(o >= 0 && o < 1) {
				return units.Q{}, fmt.Errorf("overhead: must lie from 0 up to below 1 (got %s)", units.FormatNum(o))
			}
			return result(rfmath.NetRate(q(a, 0), q(a, 1), q(a, 2)), uBitS, "net rate")
		},
	},
}

// needPositive checks that quantity argument i, called name, is above zero.
func needPositive(a []engine.Value, i int, name string) error {
	if !(q(a, i) > 0) {
		return fmt.Errorf("%s: must be positive (got %s)", name, a[i].Q)
	}
	return nil
}

// ratesPositive checks the rate and bandwidth arguments (1 and 2) of ebn0 and snr.
func ratesPositive(a []engine.Value) error {
	if err := needPositive(a, 1, "rate"); err != nil {
		return err
	}
	return needPositive(a, 2, "b")
}
