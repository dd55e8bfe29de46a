package report

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// ChanceText writes a Monte Carlo chance with its standard error as the page does (for check).
func ChanceText(p, se float64, trials int) string { return chanceText(p, se, trials) }

// WorstValue writes a requirement's worst case as the page does (for check).
func WorstValue(sh *engine.Sheet, rs analysis.RequireSpread) string { return worstValue(sh, rs) }

// chanceText writes a Monte Carlo chance with its binomial standard error ("89.4 % ± 0.3 %"),
// with as many decimals as the error needs to show its first digit; a chance of 0 or 1 has
// no spread to show (its standard error is 0) and is written without one.
func chanceText(p, se float64, trials int) string {
	switch {
	case math.IsNaN(p) || trials == 0:
		return "n/a"
	case p == 1:
		return "100 %"
	case p == 0:
		return "0 %"
	}
	d := 1
	for e := 100 * se; d < 4 && e < 0.05*math.Pow(10, 1-float64(d)); d++ {
	}
	return fmt.Sprintf("%.*f %% ± %.*f %%", d, 100*p, d, 100*se)
}

// spreadOf returns a requirement's worst case and chance, when the analyses have them.
func spreadOf(a *analysis.Analysis, rq *engine.Require) (analysis.RequireSpread, bool) {
	if a == nil || a.Tolerance == nil {
		return analysis.RequireSpread{}, false
	}
	for _, rs := range a.Tolerance.Requires {
		if rs.Require == rq {
			return rs, true
		}
	}
	return analysis.RequireSpread{}, false
}

// worstText writes a requirement's worst case, as its quantity's values are shown, and
// whether the bound holds there.
func worstText(sh *engine.Sheet, rs analysis.RequireSpread) string {
	if math.IsNaN(rs.Worst) {
		return ""
	}
	s := worstValue(sh, rs)
	outside := ""
	if len(rs.Warnings) > 0 {
		outside = "; a model is outside its range there"
	}
	if rs.WorstHolds {
		return s + " (holds" + outside + ")"
	}
	return s + " (**fails**" + outside + ")"
}

// worstValue writes a requirement's worst case in its quantity's display unit (as
// Result.Display writes the nominal value beside it).
func worstValue(sh *engine.Sheet, rs analysis.RequireSpread) string {
	q, ok := sh.Quantity(rs.Require.Subject)
	if !ok {
		return fmtNum(rs.Worst, rs.Unit)
	}
	return unitOfName(rs.Unit).Of(rs.Worst).Format(q.DisplayUnit())
}

// requireChance writes a requirement's Monte Carlo chance of holding.
func requireChance(t *analysis.Tolerance, rs analysis.RequireSpread) string {
	if t.Trials == 0 {
		return "being computed"
	}
	s := chanceText(rs.Chance, rs.ChanceSE, t.Trials)
	switch rs.Chance {
	case 1:
		s += " (every trial)"
	case 0:
		s += " (no trial)"
	}
	return s
}

// atRiskLine is the verdict of a sheet that passes at nominal but holds in fewer than
// analysis.AtRiskBelow of the Monte Carlo trials; "" when it is not at risk.
func atRiskLine(r *engine.Result, a *analysis.Analysis) string {
	if !analysis.AtRisk(r, a) {
		return ""
	}
	t := a.Tolerance
	return fmt.Sprintf("**PASS at nominal, but AT RISK: every requirement holds together in only %s of %s Monte Carlo trials** (below %.0f %%; the worst cases and each requirement's chance are in the table).",
		chanceText(t.PPass, t.PPassSE, t.Trials), analysis.Count(t.Trials), 100*analysis.AtRiskBelow)
}

// spreadLine is the sentence under a verdict that is not at risk, when the Monte Carlo
// trials were run and there are requirements: the chance that they all hold together.
func spreadLine(r *engine.Result, a *analysis.Analysis) string {
	if a == nil || a.Tolerance == nil || a.Tolerance.Trials == 0 || len(r.Sheet().Requires) == 0 || analysis.AtRisk(r, a) {
		return ""
	}
	t := a.Tolerance
	return fmt.Sprintf("Under the input tolerances every requirement holds together in %s of %s Monte Carlo trials.", chanceText(t.PPass, t.PPassSE, t.Trials), analysis.Count(t.Trials))
}

// reqChance is a requirement's Monte Carlo chance of holding, when the trials were run.
func reqChance(a *analysis.Analysis, rq *engine.Require) *float64 {
	rs, ok := spreadOf(a, rq)
	if !ok || a.Tolerance.Trials == 0 {
		return nil
	}
	return num(rs.Chance)
}
