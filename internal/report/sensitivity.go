package report

import (
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// The sensitivity table and the corners of the worst case: the analyses give every input's
// effect; the page groups the inputs by the step they were moved by, orders each group by the
// effect as it is printed (ties by name), and names in one line the inputs whose effect
// prints as zero.

// sensGroup is the inputs moved by one step ("1 dB", "10 %").
type sensGroup struct {
	per  string
	rows []analysis.Sensitivity
}

// stepOrder is the order of the step groups on the page; other steps follow by name.
var stepOrder = map[string]int{"1 dB": 0, "10 %": 1}

// sensitivityGroups splits the sensitivities by step, each group ordered by the printed size
// of the effect, largest first, then by name; effects that print as zero (focus value f0)
// come back apart, by name.
func sensitivityGroups(ss []analysis.Sensitivity, unit string, f0 float64) (groups []sensGroup, zero []string) {
	at := map[string]int{}
	for _, s := range ss {
		if !math.IsNaN(s.Change) && printsAsZero(s.Change, unit, f0) {
			zero = append(zero, s.Input)
			continue
		}
		i, ok := at[s.Per]
		if !ok {
			i = len(groups)
			at[s.Per] = i
			groups = append(groups, sensGroup{per: s.Per})
		}
		groups[i].rows = append(groups[i].rows, s)
	}
	sort.Slice(groups, func(i, j int) bool {
		oi, iok := stepOrder[groups[i].per]
		oj, jok := stepOrder[groups[j].per]
		if iok != jok || oi != oj {
			return iok && (!jok || oi < oj)
		}
		return groups[i].per < groups[j].per
	})
	for _, g := range groups {
		sort.Slice(g.rows, func(i, j int) bool {
			return largerPrinted(g.rows[i].Change, g.rows[j].Change, g.rows[i].Input, g.rows[j].Input, unit)
		})
	}
	sort.Strings(zero)
	return groups, zero
}

// largerPrinted orders changes by their size as printed, largest first, those that could not
// be evaluated (NaN) last, ties by name.
func largerPrinted(a, b float64, nameA, nameB, unit string) bool {
	if na, nb := math.IsNaN(a), math.IsNaN(b); na != nb {
		return nb
	}
	if x, y := printedSize(a, unit), printedSize(b, unit); x != y && !math.IsNaN(x) {
		return x > y
	}
	return nameA < nameB
}

// printedSize is the size of a change as the page prints it (signedIn), for ordering: two
// effects that print alike are a tie, broken by name.
func printedSize(v float64, unit string) float64 {
	if math.IsNaN(v) {
		return math.NaN()
	}
	s := strings.TrimPrefix(signedIn(math.Abs(v), unit), "+")
	s, _, _ = strings.Cut(s, " ")
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return math.Abs(v)
	}
	return x
}

// printsAsZero reports whether a change of the focus is too small to show: a decibel change
// prints with 2 decimals, so anything under 0.005 dB prints as 0.00 dB; a linear focus prints
// with 4 significant digits, so a change under half its last digit does not move it.
func printsAsZero(v float64, unit string, f0 float64) bool {
	if strings.HasPrefix(unit, "dB") {
		return signed(v) == "0.00"
	}
	if v == 0 {
		return true
	}
	if f0 == 0 || math.IsNaN(f0) || math.IsInf(f0, 0) {
		return false
	}
	lastDigit := math.Pow(10, math.Floor(math.Log10(math.Abs(f0)))-3)
	return math.Abs(v) < lastDigit/2
}

// zeroText is how a change that prints as zero is described.
func zeroText(unit string) string {
	if strings.HasPrefix(unit, "dB") {
		return "under 0.005 dB, printed as 0.00 dB"
	}
	return "too small to change the focus in its 4 significant digits"
}

func stepText(per string) string {
	switch per {
	case "1 dB":
		return "Per +1 dB of a decibel input"
	case "10 %":
		return "Per +10 % of a linear input"
	}
	return "Per +" + per
}

func (p *page) sensitivity() {
	a := p.in.Analysis
	p.f("## Sensitivity\n\n")
	if len(a.Sensitivity) == 0 {
		p.f("%s depends on no input.\n\n", code(a.Focus.Name))
		return
	}
	f0 := engine.Number(a.Focus, a.FocusValue)
	groups, zero := sensitivityGroups(a.Sensitivity, a.ChangeUnit, f0)
	p.f("Change of %s when one input rises by one step, every other input at its nominal value; largest first within each step, equal changes by name:\n\n", code(a.Focus.Name))
	for _, g := range groups {
		p.f("%s:\n\n| input | change of %s |\n| --- | ---: |\n", stepText(g.per), text(a.Focus.Name))
		for _, s := range g.rows {
			p.f("| %s | %s |\n", p.inputName(s.Input), signedIn(s.Change, a.ChangeUnit))
		}
		p.f("\n")
	}
	if len(zero) > 0 {
		names := make([]string, len(zero))
		for i, n := range zero {
			names[i] = p.inputName(n)
		}
		p.f("No visible effect (%s): %s.\n\n", zeroText(a.ChangeUnit), strings.Join(names, ", "))
	}
}

// worstCorners writes where each toleranced input sits in the two worst cases, ordered by
// the change in the worst case low as printed, ties by name, as the sensitivity table is.
func (p *page) worstCorners() {
	a := p.in.Analysis
	t := a.Tolerance
	high := map[string]analysis.Corner{}
	for _, c := range t.HighCorner {
		high[c.Input] = c
	}
	low := append([]analysis.Corner(nil), t.LowCorner...)
	unit := a.ChangeUnit
	sort.Slice(low, func(i, j int) bool {
		return largerPrinted(low[i].Effect, low[j].Effect, low[i].Input, low[j].Input, unit)
	})
	var rows, still []string
	for _, lo := range low {
		if lo.Limit == "nominal" && !math.IsNaN(lo.Effect) {
			still = append(still, p.inputName(lo.Input))
			continue
		}
		rows = append(rows, "| "+p.inputName(lo.Input)+" | "+p.cornerText(lo)+" | "+p.cornerText(high[lo.Input])+" |")
	}
	if len(rows) > 0 {
		p.f("Where the worst cases sit: each input at the limit that moves %s down (low) or up (high); in brackets the change that input alone makes; largest first:\n\n", code(a.Focus.Name))
		p.f("| input | worst case low | worst case high |\n| --- | --- | --- |\n%s\n\n", strings.Join(rows, "\n"))
	}
	if len(still) > 0 {
		p.f("At their nominal values in both worst cases (their tolerances do not move %s): %s.\n\n", code(a.Focus.Name), strings.Join(still, ", "))
	}
}

func (p *page) cornerText(c analysis.Corner) string {
	if math.IsNaN(c.Effect) {
		return "could not be evaluated at its limits"
	}
	return c.Limit + " limit, " + fmtNum(c.Value, c.Unit) + " (" + signedIn(c.Effect, p.in.Analysis.ChangeUnit) + ")"
}
