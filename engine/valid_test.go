package engine_test

import (
	"math"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

func loadValid(t *testing.T, name string) *engine.Result {
	t.Helper()
	sh, diags := engine.Load(filepath.Join("..", "testdata", "valid", name), engine.Options{Library: lib})
	if err := diags.Err(); err != nil {
		t.Fatalf("load:\n%v", err)
	}
	r, diags := sh.Eval()
	if err := diags.Err(); err != nil {
		t.Fatalf("eval:\n%v", err)
	}
	return r
}

// Every valid sheet loads, evaluates and analyses without an error, and every quantity is known.
func TestValidSheets(t *testing.T) {
	files, _ := filepath.Glob("../testdata/valid/*.toml")
	if len(files) < 5 {
		t.Fatalf("want at least 5 valid sheets, found %d", len(files))
	}
	for _, path := range files {
		t.Run(filepath.Base(path), func(t *testing.T) {
			sh := loadValid(t, filepath.Base(path))
			for _, q := range sh.Sheet().Quantities() {
				if !sh.Known(q) {
					t.Errorf("%s is unknown", q.Name)
				}
			}
			for i, rq := range sh.Sheet().Requires {
				if _, known := sh.Pass(rq); !known {
					t.Errorf("requirement %d (%s) is unknown", i, rq.That)
				}
			}
			if _, diags := analysis.Analyze(sh, analysis.Options{Trials: 200, Seed: 1}); diags.HasErrors() {
				t.Errorf("analyze:\n%v", diags)
			}
		})
	}
}

// friisF is the noise factor of a cascade, Friis (1944): F = F1 + (F2−1)/G1 + (F3−1)/(G1·G2) + …
// (gains and noise factors linear).
func friisF(gainsDB, nfsDB []float64) float64 {
	f, g := 0.0, 1.0
	for i := range gainsDB {
		fi := math.Pow(10, nfsDB[i]/10)
		if i == 0 {
			f = fi
		} else {
			f += (fi - 1) / g
		}
		g *= math.Pow(10, gainsDB[i]/10)
	}
	return f
}

func TestValidLink(t *testing.T) {
	sh := loadValid(t, "link.toml")
	// SPEC §3: dBm − dB + dBi is dBm.
	eirp := 14 - 0.4 + 2.15
	near(t, "tx.eirp", value(t, sh, "tx.eirp", "dBm"), eirp, 1e-9)
	// ITU-R P.525-4 free-space loss plus the clutter allowance.
	loss := fsplDB(2400, 868e6) + 6
	near(t, "path.loss", value(t, sh, "path.loss", "dB"), loss, 1e-9)
	// Friis: a passive filter has G = −loss and NF = loss at T0 (SPEC §2 chains).
	nf := 10 * math.Log10(friisF([]float64{-1.8, 17}, []float64{1.8, 1.1}))
	near(t, "rx.nf", value(t, sh, "rx.nf", "dB"), nf, 1e-9)
	// k·T0·B with T0 = 290 K plus the noise figure.
	floor := ktbDBm(100e3, 290) + nf
	near(t, "rx.floor", value(t, sh, "rx.floor", "dBm"), floor, 1e-9)
	level := eirp - loss + 3
	near(t, "rx.level", value(t, sh, "rx.level", "dBm"), level, 1e-9)
	near(t, "link.margin", value(t, sh, "link.margin", "dB"), level-floor-8, 1e-9)
	// The margin is about 25 dB, so the requirement (>= 20 dB) passes.
	if pass, known := sh.Pass(sh.Sheet().Requires[0]); !known || pass != (level-floor-8 >= 20) {
		t.Errorf("requirement: known %v pass %v", known, pass)
	}
}

func TestValidGroups(t *testing.T) {
	sh := loadValid(t, "groups.toml")
	// SPEC §2 name look-up: own group first, then each enclosing group; dotted names absolute.
	near(t, "a.b.x = a.gain + 1 dB", value(t, sh, "a.b.x", "dB"), 5+1, 1e-12)
	near(t, "a.b.y = top_only + rx.extra", value(t, sh, "a.b.y", "dB"), 2+1, 1e-12)
	near(t, "a.b.w = a.gain", value(t, sh, "a.b.w", "dB"), 5, 1e-12)
	near(t, "a.b.c.z = a.b.x + a.gain + a.b.c.gain", value(t, sh, "a.b.c.z", "dB"), 6+5+10, 1e-12)
	near(t, "a.b.c.v = a.b.c.gain", value(t, sh, "a.b.c.v", "dB"), 10, 1e-12)
	near(t, "a.b.c.m = a.n * 2", value(t, sh, "a.b.c.m", ""), 8, 1e-12)

	p, _ := sh.Sheet().Quantity("a.p")
	if p.Note != "asymmetric" || p.Source != "measurement" || !p.Export || p.Show == nil || p.Show.Sym != "mW" {
		t.Errorf("a.p long form: note %q source %q export %v show %v", p.Note, p.Source, p.Export, p.Show)
	}
	// 14 dBm = 10^1.4 mW (definition of dBm).
	near(t, "a.p in mW", value(t, sh, "a.p", "mW"), math.Pow(10, 1.4), 1e-9)
	if tl := p.Tol; tl == nil || tl.Relative || tl.Dist != "uniform" {
		t.Fatalf("a.p tolerance: %+v", tl)
	}
	pv, _ := p.Nominal()
	lo, hi, err := p.Tol.Limits(pv)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "a.p low limit", lo.V+30, 13.5, 1e-12) // 14 dBm − 0.5 dB (stored as dB re 1 W)
	near(t, "a.p high limit", hi.V+30, 15.5, 1e-12)

	d, _ := sh.Sheet().Quantity("a.d")
	if d.Tol == nil || !d.Tol.Relative || d.Tol.Dist != "normal" {
		t.Fatalf("a.d tolerance: %+v", d.Tol)
	}
	dv, _ := d.Nominal()
	lo, hi, _ = d.Tol.Limits(dv)
	near(t, "a.d low limit", lo.V, 1800, 1e-9) // 2 km − 10 %
	near(t, "a.d high limit", hi.V, 2200, 1e-9)
}

func TestValidChain(t *testing.T) {
	sh := loadValid(t, "chain.toml")
	gains := []float64{-1.5, 15, 10 - 2}
	// te = 75 K is NF = 10·log10(1 + Te/T0), T0 = 290 K (IEEE definition).
	nfs := []float64{1.5, 10 * math.Log10(1+75.0/290), 8}
	f := friisF(gains, nfs)
	near(t, "rx.gain", value(t, sh, "rx.gain", "dB"), 21.5, 1e-9) // gains in dB add
	near(t, "rx.nf", value(t, sh, "rx.nf", "dB"), 10*math.Log10(f), 1e-9)
	near(t, "rx.te", value(t, sh, "rx.te", "K"), 290*(f-1), 1e-6) // Te = T0·(F − 1)

	g := func(db float64) float64 { return math.Pow(10, db/10) }
	// Cascaded intercept: 1/IIP3 = Σ G_before,i / IIP3_i (linear mW); the LNA's IIP3 is
	// OIP3 − G = 20 − 15 = 5 dBm (definition of the output-referred intercept).
	inv := 1/g(40) + g(-1.5)/g(5) + g(-1.5)*g(15)/g(5)
	near(t, "rx.iip3", value(t, sh, "rx.iip3", "dBm"), -10*math.Log10(inv), 1e-9)
	// 1 dB compression: input point = output point − G + 1 dB (the gain is 1 dB down there);
	// the filter has none, so it does not limit.
	inv = g(-1.5)/g(10-15+1) + g(-1.5)*g(15)/g(-5)
	near(t, "rx.ip1db", value(t, sh, "rx.ip1db", "dBm"), -10*math.Log10(inv), 1e-9)
}

func TestValidLiterals(t *testing.T) {
	sh := loadValid(t, "literals.toml")
	// SPEC §3: dBm/Hz + dBHz is dBm; −174 dBm/Hz is a level, not the negation of one.
	noise := -174 + 10*math.Log10(100e3)
	near(t, "calc.noise", value(t, sh, "calc.noise", "dBm"), noise, 1e-9)
	near(t, "calc.n0", value(t, sh, "calc.n0", "dBm/Hz"), -174, 1e-12)
	near(t, "calc.cable = 0.3 dB/m × 10 m", value(t, sh, "calc.cable", "dB"), 3, 1e-12) // a rate × a length
	near(t, "calc.twice = 6dB*2", value(t, sh, "calc.twice", "dB"), 12, 1e-12)          // number × ratio
	near(t, "calc.pick (2.4 km > 1 km)", value(t, sh, "calc.pick", "dB"), 3, 1e-12)
	near(t, "calc.other", value(t, sh, "calc.other", "dB"), 0.5, 1e-12)
	near(t, "calc.lin", value(t, sh, "calc.lin", "W"), 0.025, 1e-15)
	near(t, "calc.margin", value(t, sh, "calc.margin", "dB"), -90-noise-3-12-3, 1e-9)
	near(t, "calc.power = 1 kHz × 2 s", value(t, sh, "calc.power", ""), 2000, 1e-9)
	near(t, "calc.neg = x − 3 dB", value(t, sh, "calc.neg", "dB"), 7, 1e-12)
	// margin = −90 + 124 − 18 = 16 dB ≥ 0, and 25 mW ≥ 20 mW; pick is 3 dB, 25 mW ≈ 14 dBm ≥ 13 dBm.
	for i, rq := range sh.Sheet().Requires {
		if pass, known := sh.Pass(rq); !known || !pass {
			t.Errorf("requirement %d (%s): known %v pass %v", i, rq.That, known, pass)
		}
	}
}

func TestValidParts(t *testing.T) {
	sh := loadValid(t, "parts.toml")
	// SPEC §2 parts: the part's quantities come in under its name; dB + dBi is dBi.
	near(t, "rx.gain", value(t, sh, "rx.gain", "dBi"), 17+5, 1e-12)
	near(t, "lna.doubled", value(t, sh, "lna.doubled", "dB"), 34, 1e-12) // bare name resolved inside the part
	near(t, "rx.twice", value(t, sh, "rx.twice", "dB"), 34, 1e-12)
	near(t, "lna.bias.current", value(t, sh, "lna.bias.current", "A"), 0.012, 1e-15)
	if sh.Sheet().Title != "A sheet that uses parts" {
		t.Errorf("title %q: a part's title must not replace the sheet's", sh.Sheet().Title)
	}
	if len(sh.Sheet().Parts) != 2 {
		t.Errorf("parts: %v", sh.Sheet().Parts)
	}
}

// SPEC §2: groups are sections of the report in file order, also when a table is only implied
// by [a.b] or [[a.chain]].
func TestGroupsInFileOrder(t *testing.T) {
	sh := evalSrc(t, `[[rx.chain]]
gain = "10 dB"
[link]
m = "1 dB"
[path.fresnel]
r = "3 m"
[alpha]
x = "1 dB"
`)
	var names []string
	for _, g := range sh.Sheet().Groups {
		names = append(names, g.Name)
	}
	want := []string{"", "rx", "link", "path", "path.fresnel", "alpha"}
	if !reflect.DeepEqual(names, want) {
		t.Errorf("groups %q, want %q", names, want)
	}
}
