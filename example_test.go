package rfledger_test

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"strings"
	"testing/fstest"

	"github.com/rfledger/rfledger"
	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// The demo's values printed below are checked elsewhere against closed forms:
//   - link.margin (12.50 dB) and rx.sensitivity (-118.82 dBm): engine's
//     TestDemoMatchesHandWritten, which computes every quantity of the demo by hand;
//   - a 10 % longer path costs 10·n·log10(1.1) = 31·0.04139 = 1.28 dB of margin with the
//     demo's log-distance exponent n = 3.1 (log-distance model PL(d) = PL(d0) + 10·n·log10(d/d0),
//     Rappaport, "Wireless Communications", 2nd ed., section 4.9.1; section number recalled
//     from memory);
//   - the range where the margin reaches 0 dB is 2.4 km · 10^(12.505 / 31) = 6.08 km, by the
//     same model (only the distance term changes with the distance).

// Load a bundled worksheet with the built-in functions, evaluate it, read a value and the
// requirements, and run the analyses.
func Example() {
	sh, diags := rfledger.Load("worksheets/field-probe-uplink.toml")
	if diags.HasErrors() {
		fmt.Println(diags)
		return
	}
	r, _ := sh.Eval()
	margin, _ := sh.Quantity("link.margin")
	fmt.Println("link.margin =", r.Display(margin))
	for _, rq := range sh.Requires {
		pass, known := r.Pass(rq)
		fmt.Printf("%s: pass=%v\n", rq.That, pass && known)
	}

	a, _ := analysis.Analyze(r, analysis.Options{Trials: 1000, Seed: 1})
	for _, s := range a.Sensitivity {
		if s.Input == "path.distance" {
			fmt.Printf("%s +%s: %+.2f %s\n", s.Input, s.Per, s.Change, a.ChangeUnit)
		}
	}
	for _, so := range a.Solves {
		fmt.Printf("%s: %s = %.2f %s\n", so.Solve.Name, so.Solve.Vary, so.Value, so.Unit)
	}
	// Output:
	// link.margin = 12.50 dB
	// link.margin >= 10 dB: pass=true
	// tx.eirp <= 25 mW: pass=true
	// path.distance +10 %: -1.28 dB
	// max_range: path.distance = 6.08 km
}

// Evaluate with inputs replaced, as a test rig does with what it measured on the unit: here a
// transmitter that delivers 3 dB less than the worksheet assumes (11 dBm, not 14 dBm), so the
// margin drops by the same 3 dB (the power enters the margin as a plain decibel term) and the
// 10 dB requirement no longer holds.
func Example_overrides() {
	sh, _ := rfledger.Load("worksheets/field-probe-uplink.toml")
	r, diags := sh.Eval(engine.Override{Name: "tx.power", Value: "11 dBm"})
	if diags.HasErrors() {
		fmt.Println(diags)
		return
	}
	margin, _ := sh.Quantity("link.margin")
	fmt.Println("link.margin =", r.Display(margin))
	for _, rq := range sh.Requires {
		if pass, _ := r.Pass(rq); !pass {
			fmt.Printf("fails: %s (%s)\n", rq.That, rq.Note)
		}
	}
	// Output:
	// link.margin = 9.50 dB
	// fails: link.margin >= 10 dB (fade allowance agreed for wet foliage and rain on the canopy)
}

// A worksheet compiled into the program (an embed.FS, or here an in-memory one). Free-space
// loss over 1 km at 2.4 GHz is 20·log10(4π·d·f/c) = 32.45 + 20·log10(2400) + 20·log10(1) =
// 100.05 dB (free-space basic transmission loss, ITU-R P.525-4 eq. (6) as recalled from
// memory, which rounds the constant to 32.4).
func ExampleLoadFS() {
	fsys := fstest.MapFS{"hop.toml": {Data: []byte(`
[path]
distance  = "1 km"
frequency = "2.4 GHz"
loss      = "= fspl(distance, frequency)"
`)}}
	sh, diags := rfledger.LoadFS(fsys, "hop.toml")
	if diags.HasErrors() {
		fmt.Println(diags)
		return
	}
	r, _ := sh.Eval()
	loss, _ := sh.Quantity("path.loss")
	fmt.Println(r.Display(loss))
	// Output:
	// 100.05 dB
}

// Look up a built-in function and its signature.
func ExampleLibrary() {
	f, ok := rfledger.Library().Lookup("fspl")
	fmt.Println(ok, f.Signature())
	// Output:
	// true fspl(d: length, f: frequency) -> dB
}

// Write the JSON contract to a buffer and read it back as a script would. Every quantity
// carries its value in SI units beside the unit it is shown in: the demo's distance, written
// "2.4 km", is 2400 m.
func ExampleWriteJSON() {
	sh, _ := rfledger.Load("worksheets/field-probe-uplink.toml")
	r, diags := sh.Eval()
	var buf bytes.Buffer
	if err := rfledger.WriteJSON(&buf, rfledger.Report{Result: r, Warnings: diags}); err != nil {
		fmt.Println(err)
		return
	}
	var doc struct {
		Format     int
		Pass       bool
		Quantities map[string]struct {
			Value  float64
			Unit   string
			SI     float64 `json:"si"`
			SIUnit string  `json:"si_unit"`
		}
	}
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		fmt.Println(err)
		return
	}
	d := doc.Quantities["path.distance"]
	fmt.Printf("format %d, pass %v, path.distance = %g %s = %g %s\n", doc.Format, doc.Pass, d.Value, d.Unit, d.SI, d.SIUnit)
	// Output:
	// format 2, pass true, path.distance = 2.4 km = 2400 m
}

// Write the budget page, with its analyses, to a buffer; the charts it links come back to be
// written beside it.
func ExampleWriteMarkdown() {
	sh, diags := rfledger.Load("worksheets/field-probe-uplink.toml")
	r, ediags := sh.Eval()
	a, adiags := analysis.Analyze(r, analysis.Options{Trials: 1000, Seed: 1})
	warnings := append(append(diags, ediags...), adiags...)
	var page bytes.Buffer
	charts, err := rfledger.WriteMarkdown(&page, rfledger.Report{Result: r, Analysis: a, Warnings: warnings}, "field-probe")
	if err != nil {
		fmt.Println(err)
		return
	}
	title, _, _ := strings.Cut(page.String(), "\n")
	fmt.Println(title)
	linked := len(charts) > 0
	for _, c := range charts {
		linked = linked && strings.Contains(page.String(), "]("+c.Name+")") && strings.HasPrefix(c.Name, "field-probe.")
	}
	fmt.Println("every chart linked:", linked)
	// Output:
	// # Field probe uplink, 868 MHz
	// every chart linked: true
}

// Write the firmware header of the quantities marked export.
func ExampleWriteCHeader() {
	sh, _ := rfledger.Load("worksheets/field-probe-uplink.toml")
	r, _ := sh.Eval()
	var buf bytes.Buffer
	if err := rfledger.WriteCHeader(&buf, r, rfledger.HeaderOptions{Prefix: "PROBE", Type: "double"}); err != nil {
		fmt.Println(err)
		return
	}
	sc := bufio.NewScanner(&buf)
	for sc.Scan() {
		if strings.HasPrefix(sc.Text(), "#define PROBE_RX") {
			fmt.Println(sc.Text())
		}
	}
	// Output:
	// #define PROBE_RX_SENSITIVITY_DBM (-118.81929288263248)
}
