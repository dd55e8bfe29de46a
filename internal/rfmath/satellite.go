package rfmath

import "math"

// kDB is 10 log10(KB) in dBW/(K·Hz), about −228.6.
var kDB = 10 * math.Log10(KB)

// CN0 returns the carrier-to-noise-density ratio in dB-Hz of a link with
// EIRP eirpDBW (dBW), total path and propagation losses lossDB (dB) and
// receive figure of merit gtDBK (G/T, dB/K):
//
//	C/N0 = EIRP − L + G/T − 10 log10(k)
//
// (10 log10 k = −228.60 dBW/(K·Hz) with the exact k of the 2019 SI). Source: standard satellite link equation
// (Maral & Bousquet, Satellite Communications Systems).
func CN0(eirpDBW, lossDB, gtDBK float64) float64 {
	return eirpDBW - lossDB + gtDBK - kDB
}
