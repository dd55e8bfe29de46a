package cli

import (
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"os"
)

//go:embed templates/*.toml
var templates embed.FS

func cmdNew(e *Env, args []string) int {
	fl := newFlags(e, "new")
	kind := fl.String("kind", "link", "starting point `link|receiver|satellite`")
	pos, err := parse(fl, args)
	if err != nil {
		return flagErr(e, fl, err)
	}
	if len(pos) != 1 {
		return usageErr(e, "new", "want one file name")
	}
	data, err := templates.ReadFile("templates/" + *kind + ".toml")
	if err != nil {
		return usageErr(e, "new", "--kind is link, receiver or satellite, not %q", *kind)
	}
	f, err := os.OpenFile(pos[0], os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if errors.Is(err, fs.ErrExist) {
		fmt.Fprintf(e.Stderr, "rfledger new: %s exists; not overwriting it\n", pos[0])
		return ExitUsage
	}
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger new: %v\n", err)
		return ExitUsage
	}
	_, err = f.Write(data)
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger new: %v\n", err)
		return ExitUsage
	}
	fmt.Fprintf(e.Stdout, "wrote %s; render it with: rfledger render %s\n", pos[0], pos[0])
	return ExitOK
}
