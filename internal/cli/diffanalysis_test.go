package cli

import (
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// gitRepo makes an empty folder for a git repository and returns it with a function that runs
// git there (skipping the test when git is not installed).
func gitRepo(t *testing.T) (string, func(args ...string)) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not installed")
	}
	dir := t.TempDir()
	return dir, func(args ...string) {
		t.Helper()
		cmd := exec.Command("git", append([]string{"-C", dir, "-c", "user.name=t", "-c", "user.email=t@example.invalid"}, args...)...)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("git %v: %v\n%s", args, err, out)
		}
	}
}

func writeSheet(t *testing.T, dir, name, src string) string {
	t.Helper()
	f := filepath.Join(dir, name)
	if err := os.WriteFile(f, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return f
}

// TestDiffFocusChanged: a diff shows the old and the new focus when the sheet centres on
// another quantity, or on the same one by another formula, on the page and in the JSON.
func TestDiffFocusChanged(t *testing.T) {
	dir := t.TempDir()
	body := "p = \"10 dBm\"\nm = \"= p - 3 dB\"\nn = \"= p - 4 dB\"\n"
	a := writeSheet(t, dir, "a.toml", "focus = \"m\"\n"+body)
	b := writeSheet(t, dir, "b.toml", "focus = \"n\"\n"+body)
	c := writeSheet(t, dir, "c.toml", "focus = \"m\"\np = \"10 dBm\"\nm = \"= p - 5 dB\"\nn = \"= p - 4 dB\"\n")
	code, out, stderr := run(t, "diff", a, b)
	if code != ExitOK {
		t.Fatal(stderr)
	}
	for _, want := range []string{
		"| focus | `m` = 7.00 dBm | `n` = 6.00 dBm |",
		"**The focus changed.** Old: `m` = `p - 3 dB`. New: `n` = `p - 4 dB`.",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("diff lacks %q:\n%s", want, out)
		}
	}
	_, out, _ = run(t, "diff", a, c)
	if want := "**The focus's formula changed.** Old: `m` = `p - 3 dB`. New: `m` = `p - 5 dB`."; !strings.Contains(out, want) {
		t.Errorf("diff lacks %q:\n%s", want, out)
	}
	_, out, _ = run(t, "diff", "--format", "json", a, b)
	var doc struct {
		Focus struct {
			Name, OldName, Formula, OldFormula string
			Renamed, FormulaChanged            bool
		}
	}
	if err := json.Unmarshal([]byte(strings.NewReplacer(`"old_name"`, `"OldName"`, `"old_formula"`, `"OldFormula"`, `"formula_changed"`, `"FormulaChanged"`).Replace(out)), &doc); err != nil {
		t.Fatal(err)
	}
	if f := doc.Focus; f.Name != "n" || f.OldName != "m" || f.Formula != "p - 4 dB" || f.OldFormula != "p - 3 dB" || !f.Renamed || f.FormulaChanged {
		t.Errorf("focus %+v", f)
	}
	if _, out, _ = run(t, "diff", a, a); strings.Contains(out, "focus changed") || strings.Contains(out, "formula changed.") {
		t.Errorf("an unchanged focus is reported as changed:\n%s", out)
	}
}

// TestDiffSolvesAndMonteCarlo: the solves' answers and the Monte Carlo chance of holding,
// before and after. The solve is exact arithmetic: m = p − 3 dB equals 0 dBm at p = 3 dBm,
// and m = p − 5 dB at p = 5 dBm. The chance: x ~ N(10 dB, 1 dB) (tol is the 3σ limit, SPEC
// §2) holds x ≥ 9 dB with probability Φ(1), and N(9 dB, 1 dB) with 1/2 (gonum's normal CDF);
// each within 4 binomial standard errors √(p(1−p)/n).
func TestDiffSolvesAndMonteCarlo(t *testing.T) {
	dir := t.TempDir()
	sheet := func(name, loss, x string) string {
		return writeSheet(t, dir, name, "focus = \"x\"\np = \"8 dBm\"\nm = \"= p - "+loss+"\"\nx = { is = \""+x+"\", tol = \"3 dB\" }\n"+
			"[[require]]\nthat = \"= x >= 9 dB\"\n[[solve]]\nname = \"pmin\"\nvary = \"p\"\nso_that = \"m\"\nequals = \"0 dBm\"\nwithin = [\"-20 dBm\", \"30 dBm\"]\n")
	}
	a := sheet("a.toml", "3 dB", "10 dB")
	b := sheet("b.toml", "5 dB", "9 dB")
	const n = 4000
	code, out, stderr := run(t, "diff", "--trials", "4000", a, b)
	if code != ExitOK {
		t.Fatal(stderr)
	}
	for _, want := range []string{
		"| `pmin` | 3.00 dBm | 5.00 dBm | +2.00 dB |",
		"| spread of the focus | old: `x` | new: `x` |",
		"| worst case low | 7.00 dB | 6.00 dB |", // nominal − 3 dB, exact
		"| trials, seed | 4000, 1 | 4000, 1 |",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("diff lacks %q:\n%s", want, out)
		}
	}
	_, out, _ = run(t, "diff", "--format", "json", "--trials", "4000", a, b)
	var doc struct {
		Solves []struct {
			Name, Status, Change string
			Old, New             struct{ Value float64 }
		}
		Tolerance struct {
			Old, New struct {
				MonteCarlo struct {
					Trials int
					PPass  float64 `json:"p_pass"`
					SE     float64 `json:"p_pass_se"`
				} `json:"monte_carlo"`
			}
		}
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Solves) != 1 || doc.Solves[0].Status != "changed" || math.Abs(doc.Solves[0].Old.Value-3) > 1e-6 || math.Abs(doc.Solves[0].New.Value-5) > 1e-6 {
		t.Errorf("solves %+v", doc.Solves)
	}
	for _, c := range []struct {
		what string
		got  float64
		se   float64
		want float64
	}{
		{"old", doc.Tolerance.Old.MonteCarlo.PPass, doc.Tolerance.Old.MonteCarlo.SE, distuv.Normal{Mu: 10, Sigma: 1}.Survival(9)},
		{"new", doc.Tolerance.New.MonteCarlo.PPass, doc.Tolerance.New.MonteCarlo.SE, 0.5},
	} {
		se := math.Sqrt(c.want * (1 - c.want) / n)
		if math.Abs(c.got-c.want) > 4*se {
			t.Errorf("%s p_pass = %.4f, want %.4f ± %.4f", c.what, c.got, c.want, 4*se)
		}
		if math.Abs(c.se-math.Sqrt(c.got*(1-c.got)/n)) > 1e-12 {
			t.Errorf("%s p_pass_se = %g, want √(p(1−p)/n) of p = %g", c.what, c.se, c.got)
		}
	}
	// --trials 0 compares the worst cases and the solves, and says the trials were not run.
	_, out, _ = run(t, "diff", "--trials", "0", a, b)
	if !strings.Contains(out, "| worst case low | 7.00 dB | 6.00 dB |") || strings.Contains(out, "Monte Carlo median") || !strings.Contains(out, "Monte Carlo: not run (`--trials 0`).") {
		t.Errorf("--trials 0:\n%s", out)
	}
	if code, _, _ := run(t, "diff", "--trials", "-1", a, b); code != ExitUsage {
		t.Errorf("--trials -1: exit %d", code)
	}
}

// TestDiffRevExitCode: as a pull-request gate, diff --rev --exit-code compares the committed
// sheet with the working one (real git) and exits 1 when a requirement that held fails now,
// 0 when every requirement that held still holds.
func TestDiffRevExitCode(t *testing.T) {
	dir, git := gitRepo(t)
	src := func(p string) string {
		return "focus = \"m\"\np = \"" + p + "\"\nm = \"= p - 3 dB\"\n[[require]]\nthat = \"= m >= 5 dBm\"\n[[require]]\nthat = \"= p <= 20 dBm\"\n"
	}
	sheet := writeSheet(t, dir, "s.toml", src("10 dBm")) // m = 7 dBm: both hold
	git("init", "-q")
	git("add", "s.toml")
	git("commit", "-q", "-m", "first")
	writeSheet(t, dir, "s.toml", src("12 dBm")) // m = 9 dBm: better, both hold
	if code, _, stderr := run(t, "diff", "--exit-code", sheet, "--rev", "HEAD"); code != ExitOK {
		t.Errorf("a better sheet: exit %d\n%s", code, stderr)
	}
	writeSheet(t, dir, "s.toml", src("7 dBm")) // m = 4 dBm: m >= 5 dBm fails
	code, out, stderr := run(t, "diff", "--exit-code", "--tolerance", "10 dB", sheet, "--rev", "HEAD")
	if code != ExitFail || !strings.Contains(stderr, "m >= 5 dBm passed and now fails") {
		t.Errorf("a flip: exit %d\n%s", code, stderr)
	}
	if !strings.Contains(out, "| `m >= 5 dBm` | PASS | **FAIL** |") {
		t.Errorf("diff --rev:\n%s", out)
	}
	if code, _, _ := run(t, "diff", sheet, "--rev", "HEAD"); code != ExitOK {
		t.Errorf("without --exit-code a flip only reports: exit %d", code)
	}
}

// TestDiffEditedBound: a bound edited in place ("m >= 5 dBm" become "m >= 8 dBm") is the same
// requirement: shown on one row, and a pass that becomes a fail fails --exit-code, as a flip
// of an unchanged requirement does. A new requirement on another quantity is not paired.
func TestDiffEditedBound(t *testing.T) {
	dir := t.TempDir()
	body := "focus = \"m\"\np = \"10 dBm\"\nm = \"= p - 3 dB\"\n" // m = 7 dBm
	a := writeSheet(t, dir, "a.toml", body+"[[require]]\nthat = \"= m >= 5 dBm\"\n")
	b := writeSheet(t, dir, "b.toml", body+"[[require]]\nthat = \"= m >= 8 dBm\"\n[[require]]\nthat = \"= p <= 5 dBm\"\n")
	code, out, stderr := run(t, "diff", "--exit-code", a, b)
	if code != ExitFail || !strings.Contains(stderr, "m >= 8 dBm (edited from m >= 5 dBm) passed and now fails") {
		t.Errorf("an edited bound that fails: exit %d\n%s", code, stderr)
	}
	for _, want := range []string{"| `m >= 8 dBm` (was `m >= 5 dBm`) | PASS | **FAIL** |", "| `p <= 5 dBm` | (new) | **FAIL** |"} {
		if !strings.Contains(out, want) {
			t.Errorf("diff lacks %q:\n%s", want, out)
		}
	}
	// Loosened, it still holds: no flip.
	c := writeSheet(t, dir, "c.toml", body+"[[require]]\nthat = \"= m >= 4 dBm\"\n")
	if code, _, stderr := run(t, "diff", "--exit-code", a, c); code != ExitOK {
		t.Errorf("a loosened bound: exit %d\n%s", code, stderr)
	}
	_, out, _ = run(t, "diff", "--format", "json", a, b)
	var doc struct {
		Requirements []struct{ That, Was, Old, New string }
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if r := doc.Requirements; len(r) != 2 || r[0].That != "m >= 8 dBm" || r[0].Was != "m >= 5 dBm" || r[0].Old != "pass" || r[0].New != "fail" || r[1].Was != "" || r[1].Old != "absent" {
		t.Errorf("requirements %+v", r)
	}
}
