package engine

import (
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/rfledger/rfledger/internal/gen"
)

// The reference for every check here is BurntSushi/toml's decoder (wholeDecode), which reads
// TOML as the TOML 1.0/1.1 specifications (toml.io) define it: quickDecode must give its
// document, or give up.

// TestQuickDecodeReads checks texts in the plain TOML that quickDecode is meant to read: it
// must read each one, to the decoder's document.
func TestQuickDecodeReads(t *testing.T) {
	for _, src := range []string{
		"",
		"a = 1\n",
		"a = -0\nb = +7\nc = 0.5\nd = -1e-3\ne = 6.02E23\nf = 9223372036854775807\ng = 1e5\n",
		"t = true\nf = false\n",
		`s = "tab\there \"q\" back\\slash \u00e9 \U0001F4E1 \b\f\n\r"` + "\n",
		"l = 'C:\\path \"as is\"'\n",
		"\"quoted key\" = 1\n'lit key' = 2\n\"\" = 3\n",
		"a = [1, 'x', {b = 2}]\nb = []\nc = [\n  1, # one\n  2,\n]\nd = [[1, 2], [\"x\"]]\n",
		"i = {}\nj = { is = \"1 dB\", tol = \"0.5 dB\", dist = \"uniform\" }\n",
		"[a.b]\n[a]\nc = 1\n",
		"[ a . \"b.c\" ]\nx = 1\n",
		"[[chain]]\nstage = \"LNA\"\n[[chain]]\nstage = \"mixer\"\n[chain.extra]\nk = 1\n",
		"[[a.b]]\n[[a.b]]\n[[a.c]]\nx = 1\n",
		"[x]\r\nk = 1\r\n# comment\r\n",
		"a = 1 # trailing comment\n[t] # header comment\n\tb = 2\n",
		"no_newline_at_end = 1",
		"1 = 'digit key'\ntrue = 'word key'\n",
	} {
		got, _, ok := quickDecode(src)
		if !ok {
			t.Errorf("quickDecode(%q) gave up, want it read", src)
			continue
		}
		want, err := wholeDecode(src)
		if err != nil || !reflect.DeepEqual(got, want) {
			t.Errorf("quickDecode(%q) = %#v; the decoder gives %#v, %v", src, got, want, err)
		}
	}
}

// TestQuickDecodeGivesUp checks texts that quickDecode must leave to the decoder: every
// error (so that the decoder's message is the one reported) and the rarer forms.
func TestQuickDecodeGivesUp(t *testing.T) {
	for _, src := range []string{
		// errors
		"a = 1\na = 2\n", "[a]\n[a]\n", "[a]\nb = 1\n[a.b]\n", "a = {x = 1}\n[a.y]\n",
		"a = [1]\n[[a]]\n", "[[a]]\n[a]\n", "[a]\n[[a]]\n", "[a.b.c]\n[a]\nb = 1\n",
		"a = 01\n", "a = 1.\n", "a = .5\n", "a = 1e\n", "a = 9223372036854775808\n",
		"a = 1.5e400\n", "a = \"open\n", "a = 'open\n", "a = \"\\q\"\n", "a = \"\\ud800\"\n",
		"a = \"x\" # \x01\n", "a = \"\x7f\"\n", "a = 1 b = 2\n", "[a] x = 1\n", "a = \n",
		"= 1\n", "a = [1 2]\n", "a = {b = 1 c = 2}\n", "a\r= 1\n", "a = 1\r\r\n",
		"a = \"\xff\"\n", "[a\n", "[[a]\n", "a = [\n",
		// rarer forms the decoder reads
		"a.b = 1\n", "a = \"\"\"\nx\n\"\"\"\n", "a = '''x'''\n", "a = 1979-05-27\n",
		"a = 07:32:00\n", "a = 0x10\n", "a = 0o7\n", "a = 0b1\n", "a = 1_000\n", "a = inf\n",
		"a = nan\n", "a = -inf\n", "a = \"\\e\"\n", "a = \"\\x41\"\n", "a = {b = 1,}\n",
		"a = {b = 1,\nc = 2}\n", "\ufeffa = 1\n", "a = {b.c = 1}\n",
	} {
		if got, _, ok := quickDecode(src); ok {
			want, err := wholeDecode(src)
			t.Errorf("quickDecode(%q) = %#v, want it to give up (the decoder gives %#v, %v)", src, got, want, err)
		}
	}
}

// TestQuickDecodeSheets checks that generated sheets, which are what large worksheets look
// like, are read by quickDecode, and that every demo and test worksheet it reads comes out
// as the decoder's document.
func TestQuickDecodeSheets(t *testing.T) {
	for _, n := range []int{1_000, 10_000} {
		b, err := gen.Budget(n, 1)
		if err != nil {
			t.Fatal(err)
		}
		got, _, ok := quickDecode(string(b))
		if !ok {
			t.Errorf("generated %d: quickDecode gave up", n)
			continue
		}
		if want, err := wholeDecode(string(b)); err != nil || !reflect.DeepEqual(got, want) {
			t.Errorf("generated %d: quickDecode differs from the decoder (%v)", n, err)
		}
	}
	var paths []string
	for _, g := range []string{"../worksheets/*.toml", "../testdata/valid/*.toml", "../testdata/invalid/*.toml"} {
		m, _ := filepath.Glob(g)
		paths = append(paths, m...)
	}
	read := 0
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		got, _, ok := quickDecode(string(b))
		if !ok {
			continue
		}
		read++
		if want, err := wholeDecode(string(b)); err != nil || !reflect.DeepEqual(got, want) {
			t.Errorf("%s: quickDecode differs from the decoder (%v)", p, err)
		}
	}
	if read < len(paths)/2 {
		t.Errorf("quickDecode read %d of %d worksheets; the check tests little", read, len(paths))
	}
	t.Logf("quickDecode read %d of %d worksheets", read, len(paths))
}

// FuzzQuickDecode checks on any text that what quickDecode reads, the decoder reads too, to
// the same document.
func FuzzQuickDecode(f *testing.F) {
	for _, s := range []string{
		"a = 1\n[b]\nx = \"1 dB\"\n[[c]]\ny = [1, 2.5, 'z']\n",
		"[a.b]\n[a]\nc = {d = true, e = \"\\u00e9\"}\n",
		"[[a.b]]\n[a.b.c]\n[[a.b]]\n[a.b.c]\n",
		"a = [\n  1, # one\n]\r\n\"k.k\" = -0.0\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		got, _, ok := quickDecode(src)
		if !ok {
			return
		}
		want, err := wholeDecode(src)
		if err != nil {
			t.Fatalf("quickDecode reads %q, the decoder fails: %v", src, err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("quickDecode(%q) = %#v, the decoder gives %#v", src, got, want)
		}
	})
}

// BenchmarkReadText measures the three readings of a generated 100k-quantity sheet's text
// that loading starts with, each on one core: the position index, quickDecode, and the TOML
// decoder it spares (the baseline, measured in the same run).
func BenchmarkReadText(b *testing.B) {
	src, err := gen.Budget(100_000, 1)
	if err != nil {
		b.Fatal(err)
	}
	text := string(src)
	b.Run("index", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			indexTOML(text)
		}
	})
	b.Run("quick", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, _, ok := quickDecode(text); !ok {
				b.Fatal("quickDecode gave up")
			}
		}
	})
	b.Run("decoder", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := wholeDecode(text); err != nil {
				b.Fatal(err)
			}
		}
	})
}
