// Command gensheet writes a synthetic worksheet to standard output, for benchmarks:
//
//	go run ./internal/gen/cmd/gensheet -n 10000 > sheet.toml
//	go run ./internal/gen/cmd/gensheet -shape sumchain -n 2000 > feeder.toml
//
// -n is the number of quantities for the budget shape and the number of toleranced inputs
// for the sum chain; the same flags always give the same bytes.
package main

import (
	"flag"
	"fmt"
	"io"
	"os"

	"github.com/rfledger/rfledger/internal/gen"
)

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

func run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("gensheet", flag.ContinueOnError)
	fs.SetOutput(stderr)
	n := fs.Int("n", 10_000, "quantities (budget) or toleranced inputs (sumchain)")
	shape := fs.String("shape", "budget", "`budget` (a farm network) or `sumchain` (a feeder of toleranced sections)")
	seed := fs.Uint64("seed", 1, "seed of the drawn values")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "gensheet: unexpected arguments %q\n", fs.Args())
		return 2
	}
	var out []byte
	var err error
	switch *shape {
	case "budget":
		out, err = gen.Budget(*n, *seed)
	case "sumchain":
		out, err = gen.SumChain(*n, *seed)
	default:
		fmt.Fprintf(stderr, "gensheet: -shape is budget or sumchain, not %q\n", *shape)
		return 2
	}
	if err != nil {
		fmt.Fprintln(stderr, err)
		return 2
	}
	if _, err := stdout.Write(out); err != nil {
		fmt.Fprintln(stderr, "gensheet:", err)
		return 1
	}
	return 0
}
