package engine

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/units"
)

// Sheet is a loaded worksheet: its groups of quantities in file order, its chains,
// requirements, sweeps and solves, with every formula compiled and unit-checked. A Sheet does
// not change once Load has returned it, and is safe to share between goroutines; evaluating
// it gives a [Result].
type Sheet struct {
	File    string // the worksheet's path as given
	Title   string // the worksheet's title, "" when it has none
	Summary string // the worksheet's summary paragraph, "" when it has none
	Focus   string // full name of the quantity the analyses centre on ("" when none)
	Hash    string // hash of the worksheet's and its parts' bytes, for the report footer

	Groups   []*Group   // every group in load order, each file's top level first
	Requires []*Require // the [[require]] tables in file order
	Sweeps   []*Sweep   // the [[sweep]] tables in file order (those that name what exists)
	Solves   []*Solve   // the [[solve]] tables in file order (those that name what exists)
	Parts    []string   // files brought in with `use`, in load order

	Spurs    []*SpurBlock    // the [[spurs]] blocks in file order: mixer spurious responses in a passband (freqplan.go)
	Products []*ProductBlock // the [[products]] blocks in file order: tone products in protected bands

	// Nominal is the nominal evaluation's case (no overrides), named "nominal" unless a
	// [[case]] without set names it; Cases are the other operating points in file order
	// (cases.go). Neither changes the sheet's own evaluation: see Sheet.EvalCases.
	Nominal *Case
	Cases   []*Case

	nodes    []*node
	files    []*sheetFile // the files read, in load order
	byName   map[string]int
	order    []int // evaluation order of nodes (topological)
	pos      []int // each node's place in order (-1 when it is not evaluated)
	lib      *Library
	diags    Diagnostics
	nchains  int
	graph    *graphCache // shared with sheets made from this one by keepModel (the graph is the same)
	nparsed  int         // formulas parsed by Load (the others were reused from Options.Previous)
	npatched int         // files whose edit was patched into the earlier load's decoded text
	nahead   int         // groups built ahead on the cores (buildAhead)
	// nindexPatched counts the files whose position index was patched too
	nindexPatched int
	id            uint64    // this load's number (sheetIDs)
	kept          *keptFrom // how keepModel made it from an earlier load, or nil
}

// Group is a TOML table of the worksheet: quantities and chains under one dotted name.
type Group struct {
	Name       string      // full dotted name, "" for the sheet's top level
	Quantities []*Quantity // the group's own quantities, in file order
	Chains     []*Chain    // the group's own chains, in file order
	Range      Range       // where the group's table header is written
}

// Quantity is one line item: an input ("14 dBm") or a derived value ("= power - cable").
type Quantity struct {
	Name    string      // full dotted name, e.g. "rx.floor"
	Group   string      // full name of the group it belongs to, "" for the top level
	Formula string      // the formula without its leading "=", "" for inputs
	Text    string      // an input as written, e.g. "14 dBm"
	Unit    *units.Unit // the unit an input was written in (nil for derived quantities)
	Show    *units.Unit // display unit asked for with `show`, or nil
	Tol     *Tol        // tolerance, or nil
	Note    string      // the note written with it, "" for none
	Source  string      // where the number came from (source = "…"), "" for none
	Export  bool        // export = true or export = "NAME": the C header carries it
	// ExportName is the macro name chosen with export = "NAME" ("" for export = true: the
	// header derives one from the quantity's name and unit).
	ExportName string
	Range      Range // where the quantity's key is written

	node int
	sh   *Sheet
}

// Sheet returns the sheet the quantity belongs to.
func (q *Quantity) Sheet() *Sheet { return q.sh }

// Type returns the quantity's type as found when the sheet loaded: its dimension, decibel
// form and display family, with a zero number. ok is false when the quantity could not be
// checked (its formula has an error, or depends on one that has).
func (q *Quantity) Type() (t units.Q, ok bool) {
	n := q.sh.nodes[q.node]
	return n.ty, n.typed
}

// Nominal returns an input's value as written in the worksheet; ok is false for derived
// quantities and for inputs that could not be read.
func (q *Quantity) Nominal() (units.Q, bool) {
	n := q.sh.nodes[q.node]
	return n.input, n.ok && n.code == nil && q.Formula == ""
}

// Input reports whether the quantity is an input rather than derived from a formula.
func (q *Quantity) Input() bool { return q.Formula == "" }

// DisplayUnit is the unit the quantity's value is shown in: `show`, else the unit it was
// written in, else nil (the unit the algebra gives).
func (q *Quantity) DisplayUnit() *units.Unit {
	if q.Show != nil {
		return q.Show
	}
	return q.Unit
}

// Tol is a tolerance: ±Plus/−Minus in the quantity's unit, or relative (fractions of the
// linear value) when Relative, or in dB of a linear value when Decibel. Dist is "normal"
// (limits are 3σ), "uniform" or "triangular". Sigma says it was written as a standard
// deviation (sigma = "8 dB"): the limits are then ±3σ.
type Tol struct {
	Text        string  // the tolerance as written: "1 dB", "5 %", "-3 dB / +1 dB" for a pair
	Minus, Plus units.Q // how far below and above the nominal value, both not negative
	Relative    bool    // written in % or ppm: RelMinus and RelPlus apply, not Minus and Plus
	RelMinus    float64 // fraction of the linear value below nominal (0.05 for 5 %)
	RelPlus     float64 // fraction of the linear value above nominal
	Decibel     bool    // in dB of a linear value (tol = "1 dB" on "25 mW")
	Sigma       bool    // written as a standard deviation (sigma = "…")
	Dist        string  // "normal", "uniform" or "triangular"
	key         string  // the key it was written under: "tol" or "sigma"
}

// Limits returns the low and high values of a quantity with nominal value nom.
func (t *Tol) Limits(nom units.Q) (lo, hi units.Q, err error) {
	if t.Decibel && nom.K == units.Linear {
		return t.decibelLimits(nom)
	}
	if t.Relative {
		lin := nom.Linear()
		lo, hi = lin, lin
		lo.V *= 1 - t.RelMinus
		hi.V *= 1 + t.RelPlus
		if nom.K == units.Level {
			if lo, err = lo.ToLevel(); err != nil {
				return nom, nom, fmt.Errorf("tolerance %s takes the value to zero or below", t.Text)
			}
			hi, err = hi.ToLevel()
		}
		lo.F, hi.F = nom.F, nom.F // keep the display family (dBW stays dBW)
		return lo, hi, err
	}
	if lo, err = units.Sub(nom, t.Minus); err != nil {
		return nom, nom, err
	}
	hi, err = units.Add(nom, t.Plus)
	return lo, hi, err
}

// Chain is a cascade of stages in signal order ([[rx.chain]]). Input, Bandwidth and Backoff
// are its group's chain_input, chain_bandwidth and chain_backoff (nil when the group has
// none; the back-off is then DefaultBackoffDB).
type Chain struct {
	Name      string    // full dotted name, e.g. "rx.chain"
	Stages    []*Stage  // in signal order
	Range     Range     // where the chain's first table is written
	Input     *Quantity // the level entering the chain, a power
	Bandwidth *Quantity // the noise bandwidth, a frequency
	Backoff   *Quantity // the least distance from each stage's output P1dB, a ratio in dB
	node      int
	broken    bool // a stage's keys contradict each other or are of the wrong kind (reported at load)
}

// Stage is one stage of a chain. Values holds its keys (gain, nf, te, loss, iip3, oip3, ip1db,
// op1db) as quantities named like "rx.chain[2].gain".
type Stage struct {
	Label  string               // the stage's name (stage = "LNA")
	Note   string               // the note written with it, "" for none
	Values map[string]*Quantity // the stage's values by key
	Keys   []string             // the value keys in the order written
	Range  Range                // where the stage's table is written

	slots []stageSlot // Keys as StageValue places and nodes, for gathering the stage on every evaluation
}

// stageSlot is one value of a stage: its place in StageValue and the node that holds it.
type stageSlot struct{ idx, node int }

// ChainValue is what a function receives for a chain argument: the evaluated stages in signal order.
type ChainValue struct {
	Name   string       // the chain's full name
	Stages []StageValue // in signal order
	// Memo, when not nil, lets the function library keep what it derives from the stages (a
	// cascade) so that several functions of one chain work it out once per evaluation:
	// Memo.Data is the library's own and kept between evaluations (so its buffers are
	// reused), and Memo.Valid is false whenever the stage values have changed since.
	Memo *chainMemo
}

// chainMemo holds a library's work on a chain's stages. The engine sets Valid to false each
// time the stage values change; Data belongs to the library and is kept from one evaluation
// to the next, so that its buffers are reused. Each evaluation result has its own.
type chainMemo struct {
	Valid bool // Data describes the current stage values
	Data  any  // the library's own, kept between evaluations
}

// StageValue is one evaluated stage.
type StageValue struct {
	Label string // the stage's name
	vals  [10]units.Q
	has   uint16
}

// stageKeyIndex returns the place of a stage value's key in stageKeys (and in StageValue's
// array), or -1. It is a switch rather than a search of stageKeys because the cascade
// functions look up every key of every stage on each Monte Carlo trial;
// TestStageKeyIndex holds it to stageKeys.
func stageKeyIndex(key string) int {
	switch key {
	case "gain":
		return 0
	case "nf":
		return 1
	case "te":
		return 2
	case "loss":
		return 3
	case "iip3":
		return 4
	case "oip3":
		return 5
	case "ip1db":
		return 6
	case "op1db":
		return 7
	case "iip2":
		return 8
	case "oip2":
		return 9
	}
	return -1
}

// Get returns a stage value by key. A passive stage written with `loss` has gain = −loss and,
// at T0, noise figure = loss.
func (s *StageValue) Get(key string) (units.Q, bool) {
	i := stageKeyIndex(key)
	if i < 0 {
		return units.Q{}, false
	}
	if s.has&(1<<i) != 0 {
		return s.vals[i], true
	}
	loss, hasLoss := s.vals[3], s.has&(1<<3) != 0
	switch {
	case key == "gain" && hasLoss:
		q, err := units.Neg(loss)
		return q, err == nil
	case key == "nf" && hasLoss && s.has&(1<<2) == 0:
		return loss, true
	}
	return units.Q{}, false
}

func (s *StageValue) set(key string, q units.Q) {
	if i := stageKeyIndex(key); i >= 0 {
		s.vals[i] = q
		s.has |= 1 << i
	}
}

// Require is a requirement: a true/false formula and a note.
type Require struct {
	That  string // the formula without "="
	Note  string // why it is required, "" for no note
	Range Range  // where the [[require]] table is written

	// When the requirement is a plain bound on one quantity ("x >= 8 dB"), Subject names the
	// quantity, Op is the comparison as written with the quantity on the left, and Bound the limit.
	Subject string
	Op      string
	Bound   units.Q

	parsed *parsed
	code   *inode
	deps   []int
	at     site
	index  int
	sheet  *Sheet
}

// Sweep varies one input over a range and records chosen quantities at each step.
type Sweep struct {
	Vary     string   // full name of the input varied
	From, To units.Q  // the range, in the input's kind
	Steps    int      // intervals between From and To: Steps+1 points, both ends included
	Log      bool     // points evenly spaced on a logarithmic scale (scale = "log")
	Plot     []string // full names of the quantities recorded at each point
	Range    Range    // where the [[sweep]] table is written
}

// Solve finds the value of an input at which a quantity equals a target.
type Solve struct {
	Name   string     // the solve's name, as the page shows it
	Vary   string     // full name of the input to find
	SoThat string     // full name of the quantity to bring to Equals
	Equals units.Q    // the target value of SoThat
	Within [2]units.Q // the range of Vary to search, low and high
	Range  Range      // where the [[solve]] table is written

	equalsAt, withinAt Range
}

// node is one vertex of the dependency graph: a quantity or a chain.
type node struct {
	name     string
	q        *Quantity
	chain    *Chain
	chainIdx int     // index of the chain's value in a Result
	input    units.Q // value of an input quantity
	parsed   *parsed // a formula's syntax tree (shared with sheets reloaded from this one)
	code     *inode  // a formula, lowered and checked
	deps     []int
	ok       bool    // read, parsed and lowered without error
	typed    bool    // its type is known (inputs, chains, formulas that checked)
	ty       units.Q // its type, for quantities
	at       site    // where it stands: its value's index path in its file, and the scope of its formula
}

func finite(q units.Q) bool { return !math.IsNaN(q.V) && !math.IsInf(q.V, 0) }
