package units

import (
	"math"
	"strconv"
	"strings"
)

// Parse reads a number with an optional unit, such as "14 dBm", "-174 dBm/Hz", "2.4km",
// "10 %" or "1e-4", and returns the quantity and the unit it was written in.
func Parse(s string) (Q, *Unit, error) {
	s = strings.TrimSpace(s)
	orig := s
	if rest, ok := strings.CutPrefix(s, "\u2212"); ok {
		s = "-" + rest // U+2212 MINUS SIGN, as datasheets print it
	}
	n := numberLen(s)
	if n == 0 {
		return Q{}, nil, &Error{Msg: "expected a number with an optional unit, got \"" + clip(orig) + "\"", Hint: "write e.g. \"14 dBm\" or \"= formula\"", kind: ErrUnit}
	}
	v, err := strconv.ParseFloat(s[:n], 64)
	if err != nil || math.IsInf(v, 0) {
		return Q{}, nil, &Error{Msg: "bad number \"" + clip(s[:n]) + "\"", kind: ErrDomain}
	}
	u, err := ParseUnit(strings.TrimSpace(s[n:]))
	if err != nil {
		return Q{}, nil, err
	}
	q := u.Of(v)
	if math.IsInf(q.V, 0) || math.IsNaN(q.V) {
		return Q{}, nil, &Error{Msg: "\"" + clip(orig) + "\" is out of range", kind: ErrDomain}
	}
	return q, u, nil
}

// NumberLen returns the length of the decimal number at the start of s (sign, digits, point,
// exponent), or 0 if s does not start with one. An "e" counts as an exponent only when a digit
// follows, so "3e" reads as 3 followed by the unit "e".
func numberLen(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && isDigit(s[i]) {
		i, digits = i+1, digits+1
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && isDigit(s[i]) {
			i, digits = i+1, digits+1
		}
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		if j < len(s) && isDigit(s[j]) {
			for j < len(s) && isDigit(s[j]) {
				j++
			}
			i = j
		}
	}
	return i
}

// NumberLen is numberLen for the formula scanner.
func NumberLen(s string) int { return numberLen(s) }

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "…"
	}
	return s
}
