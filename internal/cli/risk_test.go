package cli

import (
	"encoding/json"
	"encoding/xml"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/rfledger/rfledger/internal/schematest"
)

// riskSheet passes at nominal (m = 7 dBm against 5 dBm), but m is uniform on 4–10 dBm, so
// the bound holds with probability 5/6 (the uniform CDF, (x − a)/(b − a)): at risk, below 90 %.
const riskSheet = `focus = "m"
p = { is = "10 dBm", tol = "3 dB", dist = "uniform" }
m = "= p - 3 dB"

[[require]]
that = "= m >= 5 dBm"
`

// TestCheckAtRisk: check says a sheet that passes at nominal but holds in fewer than 90 % of
// the trials is at risk, in every format, and still exits 0.
func TestCheckAtRisk(t *testing.T) {
	sheet := writeSheet(t, t.TempDir(), "risk.toml", riskSheet)
	code, out, _ := run(t, "check", sheet)
	if code != ExitOK {
		t.Errorf("exit %d, want %d: a nominal pass", code, ExitOK)
	}
	for _, want := range []string{"PASS at nominal but AT RISK", "of 10,000 Monte Carlo trials (below 90 %)", "at risk: m >= 5 dBm holds in 83.", "(m = 4.00 dBm at the worst case)"} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}

	_, schema, _ := run(t, "schema", "--check-output")
	code, js, _ := run(t, "check", "--format", "json", sheet)
	if code != ExitOK {
		t.Errorf("json: exit %d", code)
	}
	for _, e := range schematest.Validate([]byte(schema), []byte(js)) {
		t.Error(e)
	}
	var doc struct {
		Pass   bool
		Sheets []struct {
			Verdict      string
			AtRisk       bool `json:"at_risk"`
			Requirements []struct {
				Chance    float64
				ChanceSE  float64 `json:"chance_se"`
				Worst     *float64
				WorstPass *bool `json:"worst_pass"`
			}
			MonteCarlo struct {
				Trials  int
				PPass   float64 `json:"p_pass"`
				PPassSE float64 `json:"p_pass_se"`
			} `json:"monte_carlo"`
		}
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	s := doc.Sheets[0]
	if !doc.Pass || s.Verdict != "pass" || !s.AtRisk {
		t.Errorf("pass %v, verdict %q, at_risk %v; want a pass that is at risk", doc.Pass, s.Verdict, s.AtRisk)
	}
	r := s.Requirements[0]
	n := s.MonteCarlo.Trials
	if se := math.Sqrt(5.0 / 36 / float64(n)); math.Abs(r.Chance-5.0/6) > 4*se {
		t.Errorf("chance %.4f, want 5/6 within 4 standard errors (%.4f)", r.Chance, 4*se)
	}
	// The binomial standard error: gonum's Binomial(n, p) has standard deviation sqrt(np(1−p)).
	if want := (distuv.Binomial{N: float64(n), P: r.Chance}).StdDev() / float64(n); math.Abs(r.ChanceSE-want) > 1e-12 {
		t.Errorf("chance_se %v, want %v", r.ChanceSE, want)
	}
	if r.Worst == nil || math.Abs(*r.Worst-4) > 1e-9 || r.WorstPass == nil || *r.WorstPass {
		t.Errorf("worst %v (pass %v), want 4 dBm, failing", r.Worst, r.WorstPass)
	}
	if s.MonteCarlo.PPass != r.Chance || s.MonteCarlo.PPassSE != r.ChanceSE {
		t.Errorf("one requirement: p_pass %v ± %v, want its chance %v ± %v", s.MonteCarlo.PPass, s.MonteCarlo.PPassSE, r.Chance, r.ChanceSE)
	}

	_, junit, _ := run(t, "check", "--format", "junit", sheet)
	checkJUnitShape(t, junit)
	var jd struct {
		Suites []struct {
			Failures  int    `xml:"failures,attr"`
			SystemErr string `xml:"system-err"`
			Cases     []struct {
				SystemErr string `xml:"system-err"`
			} `xml:"testcase"`
		} `xml:"testsuite"`
	}
	if err := xml.Unmarshal([]byte(junit), &jd); err != nil {
		t.Fatal(err)
	}
	if su := jd.Suites[0]; su.Failures != 0 || !strings.Contains(su.SystemErr, "at risk") || !strings.Contains(su.Cases[0].SystemErr, "holds at nominal but only in 83.") {
		t.Errorf("junit suite %+v", su)
	}

	code, gh, _ := run(t, "check", "--format", "github", sheet)
	if code != ExitOK || !strings.Contains(gh, "::warning file="+sheet+",line=6,col=8,title=rfledger::requirement holds at nominal but only in 83.") || !strings.Contains(gh, sheet+": PASS at nominal, AT RISK\n") {
		t.Errorf("github (exit %d):\n%s", code, gh)
	}

	// With --trials 0 there is no Monte Carlo run and so no at-risk verdict.
	if _, out, _ := run(t, "check", "--trials", "0", sheet); !strings.Contains(out, ": PASS, 1 of 1") {
		t.Errorf("--trials 0: %s", out)
	}
}

// TestPageAtRisk: the page's first lines say the sheet is at risk, and the verdict table has
// the nominal value, the worst case and the chance with its standard error; a sheet without
// requirements has no row for the chance that every requirement holds.
func TestPageAtRisk(t *testing.T) {
	sheet := writeSheet(t, t.TempDir(), "risk.toml", riskSheet)
	_, page, _ := run(t, "render", sheet)
	verdict := page[strings.Index(page, "## Verdict"):]
	verdict = verdict[:strings.Index(verdict[3:], "\n## ")+3]
	for _, want := range []string{
		"**PASS at nominal, but AT RISK: every requirement holds together in only 83.",
		"| requirement | nominal | worst case | chance it holds | result | note |",
		"| `m >= 5 dBm` | 7.00 dBm | 4.00 dBm (**fails**) | 83.",
	} {
		if !strings.Contains(verdict, want) {
			t.Errorf("verdict lacks %q:\n%s", want, verdict)
		}
	}
	if !strings.Contains(verdict, " % ± 0.4 % |") {
		t.Errorf("chance without its standard error (sqrt(5/36/10000) = 0.37 %%):\n%s", verdict)
	}
	_, schema, _ := run(t, "schema", "--render-output")
	_, js, _ := run(t, "render", "--json", sheet)
	for _, e := range schematest.Validate([]byte(schema), []byte(js)) {
		t.Error(e)
	}
	var doc struct {
		AtRisk       bool `json:"at_risk"`
		Requirements []struct {
			Worst     float64
			WorstPass bool    `json:"worst_pass"`
			Chance    float64 `json:"chance"`
			ChanceSE  float64 `json:"chance_se"`
		}
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	if rq := doc.Requirements[0]; !doc.AtRisk || math.Abs(rq.Worst-4) > 1e-9 || rq.WorstPass || math.Abs(rq.ChanceSE-math.Sqrt(rq.Chance*(1-rq.Chance)/10000)) > 1e-12 {
		t.Errorf("render --json: at_risk %v, requirement %+v", doc.AtRisk, rq)
	}
	free := writeSheet(t, t.TempDir(), "free.toml", "focus = \"m\"\np = { is = \"10 dBm\", tol = \"3 dB\" }\nm = \"= p - 3 dB\"\n")
	_, page, _ = run(t, "render", free)
	if strings.Contains(page, "every requirement holds") {
		t.Errorf("a sheet without requirements speaks of every requirement holding:\n%s", page)
	}
	if _, out, _ := run(t, "check", free); strings.Contains(out, "hold together") {
		t.Errorf("check of a sheet without requirements: %s", out)
	}
}

// TestPageWarningsAtPoints: warnings raised only at sweep points, Monte Carlo trials and a
// solve's answer reach the page, after the verdict and before the line items, and the solve
// says so beside its answer. logdist warns below its reference distance d0 = 100 m (the model
// is anchored there: Rappaport, log-distance path loss); the nominal 110 m is above it.
func TestPageWarningsAtPoints(t *testing.T) {
	sheet := "../../testdata/valid/below_reference.toml"
	code, page, stderr := run(t, "render", sheet)
	if code != ExitOK {
		t.Fatal(stderr)
	}
	w := strings.Index(page, "## Warnings")
	if w < 0 || w < strings.Index(page, "## Verdict") || w > strings.Index(page, "## Line items") {
		t.Fatalf("warnings not between the verdict and the line items:\n%s", page)
	}
	warn := page[w : w+strings.Index(page[w:], "## Line items")]
	for _, want := range []string{
		"Monte Carlo trials (figures from trial",
		"at 5 of 11 points of the sweep of d, from d = 50 m to 90 m",
		"at the answer of solve near",
		"at the worst case of the requirement loss \\>= 70 dB",
	} {
		if !strings.Contains(warn, want) {
			t.Errorf("warnings lack %q:\n%s", want, warn)
		}
	}
	// 70 dB is reached below 100 m: free space to 100 m at 868 MHz is 71.2 dB (ITU-R P.525-4).
	if !strings.Contains(page, "| 69.55 dB (**fails**; a model is outside its range there) |") {
		t.Errorf("the worst case does not say it lies outside logdist's range:\n%s", page)
	}
	if !strings.Contains(page, "; a model is outside its range there: logdist\\: distance") {
		t.Errorf("the solve does not say its answer is outside logdist's range:\n%s", page)
	}
}

// TestCasesAtRisk: with [[case]] entries the analyses run for the nominal case; the page's
// verdict says that case is at risk, in its headline, its line and its verdict cell, and
// check's JSON marks it (and the sheet) at risk while the other case, not analysed, is not.
func TestCasesAtRisk(t *testing.T) {
	sheet := writeSheet(t, t.TempDir(), "cases.toml", riskSheet+"\n[[case]]\nname = \"strong\"\nset = { p = \"14 dBm\" }\n")
	_, page, _ := run(t, "render", sheet)
	for _, want := range []string{
		"**PASS at nominal in all 2 cases, but AT RISK in “nominal”:**",
		"- “nominal”: every requirement holds together in 83.",
		": **at risk** (below 90 %).",
		"| verdict | PASS at nominal, **AT RISK** | PASS |",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	code, js, _ := run(t, "check", "--format", "json", sheet)
	var doc struct {
		Sheets []struct {
			AtRisk bool `json:"at_risk"`
			Cases  []struct {
				Name   string
				AtRisk bool `json:"at_risk"`
			}
		}
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	s := doc.Sheets[0]
	if code != ExitOK || !s.AtRisk || len(s.Cases) != 2 || !s.Cases[0].AtRisk || s.Cases[1].AtRisk {
		t.Errorf("exit %d, sheet at risk %v, cases %+v", code, s.AtRisk, s.Cases)
	}
}
