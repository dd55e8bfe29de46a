package analysis

import (
	"fmt"
	"math"
	"strconv"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// AtRiskBelow is the chance of holding under which a sheet that passes at nominal is at
// risk: fewer than 90 % of the Monte Carlo trials meet every requirement (common practice,
// no source: a one-in-ten chance of failing is more than a budget's margin should leave).
const AtRiskBelow = 0.9

// RequireSpread is one requirement under the inputs' tolerances: the bounded quantity at
// the worst case in the direction that fails the bound, and the Monte Carlo chance that the
// requirement holds.
type RequireSpread struct {
	Require *engine.Require
	// Worst is the bounded quantity (in Unit) with every toleranced input at the limit that
	// moves it against the bound (lowers it for ">=", raises it for "<="); NaN when the
	// requirement is not a plain ordering bound on one quantity, or could not be evaluated.
	Worst      float64
	Unit       string
	WorstHolds bool    // whether the bound still holds at Worst
	Holds      int     // Monte Carlo trials in which the requirement holds
	Chance     float64 // Holds / Trials; NaN when the trials were not run
	ChanceSE   float64 // its binomial standard error, StdErr(Chance, Trials)
	// Warnings are the validity warnings raised at the worst case's corner (point 0).
	Warnings []engine.Tally
}

// StdErr is the standard error of a proportion p estimated from n independent trials,
// sqrt(p(1−p)/n): the spread of a Monte Carlo chance from the finite number of trials
// (the standard error of a binomial proportion, as in Wackerly, Mendenhall and Scheaffer,
// Mathematical Statistics with Applications, 7th ed., the large-sample interval for p; the
// section recalled from memory). NaN for n < 1.
func StdErr(p float64, n int) float64 {
	if n < 1 {
		return math.NaN()
	}
	return math.Sqrt(p * (1 - p) / float64(n))
}

// AtRisk reports whether r, with a's analyses, passes every requirement at nominal yet holds
// in fewer than AtRiskBelow of the Monte Carlo trials. A sheet without requirements, or whose
// trials were not run, is never at risk.
func AtRisk(r *engine.Result, a *Analysis) bool {
	if a == nil || a.Tolerance == nil || a.Tolerance.Trials == 0 || len(r.Sheet().Requires) == 0 {
		return false
	}
	for _, rq := range r.Sheet().Requires {
		if p, _ := r.Pass(rq); !p {
			return false
		}
	}
	return a.Tolerance.PPass < AtRiskBelow
}

// meets reports whether v satisfies "v op limit" for an ordering bound.
func meets(op string, v, limit float64) bool {
	switch op {
	case ">=":
		return v >= limit
	case ">":
		return v > limit
	case "<=":
		return v <= limit
	case "<":
		return v < limit
	}
	return false
}

func ordering(op string) bool { return op == ">=" || op == ">" || op == "<=" || op == "<" }

// requireWorst works out every requirement's worst case: each toleranced input (qs, with
// its limits lo and hi) is put at the limit that moves the bounded quantity against its
// bound, all together, over cone.
func (fa *focusAt) requireWorst(qs []*engine.Quantity, lo, hi []units.Q, cone *engine.Cone) []RequireSpread {
	s := fa.nom.Sheet()
	out := make([]RequireSpread, len(s.Requires))
	for i, rq := range s.Requires {
		out[i] = RequireSpread{Require: rq, Worst: math.NaN(), Chance: math.NaN(), ChanceSE: math.NaN()}
		q, ok := s.Quantity(rq.Subject)
		if !ok || !ordering(rq.Op) {
			continue // not an ordering bound: no failing direction
		}
		down := rq.Op == ">=" || rq.Op == ">" // the bound fails when q falls
		sub := &focusAt{nom: fa.nom, sc: fa.sc, focus: q, fu: reportUnit(q)}
		lin := sub.linear(qs) // the affine form when q has one: no cone per input
		corner := make([]units.Q, len(qs))
		for j := range qs {
			var vl, vh float64
			var okl, okh bool
			if lin != nil {
				vl, okl = sub.linearAt(lin, j, lo[j].V)
				vh, okh = sub.linearAt(lin, j, hi[j].V)
			} else {
				vl, okl = sub.at(qs[j:j+1], lo[j:j+1], s.Cone(qs[j]))
				vh, okh = sub.at(qs[j:j+1], hi[j:j+1], s.Cone(qs[j]))
			}
			corner[j], _ = fa.nom.Value(qs[j])
			if okl && okh && vl != vh {
				if (vl < vh) == down {
					corner[j] = lo[j]
				} else {
					corner[j] = hi[j]
				}
			}
		}
		v, ok, ws := fa.corner(qs, corner, cone, q)
		out[i].Warnings = ws
		if w := numberIn(sub.fu, v); ok && !math.IsNaN(w) {
			out[i].Worst, out[i].Unit = w, q.UnitName()
			out[i].WorstHolds = meets(rq.Op, w, numberIn(sub.fu, rq.Bound))
		}
	}
	return out
}

// corner evaluates q with the inputs qs at vals, over cone, in a scenario of its own that
// counts the warnings the models raise there.
func (fa *focusAt) corner(qs []*engine.Quantity, vals []units.Q, cone *engine.Cone, q *engine.Quantity) (units.Q, bool, []engine.Tally) {
	sc := fa.nom.Scenario()
	sc.Point(0)
	for j, in := range qs {
		sc.Set(in, vals[j])
	}
	sc.Run(cone)
	v, ok := sc.Value(q)
	return v, ok, sc.Tallies()
}

// cornerDiags says that a worst case lies where a model is not valid: a requirement's, then
// the focus's low and high ones (unless a requirement's corner said the same already).
func cornerDiags(t *Tolerance, focus string, unit string) engine.Diagnostics {
	var out engine.Diagnostics
	said := map[string]bool{}
	for _, rs := range t.Requires {
		out = append(out, talliesDiags(rs.Warnings, func(engine.Tally) string {
			return fmt.Sprintf("at the worst case of the requirement %s (%s = %s)", rs.Require.That, rs.Require.Subject, fmtX(rs.Worst, rs.Unit))
		})...)
		for _, w := range rs.Warnings {
			said[w.Quantity.Name+"\x00"+w.Message] = true
		}
	}
	for i, ws := range [2][]engine.Tally{t.LowWarnings, t.HighWarnings} {
		side, v := "low", t.WorstLow
		if i == 1 {
			side, v = "high", t.WorstHigh
		}
		for _, w := range ws {
			if said[w.Quantity.Name+"\x00"+w.Message] {
				continue
			}
			out = append(out, talliesDiags([]engine.Tally{w}, func(engine.Tally) string {
				return fmt.Sprintf("at the worst case %s of %s (%s)", side, focus, fmtX(v, unit))
			})...)
		}
	}
	return out
}

// talliesDiags turns warnings counted over an analysis's points into diagnostics at their
// quantities; where says at which points, for a tally.
func talliesDiags(ts []engine.Tally, where func(engine.Tally) string) engine.Diagnostics {
	var out engine.Diagnostics
	for _, t := range ts {
		out = append(out, engine.Diagnostic{Severity: engine.Warning, Quantity: t.Quantity.Name, Summary: where(t) + ": " + t.Message, Range: t.Quantity.Range})
	}
	return out
}

// trialsDiags says which Monte Carlo trials raised each warning.
func trialsDiags(t *Tolerance) engine.Diagnostics {
	return talliesDiags(t.Warnings, func(w engine.Tally) string {
		return fmt.Sprintf("in %s of %s Monte Carlo trials (figures from trial %s)", Count(w.Points), Count(t.Trials), Count(w.First+1))
	})
}

// sweepDiags says at which points of a sweep each warning was raised.
func sweepDiags(sw SweepResult) engine.Diagnostics {
	return talliesDiags(sw.Warnings, func(w engine.Tally) string {
		at := fmt.Sprintf("at %s = %s", sw.Sweep.Vary, fmtX(sw.X[w.First], sw.Unit))
		if w.Last != w.First {
			at = fmt.Sprintf("from %s = %s to %s", sw.Sweep.Vary, fmtX(sw.X[w.First], sw.Unit), fmtX(sw.X[w.Last], sw.Unit))
		}
		return fmt.Sprintf("at %d of %d points of the sweep of %s, %s (figures from the first)", w.Points, len(sw.X), sw.Sweep.Vary, at)
	})
}

// solveDiags says that a solve's answer lies where a model is not valid.
func solveDiags(so SolveResult, ts []engine.Tally) engine.Diagnostics {
	return talliesDiags(ts, func(engine.Tally) string {
		return fmt.Sprintf("at the answer of solve %s (%s = %s)", so.Solve.Name, so.Solve.Vary, fmtX(so.Value, so.Unit))
	})
}

func fmtX(v float64, unit string) string {
	if unit == "" {
		return units.FormatNum(v)
	}
	return units.FormatNum(v) + " " + unit
}

// Count writes a count with thousands separated by commas ("10,000").
func Count(n int) string {
	s := strconv.Itoa(n)
	neg := n < 0
	if neg {
		s = s[1:]
	}
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	if neg {
		s = "-" + s
	}
	return s
}
