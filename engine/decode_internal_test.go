package engine

import (
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"

	"github.com/rfledger/rfledger/internal/gen"
)

// wholeDecode is the reference: the TOML decoder on the whole text, as it was called before
// the text was cut into pieces.
func wholeDecode(src string) (map[string]any, error) {
	var doc map[string]any
	_, err := toml.Decode(src, &doc)
	return doc, err
}

// TestDecodePiecesIsWholeDecode checks that decoding a worksheet in pieces gives the
// decoder's own result on the whole text, for generated sheets (cut into many pieces) and
// for every demo worksheet, and that the large ones were cut at all.
func TestDecodePiecesIsWholeDecode(t *testing.T) {
	srcs := map[string]string{}
	for _, n := range []int{2_000, 10_000} {
		b, err := gen.Budget(n, 1)
		if err != nil {
			t.Fatal(err)
		}
		srcs["generated "+strconv.Itoa(n)] = string(b)
	}
	demos, _ := filepath.Glob("../worksheets/*.toml")
	for _, p := range demos {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		srcs[p] = string(b)
	}
	for name, src := range srcs {
		want, werr := wholeDecode(src)
		got, _, gerr := decodeTOML(src)
		if (werr != nil) != (gerr != nil) || !reflect.DeepEqual(got, want) {
			t.Errorf("%s: pieces differ from the whole decode (errors %v, %v)", name, gerr, werr)
		}
		if strings.HasPrefix(name, "generated") {
			cuts := decodeCuts(src, 2, decodeChunk)
			if len(cuts) < 1 {
				t.Errorf("%s: %d cuts, want the text cut into pieces", name, len(cuts))
			}
			if _, _, ok := decodePieces(src, cuts); !ok {
				t.Errorf("%s: the pieces did not join", name)
			}
		}
	}
}

// TestDecodePiecesFallsBack builds texts where a cut at a line starting with "[" would change
// the meaning or hide an error, and checks the result and the error are the whole decode's:
// a top-level table written in two places, a header line inside a multi-line string and
// inside a multi-line array, a key defined twice across the cut, a root key that a later
// table redefines, and a syntax error after the cut.
func TestDecodePiecesFallsBack(t *testing.T) {
	filler := func(group string) string {
		var b strings.Builder
		b.WriteString("[" + group + "]\n")
		for b.Len() < 3*decodeChunk {
			b.WriteString("x" + strconv.Itoa(b.Len()) + " = \"1 dB\"\n")
		}
		return b.String()
	}
	cases := map[string]string{
		"table in two places":     filler("a") + filler("b") + "[a.more]\ny = 1\n",
		"header in a string":      filler("a") + "s = \"\"\"\n[b]\nz = 1\n\"\"\"\n" + filler("c"),
		"header in an array":      filler("a") + "arr = [\n[\"b\"],\n[\"c\"],\n]\n" + filler("d"),
		"key twice across a cut":  filler("a") + filler("b") + "[a]\nq = 1\n",
		"root key redefined":      "a = 1\n" + filler("b") + filler("a"),
		"syntax error after cuts": filler("a") + filler("b") + "[c]\nx = = 1\n",
		"array of tables split":   filler("a") + "[[b]]\nn = 1\n" + filler("c") + "[[b]]\nn = 2\n",
	}
	for name, src := range cases {
		if len(decodeCuts(src, 2, decodeChunk)) == 0 {
			t.Errorf("%s: not cut; the case tests nothing", name)
			continue
		}
		want, werr := wholeDecode(src)
		got, _, gerr := decodeTOML(src)
		switch {
		case (werr == nil) != (gerr == nil):
			t.Errorf("%s: error %v, want %v", name, gerr, werr)
		case werr != nil && werr.Error() != gerr.Error():
			t.Errorf("%s: error %q, want %q", name, gerr, werr)
		case !reflect.DeepEqual(got, want):
			t.Errorf("%s: pieces differ from the whole decode", name)
		}
	}
}

func TestHeaderKey(t *testing.T) {
	for line, want := range map[string]string{
		"[a]\n": "a", "[a.b]": "a", "[[a.b]]\n": "a", "[ a . b ]": "a", `["q.r".s]`: `"q.r"`,
		"['x y']": "'x y'", "[r01.f01]   # gateway\n": "r01",
	} {
		if got, ok := headerKey(line); !ok || got != want {
			t.Errorf("headerKey(%q) = %q, %v; want %q", line, got, ok, want)
		}
	}
	for _, line := range []string{"[1,2],\n", " [a]\n", "a = [b]\n", "[\n", `["open`, "[]\n", "[a b]\n"} {
		if got, ok := headerKey(line); ok {
			t.Errorf("headerKey(%q) = %q, want no header", line, got)
		}
	}
}

// FuzzDecodePieces checks the claim decodeTOML rests on, on any text: when every piece of a
// text cut at its table headers decodes and no top-level key comes out of two pieces, the
// whole text decodes, to the same document. The text is cut at every header whose first key
// changes (pieces of any size), so small inputs exercise it.
func FuzzDecodePieces(f *testing.F) {
	for _, s := range []string{
		"a = 1\n[b]\nx = 1\n[c]\ny = 2\n",
		"[a]\nx = 1\n[b]\ny = 1\n[a.c]\nz = 1\n",
		"s = \"\"\"\n[b]\n\"\"\"\n[c]\nx = 1\n",
		"[[a]]\nn = 1\n[b]\n[[a]]\nn = 2\n",
		"x = [\n[\"b\"],\n]\n[c]\n",
		"a.b = 1\n[a]\nc = 2\n",
		"[a]\nb = {c = 1}\n[d]\n[a.b.e]\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		cuts := decodeCuts(src, 1<<20, 0)
		if len(cuts) == 0 {
			return
		}
		got, _, ok := decodePieces(src, cuts)
		if !ok {
			return
		}
		want, err := wholeDecode(src)
		if err != nil {
			t.Fatalf("the pieces decode and join but the whole text does not: %v", err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("pieces give %v, the whole text %v", got, want)
		}
	})
}
