package cli

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/internal/gen"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/internal/schematest"
	"github.com/rfledger/rfledger/internal/sheettest"
)

// withCases writes sheet's text with [[case]] entries appended into a temporary folder.
func withCases(t *testing.T, sheet string, cases ...string) string {
	t.Helper()
	src, err := os.ReadFile(sheet)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	b.Write(src)
	for _, c := range cases {
		b.WriteString("\n[[case]]\n" + c + "\n")
	}
	p := filepath.Join(t.TempDir(), filepath.Base(sheet))
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

type caseDoc struct {
	Pass         bool                       `json:"pass"`
	Quantities   map[string]json.RawMessage `json:"quantities"`
	Requirements []struct {
		That   string   `json:"that"`
		Pass   bool     `json:"pass"`
		Chance *float64 `json:"chance"`
	} `json:"requirements"`
	Solves json.RawMessage `json:"solves"`
	Cases  []struct {
		Name     string            `json:"name"`
		Nominal  bool              `json:"nominal"`
		Set      map[string]string `json:"set"`
		Pass     bool              `json:"pass"`
		Analyses bool              `json:"analyses"`
		Focus    *struct {
			Name  string   `json:"name"`
			Value *float64 `json:"value"`
			Unit  string   `json:"unit"`
		} `json:"focus"`
		Requirements []struct {
			That   string   `json:"that"`
			Pass   bool     `json:"pass"`
			Value  *float64 `json:"value"`
			Unit   string   `json:"unit"`
			Chance *float64 `json:"chance"`
		} `json:"requirements"`
		Quantities map[string]json.RawMessage `json:"quantities"`
		Solves     json.RawMessage            `json:"solves"`
	} `json:"cases"`
}

func renderJSON(t *testing.T, args ...string) caseDoc {
	t.Helper()
	code, out, stderr := run(t, append([]string{"render", "--json", "--trials", "20"}, args...)...)
	if code != ExitOK {
		t.Fatalf("render %v: exit %d\n%s", args, code, stderr)
	}
	var doc caseDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	return doc
}

// orchardSheet is an invented 868 MHz soil-probe link with a solve and four cases, one with
// a focus of its own; one case fails the EIRP cap.
const orchardSheet = `title = "Orchard soil probes, 868 MHz"
focus = "link.margin"
[tx]
power   = { is = "14 dBm", tol = "1 dB" }
antenna = "2 dBi"
cable   = "0.5 dB"
eirp    = "= power + antenna - cable"
[path]
frequency = "868 MHz"
distance  = { is = "1.2 km", tol = "5 %" }
foliage   = { is = "8 dB", note = "apple rows in leaf" }
loss      = "= fspl(distance, frequency) + foliage"
[rx]
antenna = "5 dBi"
level   = "= tx.eirp - path.loss + antenna"
sens    = "-137 dBm"
[link]
margin = "= rx.level - rx.sens"
[[require]]
that = "= link.margin >= 15 dB"
[[require]]
that = "= tx.eirp <= 16 dBm"
note = "our own cap; check the legal limit with the regulator"
[[solve]]
name    = "reach"
vary    = "path.distance"
so_that = "link.margin"
equals  = "15 dB"
within  = ["0.1 km", "200 km"]
[[case]]
name = "SF7 near"
set  = { "rx.sens" = "-124 dBm", "path.distance" = "300 m" }
[[case]]
name = "SF7 far"
set  = { "rx.sens" = "-124 dBm", "path.distance" = "3.5 km" }
[[case]]
name  = "winter, bare trees"
set   = { "path.foliage" = "2 dB", "path.distance" = "3.5 km" }
focus = "rx.level"
[[case]]
name = "hot tx"
set  = { "tx.power" = "17 dBm" }
`

// TestCaseValuesEqualSetRender is the issue's own check: every case's values in the JSON
// equal those of a separate render --json --set … with the same overrides: its quantities,
// quantity by quantity (value, unit, SI value and warnings), its pass, its focus's value and
// unit, each requirement's pass, value and Monte Carlo chance, and its solves. The sheets:
// the demo with cases, a demo given cases here, an invented sheet with a solve and a case
// focus of its own, each with --all-cases, and a generated network of 2,000 quantities with
// five cases (analyses for the first only).
func TestCaseValuesEqualSetRender(t *testing.T) {
	hill := withCases(t, "../../worksheets/hill-relay-backhaul.toml",
		`name = "short hop"`+"\n"+`set = { "path.distance" = "3 km" }`,
		`name = "wet radomes, long"`+"\n"+`set = { "path.distance" = "9 km", "path.radomes" = "3 dB", "climate.r001" = "60 mm/h" }`,
		`name = "low power"`+"\n"+`set = { "tx.power" = "10 dBm" }`)
	orchard := filepath.Join(t.TempDir(), "orchard.toml")
	if err := os.WriteFile(orchard, []byte(orchardSheet), 0o644); err != nil {
		t.Fatal(err)
	}
	src, err := gen.Budget(2000, 3)
	if err != nil {
		t.Fatal(err)
	}
	var g bytes.Buffer
	g.Write(src)
	for i := range 5 {
		fmt.Fprintf(&g, "\n[[case]]\nname = \"p%d\"\nset = { \"r01.f01.p%02d.distance\" = \"%d m\", \"r01.f01.gw_antenna\" = \"%d dBi\" }\n", i+1, i+1, 900+700*i, 2+i)
	}
	genSheet := filepath.Join(t.TempDir(), "net.toml")
	if err := os.WriteFile(genSheet, g.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, sheet := range []string{"../../worksheets/barn-silo-backhaul.toml", hill, orchard, genSheet} {
		var all []string
		if sheet != genSheet {
			all = []string{"--all-cases"}
		}
		doc := renderJSON(t, append(all, sheet)...)
		if len(doc.Cases) < 4 || !doc.Cases[0].Nominal {
			t.Fatalf("%s: %d cases, first nominal %v", sheet, len(doc.Cases), len(doc.Cases) > 0 && doc.Cases[0].Nominal)
		}
		for _, c := range doc.Cases {
			var args []string
			names := make([]string, 0, len(c.Set))
			for k := range c.Set {
				names = append(names, k)
			}
			sort.Strings(names)
			for _, k := range names {
				args = append(args, "--set", k+"="+c.Set[k])
			}
			alone := renderJSON(t, append(args, sheet)...)
			at := fmt.Sprintf("%s, case %q", sheet, c.Name)
			if len(alone.Quantities) != len(c.Quantities) {
				t.Fatalf("%s: %d quantities, --set render has %d", at, len(c.Quantities), len(alone.Quantities))
			}
			for name, want := range alone.Quantities {
				if got := c.Quantities[name]; compact(got) != compact(want) {
					t.Errorf("%s: %s = %s, --set render gives %s", at, name, got, want)
				}
			}
			if c.Pass != alone.Pass {
				t.Errorf("%s: pass %v, --set render %v", at, c.Pass, alone.Pass)
			}
			if wantFocus := map[string]string{"winter, bare trees": "rx.level"}[c.Name]; sheet == orchard && c.Focus != nil && wantFocus != "" && c.Focus.Name != wantFocus {
				t.Errorf("%s: focus %s, the case names %s", at, c.Focus.Name, wantFocus)
			}
			if c.Focus == nil {
				t.Errorf("%s: no focus", at)
			} else if got, want := fmt.Sprint(*c.Focus.Value, " ", c.Focus.Unit), valueUnit(t, alone.Quantities[c.Focus.Name]); got != want {
				t.Errorf("%s: focus %s = %s, --set render gives %s", at, c.Focus.Name, got, want)
			}
			if len(c.Requirements) != len(alone.Requirements) {
				t.Fatalf("%s: %d requirements, --set render has %d", at, len(c.Requirements), len(alone.Requirements))
			}
			for i, rq := range c.Requirements {
				ar := alone.Requirements[i]
				if rq.That != ar.That || rq.Pass != ar.Pass {
					t.Errorf("%s: %s pass %v, --set render %s pass %v", at, rq.That, rq.Pass, ar.That, ar.Pass)
				}
				if rq.Value != nil {
					if got, want := fmt.Sprint(*rq.Value, " ", rq.Unit), valueUnit(t, alone.Quantities[strings.Fields(rq.That)[0]]); got != want {
						t.Errorf("%s: %s at %s, --set render %s", at, rq.That, got, want)
					}
				}
				if c.Analyses && orNone(rq.Chance) != orNone(ar.Chance) {
					t.Errorf("%s: %s chance %v, --set render %v", at, rq.That, rq.Chance, ar.Chance)
				}
			}
			if c.Analyses && compact(c.Solves) != compact(alone.Solves) {
				t.Errorf("%s: solves %s, --set render %s", at, c.Solves, alone.Solves)
			}
			if !c.Analyses && compact(c.Solves) != "[]" {
				t.Errorf("%s: solves %s where the analyses were not run", at, c.Solves)
			}
		}
	}
}

// orNone prints a number that may be absent.
func orNone(v *float64) string {
	if v == nil {
		return "none"
	}
	return fmt.Sprint(*v)
}

// valueUnit is a quantity's value and unit in the JSON, as "value unit".
func valueUnit(t *testing.T, raw json.RawMessage) string {
	t.Helper()
	var q struct {
		Value *float64 `json:"value"`
		Unit  string   `json:"unit"`
	}
	if err := json.Unmarshal(raw, &q); err != nil || q.Value == nil {
		t.Errorf("quantity %s: %v", raw, err)
		return ""
	}
	return fmt.Sprint(*q.Value, " ", q.Unit)
}

func compact(b []byte) string {
	var c bytes.Buffer
	if err := json.Compact(&c, b); err != nil {
		return "invalid: " + string(b)
	}
	return c.String()
}

// caseSheet is a small link with a near and a far case; the far one fails its margin.
func caseSheet(t *testing.T) string {
	t.Helper()
	src := `focus = "link.margin"
[path]
distance = "2 km"
loss = "= fspl(distance, 2.4 GHz)"
[link]
sens = "-100 dBm"
rssi = { is = "= 20 dBm - path.loss", export = true }
margin = "= rssi - sens"
[[require]]
that = "= link.margin >= 0 dB"
[[case]]
name = "near"
set = { "path.distance" = "1 km" }
[[case]]
name = "far"
set = { "path.distance" = "100 km" }
`
	// fspl(2 km, 2.4 GHz) = 106.1 dB and fspl(100 km, 2.4 GHz) = 140.0 dB (ITU-R P.525-4
	// eq. (6), 32.4 + 20 log f(MHz) + 20 log d(km)): the margin is 120 dB − fspl.
	p := filepath.Join(t.TempDir(), "link.toml")
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestCheckWithOneFailingCase: check exits 1 when any case fails a requirement and says
// which, in every format; restricted to the passing cases it exits 0.
func TestCheckWithOneFailingCase(t *testing.T) {
	sheet := caseSheet(t)
	code, out, _ := run(t, "check", sheet)
	if code != ExitFail || !strings.Contains(out, `failed: link.margin >= 0 dB in case "far"`) || strings.Contains(out, `in case "near"`) {
		t.Fatalf("exit %d:\n%s", code, out)
	}
	if code, out, _ := run(t, "check", sheet, "--case", "nominal", "--case", "near"); code != ExitOK {
		t.Fatalf("passing cases only: exit %d\n%s", code, out)
	}
	if code, _, stderr := run(t, "check", sheet, "--case", "fra"); code != ExitUsage || !strings.Contains(stderr, `did you mean "far"?`) {
		t.Fatalf("unknown case: exit %d\n%s", code, stderr)
	}
	_, schema, _ := run(t, "schema", "--check-output")
	code, js, _ := run(t, "check", sheet, "--format", "json")
	for _, e := range schematest.Validate([]byte(schema), []byte(js)) {
		t.Error(e)
	}
	var doc struct {
		Pass   bool `json:"pass"`
		Sheets []struct {
			Verdict string `json:"verdict"`
			Cases   []struct {
				Name, Verdict string
			} `json:"cases"`
		} `json:"sheets"`
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	if code != ExitFail || doc.Pass || doc.Sheets[0].Verdict != "fail" || fmt.Sprint(doc.Sheets[0].Cases) != "[{nominal pass} {near pass} {far fail}]" {
		t.Fatalf("json: exit %d, %+v", code, doc)
	}
	_, junit, _ := run(t, "check", sheet, "--format", "junit")
	if !strings.Contains(junit, `name="require link.margin &gt;= 0 dB [case far]"`) || strings.Count(junit, "<failure") != 1 {
		t.Errorf("junit:\n%s", junit)
	}
	_, gh, _ := run(t, "check", sheet, "--format", "github")
	if !strings.Contains(gh, `case "far": requirement fails`) || strings.Count(gh, "::error") != 1 {
		t.Errorf("github:\n%s", gh)
	}
}

// TestExportOneOperatingPoint: a header describes one case; where the exported value differs
// between cases, export asks for --case, and refuses two.
func TestExportOneOperatingPoint(t *testing.T) {
	sheet := caseSheet(t)
	if code, _, stderr := run(t, "export", sheet, "--c-header"); code != ExitUsage || !strings.Contains(stderr, "choose it with --case NAME") {
		t.Fatalf("ambiguous: exit %d\n%s", code, stderr)
	}
	if code, _, stderr := run(t, "export", sheet, "--c-header", "--case", "near", "--case", "far"); code != ExitUsage || !strings.Contains(stderr, "give one --case, not 2") {
		t.Fatalf("two cases: exit %d\n%s", code, stderr)
	}
	_, near, _ := run(t, "export", sheet, "--c-header", "--case", "near")
	_, far, _ := run(t, "export", sheet, "--c-header", "--case", "far")
	_, set, _ := run(t, "export", sheet, "--c-header", "--case", "nominal", "--set", "path.distance=100 km")
	// the header names its operating point in the comment under its first line
	point := func(h, want string) string {
		lines := strings.SplitN(h, "\n", 3)
		if len(lines) < 3 || lines[1] != "/* operating point: "+want+" */" {
			t.Errorf("header's second line %q, want the operating point %s", lines[min(1, len(lines)-1)], want)
			return h
		}
		return lines[0] + "\n" + lines[2]
	}
	near = point(near, `case "near" (path.distance = 1 km)`)
	far = point(far, `case "far" (path.distance = 100 km)`)
	set = point(set, `case "nominal" (the worksheet as written)`)
	if near == far || far != set {
		t.Fatalf("near:\n%s\nfar:\n%s\nfar by --set:\n%s", near, far, set)
	}
}

// TestBadCasesWriteNothing: a worksheet whose cases are wrong cannot be evaluated (exit 3),
// render, render --json and export write nothing, and each mistake the issue lists is an error
// at FILE:LINE:COL with a hint.
func TestBadCasesWriteNothing(t *testing.T) {
	const sheet = "../../testdata/invalid/case_errors.toml"
	at := "case_errors.toml:"
	want := []string{
		at + `13:10: path.distanse: no such quantity; did you mean "path.distance"?`,        // unknown input
		at + `17:10: path.loss: derived from a formula; only inputs can be set`,             // derived quantity
		at + `21:28: path.distance: is 4 km; 8 dB is not of the same kind; give a value of`, // wrong kind
		at + `28:8: case: case "far" is defined twice; already defined at`,                  // duplicate name
		at + `32:8: case: case "path" is named like the group [path]; choose a name no group has`,
		at + `44:1: case: a case needs a name; write name = "heavy rain"`,
		at + `58:10: path.distance: a case's set takes a value, not a formula; write a value like`,
		at + `62:8: case: set must be a table of input names and values; write set = {`,
	}
	for _, args := range [][]string{
		{"render", sheet, "-o", "page.md"},
		{"render", "--json", sheet, "-o", "page.json"},
		{"export", sheet, "--c-header", "-o", "page.h"},
		{"check", sheet},
	} {
		dir := t.TempDir()
		if n := len(args); args[n-2] == "-o" {
			args[n-1] = filepath.Join(dir, args[n-1])
		}
		code, out, stderr := run(t, args...)
		if code != ExitBadSheet {
			t.Errorf("%v: exit %d, want %d\n%s%s", args, code, ExitBadSheet, out, stderr)
		}
		for _, w := range want {
			if !strings.Contains(stderr+out, w) {
				t.Errorf("%v: no error %q in\n%s%s", args, w, out, stderr)
			}
		}
		if files, _ := os.ReadDir(dir); len(files) > 0 {
			t.Errorf("%v: wrote %v", args, files)
		}
	}
	dir := t.TempDir()
	code, _, stderr := run(t, "render", "../../testdata/invalid/case_too_many.toml", "-o", filepath.Join(dir, "page.md"))
	if code != ExitBadSheet || !strings.Contains(stderr, "case_too_many.toml:260:1: case: more than 64 cases; split the operating points over several worksheets") {
		t.Errorf("65 cases: exit %d\n%s", code, stderr)
	}
	if files, _ := os.ReadDir(dir); len(files) > 0 {
		t.Errorf("65 cases: wrote %v", files)
	}
}

// TestAllCasesAnalyses: the analyses run for the first case by default, for a case with
// analyses = true, and for every case with --all-cases; the page and check say for which.
func TestAllCasesAnalyses(t *testing.T) {
	analysed := func(doc caseDoc) string {
		var s []string
		for _, c := range doc.Cases {
			s = append(s, fmt.Sprint(c.Analyses))
		}
		return strings.Join(s, " ")
	}
	barn := "../../worksheets/barn-silo-backhaul.toml"
	if got := analysed(renderJSON(t, barn)); got != "true false false false false true false" {
		t.Errorf("default: %s", got)
	}
	if got := analysed(renderJSON(t, barn, "--all-cases")); got != "true true true true true true true" {
		t.Errorf("--all-cases: %s", got)
	}
	// every case's chances and solves are in the render schema too
	_, schema, _ := run(t, "schema", "--render-output")
	_, js, _ := run(t, "render", "--json", "--trials", "200", "--all-cases", barn)
	for _, e := range schematest.Validate([]byte(schema), []byte(js)) {
		t.Errorf("--all-cases JSON: %s", e)
	}
	// the page and check say which cases were analysed
	_, page, _ := run(t, "render", "--trials", "200", barn)
	if !strings.Contains(page, "were run for “near, clear sky”, “far, heavy rain”, and the sections below show “near, clear sky”; they were not run for “near, moderate rain”") {
		t.Errorf("the page does not say which cases were analysed")
	}
	_, out, _ := run(t, "check", "--trials", "200", barn)
	if strings.Count(out, "\n  in case ") != 1 || !strings.Contains(out, "\n  in case \"far, heavy rain\" all hold together in ") || !strings.Contains(out, "\n  Monte Carlo not run for 5 of 7 cases (--all-cases") {
		t.Errorf("check:\n%s", out)
	}
	_, out, _ = run(t, "check", "--trials", "200", "--all-cases", barn)
	if strings.Count(out, "\n  in case ") != 6 || strings.Contains(out, "not run") {
		t.Errorf("check --all-cases:\n%s", out)
	}
}

// casePage renders the hill relay demo with n−1 cases of other distances and returns its page.
func casePage(t *testing.T, n int) string {
	t.Helper()
	var cases []string
	for i := 1; i < n; i++ {
		cases = append(cases, fmt.Sprintf("name = \"hop %d\"\nset = { \"path.distance\" = \"%d km\" }", i, 2+i))
	}
	sheet := withCases(t, "../../worksheets/hill-relay-backhaul.toml", cases...)
	page, _ := render(t, sheet, t.TempDir())
	return string(page)
}

// TestCasePagesRead renders pages with 2, 5 and 10 cases: up to 8 side by side in the verdict
// and the line items, beyond that a row per case and a section per case; every table block is a
// GFM table.
func TestCasePagesRead(t *testing.T) {
	md := goldmark.New(goldmark.WithExtensions(extension.GFM))
	for _, n := range []int{2, 5, 10} {
		page := casePage(t, n)
		var html bytes.Buffer
		if err := md.Convert([]byte(page), &html); err != nil {
			t.Fatal(err)
		}
		tables := 0
		for _, line := range strings.Split(page, "\n") {
			if strings.HasPrefix(line, "| --- |") || strings.HasPrefix(line, "| ---: |") {
				tables++
			}
		}
		if got := strings.Count(html.String(), "<table>"); got != tables {
			t.Errorf("%d cases: %d table blocks, %d GFM tables", n, tables, got)
		}
		header := "| | nominal |"
		for i := 1; i < n; i++ {
			header += fmt.Sprintf(" hop %d |", i)
		}
		switch {
		case n <= 8 && !strings.Contains(page, "\n"+header+"\n"):
			t.Errorf("%d cases: no verdict column per case", n)
		case n <= 8 && strings.Contains(page, "### Case "):
			t.Errorf("%d cases: sections per case on a page whose cases fit side by side", n)
		case n > 8 && (!strings.Contains(page, "| case | `link.margin_left` | verdict |") || strings.Count(page, "\n### Case ") != n):
			t.Errorf("%d cases: want a row and a section per case", n)
		}
		if n <= 8 {
			// distance differs between cases, radomes does not: a column per case only for the first
			if !strings.Contains(page, "| radomes | 1.00 dB |"+strings.Repeat("  |", n-1)) {
				t.Errorf("%d cases: radomes should show once", n)
			}
		}
		// the budget in signal order: a level column per case side by side, one beyond
		flowHead := "\n| # | item | change | level |\n"
		if n <= 8 {
			flowHead = "\n| # | item | change |" + strings.TrimPrefix(header, "| |") + "\n"
		}
		if i := strings.Index(page, "## Where the budget goes"); i < 0 || !strings.Contains(page[i:], flowHead) {
			t.Errorf("%d cases: no signal-flow table headed %q", n, flowHead)
		}
	}
}

// TestSignalFlowLevelPerCase: the budget in signal order has a level column per case, and a
// case's own change beside its level where it differs from the first column's.
func TestSignalFlowLevelPerCase(t *testing.T) {
	page, _ := render(t, caseSheet(t), t.TempDir())
	// Free-space loss by ITU-R P.525-4 eq. (4) (sheettest); the level is 20 dBm minus it and
	// the margin that level above −100 dBm.
	fspl := func(km float64) float64 { return sheettest.FreeSpaceLossDB(km*1e3, 2.4e9) }
	var levels, margins []string
	for _, km := range []float64{2, 1, 100} {
		levels = append(levels, fmt.Sprintf("**%.2f dBm**", 20-fspl(km)))
		margins = append(margins, fmt.Sprintf("%.2f dB", 120-fspl(km)))
	}
	want := []string{
		"| # | item | change | nominal | near | far |",
		fmt.Sprintf("| 2 | `path.loss` | -%.2f dB | %.2f dBm | %.2f dBm (-%.2f dB) | %.2f dBm (-%.2f dB) |", fspl(2), 20-fspl(2), 20-fspl(1), fspl(1), 20-fspl(100), fspl(100)),
		"| | **`link.rssi`** | | " + strings.Join(levels, " | ") + " |",
		"| 3 | compared with `link.sens` = -100.00 dBm | | " + strings.Join(margins, " | ") + " |",
	}
	flow := string(page)
	if i := strings.Index(flow, "## Where the budget goes"); i >= 0 {
		flow = flow[i:]
	}
	for _, line := range want {
		if !strings.Contains(flow, "\n"+line+"\n") {
			t.Errorf("no line %q in\n%s", line, flow)
		}
	}
}

// TestDiffCaseByCase: diff matches cases by name, shows a changed case's flip, an added
// case's focus and failing requirement, a removed case's focus, and --exit-code exits 1 on a
// requirement that flips in one case only.
func TestDiffCaseByCase(t *testing.T) {
	sheet := func(cases string) string {
		src := `focus = "link.margin"
[path]
distance = "2 km"
loss = "= fspl(distance, 2.4 GHz)"
[link]
margin = "= 20 dBm - path.loss - (-100 dBm)"
[[require]]
that = "= link.margin >= 0 dB"
` + cases
		p := filepath.Join(t.TempDir(), "link.toml")
		if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	c := func(name, d string) string {
		return fmt.Sprintf("[[case]]\nname = %q\nset = { \"path.distance\" = %q }\n", name, d)
	}
	old := sheet(c("near", "1 km") + c("far", "100 km") + c("mid", "5 km"))
	now := sheet(c("near", "60 km") + c("far", "3 km") + c("farther", "200 km"))
	// Free-space loss by ITU-R P.525-4 eq. (4) (sheettest); the margin is 120 dB less it
	// (written here as a level difference: 20 dBm − loss − (−100 dBm)).
	margin := func(km float64) string {
		return fmt.Sprintf("%.2f dB", 120-sheettest.FreeSpaceLossDB(km*1e3, 2.4e9))
	}
	code, out, stderr := run(t, "diff", old, now)
	if code != ExitOK {
		t.Fatalf("exit %d\n%s", code, stderr)
	}
	for _, row := range []string{
		"| near | changed | " + margin(1) + " | " + margin(60) + " | `link.margin >= 0 dB`: pass → fail | 3 |",
		"| far | changed | " + margin(100) + " | " + margin(3) + " | `link.margin >= 0 dB`: fail → pass | 3 |",
		"| farther | added |  | " + margin(200) + " | `link.margin >= 0 dB`: fail |  |",
		"| mid | removed | " + margin(5) + " |  | all pass |  |",
	} {
		if !strings.Contains(out, "\n"+row+"\n") {
			t.Errorf("no row %q in\n%s", row, out)
		}
	}
	code, out, _ = run(t, "diff", "--exit-code", "--format", "json", old, now)
	var doc struct {
		Flipped []string `json:"flipped"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if code != ExitFail || fmt.Sprint(doc.Flipped) != `[link.margin >= 0 dB (case "near")]` {
		t.Errorf("--exit-code: exit %d, flipped %q", code, doc.Flipped)
	}
}

// TestLivePageShowsCases: watch's page shows every case side by side, its bar counts the
// checks over all of them, an edit to one case shows on the next render, and --case
// restricts the live page as it does render.
func TestLivePageShowsCases(t *testing.T) {
	src, err := os.ReadFile("../../worksheets/barn-silo-backhaul.toml")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	sheet := filepath.Join(dir, "barn.toml")
	if err := os.WriteFile(sheet, src, 0o644); err != nil {
		t.Fatal(err)
	}
	names := []string{"near, clear sky", "near, moderate rain", "near, heavy rain", "far, clear sky", "far, moderate rain", "far, heavy rain", "far, 16-QAM, heavy rain"}
	lw := &liveSheet{e: &Env{Stdout: io.Discard, Stderr: io.Discard}, sheet: sheet, out: filepath.Join(dir, "barn.md"), lib: rflib.Library(), ao: analysis.Options{Seed: 1, Trials: 200}}
	page, _, err := lw.render()
	if err != nil {
		t.Fatal(err)
	}
	if header := "\n| | " + strings.Join(names, " | ") + " |\n"; !strings.Contains(string(page), header) {
		t.Errorf("no verdict column per case in the live page")
	}
	// 3 requirements in 7 cases; "far" fails its margin in clear sky, moderate and heavy rain
	if s := lw.summary(); s.Verdict != "FAIL" || s.Detail != "18 of 21 requirement checks hold over 7 cases" {
		t.Errorf("bar: %q, %q", s.Verdict, s.Detail)
	}
	edited := strings.Replace(string(src), `name = "far, clear sky"
set  = { "path.distance" = "5.2 km" }`, `name = "far, clear sky"
set  = { "path.distance" = "2 km" }`, 1)
	if edited == string(src) {
		t.Fatal("the demo's far, clear sky case is not where the test expects it")
	}
	if err := os.WriteFile(sheet, []byte(edited), 0o644); err != nil {
		t.Fatal(err)
	}
	page, _, err = lw.render()
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "`path.distance` = 2 km") || lw.summary().Detail != "19 of 21 requirement checks hold over 7 cases" {
		t.Errorf("the edited case does not show: %q", lw.summary().Detail)
	}
	lw.sel = caseSel{names: []string{"far, heavy rain", "near, clear sky"}}
	page, _, err = lw.render()
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "\n| | near, clear sky | far, heavy rain |\n") || lw.summary().Detail != "5 of 6 requirement checks hold over 2 cases" {
		t.Errorf("--case: %q", lw.summary().Detail)
	}
}

// TestCaseEvaluationError: a value that passes the checks of set but that a model refuses
// (a negative distance) stops the sheet (exit 3, nothing written), at the formula, naming the
// case and saying where it is written.
func TestCaseEvaluationError(t *testing.T) {
	src, err := os.ReadFile(caseSheet(t))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	sheet := filepath.Join(dir, "link.toml")
	bad := string(src) + "[[case]]\nname = \"behind\"\nset = { \"path.distance\" = \"-1 km\" }\n"
	if err := os.WriteFile(sheet, []byte(bad), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "page.md")
	code, _, stderr := run(t, "render", sheet, "-o", out)
	line := strings.Count(string(src), "\n") + 1 // the [[case]] line appended
	want := fmt.Sprintf(`link.toml:4:11: path.loss in case "behind": fspl: d: a distance cannot be negative (got -1 km); the case is written at %s:%d:1`, sheet, line)
	if code != ExitBadSheet || !strings.Contains(stderr, want) {
		t.Errorf("exit %d, want %d and %q in\n%s", code, ExitBadSheet, want, stderr)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a page was written")
	}
}
