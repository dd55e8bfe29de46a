package cli

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/units"
)

// TestTruncatedSaveKeepsThePage: an editor that saves an empty file first (or a save cut
// short) must not replace a good page with "PASS, 0 of 0 requirements"; the empty worksheet
// is an error, so render (and watch, which renders the same way) keeps the last good page.
func TestTruncatedSaveKeepsThePage(t *testing.T) {
	dir := t.TempDir()
	sheet := filepath.Join(dir, "s.toml")
	page := filepath.Join(dir, "s.md")
	os.WriteFile(sheet, []byte("[tx]\npower = \"14 dBm\"\n"), 0o644)
	if code, _, stderr := run(t, "render", sheet, "-o", page); code != 0 {
		t.Fatalf("good sheet: exit %d: %s", code, stderr)
	}
	good, _ := os.ReadFile(page)
	for _, text := range []string{"", "# only a comment\n\n"} {
		os.WriteFile(sheet, []byte(text), 0o644)
		code, _, stderr := run(t, "render", sheet, "-o", page)
		if code != ExitBadSheet || !strings.Contains(stderr, sheet+":1:1: no quantities") {
			t.Errorf("%q: exit %d, stderr %q; want exit %d and a positioned \"no quantities\"", text, code, stderr, ExitBadSheet)
		}
		if now, _ := os.ReadFile(page); string(now) != string(good) {
			t.Errorf("%q: the last good page was replaced", text)
		}
		if code, out, _ := run(t, "check", sheet); code != ExitBadSheet || strings.Contains(out, "PASS") {
			t.Errorf("check %q: exit %d, %q", text, code, out)
		}
	}
}

// TestDiffNamesAMissingRevision: a revision that does not exist is named as such, not
// reported as a missing file.
func TestDiffNamesAMissingRevision(t *testing.T) {
	if _, err := os.Stat("../../.git"); err != nil {
		t.Skip("not in a git work tree")
	}
	code, _, stderr := run(t, "diff", "../../worksheets/field-probe-uplink.toml", "--rev", "nosuch-revision")
	if code != ExitBadSheet || !strings.Contains(stderr, "--rev nosuch-revision: no such revision") || strings.Contains(stderr, "no such file") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
}

// TestGroundStationGOverT computes the demo ground station's G/T by hand. A lossy feed ahead
// of the LNA adds its own noise (L − 1)·T0 and divides what follows by its gain 1/L, so,
// referred to the feed input, T_sys = T_ant + T_rain + (L − 1)·T0 + L·T_LNA, with
// T_LNA = T0·(10^(NF/10) − 1) (Friis 1944; IEEE Std 100 noise-figure definition, T0 = 290 K),
// and G/T = G − 10·log10(T_sys / 1 K). The demo once left (L − 1)·T0 out.
func TestGroundStationGOverT(t *testing.T) {
	sh, diags := engine.Load("../../worksheets/club-ground-station.toml", engine.Options{Library: rflib.Library()})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	r, _ := sh.Eval()
	num := func(name, unit string) float64 {
		q, ok := sh.Quantity(name)
		if !ok {
			t.Fatalf("no quantity %s", name)
		}
		v, _ := r.Value(q)
		u, err := units.ParseUnit(unit)
		if err != nil {
			t.Fatal(err)
		}
		x, err := v.In(u)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		return x
	}
	const t0 = 290.0
	lossDB, nfDB := num("station.chain[1].loss", "dB"), num("station.chain[2].nf", "dB")
	l := math.Pow(10, lossDB/10)
	tLNA := t0 * (math.Pow(10, nfDB/10) - 1)
	tSys := num("station.t_antenna", "K") + num("station.t_rain", "K") + (l-1)*t0 + l*tLNA
	want := num("station.gain", "dBi") - 10*math.Log10(tSys)
	if got := num("station.g_over_t", "dB/K"); math.Abs(got-want) > 0.005 {
		t.Errorf("G/T = %.3f dB/K, by hand %.3f dB/K", got, want)
	}
}
