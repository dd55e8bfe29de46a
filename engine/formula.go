package engine

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"

	"github.com/rfledger/rfledger/units"
)

// Limits on a single formula.
const (
	maxFormulaLen = 20000 // characters
	maxNodes      = 8000  // syntax-tree nodes
	maxDepth      = 64    // nesting of the syntax tree (a flat sum a + b + c … is not nesting)
)

// ferr is a problem in a formula at rune offsets [from, to) of its text.
type ferr struct {
	from, to  int
	msg, hint string
	isWarning bool
	unknown   string // an unknown name, whose "did you mean" hint the loader adds (loader.suggest)
}

func (e ferr) Error() string { return e.msg }

// typ is the static type of a formula node.
type typ uint8

const (
	tQ typ = iota
	tBool
	tText
	tChain
)

func (t typ) String() string {
	return [...]string{"a quantity", "a true/false value", "a name", "a chain"}[t]
}

// predeclared constants: names no worksheet may redefine.
var predeclared = map[string]units.Q{
	"pi": units.Num(math.Pi),
	"c0": units.Lin(299792458, units.Speed),
	"kB": units.Lin(1.380649e-23, units.Boltzmann),
	"T0": units.Lin(290, units.Temperature),
}

// scope tells a formula where it stands: its group, and the part prefix it was loaded under.
type scope struct {
	group string // full name of the formula's group ("" for the top group)
	part  string // part prefix ("" for the main sheet)
}

// Unit literals. expr has no syntax for "6 dB", so before parsing, every number followed by a
// unit is replaced by a placeholder identifier of exactly the same length ("_3___"). Positions
// in expr's errors then still point into the original text, and the rewriter turns each
// placeholder into a constant quantity.

func placeholder(i, length int) (string, bool) {
	s := "_" + strconv.FormatInt(int64(i), 36)
	if len(s) > length {
		return "", false
	}
	return s + strings.Repeat("_", length-len(s)), true
}

func placeholderIndex(name string) (int, bool) {
	if len(name) < 2 || name[0] != '_' {
		return 0, false
	}
	i, err := strconv.ParseInt(strings.TrimRight(name[1:], "_"), 36, 32)
	if err != nil {
		return 0, false
	}
	return int(i), true
}

var keywords = map[string]bool{
	"and": true, "or": true, "not": true, "in": true, "matches": true, "contains": true,
	"startsWith": true, "endsWith": true, "let": true, "if": true, "else": true, "true": true,
	"false": true, "nil": true,
}

func isIdentRune(r rune) bool { return r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r) }

func isUnitStart(r rune) bool {
	return unicode.IsLetter(r) || r == '%' || r == 'µ' || r == 'μ' || r == 'Ω'
}

func isUnitRune(r rune) bool {
	return isUnitStart(r) || unicode.IsDigit(r) || r == '/' || r == '^' || r == '*' || r == '-' || r == '_'
}

// scanLiterals replaces unit literals by placeholders and returns the literal values.
func scanLiterals(text string) (string, []lit, []ferr) {
	rs := []rune(text)
	out := make([]rune, 0, len(rs))
	var lits []lit
	var errs []ferr
	for i := 0; i < len(rs); {
		r := rs[i]
		switch {
		case r == '\'' || r == '"' || r == '`':
			j := i + 1
			for j < len(rs) && rs[j] != r {
				if rs[j] == '\\' {
					j++
				}
				j++
			}
			j = min(j+1, len(rs))
			out = append(out, rs[i:j]...)
			i = j
			continue
		case isIdentRune(r) && !unicode.IsDigit(r):
			j := i
			for j < len(rs) && (isIdentRune(rs[j]) || rs[j] == '.' && j+1 < len(rs) && isIdentRune(rs[j+1]) && !unicode.IsDigit(rs[j+1])) {
				j++
			}
			out = append(out, rs[i:j]...)
			i = j
			continue
		case unicode.IsDigit(r) || r == '.' && i+1 < len(rs) && unicode.IsDigit(rs[i+1]):
			start := i
			n := units.NumberLen(string(rs[i:min(len(rs), i+80)]))
			if n == 0 {
				n = 1
			}
			j := i + n
			for j < len(rs) && (isIdentRune(rs[j]) && unicode.IsDigit(rs[j]) || rs[j] == '_') {
				j++ // 1_000
			}
			numEnd := j
			k := j
			for k < len(rs) && (rs[k] == ' ' || rs[k] == '\t') {
				k++
			}
			q, ulen, e := unitAt(rs, numEnd, k)
			if e != nil {
				errs = append(errs, *e)
			}
			if ulen == 0 {
				out = append(out, rs[start:numEnd]...)
				i = numEnd
				continue
			}
			// Fold a unary minus into the literal: "-174 dBm/Hz" is a level, not the negation of one.
			litStart := start
			neg := false
			if m := len(out) - 1; m >= 0 {
				p := m
				for p >= 0 && (out[p] == ' ' || out[p] == '\t') {
					p--
				}
				if p >= 0 && out[p] == '-' && signIsUnary(out[:p]) {
					neg, litStart = true, start-(m-p)-1
					out = out[:p]
				}
			}
			end := k + ulen
			numText := strings.ReplaceAll(string(rs[start:numEnd]), "_", "")
			v, err := strconv.ParseFloat(numText, 64)
			if err != nil || math.IsInf(v, 0) {
				errs = append(errs, ferr{from: start, to: numEnd, msg: fmt.Sprintf("bad number %q", numText)})
			}
			if neg {
				v = -v
			}
			u, _ := units.ParseUnit(string(rs[k:end]))
			if u != nil {
				q = u.Of(v)
			}
			ph, ok := placeholder(len(lits), end-litStart)
			if !ok {
				errs = append(errs, ferr{from: litStart, to: end, msg: "too many short unit literals in one formula", hint: "write numbers with units as \"6 dB\" rather than \"6dB\", or split the formula"})
				ph = strings.Repeat("_", end-litStart)
			}
			lits = append(lits, lit{q: q, from: litStart})
			out = append(out, []rune(ph)...)
			i = end
			continue
		}
		out = append(out, r)
		i++
	}
	return string(out), lits, errs
}

// signIsUnary reports whether a '-' after the text before it is a sign rather than a subtraction.
func signIsUnary(before []rune) bool {
	p := len(before) - 1
	for p >= 0 && (before[p] == ' ' || before[p] == '\t' || before[p] == '\n') {
		p--
	}
	if p < 0 {
		return true
	}
	switch before[p] {
	case '(', ',', '+', '-', '*', '/', '^', '<', '>', '=', '!', '?', ':', '&', '|', '[':
		return true
	}
	// after a keyword such as "and"
	q := p
	for q >= 0 && isIdentRune(before[q]) {
		q--
	}
	return keywords[string(before[q+1:p+1])]
}

// unitAt looks for a unit starting at rs[k] (after a number ending at numEnd). It returns the
// length of the longest unit text that parses, or 0 when there is no unit.
func unitAt(rs []rune, numEnd, k int) (units.Q, int, *ferr) {
	if k >= len(rs) || !isUnitStart(rs[k]) {
		return units.Q{}, 0, nil
	}
	j := k
	for j < len(rs) && isUnitRune(rs[j]) {
		if rs[j] == '-' && !(j+2 < len(rs) && string(rs[j+1:j+3]) == "Hz") {
			break
		}
		j++
	}
	word := string(rs[k:j])

	// The first plain word: a keyword ("1 and x") is not a unit.
	w := k
	for w < j && isIdentRune(rs[w]) {
		w++
	}
	if keywords[string(rs[k:w])] {
		return units.Q{}, 0, nil
	}
	for end := j; end > k; end-- {
		if end < j && !strings.ContainsRune("/*^-", rs[end]) {
			continue
		}
		if _, err := units.ParseUnit(string(rs[k:end])); err == nil {
			return units.Q{}, end - k, nil
		}
	}
	// Nothing parses. Report it when it plainly was meant as a unit: written against the
	// number ("6dQ") or close to a known unit ("6 dQ").
	_, err := units.ParseUnit(word)
	var ue *units.Error
	if errors.As(err, &ue) && (k == numEnd || ue.Hint != "") {
		return units.Q{}, 0, &ferr{from: k, to: j, msg: ue.Msg, hint: ue.Hint}
	}
	return units.Q{}, 0, nil
}
