package cli

import (
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// schemaFile is the worksheet schema's file name beside a sheet (rfledger schema > it).
const schemaFile = "rfledger.schema.json"

// schemaDirective heads every sheet new writes: TOML editors (taplo, and those built on it)
// check the sheet against the schema the directive names, relative to the sheet.
const schemaDirective = "#:schema ./" + schemaFile + "\n" +
	"# The line above points editors at the worksheet schema; write it with: rfledger schema > " + schemaFile + "\n"

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
	_, err = f.Write(append([]byte(schemaDirective), data...))
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		fmt.Fprintf(e.Stderr, "rfledger new: %v\n", err)
		return ExitUsage
	}
	fmt.Fprintf(e.Stdout, "wrote %s; render it with: rfledger render %s\n", pos[0], pos[0])
	if schema := filepath.Join(filepath.Dir(pos[0]), schemaFile); !exists(schema) {
		fmt.Fprintf(e.Stdout, "for key completion and checks in an editor: rfledger schema > %s\n", schema)
	}
	return ExitOK
}

func exists(path string) bool {
	_, err := os.Stat(path)
	return err == nil
}
