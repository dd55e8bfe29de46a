package engine

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"github.com/rfledger/rfledger/units"
)

// Limits of the frequency-plan blocks (the computation in internal/freqplan holds the same).
const (
	maxPlanOrder        = 15
	defaultSpurOrder    = 7
	defaultProductOrder = 5
	maxPlanTones        = 6
	maxPlanBands        = 16
)

// SpurBlock is a [[spurs]] block: one mixer's LO, IF passband and preselector passband, the
// largest order m + n to consider and the mixer's rejection table.
type SpurBlock struct {
	Name   string      // the block's name, as the page shows it
	Note   string      // the note written with it, "" for none
	LO     *Quantity   // "spurs[1].lo": an input or a formula, evaluated with the sheet
	IF, RF [2]units.Q  // the IF passband and the preselector's RF passband, low and high edge
	Order  int         // the largest m + n considered
	Reject []Reject    // in file order
	Unit   *units.Unit // the unit the rf band was written in, for display
	Range  Range       // where the [[spurs]] table is written
}

// Reject is one entry of a rejection table: the level of the m×n response relative to the
// wanted (1×1) conversion.
type Reject struct {
	M, N  int     // the LO harmonic m and the RF harmonic n of the m×n response
	Level units.Q // a ratio in dB (dBc)
}

// ProductBlock is a [[products]] block: known tones, protected bands and the largest order.
type ProductBlock struct {
	Name    string       // the block's name, as the page shows it
	Note    string       // the note written with it, "" for none
	Tones   []units.Q    // the known tones' frequencies, in file order
	Protect [][2]units.Q // the protected bands, each low and high edge
	Order   int          // the largest order of the products considered
	Unit    *units.Unit  // the unit the first tone was written in, for display
	Range   Range        // where the [[products]] table is written
}

var (
	rejectKey = regexp.MustCompile(`^([0-9]{1,2})x([0-9]{1,2})$`)
)

// freqPlan reads the top-level "spurs" or "products" key.
func (l *loader) freqPlan(f *sheetFile, key string, v any, main bool) {
	if !main {
		return // a part's plan belongs to the part's own page
	}
	for i, m := range tableList(l, f, key, v) {
		p := fmt.Sprintf("%s[%d]", key, i)
		if key == "spurs" {
			l.spurBlock(f, p, i, m)
		} else {
			l.productBlock(f, p, i, m)
		}
	}
}

func (l *loader) spurBlock(f *sheetFile, p string, i int, m map[string]any) {
	who := fmt.Sprintf("spurs[%d]", i+1)
	l.checkKeys(f, p, m, spurKeys, "a spurs block's")
	sb := &SpurBlock{Name: fmt.Sprintf("spurs %d", i+1), Range: f.rangeOf(p)}
	ok := l.planText(f, who, p, m, &sb.Name, &sb.Note)
	if missing := missingKeys(m, spurNeeds...); len(missing) > 0 {
		l.errAt(sb.Range, who, "a spurs block needs lo, if and rf", "missing %s", strings.Join(missing, ", "))
		return
	}
	sb.LO = l.planLO(f, join(p, "lo"), fmt.Sprintf("spurs[%d].lo", i+1), m["lo"])
	ok = sb.LO != nil && ok
	var okIF, okRF bool
	sb.IF, _, okIF = l.planBand(f, who, join(p, "if"), m["if"], "the IF passband")
	sb.RF, sb.Unit, okRF = l.planBand(f, who, join(p, "rf"), m["rf"], "the preselector passband")
	sb.Order, ok = l.planOrder(f, who, join(p, "order"), m, defaultSpurOrder, 1), ok && okIF && okRF
	if sb.Order == 0 {
		ok = false
	}
	if rv, has := m["reject"]; has {
		var okR bool
		sb.Reject, okR = l.rejectTable(f, who, join(p, "reject"), rv)
		ok = ok && okR
	}
	if ok {
		l.sh.Spurs = append(l.sh.Spurs, sb)
	}
}

func (l *loader) productBlock(f *sheetFile, p string, i int, m map[string]any) {
	who := fmt.Sprintf("products[%d]", i+1)
	l.checkKeys(f, p, m, productKeys, "a products block's")
	pb := &ProductBlock{Name: fmt.Sprintf("products %d", i+1), Range: f.rangeOf(p)}
	ok := l.planText(f, who, p, m, &pb.Name, &pb.Note)
	if missing := missingKeys(m, productNeeds...); len(missing) > 0 {
		l.errAt(pb.Range, who, "a products block needs tones and protect", "missing %s", strings.Join(missing, ", "))
		return
	}
	tp := join(p, "tones")
	tones, isList := m["tones"].([]any)
	switch {
	case !isList || len(tones) == 0:
		l.errAt(f.valueRange(tp), who, "write tones = [\"915 MHz\", \"868 MHz\"]", "tones must be a list of frequencies")
		ok = false
	case len(tones) > maxPlanTones:
		l.errAt(f.valueRange(tp), who, "split the tones over several blocks", "at most %d tones", maxPlanTones)
		ok = false
	}
	for j, t := range tones {
		q, u, good := l.planFreq(f, who, fmt.Sprintf("%s[%d]", tp, j), t, "a tone")
		if good && !(q.V > 0) {
			l.errAt(f.valueRange(fmt.Sprintf("%s[%d]", tp, j)), who, "", "a tone must be a positive frequency")
			good = false
		}
		if j == 0 {
			pb.Unit = u
		}
		pb.Tones, ok = append(pb.Tones, q), ok && good
	}
	pp := join(p, "protect")
	bands, isList := m["protect"].([]any)
	if !isList || len(bands) == 0 || len(bands) > maxPlanBands {
		l.errAt(f.valueRange(pp), who, "write protect = [[\"1559 MHz\", \"1610 MHz\"]]", "protect must be a list of 1 to %d bands [low, high]", maxPlanBands)
		ok = false
	}
	for j, b := range bands {
		band, _, good := l.planBand(f, who, fmt.Sprintf("%s[%d]", pp, j), b, "a protected band")
		pb.Protect, ok = append(pb.Protect, band), ok && good
	}
	pb.Order = l.planOrder(f, who, join(p, "order"), m, defaultProductOrder, 2)
	if pb.Order == 0 {
		ok = false
	}
	if ok {
		l.sh.Products = append(l.sh.Products, pb)
	}
}

// planText reads the optional name and note of a block.
func (l *loader) planText(f *sheetFile, who, p string, m map[string]any, name, note *string) bool {
	ok := true
	for _, key := range []string{"name", "note"} {
		dst := name
		if key == "note" {
			dst = note
		}
		v, has := m[key]
		if !has {
			continue
		}
		s, isText := v.(string)
		if !isText {
			l.errAt(f.valueRange(join(p, key)), who, "", "%s must be a text in quotes", key)
			ok = false
			continue
		}
		*dst = s
	}
	return ok
}

// planLO makes the LO a quantity of the sheet, so that it may be a formula; an input must be
// a positive frequency (a formula's value is checked when the plan is worked out).
func (l *loader) planLO(f *sheetFile, path, name string, v any) *Quantity {
	mv, isMap := v.(map[string]any)
	if !isMap {
		mv = map[string]any{"is": v}
	}
	q := &Quantity{Name: name, Range: f.rangeOf(path)}
	val, good := l.quantityFields(f, q, path, mv)
	vr := f.valueRange(path + isPath(mv))
	if good && q.Formula == "" {
		switch {
		case val.D != units.Frequency || val.K != units.Linear:
			l.errAt(vr, name, "write it as \"1185 MHz\"", "the LO must be a frequency, not %s", unitOrNumber(val))
			good = false
		case !(val.V > 0):
			l.errAt(vr, name, "", "the LO must be a positive frequency (got %s)", q.Text)
			good = false
		}
	}
	n := &node{name: name, q: q, ok: good, input: val}
	q.node = l.addNode(n)
	l.formulaSites = append(l.formulaSites, site{f: f, path: path + isPath(mv), node: q.node})
	if !good {
		return nil
	}
	return q
}

// planFreq reads one frequency written with its unit.
func (l *loader) planFreq(f *sheetFile, who, path string, v any, what string) (units.Q, *units.Unit, bool) {
	s, isText := v.(string)
	if !isText {
		l.errAt(f.valueRange(path), who, "write it as \"915 MHz\"", "%s must be a frequency with its unit in quotes", what)
		return units.Q{}, nil, false
	}
	q, u, err := units.Parse(s)
	if err != nil {
		l.errAt(f.valueRange(path), who, unitHint(err), "%s", unitMsg(err))
		return units.Q{}, nil, false
	}
	if q.D != units.Frequency || q.K != units.Linear {
		l.errAt(f.valueRange(path), who, "write it as \"915 MHz\"", "%s must be a frequency, not %s", what, unitOrNumber(q))
		return units.Q{}, nil, false
	}
	return q, u, true
}

// planBand reads [low, high] with 0 <= low < high.
func (l *loader) planBand(f *sheetFile, who, path string, v any, what string) ([2]units.Q, *units.Unit, bool) {
	pair, isList := v.([]any)
	if !isList || len(pair) != 2 {
		l.errAt(f.valueRange(path), who, "write [\"257 MHz\", \"283 MHz\"]", "%s must be [low, high]", what)
		return [2]units.Q{}, nil, false
	}
	lo, u, ok1 := l.planFreq(f, who, path+"[0]", pair[0], "the low edge")
	hi, _, ok2 := l.planFreq(f, who, path+"[1]", pair[1], "the high edge")
	if !ok1 || !ok2 {
		return [2]units.Q{}, nil, false
	}
	if !(lo.V >= 0 && lo.V < hi.V) {
		l.errAt(f.valueRange(path), who, "write the lower edge first", "%s must have 0 <= low < high (got %s to %s)", what, lo, hi)
		return [2]units.Q{}, nil, false
	}
	return [2]units.Q{lo, hi}, u, true
}

// planOrder reads the optional order: a whole number from least to maxPlanOrder. It returns 0
// after reporting an error.
func (l *loader) planOrder(f *sheetFile, who, path string, m map[string]any, def, least int) int {
	v, has := m["order"]
	if !has {
		return def
	}
	n, isInt := v.(int64)
	switch {
	case !isInt:
		l.errAt(f.valueRange(path), who, fmt.Sprintf("write order = %d", def), "order must be a whole number")
		return 0
	case n > maxPlanOrder:
		l.errAt(f.valueRange(path), who, "", "order %d is above the largest, %d", n, maxPlanOrder)
		return 0
	case n < int64(least):
		hint := ""
		if least == 2 {
			hint = "order 1 is the tones themselves; products start at order 2"
		}
		l.errAt(f.valueRange(path), who, hint, "order must be at least %d: no products are possible below it", least)
		return 0
	}
	return int(n)
}

// rejectTable reads reject = { "2x1" = "-45 dBc", ... }: M is the LO harmonic, N the input's.
func (l *loader) rejectTable(f *sheetFile, who, path string, v any) ([]Reject, bool) {
	m, isMap := v.(map[string]any)
	if !isMap {
		l.errAt(f.valueRange(path), who, "write reject = { \"2x1\" = \"-45 dBc\" }", "reject must be a table of levels")
		return nil, false
	}
	var out []Reject
	ok := true
	for _, k := range l.ordered(f, path, m) {
		kp := join(path, k)
		g := rejectKey.FindStringSubmatch(k)
		var mm, nn int
		if g != nil {
			mm, _ = strconv.Atoi(g[1])
			nn, _ = strconv.Atoi(g[2])
		}
		if g == nil || nn < 1 || mm+nn > maxPlanOrder {
			l.errAt(f.rangeOf(kp), who, "write \"MxN\": M the LO harmonic (0 or more), N the input harmonic (1 or more), M + N at most 15", "reject key %q is not of the form \"MxN\"", k)
			ok = false
			continue
		}
		s, isText := m[k].(string)
		q, _, err := units.Parse(s)
		if !isText || err != nil || !q.IsRatio() {
			l.errAt(f.valueRange(kp), who, "write \"-45 dBc\"", "the %s level must be a ratio to the wanted conversion in dBc", k)
			ok = false
			continue
		}
		if mm == 1 && nn == 1 && q.V != 0 {
			l.errAt(f.valueRange(kp), who, "leave 1x1 out", "the 1x1 response is the wanted conversion, 0 dBc by definition")
			ok = false
			continue
		}
		out = append(out, Reject{M: mm, N: nn, Level: q})
	}
	return out, ok
}

// checkPlanLOKinds runs once every formula has its type: an LO formula that gives something
// other than a frequency (a level, a ratio, a plain number) is an error at the LO, as a
// written one is.
func (l *loader) checkPlanLOKinds() {
	for _, sb := range l.sh.Spurs {
		n := l.sh.nodes[sb.LO.node]
		if sb.LO.Formula == "" || !n.typed || n.ty.D == units.Frequency && n.ty.K == units.Linear {
			continue
		}
		l.errAt(sb.LO.Range, sb.LO.Name, "give the LO as a frequency, e.g. \"= rf + if\"", "the LO must be a frequency, and its formula gives %s", describeType(n.ty))
	}
}

// checkPlanLOs reports an LO formula whose value is not a positive frequency as an error at
// the LO (a written LO is checked when the sheet loads), so that a plan for a negative LO is
// never worked out.
func (r *Result) checkPlanLOs() {
	for _, sb := range r.sh.Spurs {
		v, known := r.Value(sb.LO)
		if sb.LO.Formula == "" || !known || v.V > 0 {
			continue
		}
		r.diags = append(r.diags, Diagnostic{Severity: Error, Quantity: sb.LO.Name, Summary: fmt.Sprintf("the LO must be a positive frequency, and its formula gives %s", v), Hint: "an LO is above 0 Hz; for RF = LO − IF write lo = \"= rf + if\"", Range: sb.LO.Range})
	}
}
