package cli

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
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
