package rfledger_test

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// outsideMain is a program of another module, as a production test rig would write it: it
// imports rfledger by its module path and checks a demo worksheet given on its command line.
const outsideMain = `package main

import (
	"fmt"
	"os"

	"github.com/rfledger/rfledger"
	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

func main() {
	sh, diags := rfledger.Load(os.Args[1])
	if diags.HasErrors() {
		fmt.Fprintln(os.Stderr, diags)
		os.Exit(3)
	}
	r, _ := sh.Eval(engine.Override{Name: "tx.power", Value: "11 dBm"})
	margin, _ := sh.Quantity("link.margin")
	fmt.Println("link.margin =", r.Display(margin))
	for _, rq := range sh.Requires {
		pass, _ := r.Pass(rq)
		fmt.Printf("%s: %v\n", rq.That, pass)
	}
	a, _ := analysis.Analyze(r, analysis.Options{Trials: 100, SkipMonteCarlo: true})
	fmt.Println("solves:", len(a.Solves))
	if err := rfledger.WriteCHeader(os.Stdout, r, rfledger.HeaderOptions{Prefix: "RIG"}); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}
`

// TestOutsideModule builds programs in a module of their own that import rfledger by its
// path (a replace directive points the path at this checkout, as a not yet published
// version would be used) and runs them on a demo worksheet: the README's example, word for
// word, and outsideMain. It proves that what a host program needs is reachable from outside
// the module (nothing it calls lives in internal/), and that the README's example runs.
//
// The margin they print is the demo's 12.50 dB (checked by hand in engine's
// TestDemoMatchesHandWritten) less the 3 dB the override takes off the transmit power, which
// enters the margin as a plain decibel term.
func TestOutsideModule(t *testing.T) {
	goTool, err := exec.LookPath("go")
	if err != nil {
		t.Skip("the go command is not on PATH, so no outside module can be built: ", err)
	}
	root, err := filepath.Abs(".")
	if err != nil {
		t.Fatal(err)
	}
	readme, err := readmeExample(filepath.Join(root, "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	demo, err := os.ReadFile(filepath.Join(root, "worksheets", "field-probe-uplink.toml"))
	if err != nil {
		t.Fatal(err)
	}
	sum, err := os.ReadFile(filepath.Join(root, "go.sum"))
	if err != nil {
		t.Fatal(err)
	}
	goMod := "module example.com/testrig\n\ngo 1.26\n\nrequire github.com/rfledger/rfledger v0.0.0\n\nreplace github.com/rfledger/rfledger => " + root + "\n"
	for _, tc := range []struct {
		name, main string
		want       []string
	}{
		{"README", "package main\n\n" + readme, []string{
			"link.margin = 9.50 dB\n",
			"link.margin >= 10 dB false\n",
			"tx.eirp <= 25 mW true\n",
		}},
		{"writers", outsideMain, []string{
			"link.margin = 9.50 dB\n",
			"link.margin >= 10 dB: false\n",
			"tx.eirp <= 25 mW: true\n",
			"solves: 1\n",
			"#define RIG_SHEET_HASH \"",
			"#define RIG_RX_SENSITIVITY_DBM (",
		}},
	} {
		dir := t.TempDir()
		files := map[string][]byte{"go.mod": []byte(goMod), "go.sum": sum, "main.go": []byte(tc.main), "worksheets/field-probe-uplink.toml": demo}
		for name, data := range files {
			if err := os.MkdirAll(filepath.Dir(filepath.Join(dir, name)), 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(dir, name), data, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		cmd := exec.Command(goTool, "run", ".", "worksheets/field-probe-uplink.toml")
		cmd.Dir = dir
		// -mod=mod lets go fill in the requirements rfledger brings from its own go.mod; the
		// modules themselves come from the copied go.sum and the module cache this test runs with.
		cmd.Env = append(os.Environ(), "GOFLAGS=-mod=mod", "GOWORK=off")
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Errorf("%s: go run in an outside module: %v\n%s", tc.name, err, out)
			continue
		}
		for _, want := range tc.want {
			if !strings.Contains(string(out), want) {
				t.Errorf("%s: the outside program's output lacks %q:\n%s", tc.name, want, out)
			}
		}
	}
}

// readmeExample returns the Go code block of the README's "Using rfledger from Go" section.
func readmeExample(path string) (string, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return "", err
	}
	_, section, ok := strings.Cut(string(data), "\n## Using rfledger from Go\n")
	if ok {
		_, section, ok = strings.Cut(section, "\n```go\n")
	}
	if ok {
		section, _, ok = strings.Cut(section, "\n```\n")
	}
	if !ok {
		return "", errors.New(path + ": no Go code block under \"## Using rfledger from Go\"")
	}
	return section + "\n", nil
}
