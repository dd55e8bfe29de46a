// Command rfledger keeps an RF link budget as a TOML worksheet, evaluates it with units
// checked, and renders it as a Markdown budget page. Run `rfledger` for the commands.
package main

import (
	"os"

	"github.com/rfledger/rfledger/internal/cli"
)

func main() {
	tuneGC()
	os.Exit(cli.Main(os.Args[1:], &cli.Env{Stdin: os.Stdin, Stdout: os.Stdout, Stderr: os.Stderr, Terminal: cli.IsTerminal(os.Stderr)}))
}
