package report

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/chart"
	"github.com/rfledger/rfledger/internal/freqplan"
	"github.com/rfledger/rfledger/units"
)

// spurInfo is a [[spurs]] block worked out once for the page and the JSON.
type spurInfo struct {
	block     *engine.SpurBlock
	lo        float64 // Hz
	plan      freqplan.Plan
	responses []freqplan.Response
	unit      *units.Unit
	err       error
}

// productInfo is a [[products]] block worked out once for the page and the JSON.
type productInfo struct {
	block *engine.ProductBlock
	bands []freqplan.Band
	tones []float64
	hits  []freqplan.Hit
	unit  *units.Unit
	err   error
}

func spurPlans(r *engine.Result) []spurInfo {
	var out []spurInfo
	for _, b := range r.Sheet().Spurs {
		si := spurInfo{block: b, unit: planUnit(b.Unit)}
		lo, known := r.Value(b.LO)
		switch {
		case !known:
			si.err = fmt.Errorf("the LO (%s) could not be evaluated", b.LO.Name)
		case lo.D != units.Frequency || lo.K != units.Linear || !(lo.V > 0):
			si.err = fmt.Errorf("the LO must be a positive frequency, not %s", lo)
		default:
			si.lo = lo.V
			si.plan = freqplan.Plan{LO: lo.V, IF: band(b.IF), RF: band(b.RF), Order: b.Order, Reject: map[[2]int]float64{}}
			for _, r := range b.Reject {
				si.plan.Reject[[2]int{r.M, r.N}] = r.Level.V
			}
			si.responses, si.err = freqplan.Spurs(si.plan)
		}
		out = append(out, si)
	}
	return out
}

func productPlans(sh *engine.Sheet) []productInfo {
	var out []productInfo
	for _, b := range sh.Products {
		pi := productInfo{block: b, unit: planUnit(b.Unit)}
		for _, t := range b.Tones {
			pi.tones = append(pi.tones, t.V)
		}
		for _, pb := range b.Protect {
			pi.bands = append(pi.bands, band(pb))
		}
		pi.hits, pi.err = freqplan.Products(pi.tones, pi.bands, b.Order)
		out = append(out, pi)
	}
	return out
}

func band(b [2]units.Q) freqplan.Band { return freqplan.Band{Lo: b[0].V, Hi: b[1].V} }

// planUnit is the frequency unit a plan is shown in: the one its band was written in, else MHz.
func planUnit(u *units.Unit) *units.Unit {
	if u == nil || u.D != units.Frequency || u.K != units.Linear || u.Sym == "" {
		return unitOfName("MHz")
	}
	return u
}

// inUnit gives a frequency in u, rounded to 12 significant digits so that a band edge of
// 1043.5 MHz does not read 1043.4999999999998, while a script reading the JSON still gets
// the edge to a tenth of a hertz at 20 GHz (9 digits cut 18368.966667 MHz to 18368.9667).
func inUnit(hz float64, u *units.Unit) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(hz/u.Scale, 'g', 12, 64), 64)
	return v
}

// freqText writes a frequency in u with as many decimals as it needs, up to 3.
func freqText(hz float64, u *units.Unit) string {
	s := strconv.FormatFloat(inUnit(hz, u), 'f', 3, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	return s + " " + u.Sym
}

func bandText(lo, hi float64, u *units.Unit) string {
	return strings.TrimSuffix(freqText(lo, u), " "+u.Sym) + "–" + freqText(hi, u)
}

// freqPlans writes the frequency-plan section: spurious responses, then tone products.
func (p *page) freqPlans() {
	spurs, prods := spurPlans(p.r), productPlans(p.in.Sheet)
	if len(spurs) == 0 && len(prods) == 0 {
		return
	}
	p.f("## Frequency plan\n\n")
	for i, si := range spurs {
		p.spurSection(i, si)
	}
	for i, pi := range prods {
		p.productSection(i, pi)
	}
}

func relation(r freqplan.Response) string {
	m, n := strconv.Itoa(r.M), strconv.Itoa(r.N)
	nf := n + "·f"
	if r.N == 1 {
		nf = "f"
	}
	ml := m + "·LO"
	if r.M == 1 {
		ml = "LO"
	}
	switch {
	case r.M == 0:
		return nf
	case r.Form == freqplan.Sum:
		return ml + " + " + nf
	case r.Form == freqplan.LOMinus:
		return ml + " − " + nf
	}
	return nf + " − " + ml
}

func responseKind(r freqplan.Response) string {
	var parts []string
	switch {
	case r.Wanted:
		parts = append(parts, "**wanted**")
	case r.InBand:
		parts = append(parts, "**in band**")
	}
	if r.Image {
		parts = append(parts, "image")
	}
	if r.HalfIF {
		parts = append(parts, "half-IF")
	}
	if r.M == 0 && r.N == 1 {
		parts = append(parts, "IF feedthrough")
	}
	return strings.Join(parts, ", ")
}

func (p *page) spurSection(i int, si spurInfo) {
	b, u := si.block, si.unit
	p.f("### Spurious responses: %s\n\n", text(b.Name))
	if b.Note != "" {
		p.f("%s\n\n", text(b.Note))
	}
	if si.err != nil {
		p.f("The responses cannot be worked out: %s.\n\n", text(si.err.Error()))
		return
	}
	p.f("LO %s, IF passband %s, preselector passband %s; every m·LO ± n·f up to order m + n = %d.\n\n",
		freqText(si.lo, u), bandText(si.plan.IF.Lo, si.plan.IF.Hi, u), bandText(si.plan.RF.Lo, si.plan.RF.Hi, u), b.Order)
	p.f("%s\n\n", spurSummary(si))
	p.spurChart(i, si)
	p.f("| # | m×n | converts when | input band | order | kind | level |\n| ---: | --- | --- | --- | ---: | --- | ---: |\n")
	for j, r := range si.responses {
		level := ""
		if r.HasLevel {
			level = db2(r.Level) + " dBc"
		}
		p.f("| %d | %d×%d | %s = IF | %s | %d | %s | %s |\n", j+1, r.M, r.N, relation(r), bandText(r.From, r.To, u), r.Order(), responseKind(r), level)
	}
	p.f("\nm is the LO harmonic and n the input harmonic. Levels are relative to the wanted conversion, as the rejection table gives them (blank where it gives none), at the drive level the table was measured at; a response of input order n moves n − 1 dB per dB of the input. The preselector's and image filter's rejection come on top.\n\n")
}

// spurSummary says what a receiver designer looks for first: spurs inside the passband, how
// far the image and the half-IF response lie from it.
func spurSummary(si spurInfo) string {
	u := si.unit
	var inBand, images, halfs []string
	for _, r := range si.responses {
		switch {
		case r.InBand && !r.Wanted:
			inBand = append(inBand, fmt.Sprintf("%d×%d (%s)", r.M, r.N, bandText(r.From, r.To, u)))
		case r.Image && !r.InBand:
			images = append(images, fmt.Sprintf("%s, %s from the passband edge", bandText(r.From, r.To, u), freqText(gap(r, si.plan.RF), u)))
		case r.HalfIF && !r.InBand:
			halfs = append(halfs, fmt.Sprintf("%s, %s from the passband edge", bandText(r.From, r.To, u), freqText(gap(r, si.plan.RF), u)))
		}
	}
	var s []string
	if len(inBand) == 0 {
		s = append(s, fmt.Sprintf("No response other than the wanted one falls inside the preselector passband up to order %d.", si.plan.Order))
	} else {
		s = append(s, fmt.Sprintf("**%d response(s) besides the wanted one fall inside the preselector passband**: %s; only the mixer's own rejection of them helps.", len(inBand), strings.Join(inBand, ", ")))
	}
	if len(images) > 0 {
		s = append(s, "Image: "+strings.Join(images, "; ")+": the preselector or an image-reject mixer must suppress it.")
	}
	if len(halfs) > 0 {
		s = append(s, "Half-IF response: "+strings.Join(halfs, "; ")+".")
	}
	return strings.Join(s, " ")
}

// gap is the distance between a response and the passband (0 when they overlap).
func gap(r freqplan.Response, rf freqplan.Band) float64 {
	return math.Max(0, math.Max(rf.Lo-r.To, r.From-rf.Hi))
}

func (p *page) spurChart(i int, si spurInfo) {
	u := si.unit
	spec := chart.FreqPlanSpec{Title: shortTitle("Spurious responses: " + si.block.Name), XLabel: "input frequency (" + u.Sym + ")", YLabel: "order m + n"}
	spec.Spans = []chart.Span{{Label: "RF", Lo: inUnit(si.plan.RF.Lo, u), Hi: inUnit(si.plan.RF.Hi, u)}, {Label: "IF", Lo: inUnit(si.plan.IF.Lo, u), Hi: inUnit(si.plan.IF.Hi, u)}}
	spec.Tones = []chart.Tone{{Label: "LO", X: inUnit(si.lo, u)}}
	for _, r := range si.responses {
		k := chart.KindOther
		switch {
		case r.Wanted:
			k = chart.KindWanted
		case r.InBand:
			k = chart.KindInBand
		case r.Image:
			k = chart.KindImage
		case r.HalfIF:
			k = chart.KindHalfIF
		}
		spec.Marks = append(spec.Marks, chart.Mark{Lo: inUnit(r.From, u), Hi: inUnit(r.To, u), Y: float64(r.Order()), Kind: k})
	}
	p.addChart(fmt.Sprintf("spurs-%d", i+1), "spurious responses of "+si.block.Name, func(b *bytes.Buffer) error { return chart.FreqPlan(b, spec) })
}

// shortTitle keeps a chart title within the chart's width (the section heading keeps it whole).
func shortTitle(s string) string {
	r := []rune(s)
	if len(r) <= 60 {
		return s
	}
	return strings.TrimSpace(string(r[:57])) + "…"
}

// productText writes k1·f1 + k2·f2 + … with the tones' names f1, f2, …
func productText(k []int) string {
	var b strings.Builder
	for i, c := range k {
		if c == 0 {
			continue
		}
		switch {
		case b.Len() == 0 && c < 0:
			b.WriteString("−")
		case b.Len() > 0 && c < 0:
			b.WriteString(" − ")
		case b.Len() > 0:
			b.WriteString(" + ")
		}
		if a := max(c, -c); a != 1 {
			b.WriteString(strconv.Itoa(a) + "·")
		}
		b.WriteString("f" + strconv.Itoa(i+1))
	}
	return b.String()
}

func (p *page) productSection(i int, pi productInfo) {
	b, u := pi.block, pi.unit
	p.f("### Products in protected bands: %s\n\n", text(b.Name))
	if b.Note != "" {
		p.f("%s\n\n", text(b.Note))
	}
	var tones, bands []string
	for j, t := range pi.tones {
		tones = append(tones, fmt.Sprintf("f%d = %s", j+1, freqText(t, u)))
	}
	for _, bd := range pi.bands {
		bands = append(bands, bandText(bd.Lo, bd.Hi, u))
	}
	p.f("Tones %s; protected %s; every k1·f1 + k2·f2 + … with 2 ≤ Σ|k| ≤ %d.\n\n", strings.Join(tones, ", "), strings.Join(bands, ", "), b.Order)
	if pi.err != nil {
		p.f("The products cannot be worked out: %s.\n\n", text(pi.err.Error()))
		return
	}
	if in := tonesInBands(pi); len(in) > 0 {
		p.f("**%s inside a protected band itself** (order 1, not counted among the products below): the emission there is the transmitter's own, and only the local regulations can allow it.\n\n", strings.Join(in, "; "))
	}
	if len(pi.hits) == 0 {
		p.f("No harmonic or intermodulation product up to order %d lands in a protected band.\n\n", b.Order)
	} else {
		p.f("**%d product(s) land in a protected band.** Their levels depend on the transmitter's harmonic and intermodulation performance (see `hd2`, `hd3`, `im3`) and on its output filter; the limits for emissions in these bands are set by local regulations.\n\n", len(pi.hits))
	}
	p.productChart(i, pi)
	if len(pi.hits) == 0 {
		return
	}
	p.f("| # | product | frequency | order | band |\n| ---: | --- | ---: | ---: | --- |\n")
	for j, h := range pi.hits {
		bd := pi.bands[h.Band]
		p.f("| %d | %s | %s | %d | %s |\n", j+1, productText(h.K), freqText(h.Freq, u), h.Order, bandText(bd.Lo, bd.Hi, u))
	}
	p.f("\n")
}

// tonesInBands names each tone that lies inside a protected band ("f1 = 1575 MHz lies in
// 1559–1610 MHz"): a fundamental is no product, but a designer must not miss it.
func tonesInBands(pi productInfo) []string {
	var out []string
	for j, t := range pi.tones {
		for _, bd := range pi.bands {
			if bd.Overlaps(freqplan.Band{Lo: t, Hi: t}) {
				out = append(out, fmt.Sprintf("f%d = %s lies in %s", j+1, freqText(t, pi.unit), bandText(bd.Lo, bd.Hi, pi.unit)))
			}
		}
	}
	return out
}

func (p *page) productChart(i int, pi productInfo) {
	u := pi.unit
	spec := chart.FreqPlanSpec{Title: shortTitle("Products: " + pi.block.Name), XLabel: "frequency (" + u.Sym + ")", YLabel: "order Σ|k|"}
	for j, bd := range pi.bands {
		spec.Spans = append(spec.Spans, chart.Span{Label: fmt.Sprintf("protected %d", j+1), Lo: inUnit(bd.Lo, u), Hi: inUnit(bd.Hi, u)})
	}
	for j, t := range pi.tones {
		spec.Tones = append(spec.Tones, chart.Tone{Label: fmt.Sprintf("f%d", j+1), X: inUnit(t, u)})
	}
	for _, h := range pi.hits {
		x := inUnit(h.Freq, u)
		spec.Marks = append(spec.Marks, chart.Mark{Lo: x, Hi: x, Y: float64(h.Order), Kind: chart.KindHit})
	}
	p.addChart(fmt.Sprintf("products-%d", i+1), "products of "+pi.block.Name, func(b *bytes.Buffer) error { return chart.FreqPlan(b, spec) })
}

// The JSON arrays "spurs" and "products".
type jsonSpurs struct {
	Name      string         `json:"name"`
	LO        *float64       `json:"lo"`
	Unit      string         `json:"unit"`
	Order     int            `json:"order"`
	Responses []jsonResponse `json:"responses"`
	Error     string         `json:"error,omitempty"`
}

type jsonResponse struct {
	M      int      `json:"m"`
	N      int      `json:"n"`
	Form   string   `json:"form"`
	From   float64  `json:"from"`
	To     float64  `json:"to"`
	Unit   string   `json:"unit"`
	Order  int      `json:"order"`
	InBand bool     `json:"in_band"`
	Wanted bool     `json:"wanted"`
	Image  bool     `json:"image"`
	HalfIF bool     `json:"half_if"`
	Level  *float64 `json:"level"`
}

type jsonProducts struct {
	Name  string    `json:"name"`
	Unit  string    `json:"unit"`
	Order int       `json:"order"`
	Hits  []jsonHit `json:"hits"`
	Error string    `json:"error,omitempty"`
}

type jsonHit struct {
	K     []int      `json:"k"`
	Freq  float64    `json:"freq"`
	Unit  string     `json:"unit"`
	Order int        `json:"order"`
	Band  [2]float64 `json:"band"`
}

func freqPlanJSON(r *engine.Result) ([]jsonSpurs, []jsonProducts) {
	sh := r.Sheet()
	spurs, prods := []jsonSpurs{}, []jsonProducts{}
	for _, si := range spurPlans(r) {
		u := si.unit
		js := jsonSpurs{Name: si.block.Name, Unit: u.Sym, Order: si.block.Order, Responses: []jsonResponse{}}
		if si.err != nil {
			js.Error = si.err.Error()
		} else {
			js.LO = num(inUnit(si.lo, u))
		}
		for _, r := range si.responses {
			jr := jsonResponse{M: r.M, N: r.N, Form: r.Form.String(), From: inUnit(r.From, u), To: inUnit(r.To, u), Unit: u.Sym,
				Order: r.Order(), InBand: r.InBand, Wanted: r.Wanted, Image: r.Image, HalfIF: r.HalfIF}
			if r.HasLevel {
				jr.Level = num(r.Level)
			}
			js.Responses = append(js.Responses, jr)
		}
		spurs = append(spurs, js)
	}
	for _, pi := range productPlans(sh) {
		u := pi.unit
		jp := jsonProducts{Name: pi.block.Name, Unit: u.Sym, Order: pi.block.Order, Hits: []jsonHit{}}
		if pi.err != nil {
			jp.Error = pi.err.Error()
		}
		for _, h := range pi.hits {
			bd := pi.bands[h.Band]
			jp.Hits = append(jp.Hits, jsonHit{K: h.K, Freq: inUnit(h.Freq, u), Unit: u.Sym, Order: h.Order, Band: [2]float64{inUnit(bd.Lo, u), inUnit(bd.Hi, u)}})
		}
		prods = append(prods, jp)
	}
	return spurs, prods
}
