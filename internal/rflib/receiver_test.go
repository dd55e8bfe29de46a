package rflib_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

func TestReceiverReferences(t *testing.T) {
	// Independent routes, computed here: powers summed in watts, phasors for the quadrature
	// mixer, the quantisation noise q²/12 against a full-scale sine.
	wdbm := func(w float64) float64 { return 10 * math.Log10(w/1e-3) }
	irr := func(gainDB, deg float64) float64 {
		z := cmplx.Rect(math.Pow(10, gainDB/20), deg*math.Pi/180)
		return 20 * math.Log10(cmplx.Abs(1+z)/cmplx.Abs(1-z))
	}
	fullScale := func(bits float64) float64 { // (2^N·q)²/8 over q²/12
		return 10 * math.Log10(math.Pow(2, 2*bits)/8*12)
	}
	refs := []ref{
		// recip_mix: a −25 dBm blocker, L = −125 dBc/Hz, 125 kHz channel: P·L·B in watts
		// (Razavi, RF Microelectronics, ch. 8).
		{"recip_mix(-25 dBm, -125 dBc/Hz, 125 kHz)", "dBm", wdbm(math.Pow(10, -5.5) * math.Pow(10, -12.5) * 125e3), 1e-9, "Razavi ch. 8: P_blocker·L·B"},
		{"recip_mix(3.162 uW, -125 dBc/Hz, 50.97 dBHz)", "dBm", -25 - 125 + 50.97, 0.001, "Razavi ch. 8, blocker in watts and bandwidth in dBHz"},
		// The phase noise integrated over the channel is a ratio to the carrier (dBc).
		{"-125 dBc/Hz + dbhz(125 kHz) + -25 dBm", "dBm", -25 - 125 + 10*math.Log10(125e3), 1e-9, "decibel algebra: dBc/Hz + dBHz = dBc, dBm + dBc = dBm"},
		{"desense(-120 dBm, -120 dBm)", "dB", 10 * math.Log10(2), 1e-9, "two equal noise powers summed"},
		{"desense(-120 dBm, -126 dBm)", "dB", 10 * math.Log10(1+math.Pow(10, -0.6)), 1e-9, "power sum in linear units"},
		// max_blocker: allowed 3 dB → added noise = floor·(10^0.3 − 1), blocker = that / (L·B).
		{"max_blocker(-121 dBm, -125 dBc/Hz, 125 kHz, 3 dB)", "dBm", wdbm(1e-3 * math.Pow(10, -12.1) * (math.Pow(10, 0.3) - 1) / (math.Pow(10, -12.5) * 125e3)), 1e-9, "Razavi ch. 8 solved for the blocker, in watts"},
		{"desense(-121 dBm, recip_mix(max_blocker(-121 dBm, -125 dBc/Hz, 125 kHz, 1 dB), -125 dBc/Hz, 125 kHz))", "dB", 1, 1e-9, "the blocker found raises the floor by the allowed 1 dB"},
		// Second order: the IP2 definition; harmonics 6.02 dB and 9.54 dB below the two-tone products.
		{"im2(-20 dBm, 40 dBm)", "dBm", 2*(-20) - 40, 1e-9, "IP2 definition (Razavi ch. 2): P_IM2 = 2·P − OIP2"},
		{"im2(30 dBm, 30 dBm)", "dBm", 30, 1e-9, "IP2 definition: the product meets the tone at the intercept"},
		{"hd2(-20 dBm, 40 dBm)", "dBm", 2*(-20) - 40 - 20*math.Log10(2), 1e-9, "Razavi ch. 2: HD2 = a2·A²/2, IM2 = a2·A²"},
		{"hd3(-20 dBm, 20 dBm)", "dBm", 3*(-20) - 2*20 - 20*math.Log10(3), 1e-9, "Razavi ch. 2: HD3 = a3·A³/4, IM3 = 3·a3·A³/4"},
		{"im3(-20 dBm, 20 dBm) - hd3(-20 dBm, 20 dBm)", "dB", 20 * math.Log10(3), 1e-9, "Razavi ch. 2: 9.54 dB"},
		{"im2(-20 dBm, 40 dBm) - hd2(-20 dBm, 40 dBm)", "dB", 20 * math.Log10(2), 1e-9, "Razavi ch. 2: 6.02 dB"},
		// Image rejection against the phasor model of the two paths.
		{"image_reject(0.2 dB, 2 deg)", "dB", irr(0.2, 2), 1e-9, "phasor sum 1 ± g·e^{jθ} (Razavi ch. 4)"},
		{"image_reject(-0.5 dB, 1 deg)", "dB", irr(-0.5, 1), 1e-9, "phasor sum 1 ± g·e^{jθ} (Razavi ch. 4)"},
		{"image_reject(1 dB, 0.01745 rad)", "dB", irr(1, 1), 1e-4, "phase error in radians"},
		{"image_reject(0.086 dB, 0.573 deg)", "dB", 10 * math.Log10(4/(0.01*0.01+0.01*0.01)), 0.05, "Razavi ch. 4 small-error form 4/(ε² + θ²), 1 % and 0.01 rad"},
		// ACIR, the 3GPP definition, in linear ratios.
		{"acir(45 dB, 33 dB)", "dB", -10 * math.Log10(math.Pow(10, -4.5)+math.Pow(10, -3.3)), 1e-9, "3GPP TR 36.942 ACIR = 1/(1/ACLR + 1/ACS)"},
		{"acir(30 dB, 30 dB)", "dB", 30 - 10*math.Log10(2), 1e-9, "3GPP TR 36.942, equal ratios"},
		// ADC: the quantisation formula from q²/12 and the processing gain.
		{"adc_snr(12, 2 MHz, 1 MHz)", "dB", fullScale(12), 1e-9, "Bennett 1948: full-scale sine over q²/12"},
		{"adc_snr(12, 2 MHz, 1 MHz)", "dB", 6.02*12 + 1.76, 0.01, "the trade's 6.02·N + 1.76 dB"},
		{"adc_snr(14, 61.44 MHz, 125 kHz, 12 dB)", "dB", fullScale(14) + 10*math.Log10(61.44e6/250e3) - 12, 1e-9, "Bennett 1948 with processing gain fs/2B and back-off"},
	}
	runRefs(t, "", refs)
}

func TestReceiverUnits(t *testing.T) {
	sh, diags := load(t, `
pn    = "-120 dBc/Hz"
noise = "= pn + dbhz(100 kHz)"
rm    = "= recip_mix(-30 dBm, pn, 100 kHz)"
rel   = "= rm - -30 dBm"
`)
	if err := diags.Err(); err != nil {
		t.Fatal(err)
	}
	for name, want := range map[string]string{"pn": "-120.00 dBc/Hz", "noise": "-70.00 dBc", "rm": "-100.00 dBm"} {
		if q, _ := sh.Sheet().Quantity(name); sh.Display(q) != want {
			t.Errorf("%s = %s, want %s (dBc/Hz + dBHz = dBc)", name, sh.Display(q), want)
		}
	}
	for _, c := range []struct{ formula, want string }{
		{"recip_mix(-30 dBm, -120 dB, 100 kHz)", "pn: got dB, want phase noise in dBc/Hz"},
		{"recip_mix(-30 dBm, -174 dBm/Hz, 100 kHz)", "pn: got dBm/Hz, want phase noise in dBc/Hz"},
		{"max_blocker(-120 dBm, -120 dBc/Hz, 100 kHz, 0 dB)", "allowed: the rise must be more than 0 dB"},
		{"image_reject(0 dB, 0 deg)", "perfect balance"},
		{"image_reject(0.1, 1 deg)", "gain_imbalance: got a plain number, want a ratio in dB"},
		// The issue gives the phase error in degrees; a bare 2 could be 2° or 2 rad, so it is
		// refused as every other angle argument is (rflib's package rule).
		{"image_reject(0.25 dB, 2)", "phase_error: got a plain number, want an angle in deg or rad"},
		{"adc_snr(0, 1 MHz, 100 kHz)", "must be positive"},
		{"hd2(-10 dB, 40 dBm)", "hd2: p_out: got dB, want a power"},
	} {
		if got := evalErr(t, c.formula); !strings.Contains(got, c.want) {
			t.Errorf("%s: error %q, want %q", c.formula, got, c.want)
		}
	}
	for _, c := range []struct{ formula, want string }{
		{"recip_mix(-30 dBm, -60 dBc/Hz, 1 MHz)", "not small against the carrier"},
		{"hd2(35 dBm, 40 dBm)", "within 10 dB of the intercept"},
		{"adc_snr(12, 1 MHz, 1 MHz)", "Nyquist"},
		{"image_reject(1 dB, 60 deg)", "far outside"},
		{"acir(-3 dB, 30 dB)", "normally positive"},
	} {
		ws := evalWarn(t, c.formula)
		if len(ws) == 0 || !strings.Contains(strings.Join(ws, "; "), c.want) {
			t.Errorf("%s: warnings %q, want %q", c.formula, ws, c.want)
		}
	}
}

func TestCascadeIIP2(t *testing.T) {
	// By hand, amplitudes added in phase: 2 dB of loss ahead of the LNA (IIP2 +42 dBm), then
	// 15 dB of net gain ahead of a mixer whose OIP2 is +55 dBm at 5 dB gain (IIP2 +50 dBm):
	// 1/√IIP2 = √(10^-0.2/10^4.2) + √(10^1.5/10^5) in mW^-½.
	want := -20 * math.Log10(math.Sqrt(math.Pow(10, -0.2)/math.Pow(10, 4.2))+math.Sqrt(math.Pow(10, 1.5)/1e5))
	sh, diags := load(t, `
[rx]
iip2 = "= cascade_iip2(chain)"
[[rx.chain]]
stage = "SAW"
loss  = "2 dB"
[[rx.chain]]
stage = "LNA"
gain  = "17 dB"
iip2  = "42 dBm"
iip3  = "0 dBm"
[[rx.chain]]
stage = "mixer"
gain  = "5 dB"
oip2  = "55 dBm"
`)
	if err := diags.Err(); err != nil {
		t.Fatal(err)
	}
	if got := value(t, sh, "rx.iip2", "dBm"); math.Abs(got-want) > 1e-9 {
		t.Errorf("cascade_iip2 = %.6f dBm, want %.6f (coherent sum by hand)", got, want)
	}
	if got := evalErr(t, "cascade_iip2(0 dB)"); !strings.Contains(got, "chain") {
		t.Errorf("cascade_iip2 of a number: %q", got)
	}
}
