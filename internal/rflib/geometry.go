package rflib

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

// The trigonometric and rounding functions, and the slant range of an Earth–space path.

var uDeg = unit("deg")

func init() { extra = append(extra, geometry...) }

// angleHint is what to write when a bare number is given where an angle is wanted.
const angleHint = "write the unit, e.g. 30 deg or 0.52 rad"

// angle returns argument i as an angle in rad; a bare number is refused, since it could be
// meant in degrees or in radians.
func angle(a []engine.Value, i int, name string) (float64, error) {
	if !a[i].Q.IsAngle() {
		return math.NaN(), &units.Error{Msg: fmt.Sprintf("%s: got a plain number, want an angle in deg or rad", name), Hint: angleHint}
	}
	return a[i].Q.V, nil
}

// elevation returns argument i as an elevation angle in rad, between 0° and 90°.
func elevation(a []engine.Value, i int, name string) (float64, error) {
	e, err := angle(a, i, name)
	if err != nil {
		return e, err
	}
	if !(e >= 0 && e <= math.Pi/2+1e-12) {
		return e, fmt.Errorf("%s: an elevation must lie between 0° and 90° (got %s)", name, units.FormatNum(e*180/math.Pi)+"°")
	}
	return math.Min(e, math.Pi/2), nil
}

func trig(name string, f func(float64) float64, doc string) *engine.Func {
	return &engine.Func{
		Name: name, Args: []engine.Arg{angleArg("x")}, Result: "1", Doc: doc + " The angle must carry its unit (deg or rad); a bare number is refused.",
		Source: "ISO 80000-2 (mathematics); the degree as accepted for use with the SI (SI Brochure, 9th ed., Table 8)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			x, err := angle(a, 0, "x")
			if err != nil {
				return units.Q{}, err
			}
			return result(f(x), uNum, name)
		},
	}
}

func arc(name string, f func(float64) float64, lo, hi float64, doc string) *engine.Func {
	return &engine.Func{
		Name: name, Args: []engine.Arg{lin("x", units.None)}, Result: "deg", Doc: doc,
		Source: "ISO 80000-2 (mathematics)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			x := q(a, 0)
			if !(x >= lo && x <= hi) {
				return units.Q{}, &units.Error{Msg: fmt.Sprintf("x = %s is outside the function's domain %s to %s", units.FormatNum(x), units.FormatNum(lo), units.FormatNum(hi)),
					Hint: "asin and acos take a ratio from -1 to 1, e.g. asin(h / d) with h no longer than d"}
			}
			return result(f(x)*180/math.Pi, uDeg, name)
		},
	}
}

var geometry = []*engine.Func{
	trig("sin", math.Sin, "Sine of an angle."),
	trig("cos", math.Cos, "Cosine of an angle."),
	trig("tan", math.Tan, "Tangent of an angle."),
	arc("asin", math.Asin, -1, 1, "Inverse sine of a plain number from −1 to 1, in deg."),
	arc("acos", math.Acos, -1, 1, "Inverse cosine of a plain number from −1 to 1, in deg."),
	arc("atan", math.Atan, math.Inf(-1), math.Inf(1), "Inverse tangent of a plain number, in deg (−90° to 90°)."),
	{
		Name: "atan2", Args: []engine.Arg{anyQ("y"), anyQ("x")}, Result: "deg",
		Doc:    "Angle in deg (−180° to 180°) of the point (x, y): the inverse tangent of y/x in the right quadrant, e.g. atan2(h, d) for a height over a distance. y and x are linear values of one dimension.",
		Source: "ISO 80000-2 (mathematics)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			y, x := a[0].Q, a[1].Q
			if y.K != units.Linear || x.K != units.Linear || y.D != x.D {
				return units.Q{}, fmt.Errorf("y and x must be linear values of one dimension (got %s and %s)", nameOf(y), nameOf(x))
			}
			if y.V == 0 && x.V == 0 {
				return units.Q{}, fmt.Errorf("the angle of the point (0, 0) is undefined")
			}
			return result(math.Atan2(y.V, x.V)*180/math.Pi, uDeg, "angle")
		},
	},
	plain("log2", math.Log2, "Base-2 logarithm of a plain number (log2(1024) = 10: bits for 1024 levels)."),
	plain("floor", math.Floor, "Largest whole number not above a plain number."),
	plain("ceil", math.Ceil, "Smallest whole number not below a plain number (ceil(100/12) = 9 frames)."),
	plain("round", math.Round, "Nearest whole number to a plain number (halves away from zero)."),
	{
		Name: "slant_range", Args: []engine.Arg{angleArg("elev"), lin("alt", units.Length), optional(lin("h_station", units.Length))}, Result: "m",
		Doc: "Distance from a station at height h_station (0 m by default) to a point at altitude alt (a satellite, an aircraft) seen at elevation elev, over a spherical Earth of radius R = 6371 km, without refraction: " +
			"sqrt((R + alt)² − (R + h)²·cos² elev) − (R + h)·sin elev. A 550 km orbit at 10° is 1815 km away.",
		Source: "spherical-Earth geometry (law of cosines), as in Maral & Bousquet, Satellite Communications Systems, ch. 2; R = 6371 km as in ITU-R P.452",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			e, err := elevation(a, 0, "elev")
			if err != nil {
				return units.Q{}, err
			}
			h := 0.0
			if has(a, 2) {
				h = q(a, 2)
			}
			d, err := rfmath.SlantRange(e, q(a, 1), h)
			if err != nil {
				return units.Q{}, &units.Error{Msg: clean(err).Error(), Hint: "alt is the far point's altitude above sea level (an orbit height, e.g. 550 km) and h_station the station's, both from sea level"}
			}
			return result(d, uM, "slant range")
		},
	},
}
