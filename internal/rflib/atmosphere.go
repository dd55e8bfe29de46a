package rflib

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

// Atmospheric gases, rain on a path and the sky noise they add.

func init() { extra = append(extra, atmosphere...) }

// gasArgs reads the optional meteorological arguments from index i on: water vapour density
// (g/m³), total pressure (hPa) and temperature (K), with ITU-R P.676's standard defaults.
func gasArgs(a []engine.Value, i int) (rho, p, t float64) {
	rho, p, t = rfmath.StdRho, rfmath.StdPressure, rfmath.StdTemp
	if has(a, i) {
		rho = q(a, i) * 1e3 // kg/m³ → g/m³
	}
	if has(a, i+1) {
		p = q(a, i+1) / 100 // Pa → hPa
	}
	if has(a, i+2) {
		t = q(a, i+2)
	}
	return rho, p, t
}

// percent returns argument i, a time percentage given as a fraction or with "%" (0.01 % is
// 1e-4), in percent.
func percent(a []engine.Value, i int) float64 { return q(a, i) * 100 }

// rainRate returns argument i in mm/h.
func rainRate(a []engine.Value, i int) (float64, error) {
	r, err := a[i].Q.In(uMMh)
	if err != nil {
		return math.NaN(), err
	}
	if r < 0 {
		return math.NaN(), fmt.Errorf("r001: a rain rate cannot be negative (got %s mm/h)", units.FormatNum(r))
	}
	return r, nil
}

// warnAvailability warns when a time percentage p (in %) looks like an availability (99.99 %)
// given where the outage share (0.01 %) is meant.
func warnAvailability(c *engine.Call, fn string, p float64) {
	if p >= 50 {
		c.Warn("%s: p = %s %% looks like an availability; p is the share of the year the fade is exceeded (for 99.99 %% availability write 0.01 %%)", fn, units.FormatNum(p))
	}
}

// checkPct checks a time percentage: strictly between 0 and 100 %.
func checkPct(p float64) error {
	if !(p > 0 && p < 100) {
		return &units.Error{Msg: fmt.Sprintf("p: the time percentage must lie strictly between 0 %% and 100 %% (got %s %%)", units.FormatNum(p)), Hint: "write it with its unit, e.g. 0.01 %"}
	}
	return nil
}

var gasOptional = []engine.Arg{optional(lin("rho", units.Density)), optional(lin("p", units.Pressure)), optional(lin("t", units.Temperature))}

const gasDefaults = "rho is the water vapour density (7.5 g/m^3 by default), p the total barometric pressure (1013.25 hPa), t the air temperature (15 degC = 288.15 K by default; a value written in degC is converted to kelvin, t + 273.15)"

var atmosphere = []*engine.Func{
	{
		Name: "gas_specific", Args: append([]engine.Arg{lin("f", units.Frequency)}, gasOptional...), Result: "dB/km",
		Doc: "Specific attenuation of oxygen and water vapour, γo + γw, by the approximate method (closed-form fits in f, rp = p/1013, rt = 288/(273 + t°C)); " +
			gasDefaults + ". Multiply by a terrestrial path length to get dB. Valid for 1–350 GHz; outside, a warning. " +
			"P.676-10 is the last edition with these fits (P.676-11 on use a line sum): at sea level they are within 0.5 % of P.676-13 below 5 GHz and at 22 GHz and up to 8 % higher at 10–45 GHz.",
		Source: "ITU-R P.676-10 (09/2013), Attenuation by atmospheric gases, Annex 2 §1",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			rho, p, t := gasArgs(a, 1)
			g, notes, err := rfmath.GasSpecific(q(a, 0), rho, p, t)
			if err != nil {
				return units.Q{}, clean(err)
			}
			warnFn(c, "gas_specific", notes)
			return result(g, uDBkm, "specific attenuation")
		},
	},
	{
		Name: "gas_loss", Args: append([]engine.Arg{lin("f", units.Frequency), angleArg("elev")}, gasOptional...), Result: "dB",
		Doc: "Attenuation by atmospheric gases on an Earth–space path from a station near sea level at elevation elev: (γo·ho + γw·hw)/sin elev with the equivalent heights ho, hw of oxygen and water vapour " +
			"(below 5°, the Recommendation's curved-Earth form with Re = 8500 km); " + gasDefaults + ". Valid for 1–350 GHz and 5°–90°; outside, a warning.",
		Source: "ITU-R P.676-10 (09/2013), Annex 2 §2.2 (slant paths, equivalent heights)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			e, err := elevation(a, 1, "elev")
			if err != nil {
				return units.Q{}, err
			}
			rho, p, t := gasArgs(a, 2)
			g, notes, err := rfmath.GasLoss(q(a, 0), e, rho, p, t)
			if err != nil {
				return units.Q{}, clean(err)
			}
			warnFn(c, "gas_loss", notes)
			return result(g, uDB, "gaseous attenuation")
		},
	},
	{
		Name: "sky_noise", Args: []engine.Arg{ratio("a"), optional(lin("tm", units.Temperature))}, Result: "K",
		Doc: "Rise of an antenna's noise temperature caused by an absorbing medium of attenuation a in its beam (rain, gases, clouds): Tm·(1 − 10^(−a/10)), " +
			"with the medium's mean radiating temperature tm (275 K by default, the value suggested for rain; the 2.7 K cosmic background the medium dims is neglected). Add it to the clear-sky antenna temperature.",
		Source: "ITU-R P.618-13 §3 (sky noise temperature)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			tm := 275.0
			if has(a, 1) {
				tm = q(a, 1)
			}
			if q(a, 0) < 0 {
				return units.Q{}, fmt.Errorf("a: an attenuation is written as a positive number of dB (got %s)", units.DB(q(a, 0)))
			}
			if !(tm >= 0) {
				return units.Q{}, fmt.Errorf("tm: the medium's temperature must not be negative (got %s)", units.Lin(tm, units.Temperature))
			}
			return result(rfmath.SkyNoise(q(a, 0), tm), uK, "noise temperature")
		},
	},
	{
		Name: "rain_los", Args: []engine.Arg{lin("f", units.Frequency), lin("d", units.Length), lin("r001", units.Speed), lin("p", units.None), text("pol")}, Result: "dB",
		Doc: "Rain attenuation exceeded for p % of an average year on a terrestrial line-of-sight path of length d, for the point rain rate r001 (mm/h, 1-min integration) exceeded 0.01 % of the year: " +
			"γR = k·r001^α (P.838-3, pol 'h', 'v' or 'c' for circular, tilt 45°), distance factor r = 1/(0.477 d^0.633 r001^(0.073α) f^0.123 − 10.579 (1 − e^(−0.024 d))) at most 2.5, A0.01 = γR·d·r, " +
			"then Ap = A0.01·C1·p^−(C2 + C3 log10 p) (d in km, f in GHz). p is written with %, e.g. 0.01 % for 99.99 % availability (a plain number is read as a fraction: 0.01 alone is 1 %). Warns for p outside 0.001–1 %, f outside 1–100 GHz, d beyond 60 km.",
		Source: "ITU-R P.530-17 §2.4.1 (method unchanged in P.530-18); ITU-R P.838-3 eqs. (1)–(5)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			r, err := rainRate(a, 2)
			if err != nil {
				return units.Q{}, err
			}
			p := percent(a, 3)
			if err := checkPct(p); err != nil {
				return units.Q{}, err
			}
			if d := q(a, 1); !(d > 0) {
				return units.Q{}, fmt.Errorf("d: the path length must be positive (got %s)", units.Lin(d, units.Length))
			}
			v, notes, err := rfmath.RainLOS(q(a, 0), q(a, 1), r, p, a[4].Text)
			if err != nil {
				return units.Q{}, clean(err)
			}
			warnAvailability(c, "rain_los", p)
			warnFn(c, "rain_los", notes)
			return result(v, uDB, "rain attenuation")
		},
	},
	{
		Name: "rain_es", Args: []engine.Arg{lin("f", units.Frequency), angleArg("elev"), lin("r001", units.Speed), lin("p", units.None),
			lin("hs", units.Length), lin("hr", units.Length), angleArg("lat"), text("pol")}, Result: "dB",
		Doc: "Rain attenuation exceeded for p % of an average year on an Earth–space path at elevation elev from a station at height hs (above sea level) and latitude lat, for rain rate r001 exceeded 0.01 % of the year and rain height hr " +
			"(above sea level: ITU-R P.839 gives it as a map, which is not shipped, so take it from P.839 or local data; roughly the 0 °C isotherm height + 0.36 km). " +
			"Steps 2–10 of the method: slant length through rain, horizontal reduction r0.01, vertical adjustment ν0.01, effective length, A0.01 = γR·LE, then scaling to p with the latitude- and elevation-dependent β. " +
			"pol 'h', 'v' or 'c' (circular, tilt 45°), with P.838-3's elevation dependence. Write p with %, e.g. 0.1 % (a plain number is read as a fraction: 0.1 alone is 10 %). Warns for p outside 0.001–5 %, f outside 1–55 GHz, elevation below 5°.",
		Source: "ITU-R P.618-13 §2.2.1.1, steps 1–10 (the P.618-14 validation examples give the same values); ITU-R P.838-3 eqs. (1)–(5)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			e, err := elevation(a, 1, "elev")
			if err != nil {
				return units.Q{}, err
			}
			if e == 0 {
				return units.Q{}, &units.Error{Msg: "elev: the path must rise above the horizon (got 0°)", Hint: "give the lowest elevation the antenna works at, e.g. 5 deg (below 5° the estimate is rough)"}
			}
			r, err := rainRate(a, 2)
			if err != nil {
				return units.Q{}, err
			}
			p := percent(a, 3)
			if err := checkPct(p); err != nil {
				return units.Q{}, err
			}
			lat, err := angle(a, 6, "lat")
			if err != nil {
				return units.Q{}, err
			}
			v, notes, err := rfmath.RainES(q(a, 0), e, r, p, q(a, 4)/1e3, q(a, 5)/1e3, lat, a[7].Text)
			if err != nil {
				return units.Q{}, clean(err)
			}
			warnAvailability(c, "rain_es", p)
			warnFn(c, "rain_es", notes)
			return result(v, uDB, "rain attenuation")
		},
	},
}
