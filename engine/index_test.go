package engine

import (
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
)

// The string values below are decoded by the position scanner and by BurntSushi/toml (the
// decoder the loader uses, which follows the TOML 1.0 specification and 1.1's \e and \xHH);
// the two must agree, and every decoded character must map back to the raw text it comes from.
var stringValues = []string{
	`"plain"`,
	`""`,
	`"= a +\tfoo"`,
	`"tab\t quote\" backslash\\ end"`,
	`"\u00e9t\u00E9 \U0001F4E1 \x41 \e \b\f\n\r"`,
	`"héllo wörld \u00e9"`,
	`'literal \t \u00e9 stays'`,
	`''`,
	"\"\"\"\n= a + \\\n      foo\"\"\"",
	"\"\"\"= a +\n  bar\"\"\"",
	"\"\"\"line one\\\n\n\n   \\t two \\\\\n three\"\"\"",
	"\"\"\"\r\nwindows\r\nlines\\\r\n   next\"\"\"",
	"'''\n= a +\n    baz'''",
	`"""two quotes at the end"""""`,
	`'''one quote at the end''''`,
	`"""a "quoted" word \"\"\" inside"""`,
	"\"\"\"continued \\   \n   \t after blanks\"\"\"",
}

func TestScannerDecodesStringsAsTOML(t *testing.T) {
	for _, lit := range stringValues {
		src := "k = " + lit + "\n"
		var doc map[string]any
		if _, err := toml.Decode(src, &doc); err != nil {
			t.Fatalf("%q is not valid TOML: %v", lit, err)
		}
		want := doc["k"].(string)
		ix := indexTOML(src)
		kp, _ := ix.get("k")
		sv, ok := ix.str(kp)
		if !ok {
			t.Fatalf("%q: no string value indexed", lit)
		}
		if sv.Text != want {
			t.Errorf("%q: scanner decodes %q, toml decodes %q", lit, sv.Text, want)
			continue
		}
		if end := kp.ValEnd.Byte; src[kp.Val.Byte:end] != lit {
			t.Errorf("%q: value range covers %q", lit, src[kp.Val.Byte:end])
		}
		for d, r := range sv.Text {
			raw := src[sv.rawStart(d):sv.rawEnd(d+utf8.RuneLen(r))]
			if raw == string(r) {
				continue
			}
			// Otherwise it must be exactly one escape standing for r (never a line continuation,
			// whose characters stand for nothing).
			if !strings.HasPrefix(raw, `\`) || strings.Contains(raw, "\n") || decodeBasic(t, raw) != string(r) {
				t.Errorf("%q: decoded %q at byte %d maps back to %q", lit, r, d, raw)
			}
		}
		if got := sv.rawEnd(len(sv.Text)); !strings.HasPrefix(src[got:], lit[len(lit)-1:]) {
			t.Errorf("%q: the end of the text maps to %q, not to the closing quotes", lit, src[got:])
		}
	}
}

func decodeBasic(t *testing.T, raw string) string {
	var doc map[string]any
	if _, err := toml.Decode(`k = "`+raw+`"`, &doc); err != nil {
		t.Fatalf("%q: %v", raw, err)
	}
	return doc["k"].(string)
}

func TestPositionsCountCharacters(t *testing.T) {
	src := "[g]\n\"é\\u00e9\" = \"1 dB\" # é\nx\t= \"= a\"\n"
	ix := indexTOML(src)
	kp, ok := ix.lookup("g", "éé")
	if !ok {
		t.Fatal("quoted key with escapes not indexed")
	}
	// Line 2 starts at byte 4 and is `"é\u00e9" = "1 dB"`: the key is 9 characters (10 bytes,
	// é is two), the value starts at column 13, byte 17. Line 3 starts at byte 29.
	if (kp.Key != Pos{Line: 2, Col: 1, Byte: 4}) || (kp.KeyEnd != Pos{Line: 2, Col: 10, Byte: 14}) {
		t.Errorf("key at %+v..%+v", kp.Key, kp.KeyEnd)
	}
	if (kp.Val != Pos{Line: 2, Col: 13, Byte: 17}) || (kp.ValEnd != Pos{Line: 2, Col: 19, Byte: 23}) {
		t.Errorf("value at %+v..%+v", kp.Val, kp.ValEnd)
	}
	x, _ := ix.get("g.x")
	if (x.Val != Pos{Line: 3, Col: 5, Byte: 33}) {
		t.Errorf("x's value at %+v; a tab is one column", x.Val)
	}
	for _, p := range []Pos{kp.Key, kp.KeyEnd, kp.Val, kp.ValEnd, x.Val} {
		if q := posOfByte(src, p.Byte); q != p {
			t.Errorf("%+v: byte offset gives %+v", p, q)
		}
	}
}

func TestKeyPathsDoNotCollide(t *testing.T) {
	src := "[g]\n\"q.r\" = \"1 dB\"\n[g.q]\nr = \"2 dB\"\n[\"g.q\"]\nr = \"3 dB\"\n"
	ix := indexTOML(src)
	for _, c := range []struct {
		keys []string
		line int
	}{
		{[]string{"g", "q.r"}, 2},
		{[]string{"g", "q", "r"}, 4},
		{[]string{"g.q", "r"}, 6},
	} {
		kp, ok := ix.lookup(c.keys...)
		if !ok || kp.Key.Line != c.line {
			t.Errorf("%q: at line %d (found %v), want %d", c.keys, kp.Key.Line, ok, c.line)
		}
	}
	if kp, _ := ix.get("g.q.r"); kp.Key.Line != 4 {
		t.Errorf("the dotted path of bare keys finds line %d, want 4", kp.Key.Line)
	}
	// Every way of splitting these pieces into keys gives its own path.
	pieces := []string{"", "a", "b", ".", "a.b", `\`, `a\`, `\.`, "[0]", "a[0]", `""`, `"`, "]"}
	seen := map[string][]string{}
	for _, x := range pieces {
		for _, y := range pieces {
			for _, keys := range [][]string{{x}, {x, y}} {
				p := ""
				for _, k := range keys {
					p = keyJoin(p, k)
				}
				if prev, dup := seen[p]; dup && strings.Join(prev, "\x00") != strings.Join(keys, "\x00") {
					t.Errorf("%q and %q share the path %q", prev, keys, p)
				}
				seen[p] = keys
			}
		}
	}
}

func TestParentPath(t *testing.T) {
	for path, want := range map[string]string{
		"a.b":         "a",
		"rx.chain[1]": "rx.chain",
		`g.q\.r`:      "g",
		`g.q\[1\]`:    "g",
		`a\\.b`:       `a\\`,
		"a":           "",
	} {
		if got, _ := parentPath(path); got != want {
			t.Errorf("parentPath(%q) = %q, want %q", path, got, want)
		}
	}
}

func TestKeyPathOfDecoderKeys(t *testing.T) {
	// BurntSushi/toml quotes the keys that are not bare in its messages (meta.go, Key.String).
	for _, k := range []toml.Key{{"g", "a.b"}, {"tx", "power"}, {"", "x"}, {`q"uote`, `back\slash`}} {
		if got, want := keyPathOf(k.String()), keyPath(k...); got != want {
			t.Errorf("%s: %q, want %q", k, got, want)
		}
	}
}
