package rflib

import (
	"fmt"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// Result rules for the functions whose result's unit follows from their arguments'. The
// checker calls them with each argument's type when the sheet loads; a number in a type is
// meaningful only for constants, so each rule works on a positive stand-in value.

// witness returns a type with a positive stand-in value, for unit algebra on types.
func witness(v engine.Value) units.Q {
	q := v.Q
	if !v.Const || !(q.V > 0) {
		if q.K == units.Level || q.K == units.Rate {
			q.V = 0
		} else {
			q.V = 1
		}
	}
	return q
}

func inferDB(a []engine.Value) (units.Q, error) {
	x := witness(a[0])
	if x.K != units.Linear {
		return units.Q{}, fmt.Errorf("x: already in decibels (%s)", x.UnitName())
	}
	return x.ToLevel()
}

func inferLin(a []engine.Value) (units.Q, error) {
	x := witness(a[0])
	if x.K != units.Level {
		return units.Q{}, fmt.Errorf("x: got %s, want a value in decibels", nameOf(x))
	}
	return x.Linear(), nil
}

func inferTo(a []engine.Value) (units.Q, error) {
	u, err := units.ParseUnit(a[1].Text)
	if err != nil {
		return units.Q{}, err
	}
	return witness(a[0]).As(u)
}

// inferPowerSum: psum and pdiff give a level (or a linear value) of the first term's kind;
// every term must be of the first one's dimension.
func inferPowerSum(a []engine.Value) (units.Q, error) {
	first := witness(a[0])
	for i, x := range a {
		if x.Q.D != first.D || x.Q.K == units.Rate {
			return units.Q{}, fmt.Errorf("term %d is %s, term 1 is %s", i+1, nameOf(x.Q), nameOf(first))
		}
	}
	return first, nil
}

func inferSqrt(a []engine.Value) (units.Q, error) { return units.Sqrt(witness(a[0])) }

func inferAbs(a []engine.Value) (units.Q, error) {
	x := witness(a[0])
	if x.K == units.Level && !x.D.IsNone() {
		return units.Q{}, fmt.Errorf("x: the absolute value of an absolute level (%s) has no meaning", nameOf(x))
	}
	return x, nil
}

// inferExtreme: min and max give one of their arguments, which must compare with each other.
func inferExtreme(a []engine.Value) (units.Q, error) {
	best := witness(a[0])
	for _, x := range a[1:] {
		if _, err := units.Compare(witness(x), best); err != nil {
			return units.Q{}, err
		}
	}
	return best, nil
}
