package rflib_test

import (
	"strings"
	"testing"
)

func TestLinearityReferences(t *testing.T) {
	refs := []ref{
		// im3: the IM3 products sit 2·(OIP3 − Pout) below each tone (IP3 definition, Pozar).
		{"im3(-10 dBm, 20 dBm)", "dBm", -10 - 2*(20-(-10)), 1e-9, "IP3 definition: P_IM3 = Pout − 2 (OIP3 − Pout)"},
		{"im3(0 dBm, 30 dBm)", "dBm", 0 - 2*30, 1e-9, "IP3 definition"},
		{"im3(5 dBm, 5 dBm)", "dBm", 5, 1e-9, "IP3 definition: at the intercept the products equal the tones"},
		{"im3(0 dBW, 40 dBm)", "dBm", 30 - 2*10, 1e-9, "IP3 definition, tone level in dBW"},
		{"im3(-9 dBm, 20 dBm) - im3(-10 dBm, 20 dBm)", "dB", 3, 1e-9, "IP3 definition: IM3 rises 3 dB per dB"},
		// sfdr: (2/3)(IIP3 − floor), floor = k·T0·B + NF.
		{"sfdr(10 dBm, -110 dBm)", "dB", 2.0 / 3 * 120, 1e-9, "two-tone SFDR definition (Pozar)"},
		{"sfdr(-5 dBm, thermal(1 MHz) + 6 dB)", "dB", 2.0 / 3 * (-5 - (ktb(1e6, 290) + 6)), 1e-9, "two-tone SFDR with k·T0·B + NF floor, IEEE T0 = 290 K"},
		{"sfdr(1 mW, -90 dBm)", "dB", 60, 1e-9, "two-tone SFDR definition, IIP3 in mW"},
	}
	runRefs(t, "", refs)
	for _, c := range []struct{ formula, want string }{
		{"im3(-10 dB, 20 dBm)", "im3: p_out: got dB, want a power"},
		{"sfdr(10 dBm, -174 dBm/Hz)", "sfdr: floor: got dBm/Hz, want a power"},
	} {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
	}
}
