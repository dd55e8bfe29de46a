package report

import "github.com/rfledger/rfledger/analysis"

// notGiven stands in the linearity table for a point the stage does not give: never left
// blank, so that a missing P1dB cannot be read as an infinite one.
const notGiven = "not given"

// linearity writes a chain's intercepts and compression points, per stage and cumulative,
// input- and output-referred, and with the chain's input level each stage's headroom to its
// output P1dB.
func (p *page) linearity(ci analysis.Cascade) {
	c := ci.Result
	anyP1 := false
	for _, st := range ci.Stages {
		anyP1 = anyP1 || st.HasIP1dB
	}
	if !c.HasIIP3 && !anyP1 {
		p.f("No stage gives an intercept (iip3, oip3) or a 1 dB compression point (ip1db, op1db).\n\n")
		return
	}
	p.f("Linearity and compression, per stage and from the chain input to each stage's output:\n\n")
	hasHead := ci.Headroom != nil
	p.f("| # | stage | IIP3 | OIP3 | cum. IIP3 | cum. OIP3 | IP1dB | OP1dB | cum. IP1dB | cum. OP1dB |")
	if hasHead {
		p.f(" signal out | below OP1dB |")
	}
	p.f("\n| ---: | --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |")
	if hasHead {
		p.f(" ---: | ---: |")
	}
	p.f("\n")
	for i, st := range ci.Stages {
		r := c.Stages[i]
		p.f("| %d | %s | %s | %s | %s | %s | %s | %s | %s | %s |", i+1, text(st.Name),
			given(st.IIP3, st.HasIIP3), given(st.OIP3(), st.HasIIP3), given(r.CumIIP3, r.HasIIP3), given(r.CumOIP3, r.HasIIP3),
			given(st.IP1dB, st.HasIP1dB), given(st.OP1dB(), st.HasIP1dB), given(r.CumIP1dB, r.HasIP1dB), given(r.CumOP1dB, r.HasIP1dB))
		if hasHead {
			h := ci.Headroom[i]
			head := notGiven
			if h.Has {
				head = db2(h.DB) + " dB"
				if h.DB < ci.BackoffDB {
					head = "**" + head + "** (warning)"
				}
			}
			p.f(" %s dBm | %s |", db2(ci.InputDBm+r.CumGainDB), head)
		}
		p.f("\n")
	}
	p.f("\nOutput points: OIP3 = IIP3 + gain (Pozar, Microwave Engineering, §10.3); OP1dB = IP1dB + gain − 1 dB, the gain being 1 dB down there (Razavi, RF Microelectronics, §2.2.2). ")
	p.f("Cumulative points: 1/IIP3 = Σ G_before/IIP3ᵢ in mW (Razavi §2.2.5); the 1 dB compression points are cascaded the same way, an approximation. A stage marked %q is taken as perfectly linear in the cumulative columns, which are then upper bounds.", notGiven)
	if hasHead {
		how := "the default"
		if q := ci.Chain.Backoff; q != nil {
			how = code(q.Name)
		}
		p.f(" Each stage's output at the chain input level must stay %s dB below its OP1dB (%s).", db2(ci.BackoffDB), how)
	}
	p.f("\n\n")
}

// given writes a level in dBm, or "not given".
func given(v float64, ok bool) string {
	if !ok {
		return notGiven
	}
	return db2(v) + " dBm"
}

// stageLinearityJSON adds a stage's output intercept and compression points, and its
// headroom at the chain input level, to its JSON.
func stageLinearityJSON(js *jsonStage, ci analysis.Cascade, i int) {
	st, r := ci.Stages[i], ci.Result.Stages[i]
	if st.HasIIP3 {
		js.OIP3DBm = num(st.OIP3())
	}
	if r.HasIIP3 {
		js.CumOIP3DBm = num(r.CumOIP3)
	}
	if st.HasIP1dB {
		js.IP1dBDBm, js.OP1dBDBm = num(st.IP1dB), num(st.OP1dB())
	}
	if r.HasIP1dB {
		js.CumIP1dB, js.CumOP1dB = num(r.CumIP1dB), num(r.CumOP1dB)
	}
	if i < len(ci.Headroom) && ci.Headroom[i].Has {
		js.BelowOP1dB = num(ci.Headroom[i].DB)
	}
}
