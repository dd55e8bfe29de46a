package engine

import (
	"slices"
)

// The keys of the worksheet format, table by table. The loader checks a worksheet against
// these lists and WorksheetKeys hands them out, so that what describes the format (the
// worksheet's JSON Schema, completion in an editor) cannot drift from what the loader accepts.

// Key is one key of the worksheet format.
type Key struct {
	Name     string // the key as written in the worksheet
	Doc      string // what the key holds, in a sentence or two
	Required bool   // whether its table must have it
}

// KeySet is every key the loader accepts, in the order the format lists them. A top-level
// key that is not in Top, and every key of a group, is a name: a quantity (a number, a text
// with a unit or a formula, or the long form with the Quantity keys), a nested group, or a
// chain (an array of tables with the Stage keys).
type KeySet struct {
	Top        []Key // the worksheet's own keys
	Quantity   []Key // a quantity's long form, { is = "14 dBm", tol = "1 dB" }
	StageText  []Key // a chain stage's texts
	StageValue []Key // a chain stage's values: each a quantity, short or long form
	ChainGroup []Key // quantities of a group that holds a chain, which its cascade table reads
	Require    []Key // a [[require]] table
	Sweep      []Key // a [[sweep]] table
	Solve      []Key // a [[solve]] table
	Spurs      []Key // a [[spurs]] table
	Products   []Key // a [[products]] table
	Case       []Key // a [[case]] table

	Builtins      []string // names the top group may not define (the predeclared constants), sorted
	Dists         []string // the values of a quantity's dist
	NamePattern   string   // what a quantity, group, chain or part name must match (RE2 syntax)
	RejectPattern string   // what a key of a spurs block's reject table must match
	MacroPattern  string   // what export = "NAME" must match: a C identifier
}

// WorksheetKeys returns the keys the loader accepts. The slices are the caller's own.
func WorksheetKeys() KeySet {
	builtins := make([]string, 0, len(predeclared))
	for name := range predeclared {
		builtins = append(builtins, name)
	}
	slices.Sort(builtins)
	return KeySet{
		Top:           slices.Clone(topKeyDocs),
		Quantity:      slices.Clone(quantityKeyDocs),
		StageText:     slices.Clone(stageTextDocs),
		StageValue:    slices.Clone(stageValueDocs),
		ChainGroup:    slices.Clone(chainGroupKeyDocs),
		Require:       slices.Clone(requireKeyDocs),
		Sweep:         slices.Clone(sweepKeyDocs),
		Solve:         slices.Clone(solveKeyDocs),
		Spurs:         slices.Clone(spurKeyDocs),
		Products:      slices.Clone(productKeyDocs),
		Case:          slices.Clone(caseKeyDocs),
		Builtins:      builtins,
		Dists:         slices.Clone(distNames),
		NamePattern:   validName.String(),
		RejectPattern: rejectKey.String(),
		MacroPattern:  cIdent.String(),
	}
}

// The loader's lists: the names of the keys below.
var (
	topKeys      = keyNames(topKeyDocs)
	quantityKeys = keyNames(quantityKeyDocs) // "is" first: longForm looks at the others
	stageKeys    = keyNames(stageValueDocs)  // in the order StageValue stores them
	stageAllKeys = append(keyNames(stageTextDocs), stageKeys...)
	chainKeys    = keyNames(chainGroupKeyDocs)
	requireKeys  = keyNames(requireKeyDocs)
	sweepKeys    = keyNames(sweepKeyDocs)
	solveKeys    = keyNames(solveKeyDocs)
	spurKeys     = keyNames(spurKeyDocs)
	productKeys  = keyNames(productKeyDocs)

	sweepNeeds   = requiredNames(sweepKeyDocs)
	solveNeeds   = requiredNames(solveKeyDocs)
	spurNeeds    = requiredNames(spurKeyDocs)
	productNeeds = requiredNames(productKeyDocs)

	distNames = []string{"normal", "uniform", "triangular"}
)

func keyNames(keys []Key) []string {
	out := make([]string, len(keys))
	for i, k := range keys {
		out[i] = k.Name
	}
	return out
}

func requiredNames(keys []Key) []string {
	var out []string
	for _, k := range keys {
		if k.Required {
			out = append(out, k.Name)
		}
	}
	return out
}

var topKeyDocs = []Key{
	{Name: "title", Doc: "The page's heading, a text in quotes. A part's title is not used."},
	{Name: "summary", Doc: "A paragraph under the heading: what the budget is for. A text in quotes."},
	{Name: "focus", Doc: `The full name of the quantity the analyses centre on (sensitivity, where the budget goes, tolerance), e.g. "link.margin".`},
	{Name: "use", Doc: `Parts: a table of part names and worksheet files relative to this one, e.g. use = { lna = "parts/lna.toml" }. A part's quantities come in under its name (lna.gain); parts stay inside the worksheet's folder, nest at most 8 deep and may not loop.`},
	{Name: "require", Doc: `Requirements: [[require]] tables, each with a true/false formula in that, e.g. that = "= link.margin >= 10 dB".`},
	{Name: "sweep", Doc: "Sweeps: [[sweep]] tables, each varying one input over a range and tabulating (and charting) the quantities it names."},
	{Name: "solve", Doc: "Solves: [[solve]] tables, each finding the value of one input within a range at which a quantity equals a target."},
	{Name: "spurs", Doc: "Frequency plan: [[spurs]] tables, each a mixer's LO, IF and preselector passbands, whose m×n spurious responses are listed on the page."},
	{Name: "products", Doc: "Frequency plan: [[products]] tables, each listing the harmonics and intermodulation products of known tones that land in protected bands."},
	{Name: "case", Doc: `Named operating points: [[case]] tables, each with a name, an optional note and a set of input overrides (set = { "path.distance" = "8 km" }); the page shows every case side by side.`},
}

var quantityKeyDocs = []Key{
	{Name: "is", Required: true, Doc: `The value: a number, a number with its unit in quotes ("14 dBm"), or a formula ("= power - cable").`},
	{Name: "tol", Doc: `An input's tolerance: "1 dB" (plus or minus), "10 %" (relative) or ["-0.5 dB", "+1.5 dB"] (low and high). A formula takes no tolerance; put it on the inputs.`},
	{Name: "sigma", Doc: `An input's standard deviation given directly, e.g. sigma = "8 dB" for shadowing (instead of tol, whose normal limit is 3σ).`},
	{Name: "dist", Doc: "How the tolerance is spread in the Monte Carlo run: normal (the default; tol is the 3-sigma limit), uniform or triangular. Needs tol."},
	{Name: "note", Doc: "A remark shown beside the value on the page."},
	{Name: "show", Doc: `The unit the value is shown in ("km", "dBm"), instead of the unit it was written in or that its formula gives.`},
	{Name: "source", Doc: "Where the number comes from: a datasheet, a measurement, a standard."},
	{Name: "export", Doc: `true puts the value into the C header (rfledger export --c-header); a text such as "RSSI_MIN_DBM" also chooses the macro's name.`},
}

var stageTextDocs = []Key{
	{Name: "stage", Doc: `The stage's label in the cascade table ("LNA"); "stage N" when left out.`},
	{Name: "note", Doc: "A remark on the stage, shown in the cascade table."},
}

// Keep this order: StageValue stores the values by their place in it.
var stageValueDocs = []Key{
	{Name: "gain", Doc: `The stage's gain, in dB ("16 dB"). A passive stage may give loss instead.`},
	{Name: "nf", Doc: `The stage's noise figure, in dB ("1.2 dB").`},
	{Name: "te", Doc: `The stage's noise temperature, in K ("75 K"), in place of nf.`},
	{Name: "loss", Doc: "A passive stage's loss, in dB: its gain is minus the loss and, at 290 K, its noise figure equals the loss. Not together with gain."},
	{Name: "iip3", Doc: `The stage's input third-order intercept point ("-3 dBm").`},
	{Name: "oip3", Doc: "The stage's output third-order intercept point, in place of iip3."},
	{Name: "ip1db", Doc: "The stage's input 1 dB compression point."},
	{Name: "op1db", Doc: "The stage's output 1 dB compression point, in place of ip1db."},
	{Name: "iip2", Doc: "The stage's input second-order intercept point."},
	{Name: "oip2", Doc: "The stage's output second-order intercept point, in place of iip2."},
}

// The keys of a group that holds a chain ([rx] above [[rx.chain]]). Each is a quantity like
// any other of the group (a value, a formula, the long form), which every chain of the group
// reads; without them the cascade table shows no levels.
var chainGroupKeyDocs = []Key{
	{Name: "chain_input", Doc: `The signal level entering the group's chains, a power ("-90 dBm", or "= level" to use a quantity of the group): the cascade table then shows the level after each stage and checks it against each stage's 1 dB compression point. Default: none, and no levels are shown.`},
	{Name: "chain_bandwidth", Doc: `The noise bandwidth of the group's chains, a frequency ("125 kHz", or "= bandwidth"): the cascade table then shows the thermal noise (k·T0·B) after each stage. Default: none, and no noise levels are shown.`},
	{Name: "chain_backoff", Doc: `How far under each stage's output 1 dB compression point the level from chain_input must stay before the page warns, in dB. Default: 10 dB.`},
}

var requireKeyDocs = []Key{
	{Name: "that", Required: true, Doc: `A true/false formula that must hold, e.g. "= link.margin >= 10 dB".`},
	{Name: "note", Doc: "Why the requirement is there, shown beside it on the page."},
}

var sweepKeyDocs = []Key{
	{Name: "vary", Required: true, Doc: `The full name of the input to vary ("path.distance").`},
	{Name: "from", Required: true, Doc: `The first value, with its unit ("200 m").`},
	{Name: "to", Required: true, Doc: `The last value, with its unit ("10 km").`},
	{Name: "steps", Doc: "How many intervals the range is cut into, from 2 to 10000 (default 20): a sweep evaluates steps + 1 points, both ends included."},
	{Name: "scale", Doc: `How the points are spaced: "lin" (the default) or "log" (needs positive linear from and to).`},
	{Name: "plot", Doc: `The quantities to tabulate and chart against the swept input: a full name or a list of them.`},
}

var solveKeyDocs = []Key{
	{Name: "name", Required: true, Doc: `The name the result is shown under ("max_range").`},
	{Name: "vary", Required: true, Doc: "The full name of the input to find."},
	{Name: "so_that", Required: true, Doc: "The full name of the quantity that must equal equals."},
	{Name: "equals", Required: true, Doc: `The target value of so_that, with its unit ("0 dB").`},
	{Name: "within", Required: true, Doc: `The range to search for vary, [low, high] ("10 m", "100 km"); when so_that does not cross the target in it, the page says so.`},
}

var spurKeyDocs = []Key{
	{Name: "name", Doc: `The block's heading on the page (default "spurs N").`},
	{Name: "note", Doc: "A remark shown with the block."},
	{Name: "lo", Required: true, Doc: `The local oscillator's frequency ("1185 MHz") or a formula; may take the long form.`},
	{Name: "if", Required: true, Doc: `The IF passband, [low, high] ("257 MHz", "283 MHz").`},
	{Name: "rf", Required: true, Doc: "The preselector passband, [low, high]."},
	{Name: "order", Doc: "The largest m + n to consider, a whole number from 1 to 15 (default 7)."},
	{Name: "reject", Doc: `The mixer's rejection table, { "2x1" = "-45 dBc" }: M the LO harmonic, N the input harmonic, each level relative to the wanted 1x1 conversion.`},
}

var caseKeyDocs = []Key{
	{Name: "name", Required: true, Doc: "The case's name, unique, shown as its column on the page."},
	{Name: "note", Doc: "What the case stands for (0.01 % of the year, the farthest node …)."},
	{Name: "set", Doc: `Inputs replaced in this case, as --set replaces them: set = { "path.distance" = "8 km" }. A case without set names the nominal column.`},
	{Name: "focus", Doc: "The quantity this case's analyses centre on, when not the sheet's focus."},
	{Name: "analyses", Doc: "true to run the analyses for this case too (otherwise only for the nominal case, unless --all-cases)."},
}

var productKeyDocs = []Key{
	{Name: "name", Doc: `The block's heading on the page (default "products N").`},
	{Name: "note", Doc: "A remark shown with the block."},
	{Name: "tones", Required: true, Doc: `The known tones, 1 to 6 frequencies (["915 MHz", "868 MHz"]).`},
	{Name: "protect", Required: true, Doc: `The protected bands, 1 to 16 of [low, high] ([["1559 MHz", "1610 MHz"]]).`},
	{Name: "order", Doc: "The largest order of product to consider, a whole number from 2 to 15 (default 5)."},
}
