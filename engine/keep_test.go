package engine_test

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/gen"
)

// keepBase is a sheet with a part, a chain, long forms with tolerances, a requirement, a
// sweep and a case: what a reload that keeps the model must carry over.
const keepBase = `title = "kept reloads"
focus = "link.margin"
use = { amp = "parts/amp.toml" }

[tx]
power = "14 dBm"
cable = { is = "1.5 dB", tol = "0.5 dB", note = "to the mast" }
eirp  = "= power - cable + amp.gain"

[path]
distance = "2 km"
freq     = "868 MHz"
loss     = "= fspl(distance, freq)"
spare    = "= log10(distance / 1 km) * 10 dB"

[rx]
chain_bandwidth = "125 kHz"
[[rx.chain]]
stage = "filter"
loss  = "1.2 dB"
[[rx.chain]]
stage = "LNA"
gain  = "18 dB"
nf    = "0.9 dB"

[link]
level  = "= tx.eirp - path.loss"
floor  = "= thermal(rx.chain_bandwidth) + cascade_nf(rx.chain)"
margin = "= level - floor - 10 dB"

[[require]]
that = "= link.margin >= 6 dB"

[[sweep]]
vary = "path.distance"
from = "1 km"
to   = "10 km"
plot = ["link.margin"]

[[case]]
name = "far"
set  = { "path.distance" = "6 km" }
`

const keepPart = `gain = "3 dB" # the part's own
`

// TestKeptReload: after each edit (applied one after the other, as in an editing session),
// the reload from the earlier load gives what a load from scratch gives — the sheet, its
// positions to the byte and its diagnostics — and its evaluation from the earlier result
// gives the full evaluation's values, outcomes and diagnostics. The edits of one input's
// value, a tolerance, a stage's value, a formula naming the same quantities, a part's
// value and a comment keep the model; the rest (a new dependency, a new type, a new key,
// an error) are loaded in full. The earlier sheet does not change.
func TestKeptReload(t *testing.T) {
	dir := t.TempDir()
	sheet := filepath.Join(dir, "s.toml")
	part := filepath.Join(dir, "parts", "amp.toml")
	if err := os.MkdirAll(filepath.Dir(part), 0o755); err != nil {
		t.Fatal(err)
	}
	write := func(path, text string) {
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(sheet, keepBase)
	write(part, keepPart)
	prev, diags := engine.Load(sheet, engine.Options{Library: lib})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	prevR, _ := prev.Eval()
	texts := map[string]string{sheet: keepBase, part: keepPart}
	for _, e := range []struct {
		what      string
		file      string
		from, to  string
		kept      bool
		wantError bool
	}{
		{"an input's value", sheet, `power = "14 dBm"`, `power = "20 dBm"`, true, false},
		{"a line longer by some bytes, before most others", sheet, `power = "20 dBm"`, `power = "20 dBm"  # at the connector`, true, false},
		{"the title (not a quantity)", sheet, `title = "kept reloads"`, `title = "kept reloads, retitled"`, false, false},
		{"an input in another unit of its kind", sheet, `distance = "2 km"`, `distance = "2500 m"`, true, false},
		{"a tolerance of a long form", sheet, `tol = "0.5 dB"`, `tol = "0.75 dB"`, true, false},
		{"a stage's value", sheet, `gain  = "18 dB"`, `gain  = "21.5 dB"`, true, false},
		{"a formula naming the same quantities", sheet, `"= level - floor - 10 dB"`, `"= level - floor - 12.5 dB"`, true, false},
		{"a part's value", part, `gain = "3 dB"`, `gain = "4.5 dB"`, true, false},
		{"a comment", part, `# the part's own`, `# the part's own, edited`, true, false},
		{"a value that makes a formula fail", sheet, `distance = "2500 m"`, `distance = "0 m"`, true, false},
		{"another input while it fails", sheet, `tol = "0.75 dB"`, `tol = "0.8 dB"`, true, false},
		{"and back", sheet, `distance = "0 m"`, `distance = "3 km"`, true, false},
		{"a formula with a new dependency", sheet, `"= power - cable + amp.gain"`, `"= power - cable + amp.gain - path.spare"`, false, false},
		{"an input of another type", sheet, `power = "20 dBm"`, `power = "20 dB"`, false, true},
		{"the error mended", sheet, `power = "20 dB"`, `power = "19 dBm"`, false, false},
		{"a value that does not read", sheet, `freq     = "868 MHz"`, `freq     = "868 MHzz"`, false, true},
		{"mended again", sheet, `freq     = "868 MHzz"`, `freq     = "915 MHz"`, false, false},
		{"a value nested 10,000 deep", sheet, `freq     = "915 MHz"`, `freq     = ` + strings.Repeat("[", 10000) + strings.Repeat("]", 10000), false, true},
		{"mended once more", sheet, `freq     = [[`, `freq     = "915 MHz" # [[`, false, false},
		{"a requirement's bound", sheet, `link.margin >= 6 dB`, `link.margin >= 5 dB`, false, false},
		{"nothing", sheet, `title`, `title`, true, false},
	} {
		text := strings.Replace(texts[e.file], e.from, e.to, 1)
		if text == texts[e.file] && e.from != e.to {
			t.Fatalf("%s: no %q in the sheet", e.what, e.from)
		}
		texts[e.file] = text
		write(e.file, text)
		before := describe(prev, prev.Diagnostics()) + describeResult(prevR, prevR.Diagnostics())
		inc, incDiags := engine.Load(sheet, engine.Options{Library: lib, Previous: prev})
		full, fullDiags := engine.Load(sheet, engine.Options{Library: lib})
		if a, b := describe(inc, incDiags), describe(full, fullDiags); a != b {
			t.Fatalf("%s: the reload differs from a full load:\n%s", e.what, firstDiff(a, b))
		}
		if kept, _ := engine.Kept(inc); kept != e.kept {
			t.Errorf("%s: model kept %v, want %v", e.what, kept, e.kept)
		}
		if incDiags.HasErrors() != e.wantError {
			t.Errorf("%s: errors %v, want %v: %v", e.what, incDiags.HasErrors(), e.wantError, incDiags)
		}
		incR, incRDiags := inc.EvalFrom(prevR)
		fullR, fullRDiags := full.Eval()
		if a, b := describeResult(incR, incRDiags), describeResult(fullR, fullRDiags); a != b {
			t.Fatalf("%s: the evaluation from the earlier one differs from a full one:\n%s", e.what, firstDiff(a, b))
		}
		if after := describe(prev, prev.Diagnostics()) + describeResult(prevR, prevR.Diagnostics()); after != before {
			t.Fatalf("%s: the earlier sheet or result changed:\n%s", e.what, firstDiff(after, before))
		}
		// The cases and the analyses' cones come from the kept sheet as from a full one.
		incCases, _ := inc.EvalCases(incR, inc.Cases, 1)
		fullCases, _ := full.EvalCases(fullR, full.Cases, 1)
		for i := range fullCases {
			if a, b := describeResult(incCases[i], incCases[i].Diagnostics()), describeResult(fullCases[i], fullCases[i].Diagnostics()); a != b {
				t.Fatalf("%s: case %d differs:\n%s", e.what, i, firstDiff(a, b))
			}
		}
		prev, prevR = inc, incR
	}
}

// TestKeptReloadLargeSheet: on a generated sheet large enough that the position index shares
// its unmoved parts with the earlier one, edits near the end, in the middle and at the top —
// of the same length and of another — give the index a full scan gives, the sheet and the
// evaluation a full load gives, and leave the earlier sheet's index as it was.
func TestKeptReloadLargeSheet(t *testing.T) {
	src, err := gen.Budget(3000, 1)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(src), "\n")
	var values []int // lines holding an input's value alone, as `name = "1.5 dB"`
	for i, l := range lines {
		if strings.HasPrefix(l, "[[require]]") || strings.HasPrefix(l, "[[sweep]]") || strings.HasPrefix(l, "[[solve]]") {
			break // the studies' values are not quantities
		}
		if strings.Contains(l, ` = "`) && !strings.Contains(l, `"= `) && strings.HasSuffix(l, ` dB"`) {
			values = append(values, i)
		}
	}
	if len(values) < 100 {
		t.Fatalf("only %d input lines in the generated sheet", len(values))
	}
	dir := t.TempDir()
	sheet := filepath.Join(dir, "s.toml")
	write := func() {
		if err := os.WriteFile(sheet, []byte(strings.Join(lines, "\n")), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write()
	prev, diags := engine.Load(sheet, engine.Options{Library: lib})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	prevR, _ := prev.Eval()
	for n, at := range []int{values[len(values)-3], values[len(values)/2], values[0], values[len(values)/2+7], values[len(values)-1]} {
		// Alternately the same length ("1.5 dB" → "1.6 dB") and longer ("1.5 dB" → "1.55 dB").
		l := lines[at]
		q := strings.LastIndex(l[:len(l)-len(` dB"`)], `"`)
		num := l[q+1 : len(l)-len(` dB"`)]
		repl := "9.9"
		if n%2 == 1 {
			repl = "9.75"
		}
		if num == repl {
			repl = "8.8"
		}
		lines[at] = l[:q+1] + repl + ` dB"`
		write()
		inc, incDiags := engine.Load(sheet, engine.Options{Library: lib, Previous: prev})
		if kept, _ := engine.Kept(inc); !kept {
			t.Fatalf("line %d edited to %q: the model was not kept", at+1, lines[at])
		}
		if d := engine.IndexDiff(inc); d != "" {
			t.Fatalf("line %d edited to %q: the index differs from one built in full: %s", at+1, lines[at], d)
		}
		if d := engine.IndexDiff(prev); d != "" {
			t.Fatalf("line %d edited to %q: the earlier index changed: %s", at+1, lines[at], d)
		}
		full, fullDiags := engine.Load(sheet, engine.Options{Library: lib})
		if a, b := describe(inc, incDiags), describe(full, fullDiags); a != b {
			t.Fatalf("line %d edited to %q: the reload differs from a full load:\n%s", at+1, lines[at], firstDiff(a, b))
		}
		incR, incRDiags := inc.EvalFrom(prevR)
		fullR, fullRDiags := full.Eval()
		if a, b := describeResult(incR, incRDiags), describeResult(fullR, fullRDiags); a != b {
			t.Fatalf("line %d edited to %q: the evaluation differs from a full one:\n%s", at+1, lines[at], firstDiff(a, b))
		}
		prev, prevR = inc, incR
	}
}
