package cli

import (
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// headerSheet has the same quantity names in both copies, so only the prefixes keep their
// macros apart, and a note that would end a comment early.
const headerSheet = `[path]
frequency = { is = "868.1 MHz", export = true }
[rx]
bits = { is = "256", export = true, note = "payload */ int broken; /* ??/" }
bitrate = { is = "38.4 kbit/s", export = true }
floor = { is = "= -100 dBm + 3.25 dB", export = true }
threshold = { is = "= floor + 2 dB", export = "RSSI_MIN_DBM" }
`

// TestHeadersCompileTogether includes two budgets' headers in one translation unit and
// compiles it as C89, C11 and C++11 with every warning an error, runs it, and compares the
// values it prints with the JSON of the same worksheets.
func TestHeadersCompileTogether(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"gateway.toml", "probe.toml"} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(headerSheet), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if code, _, stderr := run(t, "export", filepath.Join(dir, "gateway.toml"), "--c-header", "-o", filepath.Join(dir, "gateway.h")); code != ExitOK {
		t.Fatal(stderr)
	}
	if code, _, stderr := run(t, "export", filepath.Join(dir, "probe.toml"), "--c-header", "--prefix", "PROBE", "--type", "double", "-o", filepath.Join(dir, "probe.h")); code != ExitOK {
		t.Fatal(stderr)
	}
	src := `#include <stdio.h>
#include "gateway.h"
#include "probe.h"
#include "gateway.h" /* a second inclusion is harmless */

int main(void)
{
	printf("%lu %lu %lu %.9g %.9g %s\n", GATEWAY_PATH_FREQUENCY_HZ, GATEWAY_RX_BITS, GATEWAY_RX_BITRATE_BIT_PER_S,
		(double)GATEWAY_RX_FLOOR_DBM, (double)GATEWAY_RSSI_MIN_DBM, GATEWAY_SHEET_HASH);
	printf("%lu %lu %lu %.17g %.17g %s\n", PROBE_PATH_FREQUENCY_HZ, PROBE_RX_BITS, PROBE_RX_BITRATE_BIT_PER_S,
		PROBE_RX_FLOOR_DBM, PROBE_RSSI_MIN_DBM, PROBE_SHEET_HASH);
	return 0;
}
`
	if err := os.WriteFile(filepath.Join(dir, "main.c"), []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	compilers := []struct{ cc, std, lang string }{{"gcc", "c89", "c"}, {"gcc", "c11", "c"}, {"g++", "c++11", "c++"}}
	ran := false
	for _, c := range compilers {
		if _, err := exec.LookPath(c.cc); err != nil {
			t.Logf("%s not installed: the %s build is not checked (CI installs it)", c.cc, c.std)
			continue
		}
		bin := filepath.Join(dir, "main-"+c.std)
		cmd := exec.Command(c.cc, "-std="+c.std, "-Wall", "-Wextra", "-Werror", "-pedantic", "-x", c.lang, "main.c", "-o", bin)
		cmd.Dir = dir
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Errorf("%s -std=%s: %v\n%s", c.cc, c.std, err, out)
			continue
		}
		out, err := exec.Command(bin).Output()
		if err != nil {
			t.Fatalf("%s: %v", bin, err)
		}
		checkPrinted(t, c.std, string(out), dir)
		ran = true
	}
	if !ran {
		t.Skip("no C compiler (gcc, g++) installed; .ci/run installs them")
	}
}

// checkPrinted compares what the compiled program printed with the render JSON of the sheets.
func checkPrinted(t *testing.T, std, out, dir string) {
	t.Helper()
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 2 {
		t.Fatalf("%s printed %q", std, out)
	}
	_, js, _ := run(t, "render", filepath.Join(dir, "gateway.toml"), "--json")
	var doc struct {
		Hash       string
		Quantities map[string]struct{ Value, SI float64 }
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	q := doc.Quantities
	for i, line := range lines {
		f := strings.Fields(line)
		num := func(k int) float64 { v, _ := strconv.ParseFloat(f[k], 64); return v }
		// 868.1 MHz and 38.4 kbit/s in Hz and bit/s by the SI prefixes; the rest as the JSON has them.
		if f[0] != "868100000" || f[1] != "256" || f[2] != "38400" || f[5] != doc.Hash {
			t.Errorf("%s line %d: %q", std, i+1, line)
		}
		rel := 1e-7 // float holds about 7 significant digits
		if i == 1 {
			rel = 1e-15
		}
		for k, name := range map[int]string{3: "rx.floor", 4: "rx.threshold"} {
			if want := q[name].Value; math.Abs(num(k)-want) > rel*math.Abs(want) {
				t.Errorf("%s: %s = %v, JSON has %v", std, name, num(k), want)
			}
		}
	}
}
