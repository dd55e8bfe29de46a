// Package gen writes synthetic worksheets of any size, for measuring the engine: the same
// (shape, size, seed) always gives the same bytes.
//
// Budget is a farm sensor network: regions of fields, each field a gateway with a 20-stage
// receive chain, each probe in a field a link budget to its gateway. It has the shapes real
// worksheets have: long decibel sums, chains of 20 stages, fan-in from shared inputs (every
// probe reads the band, the required SNR and its gateway's sensitivity), tolerances on about
// one input in ten, groups nested three deep, a focus with requirements, a sweep and a solve.
// The analyses centre on one reference probe, as a real page does, so their cost does not
// grow with the number of probes.
//
// SumChain is a feeder of K cascaded sections, each with a toleranced loss, whose far-end
// level is the focus: every input feeds every later partial sum, the worst case for
// sensitivity and tolerance analyses that re-evaluate what depends on each input.
//
// The package imports nothing of rfledger's, so the worksheets it writes exercise only the
// format users write.
package gen

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
)

// Sizes accepted by Budget and SumChain.
const (
	MinBudget    = 100
	MaxBudget    = 1_000_000
	MinSumChain  = 1
	MaxSumChain  = 200_000
	chainStages  = 20
	probeSize    = 13 // quantities in one probe group
	fieldFixed   = 10 // field quantities besides its misc items and chain
	regionSize   = 2  // exponent, worst
	topSize      = 10 // shared inputs and the common group
	minMisc      = 4
	defaultMisc  = 16
	fieldsPerReg = 16
	probesPerFld = 24
)

// Edit is a one-line change of a Budget sheet (of any size and seed), as a user makes it in
// an editor: From is the text in the sheet, To what replaces its first occurrence.
type Edit struct{ Name, From, To string }

// Edits are the edits the edit benchmarks and watchtime make: one input's value (the first
// gateway's second connector loss, which its field's budgets read) and one formula (the first
// gateway's cable loss per metre), each keeping every name and type.
var Edits = []Edit{
	{"input", `conn02 = "0.2 dB"`, `conn02 = "0.3 dB"`},
	{"formula", `gw_cable = "= 0.22 dB/m * gw_length"`, `gw_cable = "= 0.23 dB/m * gw_length"`},
}

// Budget returns a farm-network worksheet of exactly n quantities (chain stage values
// included), drawn from seed.
func Budget(n int, seed uint64) ([]byte, error) {
	if n < MinBudget || n > MaxBudget {
		return nil, fmt.Errorf("gen: a budget sheet has %d to %d quantities, not %d", MinBudget, MaxBudget, n)
	}
	p := planBudget(n)
	w := &writer{rng: rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))}
	w.budget(p, n, seed)
	return w.Bytes(), nil
}

// SumChain returns a worksheet of k toleranced inputs summed in a chain (2k+1 quantities),
// drawn from seed.
func SumChain(k int, seed uint64) ([]byte, error) {
	if k < MinSumChain || k > MaxSumChain {
		return nil, fmt.Errorf("gen: a sum chain has %d to %d inputs, not %d", MinSumChain, MaxSumChain, k)
	}
	w := &writer{rng: rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))}
	w.sumChain(k, seed)
	return w.Bytes(), nil
}

// plan is how a budget sheet of n quantities is laid out.
type plan struct {
	regions int
	fields  []fieldPlan // in file order; region r holds fields [r*fieldsPerReg, ...)
}

type fieldPlan struct {
	region, index int // index within its region, from 1
	probes, misc  int
}

// planBudget spreads n quantities over regions, fields and probes. Every field has a chain
// and at least one probe; what a whole probe cannot take goes into the last field's misc
// items, so the count is exact.
func planBudget(n int) plan {
	fieldBase := fieldFixed + 3*chainStages + defaultMisc
	perField := fieldBase + probesPerFld*probeSize
	nf := max(1, int(math.Round(float64(n)/float64(perField))))
	for nf > 1 && topSize+regionSize*ceilDiv(nf, fieldsPerReg)+nf*(fieldBase+probeSize) > n {
		nf--
	}
	nr := ceilDiv(nf, fieldsPerReg)
	misc := defaultMisc
	if topSize+regionSize*nr+nf*(fieldBase+probeSize) > n {
		misc = minMisc // only when one small field is all there is
	}
	rest := n - topSize - regionSize*nr - nf*(fixedField(misc))
	probes, extra := rest/probeSize, rest%probeSize
	p := plan{regions: nr}
	for i := range nf {
		fp := fieldPlan{region: i/fieldsPerReg + 1, index: i%fieldsPerReg + 1, probes: probes / nf, misc: misc}
		if i < probes%nf {
			fp.probes++
		}
		if i == nf-1 {
			fp.misc += extra
		}
		p.fields = append(p.fields, fp)
	}
	return p
}

func (p plan) probes() int {
	n := 0
	for _, f := range p.fields {
		n += f.probes
	}
	return n
}

func count(n int, what string) string {
	if n == 1 {
		return "1 " + what
	}
	return strconv.Itoa(n) + " " + what + "s"
}

func fixedField(misc int) int { return fieldFixed + 3*chainStages + misc }

func ceilDiv(a, b int) int { return (a + b - 1) / b }

// writer builds the worksheet text.
type writer struct {
	bytes.Buffer
	rng *rand.Rand
}

func (w *writer) line(format string, args ...any) { fmt.Fprintf(w, format+"\n", args...) }

// num formats x with at most digits decimals, without trailing zeros.
func num(x float64, digits int) string {
	s := strconv.FormatFloat(x, 'f', digits, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	return s
}

// around draws a value uniformly within ±spread of mid.
func (w *writer) around(mid, spread float64) float64 {
	return mid + spread*(2*w.rng.Float64()-1)
}

// input writes an input quantity: value text v, and a tolerance drawn with probability one in
// ten from tols (none when tols is empty).
func (w *writer) input(key, v string, tols ...string) {
	if len(tols) > 0 && w.rng.IntN(10) == 0 {
		w.long(key, v, tols[w.rng.IntN(len(tols))])
		return
	}
	w.line("%s = %s", key, quote(v))
}

// long writes an input with a tolerance (a TOML value text: "\"1 dB\"" or an array).
func (w *writer) long(key, v, tol string) {
	dist := ""
	switch w.rng.IntN(8) {
	case 0:
		dist = `, dist = "uniform"`
	case 1:
		dist = `, dist = "triangular"`
	}
	w.line("%s = { is = %s, tol = %s%s }", key, quote(v), tol, dist)
}

// quote writes a TOML string, or a bare number when v is one (a dimensionless input).
func quote(v string) string {
	if _, err := strconv.ParseFloat(v, 64); err == nil {
		return v
	}
	return strconv.Quote(v)
}

func (w *writer) formula(key, f string) { w.line("%s = %s", key, strconv.Quote("= "+f)) }

func pad(i, n int) string {
	width := max(2, len(strconv.Itoa(n)))
	return fmt.Sprintf("%0*d", width, i)
}

func (p plan) regionName(r int) string { return "r" + pad(r, p.regions) }

func (p plan) fieldName(f fieldPlan) string {
	return p.regionName(f.region) + ".f" + pad(f.index, min(len(p.fields), fieldsPerReg))
}

func probeName(field string, i, n int) string { return field + ".p" + pad(i, n) }

func (w *writer) budget(p plan, n int, seed uint64) {
	f0 := p.fieldName(p.fields[0])
	focus := probeName(f0, 1, p.fields[0].probes)
	w.line("# Synthetic worksheet written by internal/gen: a farm sensor network of %d quantities (seed %d).", n, seed)
	w.line("# Regions hold fields; each field has a gateway with a %d-stage receive chain and the soil", chainStages)
	w.line("# probes that report to it, each probe a link budget. Every figure is invented.")
	w.line("")
	w.line("title   = %s", strconv.Quote(fmt.Sprintf("Synthetic farm network, %d quantities", n)))
	w.line("summary = %s", strconv.Quote(fmt.Sprintf("%s, %s and %s at 868 MHz reporting to their field gateways; the analyses centre on the reference probe %s.",
		count(p.regions, "region"), count(len(p.fields), "field"), count(p.probes(), "probe"), focus)))
	w.line("focus   = %s", strconv.Quote(focus+".margin"))
	w.line("")
	w.line("# shared by every link")
	w.input("frequency", "868 MHz")
	w.input("bandwidth", "125 kHz")
	w.input("bitrate", "5.47 kbit/s")
	w.input("ber_target", "1e-5")
	w.input("ref", "100 m")
	w.input("eirp_cap", "25 mW")
	var regions []string
	for r := 1; r <= p.regions; r++ {
		regions = append(regions, p.regionName(r)+".worst")
	}
	w.formula("worst", "min("+strings.Join(regions, ", ")+")")
	w.line("")
	w.line("[common]")
	w.formula("ebn0_req", "ebn0_for('fsk-nc', ber_target)")
	w.formula("snr_req", "snr(ebn0_req, bitrate, bandwidth)")
	w.formula("noise", "thermal(bandwidth)")

	fi := 0
	for r := 1; r <= p.regions; r++ {
		var fields []fieldPlan
		for ; fi < len(p.fields) && p.fields[fi].region == r; fi++ {
			fields = append(fields, p.fields[fi])
		}
		w.region(p, r, fields, focus)
	}
	w.studies(focus, f0)
}

func (w *writer) region(p plan, r int, fields []fieldPlan, focus string) {
	name := p.regionName(r)
	w.line("")
	w.line("[%s]", name)
	// The path-loss exponent is shared by every probe of the region; it has no tolerance, as
	// one there would move thousands of quantities together in every Monte Carlo trial.
	exp := "3.1"
	if r > 1 {
		exp = num(w.around(3.0, 0.3), 2)
	}
	w.input("exponent", exp)
	var worst []string
	for _, f := range fields {
		worst = append(worst, p.fieldName(f)+".worst")
	}
	w.formula("worst", "min("+strings.Join(worst, ", ")+")")
	for _, f := range fields {
		w.field(p.fieldName(f), f, focus)
	}
}

// stage is one receive-chain stage: label, gain (dB), noise figure (dB), IIP3 (dBm).
type stage struct {
	label        string
	gain, nf, ip float64
}

// receiver is a superheterodyne gateway front end in signal order; the values are typical of
// the parts, not of any one product (common practice, no source).
var receiver = [chainStages]stage{
	{"limiter", -0.5, 0.5, 30}, {"band filter", -1.5, 1.5, 40}, {"LNA", 18, 0.9, -2},
	{"image filter", -2, 2, 40}, {"RF amplifier", 12, 2.5, 5}, {"pad", -3, 3, 45},
	{"mixer", -7, 8, 10}, {"roofing filter", -4, 4, 40}, {"IF amplifier 1", 15, 4, 8},
	{"IF pad", -2, 2, 40}, {"IF amplifier 2", 15, 5, 12}, {"IF SAW filter", -8, 8, 45},
	{"IF amplifier 3", 12, 6, 15}, {"channel filter", -1, 1, 40}, {"balun", -0.5, 0.5, 45},
	{"VGA", 10, 8, 20}, {"anti-alias filter", -1, 1, 40}, {"ADC driver", 6, 10, 25},
	{"transformer", -0.5, 0.5, 40}, {"ADC", 0, 25, 30},
}

func (w *writer) field(name string, f fieldPlan, focus string) {
	w.line("")
	w.line("[%s]   # gateway", name)
	w.input("gw_antenna", num(w.around(6, 2), 1)+" dBi", `["-1 dB", "+0.5 dB"]`)
	w.input("gw_length", num(w.around(15, 8), 1)+" m", `"5 %"`)
	w.formula("gw_cable", "0.22 dB/m * gw_length")
	items := make([]string, f.misc)
	for i := range items {
		items[i] = "conn" + pad(i+1, f.misc)
		w.input(items[i], num(w.around(0.15, 0.1), 2)+" dB", `"0.05 dB"`)
	}
	w.formula("gw_misc", strings.Join(items, " + "))
	w.formula("gain", "cascade_gain(chain)")
	w.formula("nf", "cascade_nf(chain)")
	w.formula("iip3", "cascade_iip3(chain)")
	w.formula("floor", "common.noise + nf")
	w.formula("sensitivity", "floor + common.snr_req")
	var margins []string
	for i := 1; i <= f.probes; i++ {
		margins = append(margins, probeName(name, i, f.probes)+".margin")
	}
	w.formula("worst", "min("+strings.Join(margins, ", ")+")")
	for _, s := range receiver {
		w.line("")
		w.line("[[%s.chain]]", name)
		w.line("stage = %s", strconv.Quote(s.label))
		g := s.gain * (1 + 0.1*(2*w.rng.Float64()-1))
		nf := s.nf * (1 + 0.1*(2*w.rng.Float64()-1))
		if s.gain < 0 {
			nf = -g // a passive stage's noise figure is its loss
		}
		w.input("gain", num(g, 2)+" dB", `"0.5 dB"`, `["-1 dB", "+0.5 dB"]`)
		w.input("nf", num(nf, 2)+" dB", `"0.3 dB"`)
		w.input("iip3", num(w.around(s.ip, 2), 1)+" dBm", `"2 dB"`)
	}
	for i := 1; i <= f.probes; i++ {
		p := probeName(name, i, f.probes)
		w.probe(p, p == focus)
	}
}

// probe writes one probe's link budget to its field's gateway. The reference probe has fixed
// values and tolerances, so the focus and the requirements on it do not depend on the seed.
func (w *writer) probe(name string, ref bool) {
	w.line("")
	w.line("[%s]", name)
	if ref {
		w.long("power", "14 dBm", `"1 dB"`)
		w.line(`vswr = 1.8`)
		w.line(`cable = "0.3 dB"`)
		w.long("antenna", "-2 dBi", `["-3 dB", "+1 dB"]`)
		w.long("distance", "1.2 km", `"5 %"`)
		w.long("clutter", "6 dB", `"3 dB"`)
		w.line(`body = "1 dB"`)
		w.line(`fade = "3 dB"`)
	} else {
		w.input("power", num(w.around(13, 1), 1)+" dBm", `"1 dB"`)
		w.input("vswr", num(w.around(1.6, 0.3), 2), `"0.1"`)
		w.input("cable", num(w.around(0.3, 0.1), 2)+" dB", `"0.1 dB"`)
		w.input("antenna", num(w.around(-1, 1.5), 1)+" dBi", `["-3 dB", "+1 dB"]`)
		w.input("distance", num(w.around(1.5, 1.2), 2)+" km", `"5 %"`, `"10 %"`)
		w.input("clutter", num(w.around(6, 3), 1)+" dB", `"3 dB"`)
		w.input("body", num(w.around(1, 0.5), 1)+" dB", `"0.5 dB"`)
		w.input("fade", num(w.around(3, 1), 1)+" dB", `["-1 dB", "+2 dB"]`)
	}
	w.formula("match", "mismatch_loss(vswr)")
	w.formula("eirp", "power - match - cable + antenna")
	w.formula("loss", "logdist(distance, frequency, ref, exponent) + clutter")
	w.formula("level", "eirp - loss - body - fade + gw_antenna - gw_cable - gw_misc")
	w.formula("margin", "level - sensitivity")
}

func (w *writer) studies(focus, field string) {
	reqs := [][2]string{
		{focus + ".margin >= 10 dB", "fade allowance for the reference probe"},
		{focus + ".eirp <= eirp_cap", "our own cap; the legal limit depends on the band and the country"},
		{field + ".nf <= 6 dB", "gateway noise figure"},
		{field + ".iip3 >= -50 dBm", "gateway linearity near the irrigation pump radios"},
	}
	for _, r := range reqs {
		w.line("")
		w.line("[[require]]")
		w.line("that = %s", strconv.Quote("= "+r[0]))
		w.line("note = %s", strconv.Quote(r[1]))
	}
	w.line("")
	w.line("[[sweep]]")
	w.line("vary  = %s", strconv.Quote(focus+".distance"))
	w.line(`from  = "200 m"`)
	w.line(`to    = "10 km"`)
	w.line(`steps = 40`)
	w.line(`scale = "log"`)
	w.line("plot  = [%s]", strconv.Quote(focus+".margin"))
	w.line("")
	w.line("[[solve]]")
	w.line(`name    = "max_range"`)
	w.line("vary    = %s", strconv.Quote(focus+".distance"))
	w.line("so_that = %s", strconv.Quote(focus+".margin"))
	w.line(`equals  = "0 dB"`)
	w.line(`within  = ["10 m", "100 km"]`)
}

func (w *writer) sumChain(k int, seed uint64) {
	w.line("# Synthetic worksheet written by internal/gen: a feeder of %d cascaded sections (seed %d).", k, seed)
	w.line("# Each section's loss is toleranced; the focus is the level at the far end, so every")
	w.line("# input feeds every later partial level. Every figure is invented.")
	w.line("")
	w.line("title   = %s", strconv.Quote(fmt.Sprintf("Synthetic feeder, %d toleranced sections", k)))
	w.line(`summary = "Level along a long feeder of cascaded sections, each with its own loss and tolerance."`)
	last := "level" + pad(k, k)
	w.line("focus   = %s", strconv.Quote("feeder."+last))
	w.line("")
	w.line("[feeder]")
	w.line(`start = "30 dBm"`)
	prev := "start"
	for i := 1; i <= k; i++ {
		loss, level := "loss"+pad(i, k), "level"+pad(i, k)
		w.line("%s = { is = %s, tol = %s }", loss, strconv.Quote(num(w.around(0.01, 0.005), 4)+" dB"), `"0.005 dB"`)
		w.formula(level, prev+" - "+loss)
		prev = level
	}
}
