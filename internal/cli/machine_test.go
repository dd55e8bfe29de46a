package cli

import (
	"encoding/json"
	"encoding/xml"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/internal/schematest"
)

// sheets written for the CI-format tests: one whose requirement holds, one whose requirement
// fails, one that cannot be evaluated, one with a warning.
func ciSheets(t *testing.T) (pass, fail, broken, warned string) {
	t.Helper()
	dir := t.TempDir()
	write := func(name, src string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	pass = write("pass.toml", "focus = \"m\"\np = { is = \"10 dBm\", tol = \"1 dB\" }\nm = \"= p - 3 dB\"\n[[require]]\nthat = \"= m >= 5 dBm\"\n")
	fail = write("fail.toml", "focus = \"m\"\np = \"7 dBm\"\nm = \"= p - 3 dB\"\n[[require]]\nthat = \"= m >= 5 dBm\"\nnote = \"a, b: 100 %\"\n")
	broken = write("broken.toml", "[tx]\npower = \"14 dBm\"\neirp = \"= powr + 2 dB\"\n")
	// Okumura-Hata is defined for 150-1500 MHz (ITU-R P.529-3, Annex 1): 3 GHz is outside.
	warned = write("warned.toml", "loss = \"= hata(3 GHz, 2 km, 30 m, 1.5 m, 'urban')\"\n")
	return pass, fail, broken, warned
}

func decodeJSON(t *testing.T, s string) map[string]any {
	t.Helper()
	var doc map[string]any
	if err := json.Unmarshal([]byte(s), &doc); err != nil {
		t.Fatalf("%v\n%s", err, s)
	}
	return doc
}

// TestRenderJSONMatchesSchema validates the JSON of every demo worksheet against the schema
// rfledger schema --render-output prints.
func TestRenderJSONMatchesSchema(t *testing.T) {
	code, schema, _ := run(t, "schema", "--render-output")
	if code != ExitOK || !json.Valid([]byte(schema)) {
		t.Fatalf("schema --render-output: exit %d, valid JSON %v", code, json.Valid([]byte(schema)))
	}
	pass, _, _, warned := ciSheets(t)
	for _, sheet := range append(worksheets(t), pass, warned) {
		code, out, stderr := run(t, "render", sheet, "--json", "--trials", "500")
		if code != ExitOK {
			t.Fatalf("%s: %s", sheet, stderr)
		}
		for _, e := range schematest.Validate([]byte(schema), []byte(out)) {
			t.Errorf("%s: %s", sheet, e)
		}
	}
}

// TestSIValues: the SI value does not depend on the unit an input is written in, while the
// value follows it (2.4 km and 2400 m; 14 dBm is 10^((14-30)/10) W by the definition of dBm).
func TestSIValues(t *testing.T) {
	sheet := "../../worksheets/field-probe-uplink.toml"
	_, km, _ := run(t, "render", sheet, "--json", "--trials", "100")
	// The same sheet with the distance written in metres (and the solve's range too).
	src, err := os.ReadFile(sheet)
	if err != nil {
		t.Fatal(err)
	}
	inM := strings.Replace(string(src), `is = "2.4 km"`, `is = "2400 m"`, 1)
	if inM == string(src) {
		t.Fatal("the demo no longer writes its distance as 2.4 km")
	}
	sheetM := filepath.Join(t.TempDir(), "in-metres.toml")
	if err := os.WriteFile(sheetM, []byte(inM), 0o644); err != nil {
		t.Fatal(err)
	}
	_, m, _ := run(t, "render", sheetM, "--json", "--trials", "100")
	a, b := decodeJSON(t, km), decodeJSON(t, m)
	solve := func(d map[string]any) map[string]any { return d["solves"].([]any)[0].(map[string]any) }
	sa, sb := solve(a), solve(b)
	if sa["unit"] != "km" || sb["unit"] != "m" || sa["si_unit"] != "m" || sb["si_unit"] != "m" {
		t.Fatalf("units: %v %v", sa, sb)
	}
	if math.Abs(sa["si"].(float64)-sb["si"].(float64)) > 1e-6*sb["si"].(float64) {
		t.Errorf("si differs: %v vs %v", sa["si"], sb["si"])
	}
	if math.Abs(sa["value"].(float64)*1000-sb["value"].(float64)) > 1e-6*sb["value"].(float64) {
		t.Errorf("value in km %v is not the value in m %v / 1000", sa["value"], sb["value"])
	}
	p := a["quantities"].(map[string]any)["tx.power"].(map[string]any)
	if want := math.Pow(10, (14.0-30)/10); p["si_unit"] != "W" || math.Abs(p["si"].(float64)-want) > 1e-12 {
		t.Errorf("tx.power si = %v %v, want %v W", p["si"], p["si_unit"], want)
	}
	pt := a["sweeps"].([]any)[0].(map[string]any)["points"].([]any)[0].(map[string]any)
	if x, xsi := pt["x"].(float64), pt["x_si"].(float64); math.Abs(x*1000-xsi) > 1e-9*xsi {
		t.Errorf("sweep x %v km and x_si %v m disagree", x, xsi)
	}
}

// TestSweepQuantityNamedX: a plotted quantity named x no longer overwrites the swept value.
func TestSweepQuantityNamedX(t *testing.T) {
	dir := t.TempDir()
	f := filepath.Join(dir, "x.toml")
	os.WriteFile(f, []byte("d = \"1 km\"\nx = \"= d * 2\"\n[[sweep]]\nvary = \"d\"\nfrom = \"1 km\"\nto = \"3 km\"\nsteps = 3\nplot = [\"x\"]\n"), 0o644)
	code, out, stderr := run(t, "render", f, "--json")
	if code != ExitOK {
		t.Fatal(stderr)
	}
	doc := decodeJSON(t, out)
	pts := doc["sweeps"].([]any)[0].(map[string]any)["points"].([]any)
	last := pts[len(pts)-1].(map[string]any)
	// x = 2 d, so at d = 3 km the plotted x is 6000 m (a derived length reads in m).
	if last["x"] != 3.0 || last["x_si"] != 3000.0 || last["values"].(map[string]any)["x"] != 6000.0 || last["values_si"].(map[string]any)["x"] != 6000.0 {
		t.Errorf("last point %v", last)
	}
	if tol, ok := doc["tolerance"].(map[string]any); !ok || len(tol) != 0 {
		t.Errorf("tolerance without toleranced inputs: %v, want {}", doc["tolerance"])
	}
}

// TestCheckJSON validates check --format json against its schema on passing, failing,
// broken and warned sheets, and reads the values back.
func TestCheckJSON(t *testing.T) {
	_, schema, _ := run(t, "schema", "--check-output")
	pass, fail, broken, warned := ciSheets(t)
	code, out, _ := run(t, "check", "--format", "json", "--trials", "400", pass, fail, broken, warned)
	if code != ExitBadSheet {
		t.Errorf("exit %d, want %d (a sheet cannot be evaluated)", code, ExitBadSheet)
	}
	for _, e := range schematest.Validate([]byte(schema), []byte(out)) {
		t.Error(e)
	}
	var doc struct {
		Pass   bool
		Sheets []struct {
			File, Verdict string
			Focus         *struct{ Value, SI *float64 }
			Requirements  []struct {
				Pass                 bool
				Value, Limit, Chance *float64
				Line                 int
			}
			MonteCarlo *struct {
				PPass float64 `json:"p_pass"`
			} `json:"monte_carlo"`
			Diagnostics []struct {
				File, Severity, Message, Hint string
				Line, Column                  int
			}
		}
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Pass || len(doc.Sheets) != 4 {
		t.Fatalf("pass %v, %d sheets", doc.Pass, len(doc.Sheets))
	}
	verdicts := []string{doc.Sheets[0].Verdict, doc.Sheets[1].Verdict, doc.Sheets[2].Verdict, doc.Sheets[3].Verdict}
	if strings.Join(verdicts, " ") != "pass fail error pass" {
		t.Errorf("verdicts %v", verdicts)
	}
	// fail.toml: m = 7 dBm - 3 dB = 4 dBm against the limit 5 dBm, on line 5.
	r := doc.Sheets[1].Requirements[0]
	if r.Pass || r.Value == nil || *r.Value != 4 || *r.Limit != 5 || r.Line != 5 {
		t.Errorf("failed requirement %+v", r)
	}
	// pass.toml: m = 7 dBm ± 1 dB (3σ, normal), limit 5 dBm is 6σ below: every trial holds.
	r = doc.Sheets[0].Requirements[0]
	if r.Chance == nil || *r.Chance != 1 || doc.Sheets[0].MonteCarlo == nil || doc.Sheets[0].MonteCarlo.PPass != 1 {
		t.Errorf("Monte Carlo chance %+v %+v", r, doc.Sheets[0].MonteCarlo)
	}
	d := doc.Sheets[2].Diagnostics
	if len(d) != 1 || d[0].Severity != "error" || d[0].Line != 3 || d[0].Column != 11 || d[0].Message != `unknown name "powr"` || d[0].Hint != `did you mean "power"?` {
		t.Errorf("diagnostics of broken.toml %+v", d)
	}
	if w := doc.Sheets[3].Diagnostics; len(w) == 0 || w[0].Severity != "warning" {
		t.Errorf("warned.toml diagnostics %+v", w)
	}
}

// The common JUnit XML shape (the schema of the Ant JUnit task's report as CI test reporters
// read it): element names, their attributes and children.
var junitShape = map[string]struct{ attrs, children []string }{
	"testsuites": {[]string{"name", "tests", "failures", "errors", "time", "disabled"}, []string{"testsuite"}},
	"testsuite":  {[]string{"name", "tests", "failures", "errors", "time", "skipped", "timestamp", "hostname", "id", "package", "file"}, []string{"properties", "testcase", "system-out", "system-err"}},
	"testcase":   {[]string{"name", "classname", "time", "file", "line", "assertions"}, []string{"skipped", "error", "failure", "system-out", "system-err"}},
	"failure":    {[]string{"message", "type"}, nil},
	"error":      {[]string{"message", "type"}, nil},
	"system-err": {nil, nil},
	"system-out": {nil, nil},
}

// checkJUnitShape walks the XML and reports elements, attributes or nesting outside the shape.
func checkJUnitShape(t *testing.T, doc string) {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(doc))
	var stack []string
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("not well-formed XML: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			name := el.Name.Local
			shape, ok := junitShape[name]
			if !ok {
				t.Errorf("element <%s> is not in the JUnit shape", name)
			}
			if len(stack) == 0 && name != "testsuites" {
				t.Errorf("root is <%s>, want <testsuites>", name)
			}
			if len(stack) > 0 && !contains(junitShape[stack[len(stack)-1]].children, name) {
				t.Errorf("<%s> inside <%s>", name, stack[len(stack)-1])
			}
			for _, a := range el.Attr {
				if !contains(shape.attrs, a.Name.Local) {
					t.Errorf("<%s %s=…> is not in the JUnit shape", name, a.Name.Local)
				}
			}
			stack = append(stack, name)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		}
	}
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

type junitDoc struct {
	Tests    int `xml:"tests,attr"`
	Failures int `xml:"failures,attr"`
	Errors   int `xml:"errors,attr"`
	Suites   []struct {
		Name     string `xml:"name,attr"`
		Tests    int    `xml:"tests,attr"`
		Failures int    `xml:"failures,attr"`
		Errors   int    `xml:"errors,attr"`
		Cases    []struct {
			Name      string `xml:"name,attr"`
			Classname string `xml:"classname,attr"`
			Failure   *struct {
				Message string `xml:"message,attr"`
			} `xml:"failure"`
			Error *struct {
				Message string `xml:"message,attr"`
			} `xml:"error"`
			SystemErr string `xml:"system-err"`
		} `xml:"testcase"`
	} `xml:"testsuite"`
}

func TestCheckJUnit(t *testing.T) {
	pass, fail, broken, warned := ciSheets(t)
	_, out, _ := run(t, "check", "--format", "junit", pass, fail, broken, warned)
	checkJUnitShape(t, out)
	var doc junitDoc
	if err := xml.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	tests, failures, errs := 0, 0, 0
	for _, s := range doc.Suites {
		f, e := 0, 0
		for _, c := range s.Cases {
			if c.Name == "" || c.Classname == "" {
				t.Errorf("%s: a test case without name or classname", s.Name)
			}
			if c.Failure != nil {
				f++
			}
			if c.Error != nil {
				e++
			}
			if c.Failure != nil && c.Error != nil {
				t.Errorf("%s: both failure and error", c.Name)
			}
		}
		if s.Tests != len(s.Cases) || s.Failures != f || s.Errors != e {
			t.Errorf("suite %s counts %d/%d/%d, cases give %d/%d/%d", s.Name, s.Tests, s.Failures, s.Errors, len(s.Cases), f, e)
		}
		tests, failures, errs = tests+s.Tests, failures+f, errs+e
	}
	if doc.Tests != tests || doc.Failures != failures || doc.Errors != errs {
		t.Errorf("totals %d/%d/%d, suites give %d/%d/%d", doc.Tests, doc.Failures, doc.Errors, tests, failures, errs)
	}
	if len(doc.Suites) != 4 {
		t.Fatalf("%d suites, want 4", len(doc.Suites))
	}
	// One case per requirement in pass and fail; fail's is a failure naming both values.
	if n := len(doc.Suites[0].Cases); n != 1 || doc.Suites[0].Failures != 0 {
		t.Errorf("pass.toml: %d cases, %d failures", n, doc.Suites[0].Failures)
	}
	if f := doc.Suites[1].Cases[0].Failure; f == nil || !strings.Contains(f.Message, "m = 4.00 dBm, limit 5.00 dBm") {
		t.Errorf("fail.toml failure %+v", f)
	}
	if doc.Suites[2].Errors != 1 || !strings.Contains(doc.Suites[2].Cases[0].Error.Message, `unknown name "powr"`) {
		t.Errorf("broken.toml: %+v", doc.Suites[2])
	}
	if s := doc.Suites[3]; s.Errors != 0 || len(s.Cases) != 1 || !strings.Contains(s.Cases[0].SystemErr, "warning") {
		t.Errorf("warned.toml: %+v", s)
	}
}

// TestCheckGitHub: workflow command lines as GitHub documents them ("Workflow commands for
// GitHub Actions": ::error file=…,line=…,col=…::message, with %, CR, LF escaped in the
// message and also : and , in properties).
func TestCheckGitHub(t *testing.T) {
	pass, fail, broken, warned := ciSheets(t)
	code, out, _ := run(t, "check", "--format", "github", pass, fail, broken, warned)
	if code != ExitBadSheet {
		t.Errorf("exit %d", code)
	}
	line := regexp.MustCompile(`^::(error|warning) file=([^,:]+),line=(\d+),col=(\d+),title=rfledger::(.*)$`)
	var cmds []string
	for _, l := range strings.Split(strings.TrimSpace(out), "\n") {
		if strings.HasPrefix(l, "::") {
			if !line.MatchString(l) {
				t.Errorf("malformed workflow command %q", l)
			}
			cmds = append(cmds, l)
		}
	}
	want := []string{
		"::error file=" + fail + ",line=5,col=8,title=rfledger::requirement fails: m >= 5 dBm (m = 4.00 dBm, limit 5.00 dBm)",
		"::error file=" + broken + `,line=3,col=11,title=rfledger::tx.eirp: unknown name "powr"; did you mean "power"?`,
	}
	for _, w := range want {
		if !contains(cmds, w) {
			t.Errorf("no line %q in\n%s", w, out)
		}
	}
	if !strings.Contains(out, "::warning file="+warned) {
		t.Errorf("no warning for warned.toml:\n%s", out)
	}
	if got := report.CheckGitHub(nil); len(got) != 0 {
		t.Errorf("no sheets gave %q", got)
	}
}

func TestCheckFormatRefused(t *testing.T) {
	code, _, stderr := run(t, "check", "--format", "xml", "../../worksheets/field-probe-uplink.toml")
	if code != ExitUsage || !strings.Contains(stderr, "text, json, junit or github") {
		t.Errorf("exit %d, %s", code, stderr)
	}
}
