package rflib_test

import (
	"go/ast"
	"go/parser"
	"go/token"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/internal/rflib"
)

// calledInTests collects the function names called inside the formula strings of this
// package's test files (an identifier followed by "(" in any string literal).
func calledInTests(t *testing.T) map[string]bool {
	t.Helper()
	files, err := filepath.Glob("*_test.go")
	if err != nil {
		t.Fatal(err)
	}
	call := regexp.MustCompile(`([A-Za-z_][A-Za-z0-9_]*)\(`)
	seen := map[string]bool{}
	fset := token.NewFileSet()
	for _, name := range files {
		f, err := parser.ParseFile(fset, name, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		ast.Inspect(f, func(n ast.Node) bool {
			lit, ok := n.(*ast.BasicLit)
			if !ok || lit.Kind != token.STRING {
				return true
			}
			s, err := strconv.Unquote(lit.Value)
			if err != nil {
				return true
			}
			for _, m := range call.FindAllStringSubmatch(s, -1) {
				seen[m[1]] = true
			}
			return true
		})
	}
	return seen
}

// TestLibraryComplete checks that every built-in function has a doc line, a source, a
// signature naming it, and at least one test calling it through a worksheet formula.
func TestLibraryComplete(t *testing.T) {
	called := calledInTests(t)
	lib := rflib.Library()
	fs := lib.Funcs()
	for _, f := range fs {
		if strings.TrimSpace(f.Doc) == "" {
			t.Errorf("%s: no doc", f.Name)
		}
		if strings.TrimSpace(f.Source) == "" {
			t.Errorf("%s: no source", f.Name)
		}
		if sig := f.Signature(); !strings.HasPrefix(sig, f.Name+"(") || !strings.Contains(sig, "->") {
			t.Errorf("%s: signature %q", f.Name, sig)
		}
		if f.Call == nil {
			t.Errorf("%s: no Call", f.Name)
		}
		if f.Infer == nil {
			if _, err := f.ResultType(nil); err != nil {
				t.Errorf("%s: result unit %q: %v", f.Name, f.Result, err)
			}
		} else if f.ResultDoc == "" {
			t.Errorf("%s: an inferred result needs a ResultDoc for the signature", f.Name)
		}
		if !called[f.Name] {
			t.Errorf("%s: no test calls it", f.Name)
		}
	}
	// Every function the brief names is present.
	for _, name := range strings.Fields(`sqrt abs min max log10 ln exp db lin dbm dbw watts dbhz dbk to psum pdiff
		wavelength fspl logdist tworay hata cost231 fresnel horizon rain rayleigh_margin
		thermal nf_to_te te_to_nf sensitivity cascade_gain cascade_nf cascade_te cascade_iip3 cascade_oip3 cascade_ip1db
		im3 sfdr ber ebn0_for ebn0 snr shannon per symbol_rate net_rate
		dish_gain aperture vswr_to_rl rl_to_vswr mismatch_loss cn0
		sin cos tan asin acos atan atan2 log2 floor ceil round slant_range gas_specific gas_loss rain_los rain_es
		sky_noise fresnel_v knife_edge beamwidth pointing_loss pol_loss field_strength pfd lognormal_margin
		recip_mix desense max_blocker im2 hd2 hd3 cascade_iip2 image_reject acir adc_snr`) {
		if _, ok := lib.Lookup(name); !ok {
			t.Errorf("%s: missing from the library", name)
		}
	}
}
