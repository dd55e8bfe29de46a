// Package freqplan works out a receiver's frequency plan: the mixer's spurious responses (every
// input band that some LO harmonic and input harmonic convert into the IF passband) and the
// harmonics and intermodulation products of known tones that land in protected bands.
// Frequencies are in Hz, levels in dB. It is plain arithmetic with no dependence on the
// worksheet engine.
package freqplan

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Limits on a plan.
const (
	MaxOrder            = 15 // largest m + n (spurs) or Σ|k| (products)
	DefaultSpurOrder    = 7
	DefaultProductOrder = 5
	MaxTones            = 6
	MaxBands            = 16
	MaxHits             = 10000
)

// Band is a closed frequency interval [Lo, Hi] in Hz.
type Band struct{ Lo, Hi float64 }

// edgeTol is how close, relative to the frequencies compared, two edges count as the same
// point. Decimal inputs such as 512.07 MHz are not exact in binary, so 3 × 512.07 MHz can
// come out a few units in the last place above an edge written as 1536.21 MHz; 1e-12 of the
// frequency (a hundredth of a hertz at 10 GHz) covers that rounding and nothing a plan could
// mean.
const edgeTol = 1e-12

// Overlaps reports whether two closed intervals share a point (edges that agree to edgeTol
// count as touching).
func (b Band) Overlaps(c Band) bool {
	tol := edgeTol * math.Max(math.Abs(b.Hi), math.Abs(c.Hi))
	return b.Lo <= c.Hi+tol && c.Lo <= b.Hi+tol
}

// contains reports whether f lies in the closed band, its edges widened by tol.
func (b Band) contains(f, tol float64) bool { return f >= b.Lo-tol && f <= b.Hi+tol }

func (b Band) mid() float64 { return (b.Lo + b.Hi) / 2 }

// Form is which of the mixing relations a response follows.
type Form uint8

const (
	// Sum is m·f_LO + n·f = f_IF (and, for m = 0, n·f = f_IF: the input's own harmonic at the IF).
	Sum Form = iota
	// LOMinus is m·f_LO − n·f = f_IF.
	LOMinus
	// InputMinus is n·f − m·f_LO = f_IF.
	InputMinus
)

// String names the form as the JSON contract writes it.
func (f Form) String() string {
	switch f {
	case Sum:
		return "mLO+nRF"
	case LOMinus:
		return "mLO-nRF"
	}
	return "nRF-mLO"
}

// Plan is one mixer stage: its LO, IF passband, the preselector passband where the wanted
// signal lives, the largest order m + n considered, and an optional rejection table (dBc
// relative to the wanted conversion, keyed by [m, n]).
type Plan struct {
	LO     float64
	IF, RF Band
	Order  int
	Reject map[[2]int]float64
}

// Response is one input band that the mixer converts into the IF passband.
type Response struct {
	M, N     int // LO harmonic (m ≥ 0) and input harmonic (n ≥ 1)
	Form     Form
	From, To float64 // the input band, Hz
	InBand   bool    // overlaps the preselector passband
	Wanted   bool    // m = n = 1 and in band: the conversion the plan is for
	Image    bool    // m = n = 1 on the other side of the LO from the passband
	HalfIF   bool    // m = n = 2 on the passband's side of the LO (half an IF from the wanted)
	Level    float64 // dBc relative to the wanted conversion, when HasLevel
	HasLevel bool
}

// Order is m + n.
func (r Response) Order() int { return r.M + r.N }

// Check reports what is wrong with a plan, or nil.
func (p Plan) Check() error {
	switch {
	case !(p.LO > 0) || math.IsInf(p.LO, 0):
		return errors.New("the LO must be a positive frequency")
	case !validBand(p.IF, 0):
		return errors.New("the IF band must be [low, high] with 0 <= low < high")
	case !validBand(p.RF, 0):
		return errors.New("the RF band must be [low, high] with 0 <= low < high")
	case p.Order < 1 || p.Order > MaxOrder:
		return fmt.Errorf("the order must be from 1 to %d", MaxOrder)
	}
	return nil
}

func validBand(b Band, min float64) bool {
	return b.Lo >= min && b.Lo < b.Hi && !math.IsInf(b.Hi, 0)
}

// Spurs lists every response of the plan: for each LO harmonic m ≥ 0 and input harmonic n ≥ 1
// with m + n ≤ Order, each input band [From, To] (clipped to positive frequencies) whose
// m·LO + n·f, m·LO − n·f or n·f − m·LO falls in the IF passband. For m = 0 the first and third
// relations coincide and the response is listed once, as Sum. The order of the list is the
// page's: in-band responses (the wanted one first), then the image, then the half-IF
// response, then the rest by order.
func Spurs(p Plan) ([]Response, error) {
	if err := p.Check(); err != nil {
		return nil, err
	}
	var out []Response
	for m := 0; m < p.Order; m++ {
		for n := 1; m+n <= p.Order; n++ {
			ml, nf := float64(m)*p.LO, float64(n)
			tol := edgeTol * (ml + p.IF.Hi) / nf // rounding of the edges below
			add := func(form Form, lo, hi float64) {
				if hi <= tol {
					return // no positive input frequency (an edge at 0 Hz, after rounding)
				}
				if lo < tol {
					lo = 0
				}
				out = append(out, p.response(m, n, form, lo, hi))
			}
			add(Sum, (p.IF.Lo-ml)/nf, (p.IF.Hi-ml)/nf)
			if m > 0 {
				add(LOMinus, (ml-p.IF.Hi)/nf, (ml-p.IF.Lo)/nf)
				add(InputMinus, (p.IF.Lo+ml)/nf, (p.IF.Hi+ml)/nf)
			}
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return less(out[i], out[j]) })
	return out, nil
}

func (p Plan) response(m, n int, form Form, from, to float64) Response {
	r := Response{M: m, N: n, Form: form, From: from, To: to}
	band := Band{from, to}
	r.InBand = band.Overlaps(p.RF)
	// Which side of the LO a band lies on is read at its middle, so that a band with an edge
	// on the LO (an IF reaching down to 0 Hz or up to the LO) still has a side.
	above := p.RF.mid() > p.LO // the passband lies above the LO
	below := p.RF.mid() < p.LO
	r.Wanted = m == 1 && n == 1 && r.InBand
	r.Image = m == 1 && n == 1 && (above && band.mid() < p.LO || below && band.mid() > p.LO)
	r.HalfIF = m == 2 && n == 2 && form != Sum && (above && band.mid() > p.LO || below && band.mid() < p.LO)
	if m == 1 && n == 1 {
		r.Level, r.HasLevel = 0, true
	} else if v, ok := p.Reject[[2]int{m, n}]; ok {
		r.Level, r.HasLevel = v, true
	}
	return r
}

// rank groups responses as the page lists them.
func rank(r Response) int {
	switch {
	case r.InBand:
		return 0
	case r.Image:
		return 1
	case r.HalfIF:
		return 2
	}
	return 3
}

func less(a, b Response) bool {
	if ra, rb := rank(a), rank(b); ra != rb {
		return ra < rb
	}
	if a.Wanted != b.Wanted {
		return a.Wanted
	}
	if a.Order() != b.Order() {
		return a.Order() < b.Order()
	}
	if a.M != b.M {
		return a.M < b.M
	}
	if a.Form != b.Form {
		return a.Form < b.Form
	}
	return a.From < b.From
}

// Hit is one product k1·f1 + k2·f2 + … of the tones that lands in a protected band.
type Hit struct {
	K     []int // one coefficient per tone
	Freq  float64
	Order int // Σ|k|
	Band  int // index of the protected band
}

// Products lists every product Σ kᵢ·fᵢ of the tones (integers kᵢ, 2 ≤ Σ|kᵢ| ≤ order) with a
// positive frequency that falls inside a protected band (closed intervals, edges to edgeTol), one hit per band
// it falls in, sorted by band, frequency, order and coefficients. Order 1 gives only the tones
// themselves, so the order must be at least 2.
func Products(tones []float64, protect []Band, order int) ([]Hit, error) {
	if err := checkProducts(tones, protect, order); err != nil {
		return nil, err
	}
	var hits []Hit
	k := make([]int, len(tones))
	var walk func(i, left int) error
	walk = func(i, left int) error {
		if i == len(tones) {
			ord, f, size := 0, 0.0, 0.0
			for j, c := range k {
				ord += abs(c)
				f += float64(c) * tones[j]
				size += float64(abs(c)) * tones[j]
			}
			if ord < 2 || f <= edgeTol*size {
				return nil
			}
			tol := edgeTol * size // rounding of the sum and of decimal edges
			for b, band := range protect {
				if band.contains(f, tol) {
					if len(hits) == MaxHits {
						return fmt.Errorf("more than %d products land in the protected bands; narrow the bands or lower the order", MaxHits)
					}
					hits = append(hits, Hit{K: append([]int(nil), k...), Freq: f, Order: ord, Band: b})
				}
			}
			return nil
		}
		for c := -left; c <= left; c++ {
			k[i] = c
			if err := walk(i+1, left-abs(c)); err != nil {
				return err
			}
		}
		k[i] = 0
		return nil
	}
	if err := walk(0, order); err != nil {
		return nil, err
	}
	sort.Slice(hits, func(i, j int) bool {
		a, b := hits[i], hits[j]
		switch {
		case a.Band != b.Band:
			return a.Band < b.Band
		case a.Freq != b.Freq:
			return a.Freq < b.Freq
		case a.Order != b.Order:
			return a.Order < b.Order
		}
		for x := range a.K {
			if a.K[x] != b.K[x] {
				return a.K[x] > b.K[x]
			}
		}
		return false
	})
	return hits, nil
}

func checkProducts(tones []float64, protect []Band, order int) error {
	switch {
	case len(tones) == 0 || len(tones) > MaxTones:
		return fmt.Errorf("give from 1 to %d tones", MaxTones)
	case len(protect) == 0 || len(protect) > MaxBands:
		return fmt.Errorf("give from 1 to %d protected bands", MaxBands)
	case order < 2 || order > MaxOrder:
		return fmt.Errorf("the order must be from 2 to %d (order 1 is the tones themselves)", MaxOrder)
	}
	for _, t := range tones {
		if !(t > 0) || math.IsInf(t, 0) {
			return errors.New("every tone must be a positive frequency")
		}
	}
	for _, b := range protect {
		if !validBand(b, 0) {
			return errors.New("every protected band must be [low, high] with 0 <= low < high")
		}
	}
	return nil
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
