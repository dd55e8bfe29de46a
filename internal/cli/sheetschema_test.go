package cli

import (
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/units"
)

// allKeysSheet uses every key of the format once (the stage keys over three stages); each
// line is tagged with the tables whose keys it writes. Tables are written inline, one line
// each, so that a key is misspelt by changing one line.
var allKeysSheet = []struct{ tables, line string }{
	{"top", `title = "Every key of the worksheet format"`},
	{"top", `summary = "A sensor link that uses each key once."`},
	{"top", `focus = "link.margin"`},
	{"top", `use = { feed = "feed.toml" }`},
	{"top require", `require = [{ that = "= link.margin >= 0 dB", note = "the link closes" }]`},
	{"top sweep", `sweep = [{ vary = "path.distance", from = "100 m", to = "10 km", steps = 5, scale = "log", plot = ["link.margin"] }]`},
	{"top solve", `solve = [{ name = "range", vary = "path.distance", so_that = "link.margin", equals = "0 dB", within = ["10 m", "1000 km"] }]`},
	{"top spurs", `spurs = [{ name = "first mixer", note = "high-side LO", lo = "1185 MHz", if = ["260 MHz", "280 MHz"], rf = ["902 MHz", "928 MHz"], order = 5, reject = { "2x1" = "-40 dBc" } }]`},
	{"top products", `products = [{ name = "downlink", note = "harmonics", tones = ["915 MHz"], protect = [["1559 MHz", "1610 MHz"]], order = 3 }]`},
	{"top case", `case = [{ name = "far", note = "the farthest node", set = { "path.distance" = "5 km" }, focus = "link.margin", analyses = true }]`},
	{"", `[tx]`},
	{"quantity", `power = { is = "14 dBm", tol = "1 dB", dist = "uniform", note = "at full setting", show = "dBm", source = "radio datasheet", export = "TX_POWER_DBM" }`},
	{"quantity", `shadow = { is = "0 dB", sigma = "8 dB" }`},
	{"", `[path]`},
	{"", `distance = "2 km"`},
	{"", `frequency = "868 MHz"`},
	{"", `loss = "= fspl(distance, frequency)"`},
	{"", `[rx]`},
	{"", `bandwidth = "125 kHz"`},
	{"group", `chain_input = "-90 dBm"`},
	{"group", `chain_bandwidth = "= bandwidth"`},
	{"group", `chain_backoff = "6 dB"`},
	{"", `gain = "= cascade_gain(chain)"`},
	{"", `floor = "= thermal(bandwidth) + cascade_nf(chain)"`},
	{"stage", `chain = [{ stage = "filter", note = "SAW", loss = "1 dB", iip3 = "40 dBm", ip1db = "30 dBm", iip2 = "70 dBm" }, { stage = "LNA", note = "low noise", gain = "16 dB", te = "75 K", oip3 = "20 dBm", op1db = "10 dBm", oip2 = "50 dBm" }, { stage = "mixer", gain = "6 dB", nf = "9 dB" }]`},
	{"", `[link]`},
	{"", `margin = "= tx.power - path.loss + feed.gain + rx.gain - rx.floor"`},
}

const feedPart = "gain = \"2 dBi\"\n"

// sheetText returns the all-keys sheet, with line i replaced when i >= 0.
func sheetText(i int, line string) string {
	var b strings.Builder
	for j, l := range allKeysSheet {
		if j == i {
			l.line = line
		}
		b.WriteString(l.line + "\n")
	}
	return b.String()
}

// keyAt matches key written as a key of an inline table, or at the start of a line.
func keyAt(key string) *regexp.Regexp {
	return regexp.MustCompile(`(^|[{,] )` + regexp.QuoteMeta(key) + ` =`)
}

// misspelt doubles the last letter: a common slip, one edit from the key.
func misspelt(key string) string { return key + key[len(key)-1:] }

type keySite struct {
	table, key string
	line       int
}

// keySites finds where the all-keys sheet writes each key of each table, failing the test
// for a key it does not write.
func keySites(t *testing.T) []keySite {
	t.Helper()
	var sites []keySite
	for table, keys := range sortedTables(tableKeys(engine.WorksheetKeys())) {
		for _, k := range keys {
			at := -1
			for i, l := range allKeysSheet {
				if slices.Contains(strings.Fields(l.tables), table) && keyAt(k.Name).MatchString(l.line) {
					at = i
					break
				}
			}
			if at < 0 {
				t.Errorf("the all-keys sheet does not use %s key %q; add it", table, k.Name)
				continue
			}
			sites = append(sites, keySite{table, k.Name, at})
		}
	}
	return sites
}

// sortedTables iterates the tables in name order.
func sortedTables(m map[string][]engine.Key) func(func(string, []engine.Key) bool) {
	return func(yield func(string, []engine.Key) bool) {
		names := make([]string, 0, len(m))
		for n := range m {
			names = append(names, n)
		}
		sort.Strings(names)
		for _, n := range names {
			if !yield(n, m[n]) {
				return
			}
		}
	}
}

// variant is the all-keys sheet with one key misspelt.
func (s keySite) variant() string {
	l := allKeysSheet[s.line].line
	loc := keyAt(s.key).FindStringSubmatchIndex(l)
	at := loc[3] // after the prefix group
	return sheetText(s.line, l[:at]+misspelt(s.key)+l[at+len(s.key):])
}

func loadSheet(t *testing.T, dir, text string) engine.Diagnostics {
	t.Helper()
	main := filepath.Join(dir, "sheet.toml")
	if err := os.WriteFile(main, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "feed.toml"), []byte(feedPart), 0o644); err != nil {
		t.Fatal(err)
	}
	_, diags := engine.Load(main, engine.Options{Library: rflib.Library()})
	var errs engine.Diagnostics
	for _, d := range diags {
		if d.Severity == engine.Error {
			errs = append(errs, d)
		}
	}
	return errs
}

// TestLoaderAcceptsExactlyTheKeys: a sheet with every key the key lists hold loads without an
// error, and misspelling any one of them gives an error (for a key of a table, "unknown key"
// naming it). So the lists WorksheetKeys returns, which the schema is built from, are the keys
// the loader accepts.
func TestLoaderAcceptsExactlyTheKeys(t *testing.T) {
	dir := t.TempDir()
	if errs := loadSheet(t, dir, sheetText(-1, "")); len(errs) > 0 {
		t.Fatalf("the all-keys sheet does not load:\n%v", errs)
	}
	sites := keySites(t)
	for _, s := range sites {
		errs := loadSheet(t, dir, s.variant())
		if len(errs) == 0 {
			t.Errorf("%s key %q misspelt as %q: no error", s.table, s.key, misspelt(s.key))
			continue
		}
		if s.table == "top" {
			continue // a misspelt top key is read as a name: the error is about what it holds
		}
		want := fmt.Sprintf("unknown key %q", misspelt(s.key))
		if s.table == "stage" {
			want = fmt.Sprintf("unknown stage key %q", misspelt(s.key))
		}
		if s.table == "group" {
			want = fmt.Sprintf("unknown chain key %q", misspelt(s.key))
		}
		if !strings.Contains(errs.Error(), want) {
			t.Errorf("%s key %q misspelt: want %s, got\n%v", s.table, s.key, want, errs)
		}
	}
	if len(sites) < 40 {
		t.Errorf("only %d keys checked", len(sites))
	}
}

// TestSchemaListsExactlyTheKeys: every table of the schema has as properties exactly the
// keys the loader's list holds, each described, closed to any other key, with the required
// ones required.
func TestSchemaListsExactlyTheKeys(t *testing.T) {
	code, out, stderr := run(t, "schema")
	if code != ExitOK {
		t.Fatalf("schema: exit %d: %s", code, stderr)
	}
	var s map[string]any
	if err := json.Unmarshal([]byte(out), &s); err != nil {
		t.Fatalf("schema is not JSON: %v", err)
	}
	if s["$schema"] != "http://json-schema.org/draft-07/schema#" {
		t.Errorf("$schema = %v", s["$schema"])
	}
	defs, _ := s["definitions"].(map[string]any)
	ks := engine.WorksheetKeys()
	where := map[string]map[string]any{"top": s}
	for table, def := range map[string]string{"quantity": "longForm", "stage": "stage", "require": "require", "sweep": "sweep", "solve": "solve", "spurs": "spurs", "products": "products", "case": "case", "group": "group"} {
		where[table], _ = defs[def].(map[string]any)
	}
	for table, keys := range sortedTables(tableKeys(ks)) {
		sch := where[table]
		props, _ := sch["properties"].(map[string]any)
		want := keyNamesOf(keys)
		if table == "top" {
			want = append(want, ks.Builtins...)
		}
		got := make([]string, 0, len(props))
		for k, p := range props {
			got = append(got, k)
			if d, _ := p.(map[string]any)["description"].(string); len(d) < 10 {
				t.Errorf("%s key %q has no description", table, k)
			}
		}
		sort.Strings(got)
		sort.Strings(want)
		if !slices.Equal(got, want) {
			t.Errorf("%s: schema has keys %v, the loader %v", table, got, want)
		}
		if table == "top" || table == "group" {
			if ap, _ := sch["additionalProperties"].(map[string]any); ap["$ref"] != "#/definitions/member" {
				t.Errorf("%s: other keys should be names (member), got %v", table, sch["additionalProperties"])
			}
			continue
		}
		if sch["additionalProperties"] != false {
			t.Errorf("%s: not closed to other keys", table)
		}
		var req []string
		for _, k := range keys {
			if k.Required {
				req = append(req, k.Name)
			}
		}
		var gotReq []string
		if r, ok := sch["required"].([]any); ok {
			for _, x := range r {
				gotReq = append(gotReq, x.(string))
			}
		}
		if !slices.Equal(gotReq, req) {
			t.Errorf("%s: required %v, the loader needs %v", table, gotReq, req)
		}
	}
	// Every key has its value's shape, and no shape is kept for a key the loader does not have.
	values := valueSchemas(ks)
	for table, keys := range sortedTables(tableKeys(ks)) {
		names := keyNamesOf(keys)
		for _, k := range names {
			if _, ok := values[table][k]; !ok {
				t.Errorf("%s key %q: no value schema in valueSchemas", table, k)
			}
		}
		for k := range values[table] {
			if !slices.Contains(names, k) {
				t.Errorf("valueSchemas has %s key %q, which the loader does not know", table, k)
			}
		}
	}
	if len(values) != len(tableKeys(ks)) {
		t.Errorf("valueSchemas has %d tables, the format %d", len(values), len(tableKeys(ks)))
	}
	// The same bytes every time.
	if _, again, _ := run(t, "schema"); again != out {
		t.Error("schema output differs between runs")
	}
}

func keyNamesOf(keys []engine.Key) []string {
	var out []string
	for _, k := range keys {
		out = append(out, k.Name)
	}
	return out
}

// TestQuantityPattern: every text the loader reads as a quantity (a formula, or what the unit
// parser reads) matches the schema's pattern, and the texts it reads as neither do not.
func TestQuantityPattern(t *testing.T) {
	rx := regexp.MustCompile(quantityPattern)
	value := regexp.MustCompile(valuePattern)
	for _, s := range []string{"14 dBm", "-3 dB", "\u22123 dB", "+1.5 dB", ".5 dB", "-.5 dB", "1e-4", "2.4km", "0 dBc", "= a + b", "  = tx.power - 3 dB", "100 kHz"} {
		_, _, err := units.Parse(s)
		formula := strings.HasPrefix(strings.TrimSpace(s), "=")
		if err != nil && !formula {
			t.Fatalf("%q: the unit parser refuses it (%v); not a sample of a quantity", s, err)
		}
		if !rx.MatchString(s) {
			t.Errorf("%q is a quantity but does not match %s", s, quantityPattern)
		}
		if !formula && !value.MatchString(s) {
			t.Errorf("%q is a value but does not match %s", s, valuePattern)
		}
	}
	for _, s := range []string{"My sheet", "link.margin", "normal", "dB", "", "  ", "-dB", "e5", ". 5"} {
		if _, _, err := units.Parse(s); err == nil {
			t.Fatalf("%q: the unit parser reads it; not a sample of a non-quantity", s)
		}
		if rx.MatchString(s) {
			t.Errorf("%q is not a quantity but matches %s", s, quantityPattern)
		}
	}
}

// taplo returns the command line of the taplo CLI: $RFLEDGER_TAPLO, taplo on the PATH, the
// copy .ci/run installs, or one npx knows; nil when there is none.
func taplo() []string {
	if p := os.Getenv("RFLEDGER_TAPLO"); p != "" {
		return []string{p}
	}
	if p, err := exec.LookPath("taplo"); err == nil {
		return []string{p}
	}
	if dir, err := os.UserCacheDir(); err == nil {
		if p := filepath.Join(dir, "rfledger-ci", "node_modules", ".bin", "taplo"); exists(p) {
			return []string{p}
		}
	}
	if exec.Command("npx", "--no-install", "taplo", "--version").Run() == nil {
		return []string{"npx", "--no-install", "taplo"}
	}
	return nil
}

// lint runs taplo lint on files and returns the exit code and the base names of the files it
// found invalid.
func lint(t *testing.T, tp []string, schema string, files []string) (int, []string, string) {
	t.Helper()
	args := append(append([]string{}, tp[1:]...), "lint", "--no-auto-config", "--colors", "never")
	if schema != "" {
		args = append(args, "--schema", "file://"+filepath.ToSlash(schema))
	}
	cmd := exec.Command(tp[0], append(args, files...)...)
	out, err := cmd.CombinedOutput()
	code := 0
	if err != nil {
		ee, ok := err.(*exec.ExitError)
		if !ok {
			t.Fatalf("taplo: %v", err)
		}
		code = ee.ExitCode()
	}
	var bad []string
	for _, m := range regexp.MustCompile(`invalid file .*path="([^"]+)"`).FindAllStringSubmatch(string(out), -1) {
		bad = append(bad, filepath.Base(m[1]))
	}
	sort.Strings(bad)
	return code, bad, string(out)
}

// misspeltSheets are sheets with one slip each, written as people slip, for taplo to refuse.
var misspeltSheets = map[string]string{
	"title.toml":     "titel = \"Barn to silo\"\n",
	"source.toml":    "[tx]\npower = { is = \"14 dBm\", tol = \"1 dB\", sorce = \"datasheet\" }\n",
	"stage.toml":     "[[rx.chain]]\nstage = \"LNA\"\ngian = \"16 dB\"\n",
	"sweep.toml":     "[[sweep]]\nvary = \"a\"\nfrom = \"1 m\"\nto = \"2 m\"\nstpes = 10\n",
	"long_form.toml": "[tx]\npower = { value = \"14 dBm\", tol = \"1 dB\", note = \"max\" }\n",
	"no_is.toml":     "[tx]\npower = { tol = \"1 dB\" }\n",
	"requires.toml":  "[[requires]]\nthat = \"= a > 1\"\n",
	"reject.toml":    "[[spurs]]\nlo = \"1 GHz\"\nif = [\"1 MHz\", \"2 MHz\"]\nrf = [\"1 GHz\", \"2 GHz\"]\nreject = { \"2by1\" = \"-40 dBc\" }\n",
	"builtin.toml":   "pi = \"3\"\n",
	"dist.toml":      "[tx]\npower = { is = \"14 dBm\", tol = \"1 dB\", dist = \"gaussian\" }\n",
	"solve.toml":     "a = \"3 dB\"\n[[solve]]\nname = \"x\"\nvary = \"a\"\nso_that = \"a\"\nequals = \"0 dB\"\nwithin = [\"1 dB\", \"2 dB\"]\nnotes = \"x\"\n",
	"products.toml":  "[[products]]\ntones = [\"915 MHz\"]\nprotekt = [[\"1559 MHz\", \"1610 MHz\"]]\n",
}

// TestSchemaWithTaplo lints sheets against the schema with taplo, a TOML linter that reads
// JSON Schemas: the demos, the valid test sheets and their parts, the all-keys sheet and the
// sheets new writes pass; every misspelt sheet fails.
func TestSchemaWithTaplo(t *testing.T) {
	if testing.Short() {
		t.Skip("taplo runs in the full test run")
	}
	tp := taplo()
	if tp == nil {
		t.Skip("taplo not found: bash .ci/run installs it (npm install --no-save --prefix ~/.cache/rfledger-ci @taplo/cli), or set RFLEDGER_TAPLO")
	}
	dir := t.TempDir()
	_, schemaJSON, _ := run(t, "schema")
	schema := filepath.Join(dir, schemaFile)
	if err := os.WriteFile(schema, []byte(schemaJSON), 0o644); err != nil {
		t.Fatal(err)
	}
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}

	var valid []string
	for _, g := range []string{"../../worksheets/*.toml", "../../testdata/valid/*.toml", "../../testdata/valid/parts/*.toml"} {
		m, _ := filepath.Glob(g)
		valid = append(valid, m...)
	}
	if len(valid) < 10 {
		t.Fatalf("found only %d sheets to lint", len(valid))
	}
	valid = append(valid, write("all-keys.toml", sheetText(-1, "")))
	if code, bad, out := lint(t, tp, schema, valid); code != 0 || len(bad) > 0 {
		t.Fatalf("valid sheets fail taplo lint (exit %d, %v):\n%s", code, bad, out)
	}

	// The sheets new writes name the schema on their first line: taplo finds it beside them.
	var fresh []string
	for _, kind := range []string{"link", "receiver", "satellite"} {
		f := filepath.Join(dir, "new-"+kind+".toml")
		if code, _, stderr := run(t, "new", f, "--kind", kind); code != ExitOK {
			t.Fatalf("new: %s", stderr)
		}
		fresh = append(fresh, f)
	}
	if code, bad, out := lint(t, tp, "", fresh); code != 0 || len(bad) > 0 {
		t.Fatalf("sheets from new fail taplo lint by their #:schema line (exit %d, %v):\n%s", code, bad, out)
	}
	link, _ := os.ReadFile(fresh[0])
	slip := strings.Replace(string(link), "\nfocus ", "\nfocsu ", 1)
	if slip == string(link) {
		t.Fatal("the link template has no focus line to misspell")
	}
	if code, bad, out := lint(t, tp, "", []string{write("new-slip.toml", slip)}); code == 0 || len(bad) != 1 {
		t.Errorf("a misspelt sheet from new passes taplo by its #:schema line (exit %d):\n%s", code, out)
	}

	var invalid, want []string
	for _, s := range keySites(t) {
		if s.table == "group" {
			// A group's other keys are names of its own: the schema cannot tell chain_inputt
			// from a quantity, only the loader can (it knows which groups hold a chain).
			continue
		}
		name := fmt.Sprintf("slip-%s-%s.toml", s.table, s.key)
		invalid, want = append(invalid, write(name, s.variant())), append(want, name)
	}
	for name, text := range misspeltSheets {
		invalid, want = append(invalid, write(name, text)), append(want, name)
	}
	sort.Strings(want)
	code, bad, out := lint(t, tp, schema, invalid)
	if code == 0 || !slices.Equal(bad, want) {
		var missed []string
		for _, w := range want {
			if !slices.Contains(bad, w) {
				missed = append(missed, w)
			}
		}
		t.Errorf("taplo lint exit %d; misspelt sheets it passed: %v\n%s", code, missed, lastLines(out, 40))
	}
}

func lastLines(s string, n int) string {
	lines := strings.Split(s, "\n")
	if len(lines) > n {
		lines = lines[len(lines)-n:]
	}
	return strings.Join(lines, "\n")
}
