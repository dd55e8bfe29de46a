package report

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/schematest"
	"github.com/rfledger/rfledger/units"
)

// sensSheet is a sum of decibel terms (each moves m by its coefficient per dB, exactly) and
// a free-space loss (20·log10(1.1) ≈ 0.83 dB per +10 % of distance, ITU-R P.525-4 eq. (4));
// beta moves it by 0.99999 dB per dB, which prints as 1.00 dB like zeta and alpha, so the
// three are ordered by name; tiny moves m by 0.001 dB per dB, which prints as 0.00 dB.
const sensSheet = `focus = "m"
zeta = { is = "10 dBm", tol = "1 dB" }
alpha = { is = "3 dB", tol = ["-0.5 dB", "+1.5 dB"] }
mid = "2 dB"
beta = { is = "1 dB", tol = "1 dB" }
tiny = "5 dB"
d = { is = "2 km", tol = "10 %" }
m = "= zeta - alpha + 2 * mid + 0.99999 * beta + 0.001 * tiny - fspl(d, 868 MHz) + fspl(1 km, 868 MHz)"
`

func analysed(t *testing.T, src string) Input {
	t.Helper()
	r := load(t, src)
	a, diags := analysis.Analyze(r, analysis.Options{Trials: 200, Seed: 1})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	return Input{Result: r, Analysis: a}
}

// TestSensitivityTableGrouped: one table per step (1 dB before 10 %), largest first inside
// each, equal changes by name, and the inputs whose change prints as 0.00 dB named once.
func TestSensitivityTableGrouped(t *testing.T) {
	page, _ := Markdown(analysed(t, sensSheet))
	s := string(page)
	sec := s[strings.Index(s, "## Sensitivity"):strings.Index(s, "## Tolerance")]
	want := []string{
		"Per +1 dB of a decibel input:",
		"| `mid` | +2.00 dB |",
		"| `alpha` | -1.00 dB |",
		"| `beta` | +1.00 dB |",
		"| `zeta` | +1.00 dB |",
		"Per +10 % of a linear input:",
		"| `d` | -0.83 dB |",
		"No visible effect (under 0.005 dB, printed as 0.00 dB): `tiny`.",
	}
	at := 0
	for _, w := range want {
		i := strings.Index(sec[at:], w)
		if i < 0 {
			t.Fatalf("sensitivity section lacks %q after byte %d:\n%s", w, at, sec)
		}
		at += i + len(w)
	}
	if strings.Contains(sec, "| `tiny` |") {
		t.Errorf("an effect that prints as zero has a row:\n%s", sec)
	}
}

// TestWorstCaseCornersOnThePage: the page and the JSON name the limit each toleranced input
// sits at in each worst case. For the decibel terms the effect is the limit itself (exact
// arithmetic for a sum); for d at +10 % (2.2 km) the loss rises by 20·log10(1.1) dB and at
// −10 % falls by 20·log10(0.9) dB (ITU-R P.525-4 eq. (4)).
func TestWorstCaseCornersOnThePage(t *testing.T) {
	in := analysed(t, sensSheet)
	page, _ := Markdown(in)
	s := string(page)
	last := 0
	for _, w := range []string{
		"| input | worst case low | worst case high |",
		"| `alpha` | high limit, 4.50 dB (-1.50 dB) | low limit, 2.50 dB (+0.50 dB) |",
		"| `beta` | low limit, 0.00 dB (-1.00 dB) | high limit, 2.00 dB (+1.00 dB) |",
		"| `zeta` | low limit, 9.00 dBm (-1.00 dB) | high limit, 11.00 dBm (+1.00 dB) |",
		"| `d` | high limit, 2.2 km (-0.83 dB) | low limit, 1.8 km (+0.92 dB) |",
	} {
		// In this order: by the change in the worst case low as printed, ties by name.
		i := strings.Index(s, w)
		if i < 0 || i < last {
			t.Errorf("page lacks %q after the row before it:\n%s", w, s[strings.Index(s, "## Tolerance"):])
		}
		last = i
	}
	doc := JSON(in)
	for _, e := range schematest.Validate(RenderSchema, doc) {
		t.Error(e)
	}
	var got struct {
		Tolerance struct {
			Low  []map[string]any `json:"worst_low_corner"`
			High []map[string]any `json:"worst_high_corner"`
		}
	}
	if err := json.Unmarshal(doc, &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Tolerance.Low) != 4 || len(got.Tolerance.High) != 4 {
		t.Fatalf("corners %+v", got.Tolerance)
	}
	first := got.Tolerance.Low[0]
	if first["input"] != "alpha" || first["limit"] != "high" || first["value"] != 4.5 || first["unit"] != "dB" || first["effect"] != -1.5 {
		t.Errorf("worst low corner[0] = %v", first)
	}
	far := got.Tolerance.High[2] // zeta (+1 dB), beta (+0.99999 dB), d (+0.92 dB), alpha (+0.50 dB)
	// d at its low limit, 1.8 km, is 1800 m in SI.
	if far["input"] != "d" || far["limit"] != "low" || far["si"] != 1800.0 || far["si_unit"] != "m" {
		t.Errorf("worst high corner[2] = %v", far)
	}
}

// TestSensitivityLinearFocusZero: a linear focus prints with 4 significant digits (FormatNum),
// so a change below half its last digit is named among the inputs with no visible effect,
// and one above it keeps its row. r = d + x·1 m: +10 % of d (2 km) adds 200 m, +10 % of x (2)
// adds 0.2 m to r ≈ 2002 m, whose last printed digit is 1 m (exact arithmetic).
func TestSensitivityLinearFocusZero(t *testing.T) {
	page, _ := Markdown(analysed(t, "focus = \"r\"\nd = \"2 km\"\nx = 2\nr = \"= d + x * 1 m\"\n"))
	s := string(page)
	sec := s[strings.Index(s, "## Sensitivity"):strings.Index(s, "## Tolerance")]
	if !strings.Contains(sec, "| `d` | +") || !strings.Contains(sec, "No visible effect (too small to change the focus in its 4 significant digits): `x`.") {
		t.Errorf("sensitivity of a linear focus:\n%s", sec)
	}
	// The rule agrees with the formatter on either side of half a last digit.
	for _, c := range []struct {
		f0, v float64
		zero  bool
	}{{2002, 0.2, true}, {2002, 0.7, false}, {0.02345, 0.000004, true}, {0.02345, 0.000006, false}} {
		if got := printsAsZero(c.v, "m", c.f0); got != c.zero {
			t.Errorf("printsAsZero(%g, f0 %g) = %v", c.v, c.f0, got)
		}
		if same := units.FormatNum(c.f0+c.v) == units.FormatNum(c.f0); same != c.zero {
			t.Errorf("FormatNum(%g + %g) == FormatNum(%g) is %v, want %v", c.f0, c.v, c.f0, same, c.zero)
		}
	}
}
