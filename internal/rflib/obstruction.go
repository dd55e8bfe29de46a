package rflib

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/rfmath"
	"github.com/rfledger/rfledger/units"
)

// Obstruction, antenna pointing and polarisation, field strength and fading margins.

func init() { extra = append(extra, obstruction...) }

var (
	uDBuVm  = unit("dBuV/m")
	uDBWm2  = unit("dBW/m^2")
	knifeDs = []engine.Arg{lin("h", units.Length), lin("d1", units.Length), lin("d2", units.Length), lin("f", units.Frequency)}
)

func fresnelV(a []engine.Value) (float64, error) {
	v, err := rfmath.FresnelV(q(a, 0), q(a, 1), q(a, 2), q(a, 3))
	if err != nil {
		return v, &units.Error{Msg: fmt.Sprintf("d1, d2 and f must be positive (got d1 = %s, d2 = %s, f = %s)", units.Lin(q(a, 1), units.Length), units.Lin(q(a, 2), units.Length), units.Lin(q(a, 3), units.Frequency)),
			Hint: "d1 and d2 are the distances from each end of the path to the obstacle, e.g. distance / 2 for one in mid-path"}
	}
	return v, nil
}

// positiveDistance refuses a distance argument i that is not above zero.
func positiveDistance(a []engine.Value, i int) error {
	if !(q(a, i) > 0) {
		return &units.Error{Msg: fmt.Sprintf("d: the distance must be positive (got %s)", units.Lin(q(a, i), units.Length)), Hint: "the distance from the transmitter, e.g. 3 m or 1 km"}
	}
	return nil
}

// eirpDBW returns argument i, an e.i.r.p. given as a power or a power level, in dBW.
func eirpDBW(a []engine.Value, i int) float64 { return q(a, i) }

var obstruction = []*engine.Func{
	{
		Name: "fresnel_v", Args: knifeDs, Result: "1",
		Doc:    "Diffraction parameter ν of a single knife edge whose top lies h above the line of sight (negative h: below it, a clearance) at d1 and d2 from the ends: ν = h·sqrt(2/λ·(1/d1 + 1/d2)). ν = −0.78 is about 55 % clearance of the first Fresnel zone.",
		Source: "ITU-R P.526-15 §4.1 (single knife edge)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			v, err := fresnelV(a)
			if err != nil {
				return units.Q{}, err
			}
			return result(v, uNum, "ν")
		},
	},
	{
		Name: "knife_edge", Args: knifeDs, Result: "dB",
		Doc: "Diffraction loss over a single knife edge (arguments as fresnel_v): J(ν) = 6.9 + 20·log10(sqrt((ν − 0.1)² + 1) + ν − 0.1), about 6 dB at grazing (h = 0). " +
			"The approximation holds for ν > −0.78; at or below it the edge clears the path, 0 dB is used and a warning says so.",
		Source: "ITU-R P.526-15 §4.1 (approximation of J(ν))",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			v, err := fresnelV(a)
			if err != nil {
				return units.Q{}, err
			}
			l, notes := rfmath.KnifeEdgeV(v)
			warnFn(c, "knife_edge", notes)
			return result(l, uDB, "diffraction loss")
		},
	},
	{
		Name: "beamwidth", Args: []engine.Arg{lin("d", units.Length), lin("f", units.Frequency), optional(angleArg("k"))}, Result: "deg",
		Doc:    "Half-power (−3 dB) beamwidth of a parabolic dish of diameter d: k·λ/d, k = 70° by default (a typical tapered feed; common practice, no single source: a uniformly lit aperture gives 58.4°, heavier tapers up to about 75°). A 2.4 m dish at 2.4 GHz has 3.6°.",
		Source: "common practice, no source (θ3dB ≈ 70 λ/D degrees; Kraus, Antennas, aperture beamwidth)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			k := 70 * math.Pi / 180
			if has(a, 2) {
				var err error
				if k, err = angle(a, 2, "k"); err != nil {
					return units.Q{}, err
				}
			}
			if !(q(a, 0) > 0) || !(k > 0) {
				return units.Q{}, &units.Error{Msg: fmt.Sprintf("the diameter and k must be positive (got d = %s, k = %s°)", units.Lin(q(a, 0), units.Length), units.FormatNum(k*180/math.Pi)),
					Hint: "give the dish diameter, e.g. 1.2 m, and leave k out for the usual 70 deg"}
			}
			return result(rfmath.Beamwidth(q(a, 0), q(a, 1), k)*180/math.Pi, uDeg, "beamwidth")
		},
	},
	{
		Name: "pointing_loss", Args: []engine.Arg{angleArg("offset"), angleArg("beamwidth")}, Result: "dB",
		Doc:    "Gain lost when an antenna points off its target by offset, for half-power beamwidth beamwidth: 12·(offset/beamwidth)², the parabolic fit of the main lobe (3 dB at half a beamwidth). Warns past one beamwidth, where the fit fails.",
		Source: "main-lobe parabolic approximation (Maral & Bousquet, Satellite Communications Systems, antenna pointing loss); common practice",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			off, err := angle(a, 0, "offset")
			if err != nil {
				return units.Q{}, err
			}
			bw, err := angle(a, 1, "beamwidth")
			if err != nil {
				return units.Q{}, err
			}
			if !(bw > 0) {
				return units.Q{}, &units.Error{Msg: fmt.Sprintf("beamwidth: must be positive (got %s°)", units.FormatNum(bw*180/math.Pi)), Hint: "the antenna's half-power beamwidth, e.g. beamwidth(dish, f)"}
			}
			l, notes := rfmath.PointingLoss(off, bw)
			warnFn(c, "pointing_loss", notes)
			return result(l, uDB, "pointing loss")
		},
	},
	{
		Name: "pol_loss", Args: []engine.Arg{angleArg("angle")}, Result: "dB",
		Doc:    "Polarisation mismatch loss between two linearly polarised antennas whose planes differ by angle: −20·log10|cos angle| (3 dB at 45°). At exactly 90° the ideal loss is unbounded: an error; give the antennas' cross-polar discrimination instead.",
		Source: "polarisation loss factor PLF = cos²ψ (Balanis, Antenna Theory, §2.12)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			x, err := angle(a, 0, "angle")
			if err != nil {
				return units.Q{}, err
			}
			l, err := rfmath.PolLoss(x)
			if err != nil {
				return units.Q{}, &units.Error{Msg: "angle: crossed linear polarisations (90°) have no finite ideal mismatch loss", Hint: "use the antennas' cross-polar discrimination (XPD, e.g. 20 dB from the datasheet) as the loss"}
			}
			return result(l, uDB, "polarisation loss")
		},
	},
	{
		Name: "field_strength", Args: []engine.Arg{level("eirp", units.Power), lin("d", units.Length)}, Result: "dBuV/m",
		Doc:    "Free-space field strength at distance d from a transmitter of e.i.r.p. eirp: E = sqrt(30·p)/d, i.e. EIRP(dBW) − 20·log10 d(km) + 74.77 dB(µV/m). For comparison with a limit; the page does not judge compliance, which local rules decide.",
		Source: "ITU-R P.525-4 §2.1 (field strength for isotropic radiation)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if err := positiveDistance(a, 1); err != nil {
				return units.Q{}, err
			}
			return result(rfmath.FieldStrength(eirpDBW(a, 0), q(a, 1)), uDBuVm, "field strength")
		},
	},
	{
		Name: "pfd", Args: []engine.Arg{level("eirp", units.Power), lin("d", units.Length)}, Result: "dBW/m^2",
		Doc:    "Power flux-density at distance d from a transmitter of e.i.r.p. eirp, spreading spherically: EIRP − 10·log10(4π d²) dB(W/m²). Add 10·log10(reference bandwidth / occupied bandwidth) for a limit per 4 kHz or per MHz. The page does not judge compliance, which local rules decide.",
		Source: "ITU-R P.525-4 §2.1 (power flux-density, isotropic radiation)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if err := positiveDistance(a, 1); err != nil {
				return units.Q{}, err
			}
			return result(rfmath.PFD(eirpDBW(a, 0), q(a, 1)), uDBWm2, "power flux-density")
		},
	},
	{
		Name: "lognormal_margin", Args: []engine.Arg{ratio("sigma"), lin("availability", units.None)}, Result: "dB",
		Doc:    "Margin over the median that a log-normally distributed level with standard deviation sigma (in dB, e.g. shadowing) exceeds with probability availability: σ·Q⁻¹(1 − availability); 1.28σ for 90 %, 1.64σ for 95 % (cell-edge coverage).",
		Source: "log-normal shadowing margin (Rappaport, Wireless Communications: Principles and Practice, §4.9)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			m, err := rfmath.LognormalMargin(q(a, 0), q(a, 1))
			if err != nil {
				return units.Q{}, &units.Error{Msg: clean(err).Error(), Hint: "write the availability as 0.95 or 95 %, and sigma as a positive number of dB"}
			}
			return result(m, uDB, "fade margin")
		},
	},
}
