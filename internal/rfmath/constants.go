package rfmath

// Physical and reference constants, SI units.
const (
	// C0 is the speed of light in vacuum in m/s (exact by definition of the
	// metre, SI 2019).
	C0 = 299792458.0

	// KB is the Boltzmann constant in J/K (exact, SI 2019 redefinition).
	KB = 1.380649e-23

	// T0 is the standard reference temperature in K of the IEEE definition
	// of noise figure (290 K).
	T0 = 290.0

	// EarthRadius is the mean radius of the Earth in m (6371 km, the value
	// ITU-R P.452 uses for the actual Earth radius before applying the
	// effective-radius factor k).
	EarthRadius = 6371e3

	// mW is one milliwatt in watts, the reference for dBm.
	mW = 1e-3
)
