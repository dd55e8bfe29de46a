package rflib

import (
	"fmt"
	"math"
	"strings"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

var uM = unit("m")
var uDB = unit("dB")

var (
	uDBkm = unit("dB/km")
	uMMh  = unit("mm/h")
)

var propagation = []*engine.Func{
	{
		Name: "wavelength", Args: []engine.Arg{lin("f", units.Frequency)}, Result: "m",
		Doc: "Free-space wavelength λ = c0 / f.", Source: "ITU-R P.525 (c0 = 299 792 458 m/s, SI definition)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return result(rfmath.Wavelength(q(a, 0)), uM, "wavelength")
		},
	},
	{
		Name: "fspl", Args: []engine.Arg{lin("d", units.Length), lin("f", units.Frequency)}, Result: "dB",
		Doc: "Free-space path loss between isotropic antennas, 20·log10(4π d f / c0) (Friis transmission formula).", Source: "ITU-R P.525-4, eq. (4)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			d, f := q(a, 0), q(a, 1)
			if d < 2*rfmath.Wavelength(f) {
				c.Warn("distance %s is within two wavelengths: the far-field free-space formula does not hold", units.Lin(d, units.Length))
			}
			return result(rfmath.FSPL(d, f), uDB, "path loss")
		},
	},
	{
		Name: "logdist", Args: []engine.Arg{lin("d", units.Length), lin("f", units.Frequency), lin("d0", units.Length), lin("n", units.None)}, Result: "dB",
		Doc:    "Log-distance path loss: free space out to the reference distance d0, then 10·n·log10(d/d0) with path-loss exponent n (2 free space, about 2.7–3.5 urban, 4–6 obstructed indoor). Warns when d < d0, where the model only extrapolates.",
		Source: "Rappaport, Wireless Communications: Principles and Practice, log-distance path loss model; free-space anchor ITU-R P.525-4",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			d, f, d0, n := q(a, 0), q(a, 1), q(a, 2), q(a, 3)
			switch {
			case !(d0 > 0):
				return units.Q{}, fmt.Errorf("the reference distance d0 = %s must be positive", units.Lin(d0, units.Length))
			case n < 0:
				return units.Q{}, fmt.Errorf("the path-loss exponent n = %g is negative: the loss would fall with distance", n)
			case n < 1.6 || n > 6:
				// Rappaport, Table 4.2 (recalled from memory): measured exponents run from
				// 1.6–1.8 (line of sight in buildings) to 4–6 (obstructed in buildings).
				c.Warn("logdist: the path-loss exponent n = %g is outside 1.6–6, the range of measured environments; check it (2 is free space)", n)
			}
			if d > 0 && d < d0 {
				c.Warn("logdist: distance %s is shorter than the reference distance d0 = %s; the model is anchored at d0 and only extrapolates below it",
					units.Lin(d, units.Length), units.Lin(d0, units.Length))
			}
			return result(rfmath.LogDistance(d, f, d0, n), uDB, "path loss")
		},
	},
	{
		Name: "tworay", Args: []engine.Arg{lin("d", units.Length), lin("ht", units.Length), lin("hr", units.Length), optional(lin("f", units.Frequency))}, Result: "dB",
		Doc: "Two-ray ground-reflection path loss, large-distance asymptote 40·log10(d) − 20·log10(ht) − 20·log10(hr) (isotropic antennas, flat perfectly reflecting ground; independent of frequency). " +
			"With f given, warns when d is shorter than the crossover distance 4π·ht·hr/λ, where the asymptote is optimistic and free space is the better estimate; without f no crossover check is made.",
		Source: "Rappaport, Wireless Communications: Principles and Practice, two-ray ground reflection model",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			f := math.SmallestNonzeroFloat64 // no frequency: λ → ∞, crossover distance 0, so no check
			if has(a, 3) {
				f = q(a, 3)
			}
			loss, notes := rfmath.TwoRay(q(a, 0), q(a, 1), q(a, 2), f)
			if math.IsNaN(loss) {
				return units.Q{}, fmt.Errorf("%s", strings.Join(notes, "; "))
			}
			warnFn(c, "tworay", notes)
			return result(loss, uDB, "path loss")
		},
	},
	{
		Name: "hata", Args: []engine.Arg{lin("f", units.Frequency), lin("d", units.Length), lin("hb", units.Length), lin("hm", units.Length), text("env")}, Result: "dB",
		Doc: "Okumura–Hata median path loss: 69.55 + 26.16·log f − 13.82·log hb − a(hm) + (44.9 − 6.55·log hb)·log d (f in MHz, d in km), " +
			"env 'urban' (small/medium city a(hm)), 'urban-large' (large-city a(hm)), 'suburban' (− 2·(log(f/28))² − 5.4), 'open' (− 4.78·(log f)² + 18.33·log f − 40.94). " +
			"Valid for 150–1500 MHz, 1–20 km, hb 30–200 m, hm 1–10 m; outside, a warning names the input.",
		Source: "M. Hata, Empirical formula for propagation loss in land mobile radio services, IEEE Trans. Veh. Technol. VT-29(3), 1980",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			loss, notes, err := rfmath.Hata(q(a, 0), q(a, 1), q(a, 2), q(a, 3), a[4].Text)
			if err != nil {
				return units.Q{}, clean(err)
			}
			warnFn(c, "hata", notes)
			return result(loss, uDB, "path loss")
		},
	},
	{
		Name: "cost231", Args: []engine.Arg{lin("f", units.Frequency), lin("d", units.Length), lin("hb", units.Length), lin("hm", units.Length), text("env")}, Result: "dB",
		Doc: "COST 231–Hata median path loss: 46.3 + 33.9·log f − 13.82·log hb − a(hm) + (44.9 − 6.55·log hb)·log d + Cm (f in MHz, d in km, small/medium-city a(hm)), " +
			"Cm = 0 dB for env 'medium' (medium cities, suburban centres), 3 dB for 'metro' (metropolitan centres). Valid for 1500–2000 MHz, 1–20 km, hb 30–200 m, hm 1–10 m; outside, a warning names the input.",
		Source: "COST Action 231 final report, Digital mobile radio towards future generation systems (1999), COST 231–Hata model",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			loss, notes, err := rfmath.COST231(q(a, 0), q(a, 1), q(a, 2), q(a, 3), a[4].Text)
			if err != nil {
				return units.Q{}, clean(err)
			}
			warnFn(c, "cost231", notes)
			return result(loss, uDB, "path loss")
		},
	},
	{
		Name: "fresnel", Args: []engine.Arg{lin("d1", units.Length), lin("d2", units.Length), lin("f", units.Frequency), optional(lin("n", units.None))}, Result: "m",
		Doc:    "Radius of the n-th Fresnel zone (n = 1 by default) at d1 from one end and d2 from the other: sqrt(n·λ·d1·d2/(d1 + d2)). Keep at least 60 % of the first zone clear of obstacles.",
		Source: "ITU-R P.526 (Fresnel ellipsoids and zones)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			n := 1.0
			if has(a, 3) {
				n = q(a, 3)
			}
			if !(n >= 1 && n <= 1e6) || n != math.Trunc(n) {
				return units.Q{}, fmt.Errorf("n: the zone number must be a whole number from 1 (got %s)", units.FormatNum(n))
			}
			d1, d2 := q(a, 0), q(a, 1)
			if d1 < 0 || d2 < 0 || !(d1+d2 > 0) {
				return units.Q{}, fmt.Errorf("the distances must not be negative and must not both be zero")
			}
			return result(rfmath.Fresnel(d1, d2, q(a, 2), int(n)), uM, "Fresnel radius")
		},
	},
	{
		Name: "horizon", Args: []engine.Arg{lin("h", units.Length), optional(lin("k", units.None))}, Result: "m",
		Doc:    "Distance to the radio horizon from an antenna at height h over a smooth Earth: sqrt(2·k·R·h), R = 6371 km, effective Earth-radius factor k (4/3 by default, the standard atmosphere). For a link, add both ends' horizons.",
		Source: "ITU-R P.452 (effective Earth radius a_e = k·6371 km, k = 4/3 median); ITU-R P.834 (effective Earth-radius factor)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			k := 4.0 / 3
			if has(a, 1) {
				k = q(a, 1)
			}
			if !(k > 0) {
				return units.Q{}, fmt.Errorf("k: the effective Earth-radius factor must be positive (got %s)", units.FormatNum(k))
			}
			if h := q(a, 0); !(h >= 0) {
				return units.Q{}, fmt.Errorf("h: the antenna height must not be negative (got %s)", units.Lin(h, units.Length))
			}
			return result(rfmath.Horizon(q(a, 0), k), uM, "horizon distance")
		},
	},
	{
		Name: "rain", Args: []engine.Arg{lin("f", units.Frequency), lin("rate", units.Speed), text("pol")}, Result: "dB/km",
		Doc: "Specific attenuation due to rain, γ = k·R^α dB/km, for rain rate R (mm/h) and polarisation 'h' (horizontal) or 'v' (vertical), with k and α from the frequency regressions. " +
			"Multiply by an effective path length to get dB. Valid for 1–1000 GHz; outside, a warning.",
		Source: "ITU-R P.838-3, Specific attenuation model for rain for use in prediction methods (2005), eqs. (1)–(3), Tables 1–4",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			rate, err := a[1].Q.In(uMMh)
			if err != nil {
				return units.Q{}, err
			}
			g, notes, err := rfmath.Rain(q(a, 0), rate, a[2].Text)
			if err != nil {
				return units.Q{}, clean(err)
			}
			warnFn(c, "rain", notes)
			return result(g, uDBkm, "specific attenuation")
		},
	},
	{
		Name: "rayleigh_margin", Args: []engine.Arg{lin("availability", units.None)}, Result: "dB",
		Doc: "Fade margin over the mean received power that a Rayleigh-faded signal exceeds with probability availability (0.99 or 99 %): −10·log10(−ln availability); " +
			"about 20 dB for 99 %, 30 dB for 99.9 %.",
		Source: "Rayleigh fading: exponentially distributed received power (Sklar, Digital Communications, ch. 15; Proakis, Digital Communications, fading multipath channels)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			m, err := rfmath.RayleighMargin(q(a, 0))
			if err != nil {
				return units.Q{}, clean(err)
			}
			return result(m, uDB, "fade margin")
		},
	},
}
