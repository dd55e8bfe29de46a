package cli

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestDiffExitCode: --exit-code fails on a requirement that flips from pass to fail and on a
// focus that moves the wrong way by more than --tolerance; a gain or a small loss passes.
func TestDiffExitCode(t *testing.T) {
	dir := t.TempDir()
	sheet := func(name, p, req string) string {
		f := filepath.Join(dir, name)
		os.WriteFile(f, []byte("focus = \"m\"\np = \""+p+"\"\nm = \"= p - 3 dB\"\n[[require]]\nthat = \"= "+req+"\"\n"), 0o644)
		return f
	}
	base := sheet("base.toml", "10 dBm", "m >= 5 dBm")   // m = 7 dBm
	down := sheet("down.toml", "9.5 dBm", "m >= 5 dBm")  // m = 6.5 dBm: 0.5 dB worse, still passes
	flip := sheet("flip.toml", "7.5 dBm", "m >= 5 dBm")  // m = 4.5 dBm: the requirement fails
	up := sheet("up.toml", "12 dBm", "m >= 5 dBm")       // m = 9 dBm: better
	capped := sheet("cap.toml", "10 dBm", "m <= 9 dBm")  // an upper bound: a rise is worse
	capUp := sheet("capup.toml", "11 dBm", "m <= 9 dBm") // m = 8 dBm: 1 dB worse by that rule
	for _, c := range []struct {
		args []string
		want int
	}{
		{[]string{base, down}, ExitOK}, // without --exit-code the diff only reports
		{[]string{"--exit-code", base, down}, ExitFail},
		{[]string{"--exit-code", "--tolerance", "0.5 dB", base, down}, ExitOK},  // "more than" the tolerance
		{[]string{"--exit-code", "--tolerance", "0.4", base, down}, ExitFail},   // a plain number is in dB here
		{[]string{"--exit-code", "--tolerance", "10 dB", base, flip}, ExitFail}, // a flip fails whatever the tolerance
		{[]string{"--exit-code", base, up}, ExitOK},
		{[]string{"--exit-code", capped, capUp}, ExitFail},
		{[]string{"--exit-code", capUp, capped}, ExitOK},
		{[]string{"--exit-code", "--tolerance", "1 km", base, down}, ExitUsage},
		{[]string{"--exit-code", "--tolerance", "lots", base, down}, ExitUsage},
	} {
		if code, _, stderr := run(t, append([]string{"diff"}, c.args...)...); code != c.want {
			t.Errorf("diff %v: exit %d, want %d\n%s", c.args, code, c.want, stderr)
		}
	}
	_, _, stderr := run(t, "diff", "--exit-code", base, flip)
	if !strings.Contains(stderr, "m >= 5 dBm passed and now fails") {
		t.Errorf("the flip is not named: %s", stderr)
	}
}

func TestDiffJSON(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.toml")
	b := filepath.Join(dir, "b.toml")
	os.WriteFile(a, []byte("focus = \"m\"\np = \"10 dBm\"\nm = \"= p - 3 dB\"\ngone = \"1 m\"\n[[require]]\nthat = \"= m >= 5 dBm\"\n"), 0o644)
	os.WriteFile(b, []byte("focus = \"m\"\np = \"7 dBm\"\nm = \"= p - 3 dB\"\nextra = \"2 km\"\n[[require]]\nthat = \"= m >= 5 dBm\"\n"), 0o644)
	code, out, stderr := run(t, "diff", "--format", "json", a, b)
	if code != ExitOK {
		t.Fatal(stderr)
	}
	var doc struct {
		Regression bool
		Flipped    []string
		Focus      struct {
			Change string
			Worse  bool
			Old    struct{ Value float64 }
			New    struct{ Value float64 }
		}
		Requirements []struct{ That, Old, New string }
		Quantities   []struct {
			Name, Status string
			New          *struct {
				Value, SI float64
				SIUnit    string `json:"si_unit"`
			}
		}
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	// m = 10 - 3 = 7 dBm before, 7 - 3 = 4 dBm after: 3 dB worse, and below 5 dBm.
	if !doc.Regression || len(doc.Flipped) != 1 || doc.Focus.Change != "-3.00 dB" || !doc.Focus.Worse || doc.Focus.Old.Value != 7 || doc.Focus.New.Value != 4 {
		t.Errorf("focus/regression: %+v", doc)
	}
	if len(doc.Requirements) != 1 || doc.Requirements[0].Old != "pass" || doc.Requirements[0].New != "fail" {
		t.Errorf("requirements %+v", doc.Requirements)
	}
	status := map[string]string{}
	for _, q := range doc.Quantities {
		status[q.Name] = q.Status
		if q.Name == "extra" && (q.New == nil || q.New.Value != 2 || q.New.SI != 2000 || q.New.SIUnit != "m") {
			t.Errorf("extra: %+v", q.New)
		}
	}
	if status["p"] != "changed" || status["m"] != "changed" || status["extra"] != "new" || status["gone"] != "removed" {
		t.Errorf("quantities %v", status)
	}
}
