package engine

import (
	"fmt"
	"slices"
	"strings"

	"github.com/rfledger/rfledger/units"
)

// This file holds the checks on a chain's stages: keys that contradict each other and
// values of the wrong kind (at load, once per stage, at the stage's own lines), and values
// that no physical stage has (when the chain is gathered, so that a formula's value is
// checked too). A chain with a bad stage is unknown: the cascade functions that take it are
// skipped quietly instead of each reporting the same stage again.

// stageConflicts are the pairs of stage keys that say the same thing twice (or, with loss,
// say what loss already says), with what to do about it.
var stageConflicts = []struct{ a, b, hint string }{
	{"gain", "loss", "a passive stage has loss (its gain is −loss); an active one gain"},
	{"nf", "loss", "a passive stage's noise figure at 290 K is its loss; drop nf, or write gain = −loss with nf for a part that is not at 290 K"},
	{"te", "loss", "a passive stage's noise temperature at 290 K is (L − 1)·290 K; drop te, or write gain = −loss with te for a part that is not at 290 K"},
	{"nf", "te", "give one: te = 290 K·(10^(nf/10) − 1)"},
	{"iip3", "oip3", "give one: oip3 = iip3 + gain"},
	{"ip1db", "op1db", "give one: op1db = ip1db + gain − 1 dB"},
	{"iip2", "oip2", "give one: oip2 = iip2 + gain"},
}

// checkStageKeys reports each pair of contradicting keys of a stage at the one written
// second, and a stage with neither gain nor loss at its table, and reports whether the stage
// is sound.
func (l *loader) checkStageKeys(chain string, st *Stage) bool {
	ok := true
	for _, c := range stageConflicts {
		qa, hasA := st.Values[c.a]
		qb, hasB := st.Values[c.b]
		if !hasA || !hasB {
			continue
		}
		first, second := qa, qb
		fk, sk := c.a, c.b
		if slices.Index(st.Keys, c.b) < slices.Index(st.Keys, c.a) {
			first, second, fk, sk = qb, qa, c.b, c.a
		}
		l.errAt(second.Range, second.Name, c.hint, "stage %q gives both %s (line %d) and %s", st.Label, fk, first.Range.Start.Line, sk)
		ok = false
	}
	_, hasGain := st.Values["gain"]
	_, hasLoss := st.Values["loss"]
	if !hasGain && !hasLoss {
		l.errAt(st.Range, chain, `give gain = "16 dB" for an active stage or loss = "2 dB" for a passive one`, "stage %q has neither gain nor loss", st.Label)
		ok = false
	}
	return ok
}

// stageKinds is the kind each stage value must be of.
var stageKinds = map[string]struct {
	want string
	ok   func(units.Q) bool
}{
	"gain":  {"a ratio in dB", units.Q.IsRatio},
	"loss":  {"a ratio in dB", units.Q.IsRatio},
	"nf":    {"a ratio in dB", units.Q.IsRatio},
	"te":    {"a temperature (K)", func(q units.Q) bool { return q.D == units.Temperature }},
	"iip3":  {"a power level (dBm)", isPower},
	"oip3":  {"a power level (dBm)", isPower},
	"ip1db": {"a power level (dBm)", isPower},
	"op1db": {"a power level (dBm)", isPower},
	"iip2":  {"a power level (dBm)", isPower},
	"oip2":  {"a power level (dBm)", isPower},
}

func isPower(q units.Q) bool { return q.D == units.Power }

// stageKindOK is stageKinds' test by the key's place in stageKeys, for the checks that run
// on every gathering of a chain.
var stageKindOK = func() (ok [len(StageValue{}.vals)]func(units.Q) bool) {
	for i, k := range stageKeys {
		ok[i] = stageKinds[k].ok
	}
	return ok
}()

// checkStageKinds runs once every formula has its type: a stage value of the wrong kind
// (a gain in dBm, a te in dB) is an error at its key, and leaves its chain unknown.
func (l *loader) checkStageKinds() {
	for _, n := range l.sh.nodes {
		if n.chain == nil {
			continue
		}
		for _, st := range n.chain.Stages {
			for _, k := range st.Keys {
				q := st.Values[k]
				qn := l.sh.nodes[q.node]
				kind, known := stageKinds[k]
				if !known || !qn.typed || kind.ok(qn.ty) {
					continue
				}
				l.errAt(q.Range, q.Name, "write "+k+" as "+kind.want, "stage %q: %s is %s, want %s", st.Label, k, describeType(qn.ty), kind.want)
				n.chain.broken = true
			}
		}
	}
}

// stageProblems returns what no physical stage has among a gathered stage's values: a
// negative noise figure, noise temperature or loss, and a negative gain with nothing said
// about its noise. Each names the key it is about.
func stageProblems(st *Stage, sv *StageValue) []stageProblem {
	var out []stageProblem
	get := func(k string) (units.Q, bool) {
		i := stageKeyIndex(k)
		v, has := sv.vals[i], sv.has&(1<<i) != 0
		return v, has && stageKindOK[i](v) // a value of the wrong kind is reported at load
	}
	// F = 1 + Te/T0 ≥ 1 for a physical two-port (Friis 1944): NF ≥ 0 dB, Te ≥ 0 K.
	if nf, ok := get("nf"); ok && nf.V < 0 {
		out = append(out, stageProblem{"nf", fmt.Sprintf("stage %q: nf %s is below 0 dB: no two-port adds less than no noise", st.Label, nf), "a noise figure is 0 dB or more (F = 1 + Te/T0 ≥ 1)"})
	}
	if te, ok := get("te"); ok && te.Linear().V < 0 {
		out = append(out, stageProblem{"te", fmt.Sprintf("stage %q: te %s is negative: a noise temperature is 0 K or more", st.Label, te), "a stage that adds no noise has te = 0 K"})
	}
	if loss, ok := get("loss"); ok && loss.V < 0 {
		out = append(out, stageProblem{"loss", fmt.Sprintf("stage %q: loss %s is negative: a passive part does not amplify", st.Label, loss), "write the loss as a positive number, or gain with nf for an amplifier"})
	}
	var declared uint16 // the keys the stage gives, known or not
	for _, sl := range st.slots {
		declared |= 1 << sl.idx
	}
	hasNF, hasTe := declared&(1<<stageKeyIndex("nf")) != 0, declared&(1<<stageKeyIndex("te")) != 0
	if g, ok := get("gain"); ok && g.V < 0 && !hasNF && !hasTe {
		out = append(out, stageProblem{"gain", fmt.Sprintf("stage %q: gain %s with no nf or te: a stage that loses power adds noise", st.Label, g), fmt.Sprintf("give nf or te, or write it as loss = \"%s dB\" for a passive part", units.FormatNum(-g.V))})
	}
	return out
}

// stageProblem is one impossible stage value.
type stageProblem struct{ key, msg, hint string }

// DefaultBackoffDB is the back-off from each stage's output 1 dB compression point that a
// chain's input level must keep when its group gives no chain_backoff (common practice, no
// source: 10 dB keeps a stage well inside its linear range).
const DefaultBackoffDB = 10

// chainGroupKinds is the kind each chain group key must be of.
var chainGroupKinds = map[string]struct {
	want string
	ok   func(units.Q) bool
}{
	"chain_input":     {"a power (\"-90 dBm\")", isPower},
	"chain_bandwidth": {"a frequency (\"125 kHz\")", func(q units.Q) bool { return q.D == units.Frequency && q.K == units.Linear }},
	"chain_backoff":   {"a ratio in dB (\"10 dB\")", units.Q.IsRatio},
}

// chainGroupKeys gives every chain its group's chain_input, chain_bandwidth and
// chain_backoff, once their types are known. One of them in a group without a chain, or of
// the wrong kind, is an error; so is a near miss of one in a group with a chain
// (chain_inputs), which would otherwise be an unused quantity and leave the levels out.
func (l *loader) chainGroupKeys() {
	for _, g := range l.sh.Groups {
		for _, q := range g.Quantities {
			key := q.Name
			if g.Name != "" {
				key = strings.TrimPrefix(q.Name, g.Name+".")
			}
			kind, isKey := chainGroupKinds[key]
			if !isKey {
				if len(g.Chains) > 0 && strings.HasPrefix(key, "chain_") {
					if near := units.Nearest(key, chainKeys); near != "" {
						l.errAt(q.Range, q.Name, fmt.Sprintf("did you mean %q?", near), "unknown chain key %q", key)
					}
				}
				continue
			}
			if len(g.Chains) == 0 {
				l.errAt(q.Range, q.Name, "put it in the group that holds the chain's [[…]] stages", "%s is read by the chains of its group, and %s holds none", key, groupTitle(g))
				continue
			}
			if n := l.sh.nodes[q.node]; n.typed && !kind.ok(n.ty) {
				l.errAt(q.Range, q.Name, "write "+key+" as "+kind.want, "%s is %s, want %s", key, describeType(n.ty), kind.want)
				continue
			}
			for _, ch := range g.Chains {
				switch key {
				case "chain_input":
					ch.Input = q
				case "chain_bandwidth":
					ch.Bandwidth = q
				case "chain_backoff":
					ch.Backoff = q
				}
			}
		}
	}
}

// groupTitle names a group as its table is written ("[rx]", "the top level").
func groupTitle(g *Group) string {
	if g.Name == "" {
		return "the top level"
	}
	return "[" + g.Name + "]"
}
