package report

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// CheckInput is one worksheet as check evaluated it.
type CheckInput struct {
	File     string // the path as given on the command line
	Result   *engine.Result
	Analysis *analysis.Analysis // nil unless the Monte Carlo run was asked for
	Diags    engine.Diagnostics // everything loading, evaluation and the analyses found
	// Cases are the operating points checked, the first being Result's; nil or one entry
	// for a worksheet without cases.
	Cases []Case
}

// Verdicts of a checked worksheet.
const (
	VerdictPass  = "pass"  // every requirement holds
	VerdictFail  = "fail"  // a requirement fails (or cannot be evaluated)
	VerdictError = "error" // the worksheet cannot be evaluated
)

// checkDoc is the JSON of check --format json; its schema is schema/check.schema.json.
type checkDoc struct {
	Format int          `json:"format"`
	Pass   bool         `json:"pass"`
	Sheets []checkSheet `json:"sheets"`
}

type checkSheet struct {
	File         string       `json:"file"`
	Title        string       `json:"title"`
	Hash         string       `json:"hash"`
	Verdict      string       `json:"verdict"`
	AtRisk       bool         `json:"at_risk"` // passes at nominal, holds in fewer than 90 % of the trials
	Focus        *checkValue  `json:"focus"`
	Requirements []checkReq   `json:"requirements"`
	MonteCarlo   *checkMC     `json:"monte_carlo,omitempty"`
	Diagnostics  []checkDiag  `json:"diagnostics"`
	Cases        []checkCase  `json:"cases,omitempty"` // with [[case]]: every case checked, the first as above
	counts       checkCounted // for the JUnit totals
	risk         []string     // why the sheet is at risk, for the writers
}

type checkCounted struct{ failed, errors int }

// checkCase is one operating point's verdict.
type checkCase struct {
	Name         string      `json:"name"`
	Verdict      string      `json:"verdict"` // pass or fail
	AtRisk       bool        `json:"at_risk"`
	Focus        *checkValue `json:"focus"`
	Requirements []checkReq  `json:"requirements"`
}

type checkValue struct {
	Name   string   `json:"name"`
	Value  *float64 `json:"value"`
	Unit   string   `json:"unit"`
	SI     *float64 `json:"si"`
	SIUnit string   `json:"si_unit"`
}

type checkReq struct {
	That      string   `json:"that"`
	Note      string   `json:"note,omitempty"`
	Pass      bool     `json:"pass"`
	Evaluated bool     `json:"evaluated"`
	Quantity  string   `json:"quantity,omitempty"` // the bounded quantity, for a plain bound
	Op        string   `json:"op,omitempty"`
	Value     *float64 `json:"value"` // the quantity's value, in unit
	Limit     *float64 `json:"limit"` // the bound, in unit
	Unit      string   `json:"unit"`
	Chance    *float64 `json:"chance,omitempty"`     // Monte Carlo chance that it holds, where computed
	ChanceSE  *float64 `json:"chance_se,omitempty"`  // its binomial standard error
	Worst     *float64 `json:"worst,omitempty"`      // the bounded quantity at the worst case against its bound, in unit
	WorstPass *bool    `json:"worst_pass,omitempty"` // whether the bound holds at the worst case
	trials    int      // the Monte Carlo trials behind Chance
	worst     string   // Worst as the page writes it
	File      string   `json:"file"`
	Line      int      `json:"line"`
	Column    int      `json:"column"`
}

type checkMC struct {
	Trials  int     `json:"trials"`
	Seed    uint64  `json:"seed"`
	PPass   float64 `json:"p_pass"`    // chance that every requirement holds
	PPassSE float64 `json:"p_pass_se"` // its binomial standard error
}

type checkDiag struct {
	File     string `json:"file"`
	Line     int    `json:"line"`
	Column   int    `json:"column"`
	Severity string `json:"severity"`
	Quantity string `json:"quantity,omitempty"`
	Message  string `json:"message"`
	Hint     string `json:"hint,omitempty"`
}

// checkSheets works out what every writer of check reports.
func checkSheets(in []CheckInput) []checkSheet {
	var out []checkSheet
	for _, c := range in {
		out = append(out, checkOf(c))
	}
	return out
}

func checkOf(c CheckInput) checkSheet {
	res := c.Result
	sh := res.Sheet()
	cs := checkSheet{File: c.File, Title: sh.Title, Hash: sh.Hash, Verdict: VerdictPass, Requirements: []checkReq{}, Diagnostics: []checkDiag{}}
	for _, d := range c.Diags {
		cd := checkDiag{File: d.Range.File, Line: d.Range.Start.Line, Column: d.Range.Start.Col, Severity: "error", Quantity: d.Quantity, Message: d.Summary, Hint: d.Hint}
		if d.Severity == engine.Warning {
			cd.Severity = "warning"
		} else {
			cs.counts.errors++
		}
		cs.Diagnostics = append(cs.Diagnostics, cd)
	}
	if c.Diags.HasErrors() {
		cs.Verdict = VerdictError
	}
	var tol *analysis.Tolerance
	if c.Analysis != nil && c.Analysis.Tolerance != nil {
		tol = c.Analysis.Tolerance
		if tol.Trials > 0 {
			cs.MonteCarlo = &checkMC{Trials: tol.Trials, Seed: tol.Seed, PPass: tol.PPass, PPassSE: tol.PPassSE}
		}
	}
	cs.AtRisk = !c.Diags.HasErrors() && analysis.AtRisk(res, c.Analysis)
	focusName := sh.Focus
	if len(c.Cases) > 0 {
		focusName = c.Cases[0].Case.FocusName(sh)
	}
	cs.Focus, cs.Requirements = checkResult(res, focusName, c.Analysis)
	for _, r := range cs.Requirements {
		if !r.Pass {
			cs.counts.failed++
		}
	}
	if len(c.Cases) > 1 {
		for _, k := range c.Cases {
			cc := checkCase{Name: k.Case.Name, Verdict: VerdictPass, AtRisk: analysis.AtRisk(k.Result, k.Analysis)}
			cc.Focus, cc.Requirements = checkResult(k.Result, k.Case.FocusName(sh), k.Analysis)
			for _, r := range cc.Requirements {
				if !r.Pass {
					cc.Verdict = VerdictFail
				}
			}
			cs.Cases = append(cs.Cases, cc)
		}
		cs.counts.failed = 0
		for _, cc := range cs.Cases {
			for _, r := range cc.Requirements {
				if !r.Pass {
					cs.counts.failed++
				}
			}
		}
	}
	if cs.counts.failed > 0 && cs.Verdict == VerdictPass {
		cs.Verdict = VerdictFail
	}
	for _, cc := range cs.Cases {
		cs.AtRisk = cs.AtRisk || cc.AtRisk
	}
	cs.AtRisk = cs.AtRisk && cs.Verdict == VerdictPass
	if cs.AtRisk {
		cs.risk = riskNotes(c)
	}
	return cs
}

// riskNotes says, for a sheet at risk, which case (when there are several) holds in fewer
// than 90 % of the Monte Carlo trials.
func riskNotes(c CheckInput) []string {
	cases := c.Cases
	if len(cases) == 0 {
		cases = []Case{{Result: c.Result, Analysis: c.Analysis}}
	}
	var out []string
	for _, k := range cases {
		if !analysis.AtRisk(k.Result, k.Analysis) {
			continue
		}
		t := k.Analysis.Tolerance
		note := fmt.Sprintf("at risk: passes at nominal, but every requirement holds together in only %s of %s Monte Carlo trials (below %.0f %%)",
			chanceText(t.PPass, t.PPassSE, t.Trials), analysis.Count(t.Trials), 100*analysis.AtRiskBelow)
		if len(c.Cases) > 1 {
			note = fmt.Sprintf("case %q: %s", k.Case.Name, note)
		}
		out = append(out, note)
	}
	return out
}

// reqRisk says that a requirement holding at nominal holds in fewer than 90 % of the trials,
// or "" when it does not.
func reqRisk(r checkReq) string {
	if !r.Pass || r.Chance == nil || *r.Chance >= analysis.AtRiskBelow {
		return ""
	}
	s := fmt.Sprintf("requirement holds at nominal but only in %s of the Monte Carlo trials: %s", chanceText(*r.Chance, *r.ChanceSE, r.trials), r.That)
	if r.Worst != nil {
		s += fmt.Sprintf(" (%s = %s at the worst case)", r.Quantity, r.worst)
	}
	return s
}

// checkResult works out the focus and every requirement's outcome of one evaluation.
func checkResult(res *engine.Result, focusName string, a *analysis.Analysis) (*checkValue, []checkReq) {
	sh := res.Sheet()
	var fv *checkValue
	if q, ok := sh.Quantity(focusName); ok {
		fv = &checkValue{Name: q.Name, Unit: unitName(q)}
		if qv, known := res.Value(q); known {
			v, _ := res.Number(q)
			fv.Value = num(v)
			fv.SI, fv.SIUnit = SI(qv)
		}
	}
	reqs := []checkReq{}
	for _, rq := range sh.Requires {
		pass, known := res.Pass(rq)
		r := checkReq{That: rq.That, Note: rq.Note, Pass: pass, Evaluated: known,
			File: rq.Range.File, Line: rq.Range.Start.Line, Column: rq.Range.Start.Col}
		if q, ok := sh.Quantity(rq.Subject); ok {
			r.Quantity, r.Op, r.Unit = q.Name, rq.Op, unitName(q)
			if res.Known(q) {
				v, _ := res.Number(q)
				r.Value = num(v)
			}
			r.Limit = num(engine.Number(q, rq.Bound))
		}
		if rs, ok := spreadOf(a, rq); ok {
			if r.Worst = num(rs.Worst); r.Worst != nil {
				r.WorstPass, r.worst = &rs.WorstHolds, worstValue(sh, rs)
			}
			if a.Tolerance.Trials > 0 {
				r.Chance, r.ChanceSE, r.trials = num(rs.Chance), num(rs.ChanceSE), a.Tolerance.Trials
			}
		}
		reqs = append(reqs, r)
	}
	return fv, reqs
}

// CheckJSON writes check's verdicts as JSON ("format": 1 of the check output).
func CheckJSON(in []CheckInput) []byte {
	doc := checkDoc{Format: 1, Pass: true, Sheets: checkSheets(in)}
	for _, s := range doc.Sheets {
		doc.Pass = doc.Pass && s.Verdict == VerdictPass
	}
	return encodeJSON(doc)
}

func encodeJSON(v any) []byte {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	_ = enc.Encode(v) // only plain values: cannot fail
	return b.Bytes()
}

// The JUnit XML shape CI test reporters read: suites of test cases, each with at most one
// failure or error, counted on the suite.
type junitSuites struct {
	XMLName  xml.Name     `xml:"testsuites"`
	Name     string       `xml:"name,attr"`
	Tests    int          `xml:"tests,attr"`
	Failures int          `xml:"failures,attr"`
	Errors   int          `xml:"errors,attr"`
	Suites   []junitSuite `xml:"testsuite"`
}

type junitSuite struct {
	Name      string      `xml:"name,attr"`
	Tests     int         `xml:"tests,attr"`
	Failures  int         `xml:"failures,attr"`
	Errors    int         `xml:"errors,attr"`
	Cases     []junitCase `xml:"testcase"`
	SystemErr string      `xml:"system-err,omitempty"` // why a passing sheet is at risk
}

type junitCase struct {
	Name      string        `xml:"name,attr"`
	Classname string        `xml:"classname,attr"`
	File      string        `xml:"file,attr,omitempty"`
	Line      int           `xml:"line,attr,omitempty"`
	Failure   *junitProblem `xml:"failure"`
	Error     *junitProblem `xml:"error"`
	SystemErr string        `xml:"system-err,omitempty"`
}

type junitProblem struct {
	Message string `xml:"message,attr"`
	Type    string `xml:"type,attr"`
	Text    string `xml:",chardata"`
}

// CheckJUnit writes check's verdicts as JUnit XML: a suite per worksheet, a test case per
// requirement (a failure when it does not hold) and per diagnostic (an error for an error; a
// warning is a passing case whose text is in system-err, since JUnit has no warning state and
// check succeeds with warnings).
func CheckJUnit(in []CheckInput) []byte {
	doc := junitSuites{Name: "rfledger check"}
	for _, s := range checkSheets(in) {
		class := strings.TrimSuffix(baseName(s.File), ".toml")
		su := junitSuite{Name: s.File}
		for _, cr := range caseReqs(s) {
			r := cr.req
			jc := junitCase{Name: "require " + r.That + cr.suffix, Classname: class, File: r.File, Line: r.Line}
			if !r.Pass {
				msg := cr.prefix + requirementMessage(r)
				jc.Failure = &junitProblem{Message: msg, Type: "requirement", Text: fmt.Sprintf("%s:%d:%d: %s", r.File, r.Line, r.Column, msg)}
				su.Failures++
			} else if risk := reqRisk(r); risk != "" {
				jc.SystemErr = fmt.Sprintf("%s:%d:%d: %s%s", r.File, r.Line, r.Column, cr.prefix, risk)
			}
			su.Cases = append(su.Cases, jc)
		}
		for _, d := range s.Diagnostics {
			text := diagText(d)
			jc := junitCase{Name: d.Severity + " " + diagPlace(d), Classname: class, File: d.File, Line: d.Line}
			if d.Severity == "error" {
				jc.Error = &junitProblem{Message: diagMessage(d), Type: "error", Text: text}
				su.Errors++
			} else {
				jc.SystemErr = text
			}
			su.Cases = append(su.Cases, jc)
		}
		su.SystemErr = strings.Join(s.risk, "\n")
		su.Tests = len(su.Cases)
		doc.Tests += su.Tests
		doc.Failures += su.Failures
		doc.Errors += su.Errors
		doc.Suites = append(doc.Suites, su)
	}
	var b bytes.Buffer
	b.WriteString(xml.Header)
	enc := xml.NewEncoder(&b)
	enc.Indent("", "  ")
	_ = enc.Encode(doc) // only plain values: cannot fail
	b.WriteString("\n")
	return b.Bytes()
}

// caseReq is a requirement's outcome in one case, with how to name the case in a message.
type caseReq struct {
	req            checkReq
	prefix, suffix string // "case \"x\": " before a message, " [case x]" after a test name
}

// caseReqs lists every requirement's outcome in every case of a checked sheet (the sheet's
// own requirements when it has no cases).
func caseReqs(s checkSheet) []caseReq {
	var out []caseReq
	if len(s.Cases) == 0 {
		for _, r := range s.Requirements {
			out = append(out, caseReq{req: r})
		}
		return out
	}
	for _, c := range s.Cases {
		for _, r := range c.Requirements {
			out = append(out, caseReq{req: r, prefix: fmt.Sprintf("case %q: ", c.Name), suffix: " [case " + c.Name + "]"})
		}
	}
	return out
}

// requirementMessage says why a requirement does not hold, with the values where it is a bound.
func requirementMessage(r checkReq) string {
	switch {
	case !r.Evaluated:
		return "requirement cannot be evaluated: " + r.That
	case r.Value != nil && r.Limit != nil:
		return fmt.Sprintf("requirement fails: %s (%s = %s, limit %s)", r.That, r.Quantity, numUnit(*r.Value, r.Unit), numUnit(*r.Limit, r.Unit))
	}
	return "requirement fails: " + r.That
}

func numUnit(v float64, unit string) string {
	u := unitOfName(unit)
	return u.Of(v).Format(u)
}

func diagMessage(d checkDiag) string {
	s := d.Message
	if d.Quantity != "" {
		s = d.Quantity + ": " + s
	}
	if d.Hint != "" {
		s += "; " + d.Hint
	}
	return s
}

// diagText writes a diagnostic as the text output does: FILE:LINE:COL: [warning: ]message.
func diagText(d checkDiag) string {
	msg := diagMessage(d)
	if d.Severity == "warning" {
		msg = "warning: " + msg
	}
	return diagPlace(d) + ": " + msg
}

func diagPlace(d checkDiag) string {
	if d.Line == 0 {
		return d.File
	}
	return fmt.Sprintf("%s:%d:%d", d.File, d.Line, d.Column)
}

// CheckGitHub writes check's findings as workflow commands a GitHub Actions run turns into
// annotations on the pull request's diff: ::error for errors and failed requirements,
// ::warning for warnings, then one plain verdict line per worksheet.
func CheckGitHub(in []CheckInput) []byte {
	var b bytes.Buffer
	for _, s := range checkSheets(in) {
		for _, d := range s.Diagnostics {
			ghLine(&b, d.Severity, d.File, d.Line, d.Column, diagMessage(d))
		}
		for _, cr := range caseReqs(s) {
			if !cr.req.Pass {
				ghLine(&b, "error", cr.req.File, cr.req.Line, cr.req.Column, cr.prefix+requirementMessage(cr.req))
			} else if risk := reqRisk(cr.req); risk != "" && s.AtRisk {
				ghLine(&b, "warning", cr.req.File, cr.req.Line, cr.req.Column, cr.prefix+risk)
			}
		}
		for _, note := range s.risk {
			ghLine(&b, "warning", s.File, 0, 0, note)
		}
		verdict := strings.ToUpper(s.Verdict)
		if s.AtRisk {
			verdict += " at nominal, AT RISK"
		}
		fmt.Fprintf(&b, "%s: %s\n", s.File, verdict)
	}
	return b.Bytes()
}

func ghLine(b *bytes.Buffer, severity, file string, line, col int, msg string) {
	fmt.Fprintf(b, "::%s file=%s", severity, ghProperty(file))
	if line > 0 {
		fmt.Fprintf(b, ",line=%d,col=%d", line, col)
	}
	fmt.Fprintf(b, ",title=rfledger::%s\n", ghData(msg))
}

// ghData escapes a workflow command's message: %, CR and LF would end or corrupt it.
func ghData(s string) string {
	return strings.NewReplacer("%", "%25", "\r", "%0D", "\n", "%0A").Replace(s)
}

// ghProperty escapes a workflow command's property value, where : and , also separate.
func ghProperty(s string) string {
	return strings.NewReplacer("%", "%25", "\r", "%0D", "\n", "%0A", ":", "%3A", ",", "%2C").Replace(s)
}

// SI returns a value in SI base units and the unit's name: linear values as they are
// (2.4 km → 2400 m), decibel levels as the linear value they stand for (14 dBm → 0.0251 W,
// 3 dB → 1.995), and decibel rates in dB per SI unit (dB/m). "1" names a plain number.
func SI(q units.Q) (*float64, string) {
	switch q.K {
	case units.Rate:
		if q.D == units.Length.Pow(-1) {
			return num(q.V), "dB/m"
		}
		return num(q.V), "dB*" + q.D.String()
	case units.Level:
		q = q.Linear()
	}
	return num(q.V), q.D.String()
}

// siOfNumber is SI for a number the engine reported in a named unit.
func siOfNumber(v float64, unit string) (*float64, string) {
	u, err := units.ParseUnit(unit)
	if err != nil {
		return nil, ""
	}
	return SI(u.Of(v))
}

// unitName is the unit a quantity's numbers are reported in (as Result.Number gives it).
func unitName(q *engine.Quantity) string { return engine.UnitName(q) }
