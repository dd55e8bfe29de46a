package cli

import (
	"fmt"
	"strings"

	"github.com/rfledger/rfledger/engine"

	"github.com/rfledger/rfledger/internal/report"
	"github.com/rfledger/rfledger/internal/watch"
)

func cmdExport(e *Env, args []string) int {
	fs := newFlags(e, "export")
	header := fs.Bool("c-header", false, "write a C header of the quantities marked export = true (or export = \"NAME\")")
	prefix := fs.String("prefix", "", "start every macro with `NAME`_ (default: the worksheet's file name, upper-cased)")
	ctype := fs.String("type", "float", "C type `float|double|int` of the values that are not whole counts or frequencies")
	out := fs.String("o", "", "write to `FILE` instead of standard output")
	var set setFlag
	fs.Var(&set, "set", "replace an input for this run, as `name=value` (repeatable)")
	sel := caseFlags(fs, false)
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) != 1 || !*header {
		return usageErr(e, "export", "want one worksheet and --c-header")
	}
	if *prefix != "" && !report.ValidPrefix(*prefix) {
		return usageErr(e, "export", "--prefix %q is not the start of a C macro name: letters, digits and _, starting with a letter", *prefix)
	}
	if *ctype != "float" && *ctype != "double" && *ctype != "int" {
		return usageErr(e, "export", "--type is float, double or int, not %q", *ctype)
	}
	over, err := parseSet(set)
	if err != nil {
		return usageErr(e, "export", "%v", err)
	}
	if len(sel.names) > 1 {
		return usageErr(e, "export", "a header describes one operating point: give one --case, not %d", len(sel.names))
	}
	ev := evaluateCases(pos[0], over, nil, nil, *sel)
	if ev.caseErr != nil {
		return usageErr(e, "export", "%v", ev.caseErr)
	}
	printDiags(e, ev.diags)
	if !ev.ok() {
		return ExitBadSheet
	}
	if len(sel.names) == 0 {
		if msg := ambiguousExport(ev); msg != "" {
			return usageErr(e, "export", "%s", msg)
		}
	}
	opt := report.HeaderOptions{Prefix: *prefix, Type: report.CType(*ctype)}
	if len(sel.names) == 1 {
		opt.Case = operatingPoint(ev.cases[0].Case)
	}
	data, err := report.CHeader(ev.result, opt)
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger export: %v\n", err)
		return ExitBadSheet
	}
	if *out == "" {
		_, _ = e.Stdout.Write(data)
		return ExitOK
	}
	if err := checkOut(*out, inputFiles(pos[0], ev.sheet.Parts)); err != nil {
		return usageErr(e, "export", "%v", err)
	}
	if err := watch.WriteAtomic(*out, data); err != nil {
		fmt.Fprintf(e.Stderr, "rfledger export: %v\n", err)
		return ExitBadSheet
	}
	return ExitOK
}

// operatingPoint names a case and its overrides for a header's comment:
// case "far" (path.distance = 8 km).
func operatingPoint(c *engine.Case) string {
	sets := make([]string, len(c.Set))
	for i, o := range c.Set {
		sets[i] = o.Name + " = " + strings.TrimSpace(o.Value)
	}
	if len(sets) == 0 {
		return fmt.Sprintf("case %q (the worksheet as written)", c.Name)
	}
	return fmt.Sprintf("case %q (%s)", c.Name, strings.Join(sets, ", "))
}

// ambiguousExport says why a header cannot be written without --case: an exported value
// differs between the sheet's cases. It returns "" when every case gives the same header.
func ambiguousExport(ev *evaluated) string {
	if len(ev.cases) < 2 {
		return ""
	}
	var names []string
	for _, c := range ev.cases {
		names = append(names, c.Case.Name)
	}
	for _, q := range ev.sheet.Quantities() {
		if !q.Export {
			continue
		}
		first := ev.cases[0].Result.Display(q)
		for _, c := range ev.cases[1:] {
			if v := c.Result.Display(q); v != first {
				return fmt.Sprintf("%s is %s in %q but %s in %q, and a header describes one operating point: choose it with --case NAME (cases: %s)",
					q.Name, first, ev.cases[0].Case.Name, v, c.Case.Name, quoteList(names))
			}
		}
	}
	return ""
}
