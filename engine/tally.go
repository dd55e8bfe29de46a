package engine

import (
	"cmp"
	"fmt"
	"slices"
)

// Tally is one validity warning counted over the points a scenario was run at (Monte Carlo
// trials, sweep points, a solve's answer): the quantity it was raised for, the message as it
// read at the first point that raised it, that point, the last one, and how many points
// raised it. Warnings of one call site are one tally however their numbers differ from point
// to point ("distance 0.8 km is outside…" and "distance 0.7 km is outside…").
type Tally struct {
	Quantity    *Quantity
	Message     string
	First, Last int // the first and last point that raised it
	Points      int // how many points raised it
	key         uint64
}

// tally counts the warnings of a scenario's runs, by quantity and call site. Nothing is
// allocated for a point that raises no warning, nor for a warning already seen, except
// what the function raising it allocates for its message's arguments.
type tally struct {
	sh    *Sheet
	point int // the point being run; < 0: not counting
	node  int // the node being evaluated
	seen  []Tally
}

// add counts one warning at the current point. A site is the node, the format and the text
// arguments with their numbers left out; the message is formatted only the first time.
func (t *tally) add(format string, args []any) {
	if t.point < 0 || t.node < 0 {
		return
	}
	h := siteHash(uint64(t.node)+fnvOffset, format)
	for _, a := range args {
		if s, ok := a.(string); ok {
			h = siteHash(h, s)
		}
	}
	for i := range t.seen {
		e := &t.seen[i]
		if e.key == h && e.Quantity.node == t.node {
			if e.Last != t.point {
				e.Points++
				e.Last = t.point
			}
			return
		}
	}
	t.seen = append(t.seen, Tally{Quantity: t.sh.nodes[t.node].q, Message: fmt.Sprintf(format, args...), First: t.point, Last: t.point, Points: 1, key: h})
}

const (
	fnvOffset = 14695981039346656037
	fnvPrime  = 1099511628211
)

// siteHash folds s into h (FNV-1a), leaving out numbers: a run that starts with a digit and
// goes on through digits, points, signs and exponents.
func siteHash(h uint64, s string) uint64 {
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c >= '0' && c <= '9' {
			for i+1 < len(s) && isNumByte(s[i+1]) {
				i++
			}
			c = '#'
		}
		h = (h ^ uint64(c)) * fnvPrime
	}
	return (h ^ 0xff) * fnvPrime // the end of an argument
}

func isNumByte(c byte) bool {
	return c >= '0' && c <= '9' || c == '.' || c == 'e' || c == 'E' || c == '+' || c == '-'
}

// Point makes the next runs of the scenario count their validity warnings as point i
// (a trial's or a sweep point's index); a negative i stops counting. A warning raised
// several times at one point counts once.
func (sc *Scenario) Point(i int) {
	if sc.r.call.tally == nil {
		sc.r.call.tally = &tally{sh: sc.r.sh}
	}
	sc.r.call.tally.point = i
}

// Tallies returns the warnings counted so far, in the order they were first raised.
func (sc *Scenario) Tallies() []Tally {
	if sc.r.call.tally == nil {
		return nil
	}
	out := make([]Tally, len(sc.r.call.tally.seen))
	copy(out, sc.r.call.tally.seen)
	return out
}

// MergeTallies adds up the tallies of several scenarios run over disjoint points (the
// workers of a Monte Carlo run): the same warning's counts are summed and its message is
// the one of its first point, so the result does not depend on which scenario ran which
// point. It comes back sorted by quantity (in the sheet's order), then by first point.
func MergeTallies(sets ...[]Tally) []Tally {
	var out []Tally
	for _, set := range sets {
		for _, t := range set {
			i := slices.IndexFunc(out, func(o Tally) bool { return o.key == t.key && o.Quantity == t.Quantity })
			if i < 0 {
				out = append(out, t)
				continue
			}
			o := &out[i]
			o.Points += t.Points
			if t.First < o.First {
				o.First, o.Message = t.First, t.Message
			}
			o.Last = max(o.Last, t.Last)
		}
	}
	slices.SortStableFunc(out, func(a, b Tally) int {
		if c := cmp.Compare(a.Quantity.node, b.Quantity.node); c != 0 {
			return c
		}
		return cmp.Compare(a.First, b.First)
	})
	return out
}
