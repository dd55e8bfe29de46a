package report

import (
	"bytes"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"unicode/utf8"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// page accumulates the Markdown and the chart files.
type page struct {
	in     Input
	r      *engine.Result
	b      bytes.Buffer
	files  []File
	chains []analysis.Cascade
	charts []*pendingChart // the charts being drawn, in the order of the page
}

func (p *page) f(format string, args ...any) { fmt.Fprintf(&p.b, format, args...) }

// row writes one table row of cells that are Markdown already.
func (p *page) row(cells ...string) {
	p.b.WriteString("|")
	for _, c := range cells {
		p.b.WriteString(" ")
		p.b.WriteString(c)
		p.b.WriteString(" |")
	}
	p.b.WriteString("\n")
}

// Markdown renders the budget page. The charts it links come back as files to write beside it.
func Markdown(in Input) ([]byte, []File) {
	in = in.filled()
	p := &page{in: in, r: in.Result, chains: analysis.Cascades(in.Result)}
	// The line items (a row per quantity: most of a big sheet's page) are written on a
	// goroutine of their own while the rest of the page is, into a page of their own, and set
	// in their place at the end (no other section reads them).
	items := make(chan []byte, 1)
	go func() {
		ip := &page{in: p.in, r: p.r, chains: p.chains}
		if ip.multiCase() {
			ip.caseLineItems()
		} else {
			ip.lineItems()
		}
		items <- ip.b.Bytes()
	}()
	sh := in.Sheet
	title := sh.Title
	if title == "" {
		title = "Link budget"
	}
	p.f("# %s\n\n", text(title))
	if sh.Summary != "" {
		p.f("%s\n\n", text(sh.Summary))
	}
	if p.multiCase() {
		p.caseVerdict()
	} else {
		p.verdict()
	}
	p.warnings()
	at := p.b.Len()
	p.cascades()
	p.caseSections()
	if a := in.Analysis; a != nil && a.Focus != nil {
		p.budget()
		p.sensitivity()
		p.tolerance()
	}
	p.sweeps()
	p.solves()
	p.freqPlans()
	p.cautions()
	p.footer()
	// What was written apart goes in its place: the line items and each chart's link, in
	// the order of their places (the line items first where a chart comes right after them).
	rest, li := p.b.Bytes(), <-items
	out := make([]byte, 0, len(rest)+len(li)+len(p.charts)*96)
	from, itemsDone := 0, false
	for _, c := range p.charts {
		if !itemsDone && at <= c.at {
			out, from, itemsDone = append(append(out, rest[from:at]...), li...), at, true
		}
		out, from = append(append(out, rest[from:c.at]...), p.link(c)...), c.at
	}
	if !itemsDone {
		out, from = append(append(out, rest[from:at]...), li...), at
	}
	out = append(out, rest[from:]...)
	return out, p.files
}

// text is the one escape for worksheet text (titles, notes, sources, stage labels, names,
// messages) on the page: every character Markdown or HTML could read as syntax is
// backslash-escaped, so no text becomes a tag, a link, an autolink, emphasis or a table
// cell boundary, and line breaks become spaces. Code spans go through code.
func text(s string) string {
	s = strings.TrimSpace(s)
	// Most text needs nothing: find the first rune that does before building anything.
	i := 0
	for i < len(s) {
		r, n := utf8.DecodeRuneInString(s[i:])
		if textAction(s, i, r) != keepRune {
			break
		}
		i += n
	}
	if i == len(s) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s) + 8)
	b.WriteString(s[:i])
	for j, r := range s[i:] {
		switch textAction(s, i+j, r) {
		case blankRune:
			b.WriteByte(' ')
		case dropRune:
		case escapeRune:
			b.WriteByte('\\')
			b.WriteRune(r)
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// What text does with a rune.
const (
	keepRune   = iota
	blankRune  // a line break or tab becomes a blank
	dropRune   // control characters carry nothing a reader needs
	escapeRune // Markdown or HTML syntax, escaped with a backslash
)

// textAction says what text does with the rune r at byte i of s.
func textAction(s string, i int, r rune) int {
	switch {
	case r == '\n' || r == '\r' || r == '\t':
		return blankRune
	case r < 0x20 || r == 0x7f:
		return dropRune
	case r < 0x80 && isPunct[r], i == 0 && strings.ContainsRune("-+=", r), listNumber(s, i):
		return escapeRune
	}
	return keepRune
}

// isPunct marks the ASCII characters of markdownPunct (text asks about every character of
// every cell).
var isPunct = func() (t [0x80]bool) {
	for _, c := range markdownPunct {
		t[c] = true
	}
	return t
}()

// markdownPunct is the ASCII punctuation that can start Markdown or HTML syntax inside a
// line: emphasis, strikethrough, code, links and images, tags and entities, table cell
// boundaries, headings' closing marks, and autolinks (scheme colons, e-mail at-signs). The
// list and heading marks that count only at the start of a line are escaped there (text may
// start a line: the summary does).
const markdownPunct = "\\`*_~[]<>|&#:@"

// listNumber reports whether s[i] is the "." or ")" that would make the digits before it,
// at the start of the text, an ordered list item.
func listNumber(s string, i int) bool {
	if i == 0 || s[i] != '.' && s[i] != ')' {
		return false
	}
	for _, c := range []byte(s[:i]) {
		if c < '0' || c > '9' {
			return false
		}
	}
	return true
}

func (p *page) verdict() {
	sh := p.in.Sheet
	p.f("## Verdict\n\n")
	fails, unknown := 0, 0
	for _, rq := range sh.Requires {
		switch {
		case !known(p.r, rq):
			unknown++
		case !passes(p.r, rq):
			fails++
		}
	}
	switch {
	case len(sh.Requires) == 0:
		p.f("No requirements are set; add `[[require]]` entries to have the page check them.\n\n")
	case fails == 0 && unknown == 0 && atRiskLine(p.r, p.in.Analysis) != "":
		p.f("%s\n\n", atRiskLine(p.r, p.in.Analysis))
	case fails == 0 && unknown == 0:
		p.f("**PASS: every requirement holds** (%d of %d).\n\n", len(sh.Requires), len(sh.Requires))
	default:
		p.f("**FAIL: %d of %d requirements do not hold", fails+unknown, len(sh.Requires))
		if unknown > 0 {
			p.f(" (%d could not be evaluated)", unknown)
		}
		p.f(".**\n\n")
	}
	if line := spreadLine(p.r, p.in.Analysis); line != "" {
		p.f("%s\n\n", line)
	}
	if f, ok := sh.Quantity(sh.Focus); ok {
		p.f("Focus: %s = **%s**.\n\n", code(f.Name), p.r.Display(f))
	}
	if a := p.in.Analysis; a != nil {
		for _, so := range a.Solves {
			p.f("- %s\n", solveSentence(sh, so))
		}
		if len(a.Solves) > 0 {
			p.f("\n")
		}
	}
	if len(sh.Requires) == 0 {
		return
	}
	tol := p.in.Analysis != nil && p.in.Analysis.Tolerance != nil
	if tol {
		p.f("| requirement | nominal | worst case | chance it holds | result | note |\n| --- | --- | --- | --- | --- | --- |\n")
	} else {
		p.f("| requirement | value | result | note |\n| --- | --- | --- | --- |\n")
	}
	for _, rq := range sh.Requires {
		value := ""
		if q, ok := sh.Quantity(rq.Subject); ok {
			value = p.r.Display(q)
		}
		result := "PASS"
		switch {
		case !known(p.r, rq):
			result = "**cannot evaluate**"
		case !passes(p.r, rq):
			result = "**FAIL**"
		}
		if rs, ok := spreadOf(p.in.Analysis, rq); ok {
			p.f("| %s | %s | %s | %s | %s | %s |\n", code(rq.That), value, worstText(sh, rs), requireChance(p.in.Analysis.Tolerance, rs), result, text(rq.Note))
		} else {
			p.f("| %s | %s | %s | %s |\n", code(rq.That), value, result, text(rq.Note))
		}
	}
	p.f("\n")
	if tol {
		p.f("Worst case: every toleranced input at the limit that moves the value against its bound. Chance: the share of Monte Carlo trials in which the requirement holds, ± its standard error sqrt(p(1 − p)/n).\n\n")
	}
}

func solveSentence(sh *engine.Sheet, r analysis.SolveResult) string {
	so := r.Solve
	if !r.Found {
		why := r.Note
		if why == "" {
			why = "no crossing in range"
		}
		return fmt.Sprintf("%s: %s does not reach %s for %s between %s and %s: %s.", code(so.Name), code(so.SoThat), inUnitOf(sh, so.SoThat, so.Equals), code(so.Vary), inUnitOf(sh, so.Vary, so.Within[0]), inUnitOf(sh, so.Vary, so.Within[1]), text(why))
	}
	return fmt.Sprintf("%s: %s reaches %s at %s = **%s**%s.", code(so.Name), code(so.SoThat), inUnitOf(sh, so.SoThat, so.Equals), code(so.Vary), fmtNum(r.Value, r.Unit), solveWarnings(r))
}

// solveWarnings says, beside a solve's answer, that a model is outside its range there.
func solveWarnings(r analysis.SolveResult) string {
	if len(r.Warnings) == 0 {
		return ""
	}
	return "; a model is outside its range there: " + text(strings.Join(r.Warnings, "; "))
}

func tolText(t *engine.Tol) string {
	if t == nil {
		return ""
	}
	s := t.Text
	if !strings.Contains(s, "/") && !t.Sigma {
		s = "±" + s
	}
	return s + " (" + t.Dist + ")"
}

// groupHeading starts a group's line items with its heading (the top level is "General");
// it reports false, writing nothing, for a group without quantities of its own.
func (p *page) groupHeading(g *engine.Group) bool {
	if len(g.Quantities) == 0 {
		return false
	}
	name := g.Name
	if name == "" {
		name = "General"
	}
	p.f("### %s\n\n", text(name))
	return true
}

// itemLabel returns a line item's first cells: its name within group g (marked when r has
// a warning on it), and how it is obtained ("input", or its formula).
func itemLabel(g *engine.Group, q *engine.Quantity, r *engine.Result) (key, how string) {
	key = strings.TrimPrefix(q.Name, g.Name+".")
	if len(r.Warnings(q)) > 0 {
		key += " (warning)"
	}
	how = "input"
	if !q.Input() {
		how = code("= " + q.Formula)
	}
	return key, how
}

func (p *page) lineItems() {
	sh := p.in.Sheet
	p.f("## Line items\n\n")
	for _, g := range sh.Groups {
		if !p.groupHeading(g) {
			continue
		}
		p.f("| quantity | value | obtained from | tolerance | note | source |\n| --- | ---: | --- | --- | --- | --- |\n")
		for _, q := range g.Quantities {
			key, how := itemLabel(g, q, p.r)
			p.row(text(key), p.r.Display(q), how, text(tolText(q.Tol)), text(q.Note), text(q.Source))
		}
		p.f("\n")
	}
}

func (p *page) cascades() {
	if len(p.chains) == 0 {
		return
	}
	p.f("## Cascades\n\n")
	for _, ci := range p.chains {
		p.f("### %s\n\n", text(ci.Chain.Name))
		if ci.Err != nil {
			p.f("The cascade cannot be computed: %s.\n\n", text(ci.Err.Error()))
			continue
		}
		in, hasIn := inputDBm(ci)
		nin, hasNoise := noiseInDBm(ci)
		if hasIn {
			p.f("Signal at the chain input: %s = %s. ", code(ci.Input.Name), p.r.Display(ci.Input))
		}
		if hasNoise {
			p.f("Noise in %s = %s at T0 = 290 K: %s dBm.", code(ci.Bandwidth.Name), p.r.Display(ci.Bandwidth), db2(nin))
		}
		if hasIn || hasNoise {
			p.f("\n\n")
		}
		p.f("| # | stage | gain | NF | IIP3 | cum. gain | cum. NF | cum. IIP3 | share of F−1 | share of 1/IIP3 |")
		hasIP2 := ci.Result.HasIIP2
		if hasIP2 {
			p.f(" IIP2 | cum. IIP2 |")
		}
		if hasIn {
			p.f(" signal out |")
		}
		if hasNoise {
			p.f(" noise out |")
		}
		p.f("\n| ---: | --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |")
		if hasIP2 {
			p.f(" ---: | ---: |")
		}
		if hasIn {
			p.f(" ---: |")
		}
		if hasNoise {
			p.f(" ---: |")
		}
		p.f("\n")
		for i, st := range ci.Stages {
			r := ci.Result.Stages[i]
			iip3, cumIIP3, share3 := "", "", ""
			if st.HasIIP3 {
				iip3 = db2(st.IIP3) + " dBm"
				share3 = pct(r.IIP3Share)
			}
			if r.HasIIP3 {
				cumIIP3 = db2(r.CumIIP3) + " dBm"
			}
			p.f("| %d | %s | %s dB | %s dB | %s | %s dB | %s dB | %s | %s | %s |", i+1, text(st.Name), db2(st.GainDB), db2(st.NFDB), iip3, db2(r.CumGainDB), db2(r.CumNFDB), cumIIP3, pct(r.NoiseShare), share3)
			if hasIP2 {
				p.f(" %s | %s |", dbmIf(st.IIP2, st.HasIIP2), dbmIf(r.CumIIP2, r.HasIIP2))
			}
			if hasIn {
				p.f(" %s dBm |", db2(in+r.CumGainDB))
			}
			if hasNoise {
				p.f(" %s dBm |", db2(nin+r.CumNFDB+r.CumGainDB))
			}
			p.f("\n")
		}
		c := ci.Result
		total := "n/a"
		if c.HasIIP3 {
			total = db2(c.IIP3) + " dBm"
		}
		p.f("\nCascade: gain **%s dB**, noise figure **%s dB** (Te %s K), IIP3 **%s**", db2(c.GainDB), db2(c.NFDB), units.FormatNum(c.TeK), total)
		if c.HasIIP3 {
			p.f(", OIP3 %s dBm", db2(c.OIP3))
		}
		if c.HasIP1dB {
			p.f(", input P1dB %s dBm, output P1dB %s dBm", db2(c.IP1dB), db2(c.OP1dB))
		}
		if c.HasIIP2 {
			p.f(", IIP2 %s dBm (stages added in phase, a worst case)", db2(c.IIP2))
		}
		p.f(".\n\n")
		p.f("%s\n\n", dominantStages(ci))
		p.linearity(ci)
		for _, n := range ci.Notes {
			p.f("- Note: %s.\n", text(n))
		}
		if len(ci.Notes) > 0 {
			p.f("\n")
		}
		p.levelChart(ci)
		p.caseLevels(ci)
	}
}

// dbmIf writes a level in dBm, or nothing when there is none.
func dbmIf(v float64, ok bool) string {
	if !ok {
		return ""
	}
	return db2(v) + " dBm"
}

// dominantStages names the stages that set the noise figure and the intercept.
func dominantStages(ci analysis.Cascade) string {
	bestN, bestI := -1, -1
	for i, r := range ci.Result.Stages {
		if bestN < 0 || r.NoiseShare > ci.Result.Stages[bestN].NoiseShare {
			bestN = i
		}
		if r.HasIIP3 && ci.Stages[i].HasIIP3 && (bestI < 0 || r.IIP3Share > ci.Result.Stages[bestI].IIP3Share) {
			bestI = i
		}
	}
	var parts []string
	if bestN >= 0 && ci.Result.NFDB > 0 {
		parts = append(parts, fmt.Sprintf("**%s** sets %s of the noise factor excess (F − 1)", text(ci.Stages[bestN].Name), pct(ci.Result.Stages[bestN].NoiseShare)))
	}
	if bestI >= 0 {
		parts = append(parts, fmt.Sprintf("**%s** sets %s of the IIP3 degradation", text(ci.Stages[bestI].Name), pct(ci.Result.Stages[bestI].IIP3Share)))
	}
	if len(parts) == 0 {
		return "The chain adds no noise and has no intercept points."
	}
	return "In this chain " + strings.Join(parts, "; ") + "."
}

func (p *page) budget() {
	a := p.in.Analysis
	p.f("## Where the budget goes\n\n")
	if len(a.Budget) == 0 {
		p.f("%s is not a sum and difference of decibel terms, so it does not break down into line items; see the sensitivity below.\n\n", code(a.Focus.Name))
		p.chainShares()
		return
	}
	if a.Flow != nil {
		p.signalFlow()
		p.chainShares()
		return
	}
	abs := 0.0
	for _, c := range a.Budget {
		abs += math.Abs(c.Value)
	}
	p.f("%s = %s is not one level carried along a signal path by gains and losses in dB, so its terms are listed as a sum (followed through the quantities its formula names): those with a reference (dBW, dBHz, dB/K) as the formula writes them, then the gains and losses in dB, largest first:\n\n", code(a.Focus.Name), p.r.Display(a.Focus))
	p.f("| # | item | contribution | running total | share of the total swing |\n| ---: | --- | ---: | ---: | ---: |\n")
	for i, c := range a.Budget {
		p.f("| %d | %s | %s | %s | %s |\n", i+1, code(c.Item), contribution(c), fmtNum(c.Total, c.TotalUnit), pct(math.Abs(c.Value)/abs))
	}
	p.f("| | **total** | | **%s %s** | |\n\n", db2(a.Focus.Number(a.FocusValue)), a.Unit)
	p.budgetChart()
	p.chainShares()
}

// chainShares lists, for each chain, the stages that set its noise figure and intercept.
func (p *page) chainShares() {
	var lines []string
	for _, ci := range p.chains {
		if ci.Err == nil {
			lines = append(lines, fmt.Sprintf("- %s: %s", code(ci.Chain.Name), strings.TrimPrefix(dominantStages(ci), "In this chain ")))
		}
	}
	if len(lines) > 0 {
		p.f("Inside the chains (shares per stage are in the cascade tables above):\n\n%s\n\n", strings.Join(lines, "\n"))
	}
}

func (p *page) tolerance() {
	a := p.in.Analysis
	t := a.Tolerance
	p.f("## Tolerance\n\n")
	if t == nil {
		p.f("No input that %s depends on has a tolerance; add `tol = \"1 dB\"` to the long form of an input to see the spread.\n\n", code(a.Focus.Name))
		return
	}
	u := a.Unit
	p.f("Spread of %s from the input tolerances (a normal tolerance is its 3σ limit):\n\n", code(a.Focus.Name))
	p.f("| measure | %s |\n| --- | ---: |\n", text(a.Focus.Name))
	p.f("| nominal | %s |\n", fmtNum(t.Nominal, u))
	p.f("| worst case low (every input at the limit that lowers it) | %s |\n", fmtNum(t.WorstLow, u))
	p.f("| worst case high (every input at the limit that raises it) | %s |\n", fmtNum(t.WorstHigh, u))
	p.f("| root-sum-square σ | %s |\n", fmtNum(t.RSSSigma, a.ChangeUnit))
	if t.Trials == 0 {
		p.f("\nMonte Carlo: being computed; the page is completed when the trials are done.\n\n")
		p.worstCorners()
		return
	}
	p.f("| Monte Carlo 1 %% point | %s |\n", fmtNum(t.P01, u))
	p.f("| Monte Carlo median | %s |\n", fmtNum(t.P50, u))
	p.f("| Monte Carlo 99 %% point | %s |\n", fmtNum(t.P99, u))
	if len(p.in.Sheet.Requires) > 0 {
		p.f("| chance that every requirement holds | **%s** |\n", chanceText(t.PPass, t.PPassSE, t.Trials))
	}
	p.f("\n")
	p.f("Monte Carlo: %d trials, seed %d", t.Trials, t.Seed)
	if t.Failed > 0 {
		p.f("; %d trials could not be evaluated and count as failing", t.Failed)
	}
	p.f(".\n\n")
	moved := false
	for _, s := range t.Shares {
		moved = moved || s.Share > 0
	}
	if !moved {
		p.f("The tolerances given do not move %s.\n\n", code(a.Focus.Name))
	} else {
		p.f("| input | share of the variance |\n| --- | ---: |\n")
		for _, s := range t.Shares {
			p.f("| %s | %s |\n", p.inputName(s.Input), pct(s.Share))
		}
		p.f("\n")
	}
	p.worstCorners()
	p.histChart()
}

func (p *page) sweeps() {
	a := p.in.Analysis
	if a == nil || len(a.Sweeps) == 0 {
		return
	}
	p.f("## Sweeps\n\n")
	for i, sw := range a.Sweeps {
		p.f("### %s from %s to %s\n\n", text(sw.Sweep.Vary), inUnitOf(p.in.Sheet, sw.Sweep.Vary, sw.Sweep.From), inUnitOf(p.in.Sheet, sw.Sweep.Vary, sw.Sweep.To))
		p.sweepChart(i, sw)
		for _, c := range sw.Crossings {
			rq := p.in.Sheet.Requires[c.Require]
			p.f("- %s crosses the bound of %s at %s = %s.\n", code(c.Quantity), code(rq.That), code(sw.Sweep.Vary), fmtNum(c.X, sw.Unit))
		}
		if len(sw.Crossings) > 0 {
			p.f("\n")
		}
		p.f("| %s |", text(unitHead(sw.Sweep.Vary, sw.Unit)))
		for _, s := range sw.Series {
			p.f(" %s |", text(unitHead(s.Quantity, s.Unit)))
		}
		p.f("\n| ---: |%s\n", strings.Repeat(" ---: |", len(sw.Series)))
		for j, x := range sw.X {
			p.f("| %s |", units.FormatNum(x))
			for _, s := range sw.Series {
				p.f(" %s |", tableNum(s.Y[j], s.Unit))
			}
			p.f("\n")
		}
		p.f("\n")
	}
}

func unitHead(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " (" + unit + ")"
}

func tableNum(v float64, unit string) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if strings.HasPrefix(unit, "dB") {
		return db2(v)
	}
	return units.FormatNum(v)
}

func (p *page) solves() {
	a := p.in.Analysis
	if a == nil || len(a.Solves) == 0 {
		return
	}
	p.f("## Solves\n\n| solve | vary | so that | within | result |\n| --- | --- | --- | --- | --- |\n")
	for _, r := range a.Solves {
		so := r.Solve
		res := "no crossing in range"
		if r.Found {
			res = "**" + fmtNum(r.Value, r.Unit) + "**" + solveWarnings(r)
		} else if r.Note != "" {
			res = text(r.Note)
		}
		sh := p.in.Sheet
		p.f("| %s | %s | %s = %s | %s to %s | %s |\n", code(so.Name), code(so.Vary), code(so.SoThat), inUnitOf(sh, so.SoThat, so.Equals), inUnitOf(sh, so.Vary, so.Within[0]), inUnitOf(sh, so.Vary, so.Within[1]), res)
	}
	p.f("\n")
}

func (p *page) warnings() {
	var lines []string
	for _, d := range p.in.Warnings {
		if d.Severity != engine.Warning {
			continue
		}
		who := ""
		if d.Quantity != "" {
			who = code(d.Quantity) + ": "
		}
		lines = append(lines, "- "+who+text(d.Summary))
	}
	for _, ci := range p.chains {
		if ci.Err != nil {
			lines = append(lines, "- "+code(ci.Chain.Name)+": "+text(ci.Err.Error()))
		}
	}
	p.f("## Warnings\n\n")
	if len(lines) == 0 {
		p.f("None: every function was used inside its model's range.\n\n")
		return
	}
	p.f("%s\n\n", strings.Join(lines, "\n"))
}

func (p *page) cautions() {
	p.f(`## Cautions

- This page is an engineering estimate, not a compliance finding. Transmit power, EIRP, duty cycle,
  occupied bandwidth and frequency use are regulated, and the limits depend on where the radio is
  used: check them with the spectrum authority of that country or region, and follow licensed
  practice where a licence is needed.
- RF exposure near antennas depends on power, gain, distance and duty cycle; check the applicable
  exposure limits and keep people at the safe distance they require.
- Models have ranges of validity (see the warnings above); measured margins in the field are the
  final word.

`)
}

func (p *page) footer() {
	sh := p.in.Sheet
	p.f("---\n\nRendered by rfledger from %s (content hash %s", code(filepath.Base(sh.File)), code(sh.Hash))
	if len(sh.Parts) > 0 {
		p.f(", with parts %s", strings.Join(quoteAll(sh.Parts), ", "))
	}
	p.f("). The same worksheet always gives the same page.\n")
}

func quoteAll(ss []string) []string {
	out := make([]string, len(ss))
	for i, s := range ss {
		out[i] = code(s)
	}
	return out
}

// inUnitOf formats v in the display unit of the named quantity (the unit its input was
// written in), so a sweep of a rain rate reads "0 mm/h to 60 mm/h", not in m/s.
func inUnitOf(sh *engine.Sheet, name string, v units.Q) string {
	if q, ok := sh.Quantity(name); ok {
		if u := q.DisplayUnit(); u != nil && u.Sym != "" {
			return v.Format(u)
		}
	}
	return v.String()
}

// inputName writes an input's name as code, with the stage's label for a chain stage value
// ("rx.chain[2].loss" (SAW filter)).
func (p *page) inputName(name string) string {
	for _, ci := range p.chains {
		for _, st := range ci.Chain.Stages {
			for _, q := range st.Values {
				if q.Name == name {
					return code(name) + " (" + text(st.Label) + ")"
				}
			}
		}
	}
	return code(name)
}

// signedIn writes a change with its sign in its unit: decibels with 2 decimals, linear
// values with 4 significant digits.
func signedIn(v float64, unit string) string {
	if strings.HasPrefix(unit, "dB") || math.IsNaN(v) {
		return strings.TrimSpace(signed(v) + " " + unit)
	}
	s := units.FormatNum(v)
	if v > 0 {
		s = "+" + s
	}
	return strings.TrimSpace(s + " " + unit)
}
