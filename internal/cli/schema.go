package cli

import (
	"fmt"

	"github.com/rfledger/rfledger/internal/report"
)

func cmdSchema(e *Env, args []string) int {
	fs := newFlags(e, "schema")
	check := fs.Bool("check-output", false, "the schema of check --format json")
	render := fs.Bool("render-output", false, "the schema of render --json")
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) > 0 || (*check && *render) {
		return usageErr(e, "schema", "want at most one of --check-output and --render-output")
	}
	switch {
	case *check:
		_, _ = e.Stdout.Write(report.CheckSchema)
	case *render:
		_, _ = e.Stdout.Write(report.RenderSchema)
	default:
		b, err := worksheetSchema()
		if err != nil {
			fmt.Fprintf(e.Stderr, "rfledger schema: %v\n", err)
			return ExitUsage
		}
		_, _ = e.Stdout.Write(b)
	}
	return ExitOK
}
