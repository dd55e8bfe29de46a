package rflib_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/internal/rflib"
)

// TestNoiseDocsSayWhatTheCodeDoes: the docs of thermal, sensitivity and cn0 quote kT0 and k
// as the code computes them, from the exact Boltzmann constant of the 2019 SI
// (k = 1.380649e-23 J/K) and T0 = 290 K (IEEE Std 100): 10·log10(k·T0/1 mW) = −173.98 dBm/Hz,
// 10·log10(k) = −228.60 dBW/K/Hz. The rounded −174 and −228.6 once stood there as if exact.
func TestNoiseDocsSayWhatTheCodeDoes(t *testing.T) {
	kT0 := 10*math.Log10(kB*290) + 30
	k := 10 * math.Log10(kB)
	want := map[string]string{
		"thermal":     minus(kT0) + " dBm/Hz",
		"sensitivity": minus(kT0) + " dBm/Hz",
		"cn0":         minus(k) + " dBW/K/Hz",
	}
	lib := rflib.Library()
	for _, name := range []string{"thermal", "sensitivity", "cn0"} {
		f, ok := lib.Lookup(name)
		if !ok {
			t.Fatalf("no function %s", name)
		}
		if !strings.Contains(f.Doc, want[name]) {
			t.Errorf("%s: doc %q does not state %s", name, f.Doc, want[name])
		}
	}
	// And the code agrees with the number in the doc: thermal(1 Hz) is kT0 in dBm.
	refs := []ref{{"thermal(1 Hz)", "dBm", kT0, 1e-9, "k·T0·1 Hz with the 2019 SI k"}}
	runRefs(t, "", refs)
}

// minus formats a negative number with two decimals and a typographic minus, as the docs do.
func minus(v float64) string { return strings.Replace(fmt.Sprintf("%.2f", v), "-", "−", 1) }
