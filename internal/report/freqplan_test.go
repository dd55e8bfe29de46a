package report

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"

	"github.com/rfledger/rfledger/internal/sheettest"
)

const planSheet = `
lo_hz = "1185 MHz"

[[rx.chain]]
stage = "LNA"
gain  = "18 dB"
nf    = "1 dB"
iip2  = "40 dBm"

[[spurs]]
name   = "first conversion"
lo     = "= lo_hz"
if     = ["257 MHz", "283 MHz"]
rf     = ["902 MHz", "928 MHz"]
order  = 5
reject = { "2x1" = "-45 dBc" }

[[products]]
name    = "downlink"
tones   = ["915 MHz"]
protect = [["1805 MHz", "1880 MHz"]]
order   = 3
`

func TestFreqPlanJSON(t *testing.T) {
	sh := load(t, planSheet)
	var doc struct {
		Spurs []struct {
			Name      string  `json:"name"`
			LO        float64 `json:"lo"`
			Unit      string  `json:"unit"`
			Responses []struct {
				M, N     int
				Form     string
				From, To float64
				Unit     string
				Order    int
				InBand   bool     `json:"in_band"`
				Wanted   bool     `json:"wanted"`
				Image    bool     `json:"image"`
				Level    *float64 `json:"level"`
			} `json:"responses"`
		} `json:"spurs"`
		Products []struct {
			Hits []struct {
				K     []int
				Freq  float64
				Order int
				Band  [2]float64
			} `json:"hits"`
		} `json:"products"`
		Chains map[string]struct {
			IIP2 *float64 `json:"iip2_dbm"`
		} `json:"chains"`
	}
	if err := json.Unmarshal(JSON(Input{Result: sh}), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Spurs) != 1 || doc.Spurs[0].LO != 1185 || doc.Spurs[0].Unit != "MHz" {
		t.Fatalf("spurs: %+v", doc.Spurs)
	}
	// By hand: the wanted response is LO − f = IF, f = 902…928 MHz, listed first at 0 dBc; the
	// 2×1 responses carry the table's −45 dBc.
	w := doc.Spurs[0].Responses[0]
	if w.M != 1 || w.N != 1 || w.Form != "mLO-nRF" || w.From != 902 || w.To != 928 || !w.InBand || w.Level == nil || *w.Level != 0 {
		t.Errorf("first response: %+v", w)
	}
	n21 := 0
	for _, r := range doc.Spurs[0].Responses {
		if r.M == 2 && r.N == 1 {
			n21++
			if r.Level == nil || *r.Level != -45 {
				t.Errorf("2x1 level: %+v", r)
			}
		}
	}
	if n21 != 2 {
		t.Errorf("%d 2x1 responses, want 2 (2·LO − f and f − 2·LO)", n21)
	}
	// By hand: 2·915 = 1830 MHz is the only product of order ≤ 3 in 1805–1880 MHz.
	if h := doc.Products[0].Hits; len(h) != 1 || h[0].K[0] != 2 || h[0].Freq != 1830 || h[0].Band != [2]float64{1805, 1880} {
		t.Errorf("hits: %+v", h)
	}
	if c := doc.Chains["rx.chain"]; c.IIP2 == nil || *c.IIP2 != 40 {
		t.Errorf("chain IIP2: %+v", c)
	}
}

func TestFreqPlanPage(t *testing.T) {
	sh := load(t, planSheet)
	page, files := Markdown(Input{Result: sh, ChartBase: "plan"})
	s := string(page)
	for _, want := range []string{"## Frequency plan", "### Spurious responses: first conversion", "| 1 | 1×1 | LO − f = IF | 902–928 MHz | 2 | **wanted** | 0.00 dBc |",
		"Image: 1442–1468 MHz", "| 1 | 2·f1 | 1830 MHz | 2 | 1805–1880 MHz |", "plan.spurs-1.", "plan.products-1.", "| IIP2 | cum. IIP2 |"} {
		if !strings.Contains(s, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if len(files) < 2 {
		t.Errorf("charts: %d files", len(files))
	}
	var html bytes.Buffer
	if err := goldmark.New(goldmark.WithExtensions(extension.GFM)).Convert(page, &html); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(html.String(), "<td>IF feedthrough</td>") {
		t.Error("the response table does not render as a GFM table")
	}
}

// A tone inside a protected band is no product (Σ|k| = 1), but the page says so.
func TestFreqPlanToneInBand(t *testing.T) {
	sh := load(t, strings.Replace(planSheet, `tones   = ["915 MHz"]`, `tones   = ["915 MHz", "1830 MHz"]`, 1))
	page, _ := Markdown(Input{Result: sh})
	if !strings.Contains(string(page), "**f2 = 1830 MHz lies in 1805–1880 MHz inside a protected band itself**") {
		t.Error("no word of a tone inside a protected band")
	}
	sh = load(t, planSheet)
	if page, _ := Markdown(Input{Result: sh}); strings.Contains(string(page), "inside a protected band itself") {
		t.Error("a tone outside the bands is said to be inside")
	}
}

// An LO formula that gives something other than a positive frequency is an error at the LO
// (positioned, so the command exits 3 and writes nothing), not a plan worked out for it.
func TestFreqPlanBadLOFormula(t *testing.T) {
	for _, lo := range []string{`lo_hz = "3 dB"`, `lo_hz = "-1185 MHz"`} {
		_, diags := sheettest.Eval(strings.Replace(planSheet, `lo_hz = "1185 MHz"`, lo, 1))
		found := false
		for _, d := range diags {
			found = found || d.Quantity == "spurs[1].lo" && strings.Contains(d.Summary, "the LO must be a")
		}
		if !diags.HasErrors() || !found {
			t.Errorf("%s: %v", lo, diags)
		}
	}
}

// BenchmarkSpursSection renders the page section (tables and SVG chart) of a spurs block of
// order 15 whose responses spread over 10 GHz; the target is 10 ms.
func BenchmarkSpursSection(b *testing.B) {
	sh, diags := sheettest.Eval(`
[[spurs]]
lo    = "5.2 GHz"
if    = ["140 MHz", "160 MHz"]
rf    = ["5.0 GHz", "5.1 GHz"]
order = 15
`)
	if diags.HasErrors() {
		b.Fatal(diags)
	}
	for b.Loop() {
		p := &page{in: Input{Result: sh, ChartBase: "bench"}.filled(), r: sh}
		p.freqPlans()
		if len(p.files) != 1 {
			b.Fatal("no chart")
		}
	}
}
