package chart

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// decadeTicks marks a log axis with a labelled major tick at every power of
// ten and unlabelled minor ticks at 2..9 times each power. When the range
// holds fewer than two powers of ten the minor ticks are labelled too, so the
// axis is never without numbers.
type decadeTicks struct{}

// Ticks implements plot.Ticker.
func (decadeTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) || !finite(lo) || !finite(hi) {
		return nil
	}
	e0 := int(math.Floor(math.Log10(lo) + 1e-9))
	e1 := int(math.Ceil(math.Log10(hi) - 1e-9))
	majors := 0
	for e := e0; e <= e1; e++ {
		if v := math.Pow10(e); v >= lo*(1-1e-9) && v <= hi*(1+1e-9) {
			majors++
		}
	}
	var ticks []plot.Tick
	for e := e0; e <= e1; e++ {
		base := math.Pow10(e)
		for m := 1; m <= 9; m++ {
			v := base * float64(m)
			if v < lo*(1-1e-9) || v > hi*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || majors < 2 {
				t.Label = siLabel(v)
			}
			ticks = append(ticks, t)
		}
	}
	return ticks
}

// siLabel formats a positive tick value compactly: plain numbers from 0.001
// to 999, SI prefixes k, M, G, T above, exponent notation beyond.
func siLabel(v float64) string {
	switch {
	case v >= 1e15 || v < 1e-3:
		return strconv.FormatFloat(v, 'g', 3, 64)
	case v < 1e3:
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	prefixes := []string{"k", "M", "G", "T"}
	e := int(math.Floor(math.Log10(v)/3 + 1e-9))
	return strconv.FormatFloat(v/math.Pow10(3*e), 'g', 3, 64) + prefixes[e-1]
}

// decadeRange widens [lo, hi] to whole powers of ten.
func decadeRange(lo, hi float64) (float64, float64) {
	a := math.Pow10(int(math.Floor(math.Log10(lo) + 1e-9)))
	b := math.Pow10(int(math.Ceil(math.Log10(hi) - 1e-9)))
	if b <= a {
		b = a * 10
	}
	return a, b
}

// niceTicks marks a linear axis with about six labelled ticks at steps of
// 1, 2 or 5 times a power of ten, and unlabelled minor ticks between them.
type niceTicks struct{}

// Ticks implements plot.Ticker.
func (niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !finite(lo) || !finite(hi) || hi <= lo {
		return nil
	}
	raw := (hi - lo) / 6
	mag := math.Pow10(int(math.Floor(math.Log10(raw))))
	var step float64
	var minor int
	switch r := raw / mag; {
	case r < 1.5:
		step, minor = mag, 5
	case r < 3.5:
		step, minor = 2*mag, 4
	case r < 7.5:
		step, minor = 5*mag, 5
	default:
		step, minor = 10*mag, 5
	}
	decimals := max(0, -int(math.Floor(math.Log10(step)+1e-9)))
	sub := step / float64(minor)
	var ticks []plot.Tick
	first := math.Ceil(lo/sub - 1e-9)
	for k := first; k*sub <= hi+sub*1e-9; k++ {
		// Snap to the label precision so 7×0.1 is 0.7, not 0.7000000000000001
		// (which would fall just outside the axis).
		scale := math.Pow10(decimals + 3)
		v := math.Round(k*sub*scale) / scale
		t := plot.Tick{Value: v}
		if math.Mod(k, float64(minor)) == 0 {
			if math.Abs(v) < step*1e-9 {
				v = 0
			}
			t.Label = strconv.FormatFloat(v, 'f', decimals, 64)
		}
		ticks = append(ticks, t)
		if len(ticks) > 1000 {
			break
		}
	}
	return ticks
}
