package cli

import (
	"fmt"
	"math"
	"strings"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/units"
)

// What diff compares beyond the values: the focus's definition, the solves' answers and the
// spread (worst case, RSS and Monte Carlo) of each side's focus.

// focusText describes a sheet's focus for the diff: its name and how it is obtained.
func focusText(sh *engine.Sheet) string {
	q, ok := sh.Quantity(sh.Focus)
	switch {
	case sh.Focus == "":
		return "none"
	case !ok:
		return "`" + sh.Focus + "` (not a quantity)"
	case q.Input():
		return "`" + q.Name + "` (an input, `" + q.Text + "`)"
	}
	return "`" + q.Name + "` = `" + q.Formula + "`"
}

// focusRedefined reports whether the focus is another quantity, or the same one obtained
// another way, in b than in a.
func focusRedefined(a, b *engine.Sheet) (renamed, formula bool) {
	if a.Focus != b.Focus {
		return true, false
	}
	qa, ok1 := a.Quantity(a.Focus)
	qb, ok2 := b.Quantity(b.Focus)
	return false, ok1 && ok2 && qa.Formula != qb.Formula
}

// focusMarkdown says how the focus changed, under the verdict table ("" when it did not).
func focusMarkdown(ra, rb *engine.Result) string {
	a, b := ra.Sheet(), rb.Sheet()
	renamed, formula := focusRedefined(a, b)
	switch {
	case renamed:
		s := fmt.Sprintf("**The focus changed.** Old: %s. New: %s.", focusText(a), focusText(b))
		if q, ok := a.Quantity(b.Focus); ok && b.Focus != "" {
			s += fmt.Sprintf(" The old sheet's `%s` was %s; that is what `--exit-code` compares.", q.Name, ra.Display(q))
		} else if b.Focus == "" {
			s += " The new sheet has no focus, so `--exit-code` judges only the requirements."
		} else {
			s += " The old sheet has no `" + b.Focus + "`, so `--exit-code` judges only the requirements."
		}
		return s + "\n"
	case formula:
		return fmt.Sprintf("**The focus's formula changed.** Old: %s. New: %s.\n", focusText(a), focusText(b))
	}
	return ""
}

// diffSolve is one solve's answer before and after.
type diffSolve struct {
	Name   string     `json:"name"`
	Status string     `json:"status"` // new, removed, changed or same
	Old    *solveSide `json:"old"`
	New    *solveSide `json:"new"`
	Change string     `json:"change"` // new − old, "" when either has no answer
}

type solveSide struct {
	Found   bool     `json:"found"`
	Value   *float64 `json:"value"`
	Unit    string   `json:"unit"`
	SI      *float64 `json:"si"`
	SIUnit  string   `json:"si_unit"`
	Display string   `json:"display"` // the answer, or why there is none
}

func solveSideOf(r *analysis.SolveResult) *solveSide {
	if r == nil {
		return nil
	}
	s := &solveSide{Found: r.Found, Unit: r.Unit, Display: r.Note}
	if s.Display == "" {
		s.Display = "no crossing in range"
	}
	if u, err := units.ParseUnit(r.Unit); err == nil {
		_, s.SIUnit = report.SI(u.Of(1))
	}
	if r.Found {
		s.Value = finiteOrNil(r.Value)
		s.Display = numText(r.Value, r.Unit)
		if q, ok := quantityOf(r.Value, r.Unit); ok {
			s.SI, _ = report.SI(q)
		}
	}
	return s
}

// quantityOf is a number in a named unit as a quantity.
func quantityOf(v float64, unit string) (units.Q, bool) {
	if unit == "" {
		return units.Num(v), true
	}
	u, err := units.ParseUnit(unit)
	if err != nil {
		return units.Q{}, false
	}
	return u.Of(v), true
}

// numText writes a number in its unit as the page does: decibels with 2 decimals, other
// values with 4 significant digits.
func numText(v float64, unit string) string {
	if strings.HasPrefix(unit, "dB") {
		return strings.TrimSpace(units.FormatDB(v) + " " + unit)
	}
	return strings.TrimSpace(units.FormatNum(v) + " " + unit)
}

// changeText writes new − old of two numbers in their units, "" when they are not comparable.
func changeText(ov float64, ou string, nv float64, nu string) string {
	oq, ok1 := quantityOf(ov, ou)
	nq, ok2 := quantityOf(nv, nu)
	if !ok1 || !ok2 || oq.D != nq.D || oq.K != nq.K {
		return ""
	}
	d, err := units.Sub(nq, oq)
	if err != nil {
		return ""
	}
	s := d.String()
	if d.V > 0 {
		s = "+" + s
	}
	return s
}

// solvesDiff compares the solves by name: the new sheet's in order, then the removed ones.
func solvesDiff(aa, ab *analysis.Analysis) []diffSolve {
	out := []diffSolve{}
	old := map[string]*analysis.SolveResult{}
	var oldOrder []*analysis.SolveResult
	if aa != nil {
		for i := range aa.Solves {
			old[aa.Solves[i].Solve.Name] = &aa.Solves[i]
			oldOrder = append(oldOrder, &aa.Solves[i])
		}
	}
	seen := map[string]bool{}
	if ab != nil {
		for i := range ab.Solves {
			n := &ab.Solves[i]
			seen[n.Solve.Name] = true
			o := old[n.Solve.Name]
			d := diffSolve{Name: n.Solve.Name, Status: "new", Old: solveSideOf(o), New: solveSideOf(n)}
			if o != nil {
				d.Status = "same"
				if o.Found != n.Found || o.Value != n.Value || o.Unit != n.Unit || o.Note != n.Note {
					d.Status = "changed"
				}
				if o.Found && n.Found {
					d.Change = changeText(o.Value, o.Unit, n.Value, n.Unit)
				}
			}
			out = append(out, d)
		}
	}
	for _, o := range oldOrder {
		if !seen[o.Solve.Name] {
			out = append(out, diffSolve{Name: o.Solve.Name, Status: "removed", Old: solveSideOf(o)})
		}
	}
	return out
}

// solvesMarkdown writes the solves' answers before and after.
func solvesMarkdown(ds []diffSolve) string {
	if len(ds) == 0 {
		return ""
	}
	var b strings.Builder
	b.WriteString("\n## Solves\n\n| solve | old | new | change |\n| --- | ---: | ---: | ---: |\n")
	for _, d := range ds {
		o, n := "(new)", "(removed)"
		if d.Old != nil {
			o = d.Old.Display
		}
		if d.New != nil {
			n = d.New.Display
		}
		fmt.Fprintf(&b, "| `%s` | %s | %s | %s |\n", d.Name, cell(o), cell(n), d.Change)
	}
	return b.String()
}

func cell(s string) string { return strings.ReplaceAll(s, "|", "\\|") }

// diffSpread is one side's spread of its focus.
type diffSpread struct {
	Focus     string   `json:"focus"`
	Unit      string   `json:"unit"`
	Nominal   *float64 `json:"nominal"`
	WorstLow  *float64 `json:"worst_low"`
	WorstHigh *float64 `json:"worst_high"`
	RSSSigma  *float64 `json:"rss_sigma"`
	// MonteCarlo is null when the trials were not run (--trials 0).
	MonteCarlo *diffMC `json:"monte_carlo"`
}

type diffMC struct {
	Trials  int      `json:"trials"`
	Seed    uint64   `json:"seed"`
	PPass   float64  `json:"p_pass"`
	PPassSE float64  `json:"p_pass_se"` // the binomial standard error of p_pass
	P01     *float64 `json:"p01"`
	P50     *float64 `json:"p50"`
	P99     *float64 `json:"p99"`
}

// diffTolerance is the spread before and after; a side is null when no input its focus
// depends on has a tolerance.
type diffTolerance struct {
	Old *diffSpread `json:"old"`
	New *diffSpread `json:"new"`
}

func spreadOf(a *analysis.Analysis) *diffSpread {
	if a == nil || a.Focus == nil || a.Tolerance == nil {
		return nil
	}
	t := a.Tolerance
	s := &diffSpread{Focus: a.Focus.Name, Unit: a.Unit, Nominal: finiteOrNil(t.Nominal), WorstLow: finiteOrNil(t.WorstLow), WorstHigh: finiteOrNil(t.WorstHigh), RSSSigma: finiteOrNil(t.RSSSigma)}
	if t.Trials > 0 {
		s.MonteCarlo = &diffMC{Trials: t.Trials, Seed: t.Seed, PPass: t.PPass, PPassSE: passSE(t.PPass, t.Trials),
			P01: finiteOrNil(t.P01), P50: finiteOrNil(t.P50), P99: finiteOrNil(t.P99)}
	}
	return s
}

// passSE is the standard error of a proportion p estimated from n independent trials,
// √(p(1−p)/n) (the binomial standard error).
func passSE(p float64, n int) float64 {
	if n <= 0 {
		return math.NaN()
	}
	return math.Sqrt(p * (1 - p) / float64(n))
}

func toleranceDiff(aa, ab *analysis.Analysis) *diffTolerance {
	d := &diffTolerance{Old: spreadOf(aa), New: spreadOf(ab)}
	if d.Old == nil && d.New == nil {
		return nil
	}
	return d
}

// toleranceMarkdown writes the spread of the focus before and after, side by side.
func toleranceMarkdown(d *diffTolerance) string {
	if d == nil {
		return ""
	}
	var b strings.Builder
	b.WriteString("\n## Tolerance and Monte Carlo\n\n")
	head := func(s *diffSpread) string {
		if s == nil {
			return "no tolerances"
		}
		return "`" + s.Focus + "`"
	}
	fmt.Fprintf(&b, "| spread of the focus | old: %s | new: %s |\n| --- | ---: | ---: |\n", head(d.Old), head(d.New))
	row := func(what string, get func(*diffSpread) string) {
		fmt.Fprintf(&b, "| %s | %s | %s |\n", what, sideText(d.Old, get), sideText(d.New, get))
	}
	num := func(v *float64, unit string) string {
		if v == nil {
			return "n/a"
		}
		return numText(*v, unit)
	}
	row("nominal", func(s *diffSpread) string { return num(s.Nominal, s.Unit) })
	row("worst case low", func(s *diffSpread) string { return num(s.WorstLow, s.Unit) })
	row("worst case high", func(s *diffSpread) string { return num(s.WorstHigh, s.Unit) })
	row("root-sum-square σ", func(s *diffSpread) string { return num(s.RSSSigma, changeUnitOf(s.Unit)) })
	mc := func(get func(*diffSpread, *diffMC) string) func(*diffSpread) string {
		return func(s *diffSpread) string {
			if s.MonteCarlo == nil {
				return "not run"
			}
			return get(s, s.MonteCarlo)
		}
	}
	if (d.Old != nil && d.Old.MonteCarlo != nil) || (d.New != nil && d.New.MonteCarlo != nil) {
		row("Monte Carlo 1 % point", mc(func(s *diffSpread, m *diffMC) string { return num(m.P01, s.Unit) }))
		row("Monte Carlo median", mc(func(s *diffSpread, m *diffMC) string { return num(m.P50, s.Unit) }))
		row("Monte Carlo 99 % point", mc(func(s *diffSpread, m *diffMC) string { return num(m.P99, s.Unit) }))
		row("chance that every requirement holds", mc(func(_ *diffSpread, m *diffMC) string {
			return fmt.Sprintf("%.2f %% ± %.2f %%", 100*m.PPass, 100*m.PPassSE)
		}))
		row("trials, seed", mc(func(_ *diffSpread, m *diffMC) string { return fmt.Sprintf("%d, %d", m.Trials, m.Seed) }))
		b.WriteString("\nThe ± is the binomial standard error of the chance, √(p(1−p)/n).\n")
	} else {
		b.WriteString("\nMonte Carlo: not run (`--trials 0`).\n")
	}
	return b.String()
}

// changeUnitOf is the unit of a change of a value in unit: decibels for any decibel unit.
func changeUnitOf(unit string) string {
	if strings.HasPrefix(unit, "dB") {
		return "dB"
	}
	return unit
}

func sideText(s *diffSpread, get func(*diffSpread) string) string {
	if s == nil {
		return "—"
	}
	return get(s)
}
