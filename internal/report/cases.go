package report

import (
	"fmt"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// Case is one operating point of a page: a [[case]] (or the nominal evaluation) with its
// result, and its analyses when they were run for it.
type Case struct {
	Case     *engine.Case
	Result   *engine.Result
	Analysis *analysis.Analysis // nil when the analyses were not run for this case
}

// maxCaseColumns is the most cases shown side by side in one GFM table; with more, each
// case's detail gets a section of its own.
const maxCaseColumns = 8

// multiCase reports whether the page shows more than one operating point.
func (p *page) multiCase() bool { return len(p.in.Cases) > 1 }

// wideCases reports whether the cases fit side by side in a table.
func (p *page) wideCases() bool { return len(p.in.Cases) <= maxCaseColumns }

// caseFocus returns the quantity a case centres on, if any.
func caseFocus(sh *engine.Sheet, c Case) (*engine.Quantity, bool) {
	return sh.Quantity(c.Case.FocusName(sh))
}

// casePass reports whether every requirement holds in a case.
func casePass(c Case) bool {
	for _, rq := range c.Result.Sheet().Requires {
		if !passes(c.Result, rq) {
			return false
		}
	}
	return true
}

// overridesText writes a case's overrides for the page as written. A value has been read as
// a number with its unit, and follows "name = " inside a line, so only the punctuation that
// starts Markdown inside a line needs escapes (not the sign or the "1." of a list).
func overridesText(c *engine.Case) string {
	if len(c.Set) == 0 {
		return "as written"
	}
	parts := make([]string, len(c.Set))
	for i, o := range c.Set {
		v := strings.TrimSpace(o.Value)
		if strings.ContainsAny(v, markdownPunct+"\r\n\t") {
			v = text(v)
		}
		parts[i] = code(o.Name) + " = " + v
	}
	return strings.Join(parts, ", ")
}

// requirementCell writes a requirement's outcome in a case: the bounded value, the verdict
// and the Monte Carlo chance where the case's analyses computed it.
func requirementCell(sh *engine.Sheet, c Case, rq *engine.Require) string {
	var parts []string
	q, bounded := sh.Quantity(rq.Subject)
	if bounded {
		parts = append(parts, c.Result.Display(q))
	}
	switch {
	case !known(c.Result, rq):
		parts = append(parts, "**cannot evaluate**")
	case !passes(c.Result, rq):
		parts = append(parts, "**FAIL**")
	default:
		parts = append(parts, "PASS")
	}
	out := strings.Join(parts, " ")
	if rs, ok := spreadOf(c.Analysis, rq); ok {
		if w := worstText(sh, rs); w != "" {
			out += "; worst " + w
		}
		if t := c.Analysis.Tolerance; t.Trials > 0 {
			out += "; holds in " + chanceText(rs.Chance, rs.ChanceSE, t.Trials) + " of trials"
		}
	}
	return out
}

// caseVerdictCell writes a case's verdict: PASS, PASS but at risk, or FAIL.
func caseVerdictCell(c Case) string {
	switch {
	case !casePass(c):
		return "**FAIL**"
	case analysis.AtRisk(c.Result, c.Analysis):
		return "PASS at nominal, **AT RISK**"
	}
	return "PASS"
}

// caseSpreads writes, for every case whose Monte Carlo trials were run, the chance that all
// its requirements hold together, and which cases are at risk.
func (p *page) caseSpreads() {
	var lines []string
	for _, c := range p.in.Cases {
		a := c.Analysis
		if a == nil || a.Tolerance == nil || a.Tolerance.Trials == 0 || len(c.Result.Sheet().Requires) == 0 {
			continue
		}
		t := a.Tolerance
		line := fmt.Sprintf("- “%s”: every requirement holds together in %s of %s Monte Carlo trials", text(c.Case.Name), chanceText(t.PPass, t.PPassSE, t.Trials), analysis.Count(t.Trials))
		if analysis.AtRisk(c.Result, a) {
			line += fmt.Sprintf(": **at risk** (below %.0f %%)", 100*analysis.AtRiskBelow)
		}
		lines = append(lines, line+".")
	}
	if len(lines) > 0 {
		p.f("%s\n\n", strings.Join(lines, "\n"))
	}
}

// solveCell writes a case's answer to a solve.
func solveCell(c Case, i int) string {
	if c.Analysis == nil {
		return "not run"
	}
	if i >= len(c.Analysis.Solves) {
		return "n/a"
	}
	r := c.Analysis.Solves[i]
	if !r.Found {
		if r.Note != "" {
			return text(r.Note)
		}
		return "no crossing in range"
	}
	return fmtNum(r.Value, r.Unit)
}

// caseVerdict writes the verdict of a page with several cases: which cases pass, then a
// table with a column per case (or a row per case when there are too many for columns).
func (p *page) caseVerdict() {
	sh := p.in.Sheet
	p.f("## Verdict\n\n")
	var failing, risky []string
	for _, c := range p.in.Cases {
		if !casePass(c) {
			failing = append(failing, "“"+text(c.Case.Name)+"”")
		} else if analysis.AtRisk(c.Result, c.Analysis) {
			risky = append(risky, "“"+text(c.Case.Name)+"”")
		}
	}
	n := len(p.in.Cases)
	switch {
	case len(sh.Requires) == 0:
		p.f("No requirements are set; add `[[require]]` entries to have the page check them in each of the %d cases.\n\n", n)
	case len(failing) == 0 && len(risky) > 0:
		p.f("**PASS at nominal in all %d cases, but AT RISK in %s:** its requirements hold together in fewer than %.0f %% of the Monte Carlo trials.\n\n", n, strings.Join(risky, ", "), 100*analysis.AtRiskBelow)
	case len(failing) == 0:
		p.f("**PASS: every requirement holds in all %d cases.**\n\n", n)
	default:
		p.f("**FAIL: requirements do not hold in %d of %d cases** (%s).\n\n", len(failing), n, strings.Join(failing, ", "))
	}
	p.caseSpreads()
	if p.wideCases() {
		p.caseColumns()
	} else {
		p.caseRows()
	}
	var notes []string
	for _, rq := range sh.Requires {
		if rq.Note != "" {
			notes = append(notes, "- "+code(rq.That)+": "+text(rq.Note))
		}
	}
	if len(notes) > 0 {
		p.f("%s\n\n", strings.Join(notes, "\n"))
	}
	p.analysedCases()
}

// caseColumns is the verdict table with one column per case.
func (p *page) caseColumns() {
	sh := p.in.Sheet
	p.f("| |")
	for _, c := range p.in.Cases {
		p.f(" %s |", text(c.Case.Name))
	}
	p.f("\n| --- |%s\n", strings.Repeat(" --- |", len(p.in.Cases)))
	for _, c := range p.in.Cases {
		if c.Case.Note != "" {
			p.caseRow("note", func(c Case) string { return text(c.Case.Note) })
			break
		}
	}
	p.caseRow("inputs", func(c Case) string { return overridesText(c.Case) })
	focusLabel := "focus"
	if f, ok := sh.Quantity(sh.Focus); ok {
		focusLabel = "focus " + code(f.Name)
	}
	p.caseRow(focusLabel, func(c Case) string {
		f, ok := caseFocus(sh, c)
		if !ok {
			return ""
		}
		if f.Name != sh.Focus {
			return code(f.Name) + " **" + c.Result.Display(f) + "**"
		}
		return "**" + c.Result.Display(f) + "**"
	})
	for _, rq := range sh.Requires {
		p.caseRow(code(rq.That), func(c Case) string { return requirementCell(sh, c, rq) })
	}
	for i, so := range sh.Solves {
		p.caseRow("solve "+code(so.Name), func(c Case) string { return solveCell(c, i) })
	}
	p.caseRow("verdict", caseVerdictCell)
	p.f("\n")
}

func (p *page) caseRow(label string, value func(Case) string) {
	p.f("| %s |", label)
	for _, c := range p.in.Cases {
		p.f(" %s |", value(c))
	}
	p.f("\n")
}

// caseRows is the verdict with one row per case, for more cases than fit side by side.
func (p *page) caseRows() {
	sh := p.in.Sheet
	focus := "focus"
	if f, ok := sh.Quantity(sh.Focus); ok {
		focus = code(f.Name)
	}
	p.f("| case | %s | verdict | requirements that do not hold |\n| --- | ---: | --- | --- |\n", focus)
	for _, c := range p.in.Cases {
		fv := ""
		if f, ok := caseFocus(sh, c); ok {
			fv = c.Result.Display(f)
			if f.Name != sh.Focus {
				fv = code(f.Name) + " " + fv
			}
		}
		verdict := caseVerdictCell(c)
		var fails []string
		for _, rq := range sh.Requires {
			if !passes(c.Result, rq) {
				fails = append(fails, code(rq.That))
			}
		}
		p.f("| [%s](#%s) | %s | %s | %s |\n", text(c.Case.Name), caseAnchor(c.Case.Name), fv, verdict, strings.Join(fails, ", "))
	}
	p.f("\nEach case's inputs, requirements, solves and changed values are in its section under [Cases](#cases).\n\n")
}

// caseAnchor is the anchor GitHub gives the heading "Case NAME".
func caseAnchor(name string) string {
	var b strings.Builder
	for _, r := range strings.ToLower("case " + name) {
		switch {
		case r == ' ':
			b.WriteByte('-')
		case r == '-' || r == '_' || (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9') || r > 127:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// analysedCases says which cases the analyses were run for.
func (p *page) analysedCases() {
	var done, not []string
	for _, c := range p.in.Cases {
		if c.Analysis != nil {
			done = append(done, "“"+text(c.Case.Name)+"”")
		} else {
			not = append(not, "“"+text(c.Case.Name)+"”")
		}
	}
	switch {
	case len(done) == 0:
		p.f("The analyses were not run.\n\n")
	case len(not) == 0:
		p.f("The analyses (sensitivity, tolerance, Monte Carlo, sweeps and solves) were run for every case; the sections below them show %s.\n\n", done[0])
	case len(done) == 1:
		p.f("The analyses (sensitivity, tolerance, Monte Carlo, sweeps and solves) below are those of %s; they were not run for %s (render with `--all-cases`, or set `analyses = true` on a case).\n\n", done[0], strings.Join(not, ", "))
	default:
		p.f("The analyses (sensitivity, tolerance, Monte Carlo, sweeps and solves) were run for %s, and the sections below show %s; they were not run for %s (render with `--all-cases`, or set `analyses = true` on a case).\n\n", strings.Join(done, ", "), done[0], strings.Join(not, ", "))
	}
}

// differs reports whether a quantity's value reads differently in some case.
func (p *page) differs(q *engine.Quantity) bool {
	first := p.in.Cases[0].Result.Display(q)
	for _, c := range p.in.Cases[1:] {
		if c.Result.Display(q) != first {
			return true
		}
	}
	return false
}

// caseLineItems writes the line items of a page with several cases: a group in which some
// quantity differs between cases gets a value column per case (filled only where it
// differs); with more cases than fit, the table shows the first case and each case's section
// lists what differs.
func (p *page) caseLineItems() {
	sh := p.in.Sheet
	first := p.in.Cases[0]
	p.f("## Line items\n\n")
	if !p.wideCases() {
		p.f("Values are those of “%s”; what differs in the other cases is in each case's section under [Cases](#cases).\n\n", text(first.Case.Name))
	} else {
		p.f("A quantity whose value differs between cases shows each case's; one with a single value has it in every case.\n\n")
	}
	for _, g := range sh.Groups {
		if !p.groupHeading(g) {
			continue
		}
		var extra []Case
		if p.wideCases() {
			for _, q := range g.Quantities {
				if p.differs(q) {
					extra = p.in.Cases[1:]
					break
				}
			}
		}
		head := "value"
		if len(extra) > 0 {
			head = text(first.Case.Name)
		}
		p.f("| quantity | %s |", head)
		for _, c := range extra {
			p.f(" %s |", text(c.Case.Name))
		}
		p.f(" obtained from | tolerance | note | source |\n| --- | ---: |%s --- | --- | --- | --- |\n", strings.Repeat(" ---: |", len(extra)))
		for _, q := range g.Quantities {
			key, how := itemLabel(g, q, first.Result)
			p.f("| %s | %s |", text(key), first.Result.Display(q))
			moved := len(extra) > 0 && p.differs(q)
			for _, c := range extra {
				v := ""
				if moved {
					v = c.Result.Display(q)
				}
				p.f(" %s |", v)
			}
			p.f(" %s | %s | %s | %s |\n", how, tolText(q.Tol), text(q.Note), text(q.Source))
		}
		p.f("\n")
	}
}

// caseLevels writes, under a cascade, the signal level at each stage output in every case,
// when it differs between cases.
func (p *page) caseLevels(ci analysis.Cascade) {
	if !p.multiCase() || !p.wideCases() {
		return
	}
	type levels struct {
		name string
		out  []string
	}
	var cols []levels
	differ := false
	for _, c := range p.in.Cases {
		l := levels{name: c.Case.Name}
		for _, cc := range analysis.Cascades(c.Result) {
			if cc.Chain.Name != ci.Chain.Name || cc.Err != nil {
				continue
			}
			in, ok := inputDBm(cc)
			for _, st := range cc.Result.Stages {
				v := ""
				if ok {
					v = db2(in+st.CumGainDB) + " dBm"
				}
				l.out = append(l.out, v)
			}
		}
		if len(cols) > 0 && strings.Join(l.out, "|") != strings.Join(cols[0].out, "|") {
			differ = true
		}
		cols = append(cols, l)
	}
	if !differ {
		return
	}
	p.f("Signal out of each stage per case:\n\n| # | stage |")
	for _, l := range cols {
		p.f(" %s |", text(l.name))
	}
	p.f("\n| ---: | --- |%s\n", strings.Repeat(" ---: |", len(cols)))
	for i, st := range ci.Stages {
		p.f("| %d | %s |", i+1, text(st.Name))
		for _, l := range cols {
			v := ""
			if i < len(l.out) {
				v = l.out[i]
			}
			p.f(" %s |", v)
		}
		p.f("\n")
	}
	p.f("\n")
}

// caseSections writes a section per case: its inputs, its outcome and what differs from the
// first case. Only pages with more cases than fit side by side have them.
func (p *page) caseSections() {
	if !p.multiCase() || p.wideCases() {
		return
	}
	sh := p.in.Sheet
	first := p.in.Cases[0]
	p.f("## Cases\n\n")
	for i, c := range p.in.Cases {
		p.f("### Case %s\n\n", text(c.Case.Name))
		if c.Case.Note != "" {
			p.f("%s\n\n", text(c.Case.Note))
		}
		p.f("Inputs: %s.", overridesText(c.Case))
		if f, ok := caseFocus(sh, c); ok {
			p.f(" Focus: `%s` = **%s**.", f.Name, c.Result.Display(f))
		}
		p.f("\n\n")
		if len(sh.Requires) > 0 {
			p.f("| requirement | result |\n| --- | --- |\n")
			for _, rq := range sh.Requires {
				p.f("| %s | %s |\n", code(rq.That), requirementCell(sh, c, rq))
			}
			p.f("\n")
		}
		for j, so := range sh.Solves {
			p.f("- solve `%s`: %s\n", so.Name, solveCell(c, j))
		}
		if len(sh.Solves) > 0 {
			p.f("\n")
		}
		if i == 0 {
			continue
		}
		var rows []string
		for _, q := range sh.Quantities() {
			if a, b := first.Result.Display(q), c.Result.Display(q); a != b {
				rows = append(rows, fmt.Sprintf("| %s | %s | %s |", code(q.Name), a, b))
			}
		}
		if len(rows) == 0 {
			p.f("No value differs from “%s”.\n\n", text(first.Case.Name))
			continue
		}
		p.f("| quantity | %s | %s |\n| --- | ---: | ---: |\n%s\n\n", text(first.Case.Name), text(c.Case.Name), strings.Join(rows, "\n"))
	}
}

// jsonCase is one entry of the "cases" array: an operating point's outcome and values.
type jsonCase struct {
	Name         string            `json:"name"`
	Note         string            `json:"note"`
	Nominal      bool              `json:"nominal"`
	Set          map[string]string `json:"set"`
	Pass         bool              `json:"pass"`
	Analyses     bool              `json:"analyses"` // whether the analyses (and so the solves) were run for it
	Focus        *jsonCaseFocus    `json:"focus"`
	Requirements []jsonCaseReq     `json:"requirements"`
	Quantities   map[string]jsonQ  `json:"quantities"`
	Solves       []jsonSolve       `json:"solves"`
}

type jsonCaseFocus struct {
	Name  string   `json:"name"`
	Value *float64 `json:"value"`
	Unit  string   `json:"unit"`
}

type jsonCaseReq struct {
	That      string   `json:"that"`
	Pass      bool     `json:"pass"`
	Evaluated bool     `json:"evaluated"`
	Value     *float64 `json:"value,omitempty"` // the bounded quantity's value, for a plain bound
	Unit      string   `json:"unit,omitempty"`
	Chance    *float64 `json:"chance,omitempty"` // Monte Carlo chance that it holds, where computed
}

// casesJSON writes every case of the input; a sheet without cases has the nominal one only.
func casesJSON(in Input) []jsonCase {
	sh := in.Sheet
	cases := in.Cases
	if len(cases) == 0 {
		cases = []Case{{Case: sh.Nominal, Result: in.Result, Analysis: in.Analysis}}
		if cases[0].Case == nil {
			cases[0].Case = &engine.Case{Name: engine.NominalName, Nominal: true}
		}
	}
	out := make([]jsonCase, 0, len(cases))
	for _, c := range cases {
		jc := jsonCase{Name: c.Case.Name, Note: c.Case.Note, Nominal: c.Case.Nominal, Set: map[string]string{}, Pass: casePass(c),
			Analyses: c.Analysis != nil, Requirements: []jsonCaseReq{}, Quantities: quantitiesJSON(sh, c.Result), Solves: []jsonSolve{}}
		for _, o := range c.Case.Set {
			jc.Set[o.Name] = o.Value
		}
		if f, ok := caseFocus(sh, c); ok {
			v, unit := c.Result.Number(f)
			jc.Focus = &jsonCaseFocus{Name: f.Name, Value: num(v), Unit: unit}
		}
		for _, rq := range sh.Requires {
			pass, evaluated := c.Result.Pass(rq)
			jr := jsonCaseReq{That: rq.That, Pass: pass, Evaluated: evaluated, Chance: reqChance(c.Analysis, rq)}
			if q, ok := sh.Quantity(rq.Subject); ok && c.Result.Known(q) {
				v, unit := c.Result.Number(q)
				jr.Value, jr.Unit = num(v), unit
			}
			jc.Requirements = append(jc.Requirements, jr)
		}
		if c.Analysis != nil {
			jc.Solves = solvesJSON(c.Analysis)
		}
		out = append(out, jc)
	}
	return out
}
