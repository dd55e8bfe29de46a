package engine

import (
	"fmt"
	"sort"
	"strings"
)

// Pos is a position in a worksheet file: 1-based line and column (columns count characters,
// a tab is one) and the 0-based byte offset in the file. The zero Pos means "no position".
type Pos struct {
	Line, Col, Byte int
}

// Range is a span of a worksheet file: Start is the first character of the offending text (a
// key, a value, a part of a formula) and End the position just after its last character. End
// equals Start, or is zero, when only a point is known. A Range with no Start names only its
// file ("--set" for an override given on the command line).
type Range struct {
	File       string
	Start, End Pos
}

// String writes the range's start as FILE:LINE:COL, or only FILE when it has no position.
func (r Range) String() string {
	if r.Start.Line == 0 {
		return r.File
	}
	return fmt.Sprintf("%s:%d:%d", r.File, r.Start.Line, r.Start.Col)
}

// Severity says whether a diagnostic stops evaluation.
type Severity int

const (
	// Error means the named quantity (or the whole sheet) could not be evaluated.
	Error Severity = iota
	// Warning means a value was computed but should be looked at (a model used outside its range).
	Warning
)

// Diagnostic is one problem found in a worksheet, with where it is and what to do about it.
type Diagnostic struct {
	Severity Severity // Error or Warning
	Quantity string   // full name of the quantity concerned, "" when none
	Summary  string   // what is wrong, lower case
	Hint     string   // what to do about it, "" when there is nothing to add
	Range    Range    // where in which file
}

// String renders the diagnostic as FILE:LINE:COL: NAME: message; hint.
func (d Diagnostic) String() string {
	var b strings.Builder
	b.WriteString(d.Range.String())
	b.WriteString(": ")
	if d.Severity == Warning {
		b.WriteString("warning: ")
	}
	if d.Quantity != "" {
		b.WriteString(d.Quantity)
		b.WriteString(": ")
	}
	b.WriteString(d.Summary)
	if d.Hint != "" {
		b.WriteString("; ")
		b.WriteString(d.Hint)
	}
	return b.String()
}

// Diagnostics is a list of problems. It implements error; Err returns nil when it holds no errors.
type Diagnostics []Diagnostic

// Error writes every diagnostic, errors and warnings, one a line as [Diagnostic.String]
// writes it.
func (ds Diagnostics) Error() string {
	var lines []string
	for _, d := range ds {
		lines = append(lines, d.String())
	}
	return strings.Join(lines, "\n")
}

// HasErrors reports whether any diagnostic is an error (not only warnings).
func (ds Diagnostics) HasErrors() bool {
	for _, d := range ds {
		if d.Severity == Error {
			return true
		}
	}
	return false
}

// Err returns the errors among the diagnostics as an error, or nil when there are none.
func (ds Diagnostics) Err() error {
	if errs := ds.only(Error); len(errs) > 0 {
		return errs
	}
	return nil
}

// Warnings returns the warnings only.
func (ds Diagnostics) Warnings() Diagnostics { return ds.only(Warning) }

func (ds Diagnostics) only(s Severity) Diagnostics {
	var out Diagnostics
	for _, d := range ds {
		if d.Severity == s {
			out = append(out, d)
		}
	}
	return out
}

// sortDiags orders diagnostics by file and position and drops exact repeats.
func sortDiags(ds Diagnostics) Diagnostics {
	sort.SliceStable(ds, func(i, j int) bool {
		a, b := ds[i].Range, ds[j].Range
		if a.File != b.File {
			return a.File < b.File
		}
		if a.Start.Line != b.Start.Line {
			return a.Start.Line < b.Start.Line
		}
		return a.Start.Col < b.Start.Col
	})
	out := ds[:0]
	for i, d := range ds {
		if i > 0 && d == ds[i-1] {
			continue
		}
		out = append(out, d)
	}
	return out
}

// SortDiagnostics orders diagnostics by file and position and drops exact repeats.
func SortDiagnostics(ds Diagnostics) Diagnostics { return sortDiags(ds) }
