package cli

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"

	"github.com/rfledger/rfledger/internal/lsp"
	"github.com/rfledger/rfledger/internal/rflib"
)

func cmdLsp(e *Env, args []string) int {
	fs := newFlags(e, "lsp")
	debounce := fs.Duration("debounce", lsp.DefaultDebounce, "wait `TIME` after an edit before evaluating and publishing diagnostics (e.g. 15ms)")
	fs.Bool("stdio", true, "talk over standard input and output (the only transport; editors often pass it)")
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) > 0 {
		return usageErr(e, "lsp", "takes no arguments")
	}
	if *debounce < 0 {
		return usageErr(e, "lsp", "--debounce must not be negative")
	}
	bi, _ := debug.ReadBuildInfo()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	err = lsp.Serve(ctx, stdio{e.Stdin, e.Stdout}, lsp.Options{Library: rflib.Library(), Debounce: *debounce, Version: versionLine(bi)})
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger lsp: %v\n", err)
		return ExitFail
	}
	return ExitOK
}

// stdio joins standard input and output into the one stream the server talks over.
type stdio struct {
	io.Reader
	io.Writer
}

func (s stdio) Close() error {
	if c, ok := s.Reader.(io.Closer); ok {
		return c.Close()
	}
	return nil
}
