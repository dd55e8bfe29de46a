package rfmath

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// DB converts a linear power ratio to decibels: 10 log10(x). It returns NaN
// for negative or NaN x and −Inf for zero (common decibel definition).
func DB(x float64) float64 {
	if math.IsNaN(x) || x < 0 {
		return math.NaN()
	}
	return 10 * math.Log10(x)
}

// FromDB converts decibels to a linear power ratio: 10^(x/10) (common
// decibel definition).
func FromDB(x float64) float64 {
	return math.Pow(10, x/10)
}

// DBm converts a power in W to dBm: 10 log10(p / 1 mW). NaN for negative p.
func DBm(p float64) float64 {
	return DB(p / mW)
}

// FromDBm converts dBm to W: 1 mW × 10^(x/10).
func FromDBm(x float64) float64 {
	return mW * FromDB(x)
}

// positive reports whether every value is a finite number greater than zero
// or +Inf; NaN, zero and negative values are rejected.
func positive(xs ...float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || x <= 0 {
			return false
		}
	}
	return true
}

// num formats a number compactly for human-readable notes.
func num(x float64) string {
	return strconv.FormatFloat(x, 'g', 4, 64)
}

// fmtHz formats a frequency in Hz with a readable prefix.
func fmtHz(f float64) string {
	a := math.Abs(f)
	switch {
	case a >= 1e9:
		return num(f/1e9) + " GHz"
	case a >= 1e6:
		return num(f/1e6) + " MHz"
	case a >= 1e3:
		return num(f/1e3) + " kHz"
	default:
		return num(f) + " Hz"
	}
}

// fmtM formats a length in m, switching to km at 1 km.
func fmtM(d float64) string {
	if math.Abs(d) >= 1e3 {
		return num(d/1e3) + " km"
	}
	return num(d) + " m"
}

// rangeNote returns a note when x lies outside [lo, hi]; format renders the
// numbers (e.g. fmtHz), what names the input, span names the valid range.
func rangeNote(what string, x, lo, hi float64, format func(float64) string, span string) []string {
	if x >= lo && x <= hi {
		return nil
	}
	return []string{fmt.Sprintf("%s %s is outside the model's %s", what, format(x), span)}
}

// nameError builds the error for an unknown name, listing the valid ones.
func nameError(kind, got string, valid []string) error {
	return fmt.Errorf("rfmath: unknown %s %q (valid: %s)", kind, got, strings.Join(valid, ", "))
}
