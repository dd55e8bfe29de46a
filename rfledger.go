package rfledger

import (
	"errors"
	"fmt"
	"io"
	"io/fs"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/internal/rflib"
)

// Library returns the built-in formula functions (conversions, propagation, noise, chains,
// linearity, modulation, antennas, satellite links), the set the rfledger command loads
// worksheets with. `rfledger funcs` lists them with their signatures and sources. Each call
// returns a new library; add functions of your own with [engine.NewLibrary]:
//
//	lib := engine.NewLibrary(append(rfledger.Library().Funcs(), myFunc)...)
func Library() *engine.Library { return rflib.Library() }

// Load reads, checks and compiles a worksheet and the parts it uses, from the operating
// system's files, with the built-in functions: [engine.Load] with [Library]. It always returns
// a sheet; the diagnostics hold every problem found. Evaluate the sheet with
// [engine.Sheet.Eval].
func Load(path string) (*engine.Sheet, engine.Diagnostics) {
	return engine.Load(path, engine.Options{Library: Library()})
}

// LoadFS is [Load] for a worksheet in fsys (an embed.FS compiled into a program, say); path
// is slash-separated and relative to fsys's root, and parts are read from fsys too.
func LoadFS(fsys fs.FS, path string) (*engine.Sheet, engine.Diagnostics) {
	return engine.Load(path, engine.Options{Library: Library(), FS: fsys})
}

// Report is an evaluated worksheet as the writers take it.
type Report struct {
	// Result is the evaluation to write; the writers refuse a Report without one.
	Result *engine.Result
	// Analysis holds the analyses of Result (from [analysis.Analyze]); nil leaves them out.
	Analysis *analysis.Analysis
	// Warnings are the diagnostics to list with the results: typically those of loading,
	// evaluation and the analyses together, sorted by position ([engine.SortDiagnostics]) as
	// the command lists them. Only the warnings among them are written, in the order given.
	Warnings engine.Diagnostics
	// Cases are the operating points to show side by side (see [engine.Sheet.EvalCases]),
	// the first being Result's own; nil shows Result alone.
	Cases []Case
}

// Case is one operating point of a [Report]: a case of the sheet (its [engine.Sheet.Nominal]
// or one of [engine.Sheet.Cases]) with its evaluation and, when they were run for it, its
// analyses.
type Case struct {
	Case     *engine.Case
	Result   *engine.Result
	Analysis *analysis.Analysis // nil when the analyses were not run for this case
}

// Chart is an SVG chart that a Markdown page links, to be written beside the page.
type Chart struct {
	Name string // the file name the page links, in the page's folder
	Data []byte // the SVG document
}

// HeaderOptions configure [WriteCHeader].
type HeaderOptions struct {
	// Prefix starts every macro name, so that the headers of two worksheets can be included
	// in one translation unit; "" means the worksheet's file name, upper-cased
	// ("field-probe-uplink.toml" gives FIELD_PROBE_UPLINK_).
	Prefix string
	// Type is the C type of the values that are not whole counts or frequencies: "float"
	// (the default when ""), "double", or "int" (rounded to the nearest whole number).
	Type string
}

// errNoResult is what the writers return for a Report without a Result.
var errNoResult = errors.New("rfledger: the report has no Result to write")

// WriteMarkdown writes the budget page of rep to w, as `rfledger render` does: the values,
// the requirements, the analyses when rep has them, warnings and cautions.
//
// chartBase names the page's charts: "budget" gives files such as
// "budget.sweep-1.<hash>.svg", which the page links by that name and which come back as
// Charts for the caller to write in the page's folder (a directory in chartBase is dropped
// from the names). An empty chartBase leaves the charts out of the page.
func WriteMarkdown(w io.Writer, rep Report, chartBase string) ([]Chart, error) {
	in, err := rep.input()
	if err != nil {
		return nil, err
	}
	in.ChartBase = chartBase
	page, files := report.Markdown(in)
	charts := make([]Chart, len(files))
	for i, f := range files {
		charts[i] = Chart(f)
	}
	if _, err := w.Write(page); err != nil {
		return nil, err
	}
	return charts, nil
}

// WriteJSON writes rep as the JSON contract of `rfledger render --json` (format 2, described
// by [RenderSchema]): every quantity with its value, unit and SI value, the requirements, the
// chains' cascades, and the analyses when rep has them.
func WriteJSON(w io.Writer, rep Report) error {
	in, err := rep.input()
	if err != nil {
		return err
	}
	_, err = w.Write(report.JSON(in))
	return err
}

// WriteCHeader writes a C header of r's quantities marked export in the worksheet, as
// `rfledger export --c-header` does: one #define per quantity, its unit in the macro's name,
// whole counts and frequencies as integer literals, and PREFIX_SHEET_HASH holding the
// worksheet's content hash so firmware can tell a stale header. It fails, writing nothing,
// when no quantity is marked export, on a prefix that cannot start a C macro name, on an
// unknown type, and on an exported quantity that could not be evaluated.
func WriteCHeader(w io.Writer, r *engine.Result, opt HeaderOptions) error {
	if r == nil {
		return errNoResult
	}
	data, err := report.CHeader(r, report.HeaderOptions{Prefix: opt.Prefix, Type: report.CType(opt.Type)})
	if err != nil {
		return err
	}
	_, err = w.Write(data)
	return err
}

// RenderSchema returns the JSON Schema (draft 2020-12) of what [WriteJSON] writes. The slice
// is the caller's own.
func RenderSchema() []byte { return append([]byte(nil), report.RenderSchema...) }

// input converts rep to the report package's input.
func (rep Report) input() (report.Input, error) {
	if rep.Result == nil {
		return report.Input{}, errNoResult
	}
	sh := rep.Result.Sheet()
	if !analysedOn(rep.Analysis, sh) {
		return report.Input{}, errors.New("rfledger: the report's Analysis is of another sheet than its Result")
	}
	in := report.Input{Result: rep.Result, Analysis: rep.Analysis, Warnings: rep.Warnings}
	for _, c := range rep.Cases {
		switch {
		case c.Case == nil || c.Result == nil:
			return report.Input{}, errors.New("rfledger: a case of the report has no Case or no Result")
		case c.Result.Sheet() != sh || !analysedOn(c.Analysis, sh):
			return report.Input{}, fmt.Errorf("rfledger: case %q is of another sheet than the report's Result", c.Case.Name)
		}
		in.Cases = append(in.Cases, report.Case(c))
	}
	return in, nil
}

// analysedOn reports whether a (nil, or analyses of a result) belongs to sheet sh.
func analysedOn(a *analysis.Analysis, sh *engine.Sheet) bool {
	return a == nil || a.Focus == nil || a.Focus.Sheet() == sh
}
