package rfledger_test

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rfledger/rfledger"
	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/cli"
)

// command runs the rfledger command in-process and returns its exit code and standard output.
func command(t *testing.T, args ...string) (int, []byte) {
	t.Helper()
	var out, errb bytes.Buffer
	code := cli.Main(args, &cli.Env{Stdout: &out, Stderr: &errb})
	if errb.Len() > 0 {
		t.Logf("rfledger %s: %s", strings.Join(args, " "), errb.String())
	}
	return code, out.Bytes()
}

// TestWritersMatchTheCommand: for every demo worksheet without cases, the writers give the
// bytes `rfledger render`, `render --json` and `export --c-header` give, charts included, when
// called as the package documentation shows (load, evaluate, analyse with the command's
// trials and seed, every diagnostic passed as warnings).
func TestWritersMatchTheCommand(t *testing.T) {
	const trials = 2000 // fewer than the default 10,000, for time; the same on both sides
	sheets, _ := filepath.Glob("worksheets/*.toml")
	tested := 0
	for _, path := range sheets {
		sh, diags := rfledger.Load(path)
		if diags.HasErrors() {
			t.Fatalf("%s: %v", path, diags)
		}
		if len(sh.Cases) > 0 {
			continue // the command shows every case; a Report shows those it is given
		}
		tested++
		r, ediags := sh.Eval()
		a, adiags := analysis.Analyze(r, analysis.Options{Trials: trials, Seed: 1})
		rep := rfledger.Report{Result: r, Analysis: a, Warnings: engine.SortDiagnostics(append(append(diags, ediags...), adiags...))}

		var js bytes.Buffer
		if err := rfledger.WriteJSON(&js, rep); err != nil {
			t.Fatal(err)
		}
		if code, want := command(t, "render", "--json", "--trials", fmt.Sprint(trials), path); code != 0 || !bytes.Equal(js.Bytes(), want) {
			t.Errorf("%s: WriteJSON differs from render --json (exit %d)", path, code)
		}

		dir := t.TempDir()
		name := strings.TrimSuffix(filepath.Base(path), ".toml")
		var page bytes.Buffer
		charts, err := rfledger.WriteMarkdown(&page, rep, filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		if code, _ := command(t, "render", "--trials", fmt.Sprint(trials), path, "-o", filepath.Join(dir, name+".md")); code != 0 {
			t.Fatalf("%s: render exit %d", path, code)
		}
		if want, _ := os.ReadFile(filepath.Join(dir, name+".md")); !bytes.Equal(page.Bytes(), want) {
			t.Errorf("%s: WriteMarkdown differs from render -o", path)
		}
		written, _ := filepath.Glob(filepath.Join(dir, "*.svg"))
		if len(written) != len(charts) {
			t.Errorf("%s: %d charts, render wrote %d", path, len(charts), len(written))
		}
		for _, c := range charts {
			if want, err := os.ReadFile(filepath.Join(dir, c.Name)); err != nil || !bytes.Equal(c.Data, want) {
				t.Errorf("%s: chart %s differs from render's (%v)", path, c.Name, err)
			}
		}

		code, want := command(t, "export", "--c-header", path)
		var h bytes.Buffer
		err = rfledger.WriteCHeader(&h, r, rfledger.HeaderOptions{})
		if (err == nil) != (code == 0) || !bytes.Equal(h.Bytes(), want) {
			t.Errorf("%s: WriteCHeader (error %v) differs from export --c-header (exit %d)", path, err, code)
		}
	}
	if tested < 3 {
		t.Fatalf("compared %d demo worksheets, want at least 3", tested)
	}
}

// TestWritersRefuseIncompleteReports: a Report without a result, or whose parts belong to
// another sheet, is an error, not a panic; nothing is written.
func TestWritersRefuseIncompleteReports(t *testing.T) {
	probe, _ := rfledger.Load("worksheets/field-probe-uplink.toml")
	other, _ := rfledger.Load("worksheets/orchard-receiver.toml")
	pr, _ := probe.Eval()
	or, _ := other.Eval()
	oa, _ := analysis.Analyze(or, analysis.Options{Trials: 10, SkipMonteCarlo: true})
	for name, rep := range map[string]rfledger.Report{
		"no result":             {},
		"analysis of another":   {Result: pr, Analysis: oa},
		"case of another sheet": {Result: pr, Cases: []rfledger.Case{{Case: other.Nominal, Result: or}}},
		"case without result":   {Result: pr, Cases: []rfledger.Case{{Case: probe.Nominal}}},
		"case without case":     {Result: pr, Cases: []rfledger.Case{{Result: pr}}},
	} {
		var buf bytes.Buffer
		if err := rfledger.WriteJSON(&buf, rep); err == nil || buf.Len() > 0 {
			t.Errorf("%s: WriteJSON: error %v, wrote %d bytes", name, err, buf.Len())
		}
		if _, err := rfledger.WriteMarkdown(&buf, rep, ""); err == nil || buf.Len() > 0 {
			t.Errorf("%s: WriteMarkdown: error %v, wrote %d bytes", name, err, buf.Len())
		}
	}
	var buf bytes.Buffer
	if err := rfledger.WriteCHeader(&buf, nil, rfledger.HeaderOptions{}); err == nil || buf.Len() > 0 {
		t.Errorf("WriteCHeader(nil): error %v, wrote %d bytes", err, buf.Len())
	}
	for _, opt := range []rfledger.HeaderOptions{{Prefix: "1BAD"}, {Type: "long double"}} {
		if err := rfledger.WriteCHeader(&buf, pr, opt); err == nil || buf.Len() > 0 {
			t.Errorf("WriteCHeader(%+v): error %v, wrote %d bytes", opt, err, buf.Len())
		}
	}
}
