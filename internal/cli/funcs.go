package cli

import (
	"fmt"
	"math"
	"strings"

	"github.com/rfledger/rfledger/internal/rflib"
	"github.com/rfledger/rfledger/units"
)

func cmdFuncs(e *Env, args []string) int {
	fs := newFlags(e, "funcs")
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) > 0 {
		return usageErr(e, "funcs", "takes no arguments")
	}
	fmt.Fprintln(e.Stdout, "Built-in functions. Arguments are checked by dimension; decibel and linear forms convert where the signature says so.")
	fmt.Fprintln(e.Stdout, "Names in quotes are written with single quotes: ber('qpsk', ebn0). Constants: pi, c0 (speed of light), kB (Boltzmann), T0 = 290 K.")
	for _, f := range rflib.Library().Funcs() {
		fmt.Fprintf(e.Stdout, "\n%s\n    %s\n    source: %s\n", f.Signature(), f.Doc, f.Source)
	}
	return ExitOK
}

func cmdUnits(e *Env, args []string) int {
	fs := newFlags(e, "units")
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) > 0 {
		return usageErr(e, "units", "takes no arguments")
	}
	fmt.Fprint(e.Stdout, unitsHelp)
	plain, prefixed := symbolLists()
	fmt.Fprintf(e.Stdout, "\nUnit symbols (as written, without a prefix):\n  %s\n", strings.Join(plain, " "))
	fmt.Fprintf(e.Stdout, "Common prefixed forms (any SI prefix works on the linear units above that take one):\n  %s\n", strings.Join(prefixed, " "))
	return ExitOK
}

// symbolLists splits the unit table's symbols into plain symbols and prefixed forms, each
// spelling once: the micro sign and Greek mu, and the ohm sign and Greek omega, are one
// symbol each (Unicode NFKC folds them; both spellings parse).
func symbolLists() (plain, prefixed []string) {
	fold := strings.NewReplacer("\u03bc", "\u00b5", "\u2126", "\u03a9")
	seen := map[string]bool{}
	var all []string
	for _, s := range units.KnownUnits() {
		s = fold.Replace(s)
		if !seen[s] {
			seen[s] = true
			all = append(all, s)
		}
	}
	for _, s := range all {
		if isPrefixed(s, seen) {
			prefixed = append(prefixed, s)
		} else {
			plain = append(plain, s)
		}
	}
	return plain, prefixed
}

// siPrefixes are the prefixes linear units take, with their factors.
var siPrefixes = map[string]float64{"p": 1e-12, "n": 1e-9, "u": 1e-6, "\u00b5": 1e-6, "m": 1e-3, "c": 1e-2, "k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12}

// isPrefixed reports whether sym is an SI prefix on another known symbol (km, Mbit/s) rather
// than a symbol of its own that merely starts with a prefix letter (min, mi, nmi, ppm).
func isPrefixed(sym string, known map[string]bool) bool {
	for p, f := range siPrefixes {
		rest, ok := strings.CutPrefix(sym, p)
		if !ok || !known[rest] {
			continue
		}
		u, err1 := units.ParseUnit(sym)
		r, err2 := units.ParseUnit(rest)
		if err1 == nil && err2 == nil && u.K == units.Linear && u.D == r.D && math.Abs(u.Scale/(f*r.Scale)-1) < 1e-9 {
			return true
		}
	}
	return false
}

const unitsHelp = `Units

Linear units take SI prefixes p n u/µ m c k M G T:
  Hz m s W V A ohm/Ω K J g bit bit/s (bps) Bd (sym/s)
  without prefixes: % ppm deg rad min h ft mi nmi
  compounds with * / ^: m^2, W/m^2, mm/h, bit/s/Hz, kbit/s
bit and sym are counts, so bit/s has the dimension of Hz.
  weather: hPa (= 100 Pa), g/m^3 (water vapour density), degC or °C (temperature)
A temperature in degC is an absolute temperature: 15 degC is read as 288.15 K, and what is
computed from it is shown in K (25 degC - 15 degC = 10 K); write differences and tolerances
in K. degC takes no prefix and enters no compound unit (W/degC is refused).

Decibel units (a level is the log of a linear value with a reference):
  ratios      dB dBi dBd (= dBi - 2.15 dB) dBc dBFS
  phase noise dBc/Hz (a density relative to the carrier)
  power       dBm dBW         densities  dBm/Hz dBW/Hz dBm/MHz
  bandwidth   dBHz (dB-Hz)    temperature dBK   G/T dB/K
  voltage     dBV dBmV dBuV   field      dBuV/m
  Boltzmann   dBW/K/Hz        per kelvin dBW/K
  rates       dB/km dB/m dB/100m dB/ft (decibels per length: times a length gives dB)

Rules:
  dBm + dB -> dBm        dBm - dBm -> dB       dB + dB -> dB
  dBm/Hz + dBHz -> dBm   dBm - dBHz -> dBm/Hz  dBW - dBK -> dBW/K
  dBW + dB/K - dBW/K/Hz -> dBHz (C/N0)
  dBc/Hz + dBHz -> dBc   dBm + dBc -> dBm      dBc + dB -> dBc     dBc - dBc -> dB
  number * dB -> dB      dB/km * km -> dB
  dBm + dBm   error: adding levels multiplies the powers; psum(a, b) adds powers
  W + dB      error: convert with dbm() or watts()
  number * dBm, dB * dB   error
Comparisons work across decibel and linear forms of one dimension (p >= 25 mW with p in dBm);
a plain number never compares with decibels (write 0 dB, not 0).
Display: inputs keep the unit they were written in; results take the unit the algebra gives
(decibels to 2 decimals, linear values in engineering notation); show = "unit" overrides.
`
