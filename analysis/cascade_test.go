package analysis_test

import (
	"strings"
	"testing"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// compressionSheet is a two-stage chain whose input level is set from the command line.
const compressionSheet = `
focus = "rx.nf"
[rx]
nf          = "= cascade_nf(chain)"
level       = "-40 dBm"
chain_input = "= level"

[[rx.chain]]
stage = "LNA"
gain  = "20 dB"
nf    = "1 dB"
op1db = "10 dBm"

[[rx.chain]]
stage = "mixer"
gain  = "10 dB"
nf    = "8 dB"
ip1db = "-10 dBm"

[[rx.chain]]
stage = "filter"
loss  = "2 dB"
`

// TestCompressionHeadroom: each stage's headroom is its output P1dB less its output level at
// the chain input, with OP1dB = IP1dB + G − 1 dB (Razavi, RF Microelectronics, §2.2.2), and a
// stage within the back-off (10 dB unless chain_backoff says otherwise; common practice, no
// source) is a warning at its P1dB key.
func TestCompressionHeadroom(t *testing.T) {
	cases := []struct {
		level, backoff string
		lna, mixer     float64 // headroom, dB
		warn           []string
	}{
		// LNA out −20 dBm against 10 dBm; mixer OP1dB −10 + 10 − 1 = −1 dBm against −10 dBm out.
		{"-40 dBm", "", 30, 9, []string{`rx.chain[2].ip1db: stage "mixer": its output -10.00 dBm (chain input -40.00 dBm) is 9.00 dB under its output P1dB -1.00 dBm, less than the 10.00 dB back-off`}},
		{"-40 dBm", "6 dB", 30, 9, nil},
		// 12 dB more: the mixer is driven 3 dB past its OP1dB, and the input (−28 dBm) is above
		// the cascaded IP1dB: 1/P = 1/(10 − 20 + 1 dBm) + 100/(−10 dBm) in mW = 10^0.9 + 1000,
		// −10·log10(1007.9) = −30.03 dBm (worked by hand).
		{"-28 dBm", "", 18, -3, []string{"stage \"mixer\" is driven into compression", "above the chain's cascaded input P1dB -30.03 dBm"}},
	}
	for _, c := range cases {
		src := compressionSheet
		if c.backoff != "" {
			src = strings.Replace(src, `chain_input = "= level"`, "chain_input = \"= level\"\nchain_backoff = \""+c.backoff+"\"", 1)
		}
		r := evalSrc(t, src, engine.Override{Name: "rx.level", Value: c.level})
		cc := analysis.Cascades(r)[0]
		if len(cc.Headroom) != 3 || !cc.Headroom[0].Has || !cc.Headroom[1].Has || cc.Headroom[2].Has {
			t.Fatalf("%s: headroom %+v, want the LNA's and the mixer's only", c.level, cc.Headroom)
		}
		near(t, c.level+" LNA headroom", cc.Headroom[0].DB, c.lna, 1e-9)
		near(t, c.level+" mixer headroom", cc.Headroom[1].DB, c.mixer, 1e-9)
		var got []string
		for _, d := range cc.Warnings {
			got = append(got, d.String())
		}
		all := strings.Join(got, "\n")
		if len(got) != len(c.warn) {
			t.Errorf("%s back-off %q: warnings\n%s\nwant %d", c.level, c.backoff, all, len(c.warn))
		}
		for _, w := range c.warn {
			if !strings.Contains(all, w) {
				t.Errorf("%s: warnings\n%s\nwant %q", c.level, all, w)
			}
		}
		// The warnings reach the analyses' diagnostics, so the page and check show them.
		_, diags := analysis.Analyze(r, analysis.Options{Trials: 10})
		for _, w := range c.warn {
			if !strings.Contains(diags.Error(), w) {
				t.Errorf("%s: Analyze does not report %q", c.level, w)
			}
		}
		if !strings.Contains(strings.Join(cc.Notes, "\n"), `no P1dB given for "filter"`) {
			t.Errorf("%s: notes %q do not name the stage without a P1dB", c.level, cc.Notes)
		}
	}
}

// TestChainKeysNotGuessed: a group's level and bandwidth are not taken as the chain's input
// and noise bandwidth; the cascade notes the key to write instead.
func TestChainKeysNotGuessed(t *testing.T) {
	r := evalSrc(t, `
[rx]
level     = "-90 dBm"
bandwidth = "25 kHz"
nf        = "= cascade_nf(chain)"
[[rx.chain]]
gain = "10 dB"
nf   = "2 dB"
`)
	cc := analysis.Cascades(r)[0]
	if cc.Input != nil || cc.Bandwidth != nil || cc.Headroom != nil {
		t.Errorf("input %v, bandwidth %v taken from guessed names", cc.Input, cc.Bandwidth)
	}
	notes := strings.Join(cc.Notes, "\n")
	for _, want := range []string{`write chain_input = "= level"`, `write chain_bandwidth = "= bandwidth"`} {
		if !strings.Contains(notes, want) {
			t.Errorf("notes %q, want %q", notes, want)
		}
	}
	if cc.BackoffDB != engine.DefaultBackoffDB {
		t.Errorf("back-off %g dB, want the default %d dB", cc.BackoffDB, engine.DefaultBackoffDB)
	}
}
