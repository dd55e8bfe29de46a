package cli

import (
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
	if len(pos) > 0 || *check == *render {
		return usageErr(e, "schema", "want exactly one of --check-output and --render-output")
	}
	if *check {
		_, _ = e.Stdout.Write(report.CheckSchema)
	} else {
		_, _ = e.Stdout.Write(report.RenderSchema)
	}
	return ExitOK
}
