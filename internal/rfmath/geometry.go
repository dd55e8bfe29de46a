package rfmath

import (
	"fmt"
	"math"
)

// SlantRange returns the straight-line distance in m from a station at height h (m) above a
// spherical Earth of radius EarthRadius (6371 km) to a point at altitude alt (m), seen at
// elevation angle elev (rad) above the station's horizontal:
//
//	d = sqrt((R + alt)² − (R + h)² cos² ε) − (R + h) sin ε
//
// (the law of cosines in the triangle Earth centre, station, point; no refraction). Source:
// spherical-Earth geometry as in ITU-R P.619 and satellite link texts (Maral & Bousquet,
// Satellite Communications Systems, ch. 2). It returns an error for an elevation outside
// 0–90°, a negative height, or a point below the station.
func SlantRange(elev, alt, h float64) (float64, error) {
	if !(elev >= 0 && elev <= math.Pi/2) {
		return math.NaN(), fmt.Errorf("rfmath: elevation must lie between 0° and 90° (got %s°)", num(elev*180/math.Pi))
	}
	if !(h >= 0) || math.IsInf(h, 0) {
		return math.NaN(), fmt.Errorf("rfmath: the station height must not be negative (got %s)", fmtM(h))
	}
	if !(alt > h) || math.IsInf(alt, 0) {
		return math.NaN(), fmt.Errorf("rfmath: the altitude (%s) must lie above the station (%s)", fmtM(alt), fmtM(h))
	}
	rs, rp := EarthRadius+h, EarthRadius+alt
	c := rs * math.Cos(elev)
	return math.Sqrt(rp*rp-c*c) - rs*math.Sin(elev), nil
}
