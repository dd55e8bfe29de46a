package engine

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/units"
)

// Tolerances as engineers write them: a limit (tol = "1 dB", "5 %", a pair), a standard
// deviation (sigma = "8 dB", as shadowing is given), a decibel tolerance on a linear value
// (2 W with tol = "0.5 dB"). What cannot be meant is refused: a percentage of a decibel value
// (of the decibels, or of the power?), a tolerance in an absolute level (dBm), and limits a
// quantity cannot take (a distance at −100 %).

// absoluteLevelTol refuses a tolerance written in an absolute level such as dBm: the spread
// of a level is a difference, in dB.
func absoluteLevelTol(u *units.Unit) error {
	if u.K == units.Level && !u.D.IsNone() {
		return fmt.Errorf("a tolerance is a difference of levels, written in dB, not in %s", u.Sym)
	}
	return nil
}

func (t *Tol) keyName() string {
	if t.key == "" {
		return "tol"
	}
	return t.key
}

// decibelLimits applies a decibel tolerance to a linear value: 2 W ± 0.5 dB runs from
// 2 W · 10^(−0.05) to 2 W · 10^(0.05) (20·log10 for a root-power quantity such as a voltage).
func (t *Tol) decibelLimits(nom units.Q) (lo, hi units.Q, err error) {
	lvl, err := nom.ToLevel()
	if err != nil {
		return nom, nom, err
	}
	l, err := units.Sub(lvl, t.Minus)
	if err != nil {
		return nom, nom, err
	}
	h, err := units.Add(lvl, t.Plus)
	if err != nil {
		return nom, nom, err
	}
	lo, hi = l.Linear(), h.Linear()
	lo.F, hi.F = nom.F, nom.F
	return lo, hi, nil
}

// sigma reads sigma = "8 dB" (or "5 %", or in the quantity's unit): a normal spread with
// that standard deviation, whose limits are ±3σ as for a normal tol.
func (l *loader) sigma(f *sheetFile, q *Quantity, path string, v any, m map[string]any) bool {
	r := f.valueRange(join(path, "sigma"))
	if _, has := m["tol"]; has {
		l.errAt(r, q.Name, "keep one: tol is a limit, sigma a standard deviation", "give tol or sigma, not both")
		return false
	}
	if d, has := m["dist"]; has && d != "normal" {
		l.errAt(f.valueRange(join(path, "dist")), q.Name, "drop dist, or give the limits with tol", "sigma is the standard deviation of a normal spread; dist %v does not go with it", d)
		return false
	}
	s, isText := v.(string)
	if !isText {
		if _, isList := v.([]any); isList {
			l.errAt(r, q.Name, "write sigma = \"8 dB\"; an uneven spread is written with tol = [\"-3 dB\", \"+1 dB\"]", "sigma is one value, not a pair")
		} else {
			l.errAt(r, q.Name, "write sigma = \"8 dB\"", "sigma must be a text such as \"8 dB\"")
		}
		return false
	}
	t, err := parseTol(s)
	if err != nil {
		l.errAt(r, q.Name, "write sigma = \"8 dB\" or \"5 %\"", "sigma: %v", err)
		return false
	}
	t.Minus.V *= 3
	t.Plus.V *= 3
	t.RelMinus *= 3
	t.RelPlus *= 3
	t.Text, t.Sigma, t.Dist, t.key = "σ = "+s, true, "normal", "sigma"
	q.Tol = t
	return true
}

// checkTolerance checks an input's tolerance against its value: the form of the tolerance
// must fit the value's, and both limits must be values the quantity can take.
func (l *loader) checkTolerance(f *sheetFile, q *Quantity, path string, value units.Q) bool {
	t := q.Tol
	r := f.valueRange(join(path, t.keyName()))
	if t.Relative && value.K == units.Level {
		l.errAt(r, q.Name, pctHint(t, value), "%s %s on a decibel value is ambiguous (a percentage of the decibels, or of the linear value)", t.keyName(), t.Text)
		return false
	}
	if !t.Relative && value.K == units.Linear && t.Minus.K == units.Level && t.Minus.D.IsNone() {
		t.Decibel = true
	}
	lo, _, err := t.Limits(value)
	if err != nil {
		l.errAt(r, q.Name, unitHint(err), "%s %s does not fit %s: %s", t.keyName(), t.Text, q.Text, unitMsg(err))
		return false
	}
	// A linear value that is positive and of a kind that cannot reach zero (a distance, a
	// frequency, a power), or any positive value under a relative tolerance, must stay positive.
	if value.K == units.Linear && value.V > 0 && !(lo.V > 0) && (t.Relative || !value.D.IsNone()) {
		l.errAt(r, q.Name, "a tolerance limit is a value the quantity can take; give a smaller tolerance or the low side on its own, e.g. [\"-50 %\", \"+100 %\"]", "%s %s takes %s to %s at its low limit", t.keyName(), t.Text, q.Text, lo.Format(q.Unit))
		return false
	}
	return true
}

// pctHint offers the two readings of a percentage on a decibel value.
func pctHint(t *Tol, value units.Q) string {
	mul := 10.0
	if one, err := (units.Q{V: 1, D: value.D}).ToLevel(); err == nil {
		if two, err := (units.Q{V: 10, D: value.D}).ToLevel(); err == nil {
			mul = two.V - one.V // 10 for a power, 20 for a root-power quantity
		}
	}
	up := mul * math.Log10(1+t.RelPlus)
	return fmt.Sprintf("write the spread in dB (+%s of the linear value is +%.2f dB), or write the value in linear units to keep a percentage", units.FormatNum(t.RelPlus*100)+" %", up)
}
