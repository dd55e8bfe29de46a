package lsp

import (
	"context"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestNeovim runs `rfledger lsp` under a real editor's built-in client: Debian's neovim,
// headless, with testdata/nvim.lua attaching the server, typing a typo into a formula and
// fixing it, and writing the inlay hints and diagnostics it received to a file. Neovim 0.7
// has the LSP client but shows no inlay hints, so the script asks for them with
// buf_request_sync. .ci/run installs neovim where it is missing.
func TestNeovim(t *testing.T) {
	if testing.Short() {
		t.Skip("builds rfledger and runs neovim")
	}
	nvim, err := exec.LookPath("nvim")
	if err != nil {
		t.Skip("nvim not found: install Debian's neovim (apt-get install -y neovim, as .ci/run does) to run this test")
	}
	tmp := t.TempDir()
	bin := filepath.Join(tmp, "rfledger")
	if out, err := exec.Command("go", "build", "-o", bin, "../../cmd/rfledger").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	_, uri := writeSheet(t)
	sheet := uriPath(uri)
	script, err := filepath.Abs("testdata/nvim.lua")
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(tmp, "out.json")
	cLine := at(t, benchSheet, "c ", "c").Line
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, nvim, "--headless", "-u", "NONE", "-i", "NONE", "-n", "-c", "luafile "+script)
	cmd.Env = append(os.Environ(), "RFL_BIN="+bin, "RFL_SHEET="+sheet, "RFL_OUT="+out, fmt.Sprintf("RFL_LINE=%d", cLine), "HOME="+tmp, "XDG_STATE_HOME="+tmp, "XDG_DATA_HOME="+tmp)
	if b, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("nvim: %v\n%s", err, b)
	}
	raw, err := os.ReadFile(out)
	if err != nil {
		t.Fatalf("nvim wrote no results: %v", err)
	}
	var res struct {
		Error       string      `json:"error"`
		HintsBefore []inlayHint `json:"hints_before"`
		DiagsTypo   []struct {
			Lnum     int    `json:"lnum"`
			Col      int    `json:"col"`
			EndCol   int    `json:"end_col"`
			Severity int    `json:"severity"`
			Message  string `json:"message"`
		} `json:"diags_typo"`
		HintsTypo  []inlayHint     `json:"hints_typo"`
		DiagsFixed json.RawMessage `json:"diags_fixed"`
		HintsFixed []inlayHint     `json:"hints_fixed"`
	}
	t.Logf("neovim received: %.600s", raw)
	if err := json.Unmarshal(raw, &res); err != nil {
		t.Fatalf("%v: %s", err, raw)
	}
	if res.Error != "" {
		t.Fatalf("the script failed: %s", res.Error)
	}
	// 3 dB + 4 dB of ratios is 7 dB; with 1 dB more, 8 dB.
	if got := hintOn(res.HintsBefore, cLine); got != "= 7.00 dB" {
		t.Errorf("before: c hint %q", got)
	}
	typo := strings.Index(`c      = "= a + gian"`, "gian")
	if len(res.DiagsTypo) != 1 || res.DiagsTypo[0].Lnum != int(cLine) || res.DiagsTypo[0].Col != typo || res.DiagsTypo[0].EndCol != typo+4 ||
		res.DiagsTypo[0].Severity != 1 || !strings.Contains(res.DiagsTypo[0].Message, `unknown name "gian"`) {
		t.Errorf("typo: diagnostics %+v, want one error on gian at %d:%d", res.DiagsTypo, cLine, typo)
	}
	if got := hintOn(res.HintsTypo, cLine); got != "= 7.00 dB (stale)" {
		t.Errorf("typo: c hint %q", got)
	}
	if string(res.DiagsFixed) != "[]" && string(res.DiagsFixed) != "{}" {
		t.Errorf("fixed: diagnostics %s", res.DiagsFixed)
	}
	if got := hintOn(res.HintsFixed, cLine); got != "= 8.00 dB" {
		t.Errorf("fixed: c hint %q", got)
	}
}
