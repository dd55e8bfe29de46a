package report

import (
	"math"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// The JSON contract, "format": 2. Field names are stable: fields may be added, never renamed;
// a change of shape bumps the format. Its schema is schema/render.schema.json.
//
// Format 2 against format 1: every quantity, solve and sweep value also carries "si" and
// "si_unit" (the value in SI base units, so a script does not depend on the unit a number was
// written in); sweep points are {"x", "x_si", "values": {name: …}, "values_si": {name: …}}, so a
// quantity named x cannot collide with the swept value; "tolerance" is always an object, empty
// when no input the focus depends on has a tolerance.
type jsonDoc struct {
	Format       int                  `json:"format"`
	Title        string               `json:"title"`
	Summary      string               `json:"summary,omitempty"`
	Focus        string               `json:"focus"`
	Pass         bool                 `json:"pass"`
	AtRisk       bool                 `json:"at_risk"` // passes, but holds in fewer than 90 % of the trials
	Quantities   map[string]jsonQ     `json:"quantities"`
	Requirements []jsonReq            `json:"requirements"`
	Chains       map[string]jsonChain `json:"chains"`
	Sensitivity  []jsonSens           `json:"sensitivity"`
	Budget       []jsonContribution   `json:"budget"`
	SignalFlow   []jsonFlowRow        `json:"signal_flow"` // the budget in signal order (flow.go); empty when the focus is not a level in signal order
	Tolerance    any                  `json:"tolerance"`   // *jsonTol, or an empty object
	Sweeps       []jsonSweep          `json:"sweeps"`
	Solves       []jsonSolve          `json:"solves"`
	Warnings     []string             `json:"warnings"`
	Hash         string               `json:"hash"`
	Spurs        []jsonSpurs          `json:"spurs"`
	Products     []jsonProducts       `json:"products"`
	Cases        []jsonCase           `json:"cases"` // every operating point, the top-level fields' first (cases.go)
}

type jsonQ struct {
	Value    *float64 `json:"value"`
	Unit     string   `json:"unit"`
	SI       *float64 `json:"si"`
	SIUnit   string   `json:"si_unit"`
	Kind     string   `json:"kind"`
	Formula  string   `json:"formula,omitempty"`
	Tol      string   `json:"tol,omitempty"`
	Dist     string   `json:"dist,omitempty"`
	Note     string   `json:"note,omitempty"`
	Source   string   `json:"source,omitempty"`
	Warnings []string `json:"warnings,omitempty"`
}

type jsonReq struct {
	That      string   `json:"that"`
	Pass      bool     `json:"pass"`
	Note      string   `json:"note,omitempty"`
	Worst     *float64 `json:"worst,omitempty"` // the bounded quantity at the worst case against the bound
	WorstUnit string   `json:"worst_unit,omitempty"`
	WorstPass *bool    `json:"worst_pass,omitempty"`
	Chance    *float64 `json:"chance,omitempty"` // Monte Carlo chance that it holds
	ChanceSE  *float64 `json:"chance_se,omitempty"`
}

type jsonStage struct {
	Stage      string   `json:"stage"`
	GainDB     float64  `json:"gain_db"`
	NFDB       float64  `json:"nf_db"`
	IIP3DBm    *float64 `json:"iip3_dbm,omitempty"`
	CumGainDB  float64  `json:"cum_gain_db"`
	CumNFDB    float64  `json:"cum_nf_db"`
	CumIIP3DBm *float64 `json:"cum_iip3_dbm,omitempty"`
	NoiseShare float64  `json:"noise_share"`
	IIP3Share  *float64 `json:"iip3_share,omitempty"`
	OutDBm     *float64 `json:"signal_out_dbm,omitempty"`
	IIP2DBm    *float64 `json:"iip2_dbm,omitempty"`
	CumIIP2DBm *float64 `json:"cum_iip2_dbm,omitempty"`
	OIP3DBm    *float64 `json:"oip3_dbm,omitempty"`
	CumOIP3DBm *float64 `json:"cum_oip3_dbm,omitempty"`
	IP1dBDBm   *float64 `json:"ip1db_dbm,omitempty"`
	OP1dBDBm   *float64 `json:"op1db_dbm,omitempty"`
	CumIP1dB   *float64 `json:"cum_ip1db_dbm,omitempty"`
	CumOP1dB   *float64 `json:"cum_op1db_dbm,omitempty"`
	BelowOP1dB *float64 `json:"below_op1db_db,omitempty"` // headroom at the chain input level
}

type jsonChain struct {
	Stages  []jsonStage `json:"stages"`
	GainDB  float64     `json:"gain_db"`
	NFDB    float64     `json:"nf_db"`
	TeK     float64     `json:"te_k"`
	IIP3DBm *float64    `json:"iip3_dbm,omitempty"`
	OIP3DBm *float64    `json:"oip3_dbm,omitempty"`
	IIP2DBm *float64    `json:"iip2_dbm,omitempty"`
	IP1dB   *float64    `json:"ip1db_dbm,omitempty"`
	OP1dB   *float64    `json:"op1db_dbm,omitempty"`
	InDBm   *float64    `json:"input_dbm,omitempty"`  // chain_input, when the group gives it
	Backoff *float64    `json:"backoff_db,omitempty"` // with input_dbm
	Error   string      `json:"error,omitempty"`
}

type jsonSens struct {
	Input  string   `json:"input"`
	Per    string   `json:"per"`
	Change *float64 `json:"change"`
	Unit   string   `json:"unit"`
}

type jsonContribution struct {
	Item  string  `json:"item"`
	Value float64 `json:"value"`
	Unit  string  `json:"unit"`
}

type jsonMC struct {
	Trials  int      `json:"trials"`
	Seed    uint64   `json:"seed"`
	PPass   float64  `json:"p_pass"`
	PPassSE float64  `json:"p_pass_se"`
	P01     float64  `json:"p01"`
	P50     float64  `json:"p50"`
	P99     float64  `json:"p99"`
	Failed  int      `json:"failed"`
	Shares  []jShare `json:"variance_shares"`
}

type jShare struct {
	Input string  `json:"input"`
	Share float64 `json:"share"`
}

type jsonTol struct {
	Nominal    float64 `json:"nominal"`
	WorstLow   float64 `json:"worst_low"`
	WorstHigh  float64 `json:"worst_high"`
	RSSSigma   float64 `json:"rss_sigma"`
	Unit       string  `json:"unit"`
	MonteCarlo jsonMC  `json:"monte_carlo"`
	// Where each toleranced input sits in the worst case low and high, largest effect first.
	WorstLowCorner  []jsonCorner `json:"worst_low_corner"`
	WorstHighCorner []jsonCorner `json:"worst_high_corner"`
}

// jsonCorner is one input at a worst case: which limit, its value there, and the change of
// the focus (in the tolerance's change unit: dB for a decibel focus) with it alone moved there.
type jsonCorner struct {
	Input  string   `json:"input"`
	Limit  string   `json:"limit"` // low, high or nominal
	Value  *float64 `json:"value"`
	Unit   string   `json:"unit"`
	SI     *float64 `json:"si"`
	SIUnit string   `json:"si_unit"`
	Effect *float64 `json:"effect"`
}

func cornersJSON(cs []analysis.Corner) []jsonCorner {
	out := []jsonCorner{}
	for _, c := range cs {
		jc := jsonCorner{Input: c.Input, Limit: c.Limit, Value: num(c.Value), Unit: c.Unit, Effect: num(c.Effect)}
		jc.SI, jc.SIUnit = siOfNumber(c.Value, c.Unit)
		out = append(out, jc)
	}
	return out
}

type jsonSweep struct {
	Vary      string            `json:"vary"`
	Unit      string            `json:"unit"`
	SIUnit    string            `json:"si_unit"`
	Units     map[string]string `json:"units"`
	SIUnits   map[string]string `json:"si_units"`
	Points    []jsonPoint       `json:"points"`
	Crossings []jsonCrossing    `json:"crossings"`
}

// jsonPoint is one step of a sweep: the swept input and the plotted quantities, each in its
// sweep unit and in SI base units (null where it could not be evaluated).
type jsonPoint struct {
	X        float64             `json:"x"`
	XSI      *float64            `json:"x_si"`
	Values   map[string]*float64 `json:"values"`
	ValuesSI map[string]*float64 `json:"values_si"`
}

type jsonCrossing struct {
	Quantity string  `json:"quantity"`
	That     string  `json:"that"`
	X        float64 `json:"x"`
}

type jsonSolve struct {
	Name   string   `json:"name"`
	Value  *float64 `json:"value"`
	Unit   string   `json:"unit"`
	SI     *float64 `json:"si"`
	SIUnit string   `json:"si_unit"`
	Found  bool     `json:"found"`
	Note   string   `json:"note,omitempty"`
	// Warnings are the validity warnings of the models at the answer.
	Warnings []string `json:"warnings,omitempty"`
}

func num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// JSON renders the result as the format-2 JSON contract.
func JSON(in Input) []byte {
	in = in.filled()
	sh, r := in.Sheet, in.Result
	doc := jsonDoc{Format: 2, Tolerance: struct{}{}, Title: sh.Title, Summary: sh.Summary, Focus: sh.Focus, Hash: sh.Hash, Pass: true,
		Quantities: map[string]jsonQ{}, Chains: map[string]jsonChain{},
		Requirements: []jsonReq{}, Sensitivity: []jsonSens{}, Sweeps: []jsonSweep{}, Solves: []jsonSolve{}, Warnings: []string{}, Budget: []jsonContribution{}, SignalFlow: []jsonFlowRow{}}
	doc.Quantities = quantitiesJSON(sh, r)
	for _, rq := range sh.Requires {
		pass := passes(r, rq)
		doc.Pass = doc.Pass && pass
		jr := jsonReq{That: rq.That, Pass: pass, Note: rq.Note}
		if rs, ok := spreadOf(in.Analysis, rq); ok {
			if jr.Worst = num(rs.Worst); jr.Worst != nil {
				jr.WorstUnit, jr.WorstPass = rs.Unit, &rs.WorstHolds
			}
			if jr.Chance = reqChance(in.Analysis, rq); jr.Chance != nil {
				jr.ChanceSE = num(rs.ChanceSE)
			}
		}
		doc.Requirements = append(doc.Requirements, jr)
	}
	doc.AtRisk = analysis.AtRisk(r, in.Analysis)
	for _, ci := range analysis.Cascades(r) {
		doc.Chains[ci.Chain.Name] = chainJSON(ci)
	}
	for _, d := range in.Warnings {
		if d.Severity == engine.Warning {
			doc.Warnings = append(doc.Warnings, d.String())
		}
	}
	if a := in.Analysis; a != nil {
		analysisJSON(&doc, a, sh)
	}
	doc.Spurs, doc.Products = freqPlanJSON(r)
	doc.Cases = casesJSON(in)
	return encodeJSON(doc)
}

// quantitiesJSON writes every quantity of a result.
func quantitiesJSON(sh *engine.Sheet, r *engine.Result) map[string]jsonQ {
	out := map[string]jsonQ{}
	for _, q := range sh.Quantities() {
		v, unit := r.Number(q)
		jq := jsonQ{Unit: unit, Kind: "input", Note: q.Note, Source: q.Source, Warnings: r.Warnings(q)}
		if r.Known(q) {
			jq.Value = num(v)
			qv, _ := r.Value(q)
			jq.SI, jq.SIUnit = SI(qv)
		} else {
			qt, _ := q.Type()
			_, jq.SIUnit = SI(qt)
		}
		if !q.Input() {
			jq.Kind, jq.Formula = "derived", q.Formula
		}
		if q.Tol != nil {
			jq.Tol, jq.Dist = q.Tol.Text, q.Tol.Dist
		}
		out[q.Name] = jq
	}
	return out
}

func chainJSON(ci analysis.Cascade) jsonChain {
	if ci.Err != nil {
		return jsonChain{Error: ci.Err.Error(), Stages: []jsonStage{}}
	}
	c := ci.Result
	jc := jsonChain{GainDB: c.GainDB, NFDB: c.NFDB, TeK: c.TeK}
	if c.HasIIP3 {
		jc.IIP3DBm, jc.OIP3DBm = num(c.IIP3), num(c.OIP3)
	}
	if c.HasIIP2 {
		jc.IIP2DBm = num(c.IIP2)
	}
	if c.HasIP1dB {
		jc.IP1dB, jc.OP1dB = num(c.IP1dB), num(c.OP1dB)
	}
	in, hasIn := inputDBm(ci)
	if hasIn {
		jc.InDBm, jc.Backoff = num(in), num(ci.BackoffDB)
	}
	for i, st := range ci.Stages {
		r := c.Stages[i]
		js := jsonStage{Stage: st.Name, GainDB: st.GainDB, NFDB: st.NFDB, CumGainDB: r.CumGainDB, CumNFDB: r.CumNFDB, NoiseShare: r.NoiseShare}
		if st.HasIIP3 {
			js.IIP3DBm, js.IIP3Share = num(st.IIP3), num(r.IIP3Share)
		}
		if r.HasIIP3 {
			js.CumIIP3DBm = num(r.CumIIP3)
		}
		if st.HasIIP2 {
			js.IIP2DBm = num(st.IIP2)
		}
		if r.HasIIP2 {
			js.CumIIP2DBm = num(r.CumIIP2)
		}
		if hasIn {
			js.OutDBm = num(in + r.CumGainDB)
		}
		stageLinearityJSON(&js, ci, i)
		jc.Stages = append(jc.Stages, js)
	}
	return jc
}

func analysisJSON(doc *jsonDoc, a *analysis.Analysis, sh *engine.Sheet) {
	for _, s := range a.Sensitivity {
		doc.Sensitivity = append(doc.Sensitivity, jsonSens{Input: s.Input, Per: s.Per, Change: num(s.Change), Unit: a.ChangeUnit})
	}
	for _, c := range a.Budget {
		doc.Budget = append(doc.Budget, jsonContribution{Item: c.Item, Value: c.Value, Unit: c.Unit})
	}
	doc.SignalFlow = flowJSON(a.Flow)
	if t := a.Tolerance; t != nil {
		jt := &jsonTol{Nominal: t.Nominal, WorstLow: t.WorstLow, WorstHigh: t.WorstHigh, RSSSigma: t.RSSSigma, Unit: a.Unit,
			MonteCarlo: jsonMC{Trials: t.Trials, Seed: t.Seed, PPass: t.PPass, PPassSE: t.PPassSE, P01: t.P01, P50: t.P50, P99: t.P99, Failed: t.Failed, Shares: []jShare{}}}
		for _, s := range t.Shares {
			jt.MonteCarlo.Shares = append(jt.MonteCarlo.Shares, jShare{Input: s.Input, Share: s.Share})
		}
		jt.WorstLowCorner, jt.WorstHighCorner = cornersJSON(t.LowCorner), cornersJSON(t.HighCorner)
		doc.Tolerance = jt
	}
	for _, sw := range a.Sweeps {
		js := jsonSweep{Vary: sw.Sweep.Vary, Unit: sw.Unit, Units: map[string]string{}, SIUnits: map[string]string{}, Points: []jsonPoint{}, Crossings: []jsonCrossing{}}
		_, js.SIUnit = siOfNumber(1, sw.Unit)
		for _, s := range sw.Series {
			js.Units[s.Quantity] = s.Unit
			_, js.SIUnits[s.Quantity] = siOfNumber(1, s.Unit)
		}
		for i, x := range sw.X {
			pt := jsonPoint{X: x, Values: map[string]*float64{}, ValuesSI: map[string]*float64{}}
			pt.XSI, _ = siOfNumber(x, sw.Unit)
			for _, s := range sw.Series {
				pt.Values[s.Quantity] = num(s.Y[i])
				pt.ValuesSI[s.Quantity], _ = siOfNumber(s.Y[i], s.Unit)
			}
			js.Points = append(js.Points, pt)
		}
		for _, c := range sw.Crossings {
			js.Crossings = append(js.Crossings, jsonCrossing{Quantity: c.Quantity, That: sh.Requires[c.Require].That, X: c.X})
		}
		doc.Sweeps = append(doc.Sweeps, js)
	}
	doc.Solves = solvesJSON(a)
}

// solvesJSON writes the answers of the solves.
func solvesJSON(a *analysis.Analysis) []jsonSolve {
	out := []jsonSolve{}
	for _, r := range a.Solves {
		js := jsonSolve{Name: r.Solve.Name, Unit: r.Unit, Found: r.Found, Note: r.Note, Warnings: r.Warnings}
		_, js.SIUnit = siOfNumber(1, r.Unit)
		if r.Found {
			js.Value = num(r.Value)
			js.SI, _ = siOfNumber(r.Value, r.Unit)
		}
		out = append(out, js)
	}
	return out
}
