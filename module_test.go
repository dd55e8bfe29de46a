package rfledger_test

import (
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

// TestOutsideModule builds a program in a module of its own that imports rfledger by its
// path (a replace directive points the path at this checkout, as a not yet published
// version would be used) and runs it on a demo worksheet. It proves that what a host
// program needs is reachable from outside the module: nothing it calls lives in internal/.
//
// The margin it prints is the demo's 12.50 dB (checked by hand in engine's
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
	dir := t.TempDir()
	goMod := "module example.com/testrig\n\ngo 1.26\n\nrequire github.com/rfledger/rfledger v0.0.0\n\nreplace github.com/rfledger/rfledger => " + root + "\n"
	sum, err := os.ReadFile(filepath.Join(root, "go.sum"))
	if err != nil {
		t.Fatal(err)
	}
	for name, data := range map[string][]byte{"go.mod": []byte(goMod), "go.sum": sum, "main.go": []byte(outsideMain)} {
		if err := os.WriteFile(filepath.Join(dir, name), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	cmd := exec.Command(goTool, "run", ".", filepath.Join(root, "worksheets", "field-probe-uplink.toml"))
	cmd.Dir = dir
	// -mod=mod lets go fill in the requirements rfledger brings from its own go.mod; the
	// modules themselves come from the copied go.sum and the module cache this test runs with.
	cmd.Env = append(os.Environ(), "GOFLAGS=-mod=mod", "GOWORK=off")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("go run in an outside module: %v\n%s", err, out)
	}
	for _, want := range []string{
		"link.margin = 9.50 dB\n",
		"link.margin >= 10 dB: false\n",
		"tx.eirp <= 25 mW: true\n",
		"solves: 1\n",
		"#define RIG_SHEET_HASH \"",
		"#define RIG_RX_SENSITIVITY_DBM (",
	} {
		if !strings.Contains(string(out), want) {
			t.Errorf("the outside program's output lacks %q:\n%s", want, out)
		}
	}
}
