package units

import (
	"strconv"
	"strings"
)

// Dim is a physical dimension: the exponents of length, mass, time, electric current and
// temperature, in that order. Counts (bits, symbols, cycles) and angles are dimensionless.
type Dim [5]int8

// Base dimension indices.
const (
	dimL = iota // length, m
	dimM        // mass, kg
	dimT        // time, s
	dimI        // current, A
	dimK        // temperature, K
)

// Dimensions used by the unit table and the function library.
var (
	None        = Dim{}
	Length      = Dim{dimL: 1}
	Time        = Dim{dimT: 1}
	Frequency   = Dim{dimT: -1}
	Power       = Dim{dimL: 2, dimM: 1, dimT: -3}
	Energy      = Dim{dimL: 2, dimM: 1, dimT: -2}
	Voltage     = Dim{dimL: 2, dimM: 1, dimT: -3, dimI: -1}
	Current     = Dim{dimI: 1}
	Resistance  = Dim{dimL: 2, dimM: 1, dimT: -3, dimI: -2}
	Temperature = Dim{dimK: 1}
	Area        = Dim{dimL: 2}
	Speed       = Dim{dimL: 1, dimT: -1}
	// Pressure is force per area (Pa); Density is mass per volume (kg/m^3, water vapour in g/m^3).
	Pressure = Dim{dimL: -1, dimM: 1, dimT: -2}
	Density  = Dim{dimL: -3, dimM: 1}
	// PowerDensity is power per unit bandwidth (W/Hz), the dimension of noise density N0.
	PowerDensity = Power.Div(Frequency)
	// Boltzmann is the dimension of k (W/K/Hz = J/K).
	Boltzmann = PowerDensity.Div(Temperature)
)

var baseSyms = [5]string{"m", "kg", "s", "A", "K"}

// Mul returns the dimension of a product.
func (d Dim) Mul(e Dim) Dim {
	for i := range d {
		d[i] += e[i]
	}
	return d
}

// Div returns the dimension of a quotient.
func (d Dim) Div(e Dim) Dim {
	for i := range d {
		d[i] -= e[i]
	}
	return d
}

// Pow returns the dimension raised to an integer power.
func (d Dim) Pow(n int) Dim {
	for i := range d {
		d[i] *= int8(n)
	}
	return d
}

// IsNone reports whether d is dimensionless.
func (d Dim) IsNone() bool { return d == None }

// root reports whether levels of this dimension are root-power quantities (20·log10): field
// quantities such as voltage, current and field strength carry an odd power of current.
func (d Dim) root() bool { return d[dimI]%2 != 0 }

// powerLike reports whether the dimension involves power (carries mass), so that a level of it
// can be referred to the milliwatt or to the watt.
func (d Dim) powerLike() bool { return d[dimM] != 0 }

// String writes the dimension with its named SI unit where there is one, else in base units.
func (d Dim) String() string {
	if s, ok := dimNames[d]; ok {
		return s
	}
	if d.IsNone() {
		return "1"
	}
	var num, den []string
	for i, e := range d {
		switch {
		case e == 1:
			num = append(num, baseSyms[i])
		case e > 1:
			num = append(num, baseSyms[i]+"^"+strconv.Itoa(int(e)))
		case e == -1:
			den = append(den, baseSyms[i])
		case e < -1:
			den = append(den, baseSyms[i]+"^"+strconv.Itoa(int(-e)))
		}
	}
	s := strings.Join(num, "*")
	if s == "" {
		s = "1"
	}
	for _, x := range den {
		s += "/" + x
	}
	return s
}

// dimNames are the unit symbols a derived linear value is shown in.
var dimNames = map[Dim]string{
	Length:                     "m",
	Time:                       "s",
	Frequency:                  "Hz",
	Power:                      "W",
	Energy:                     "J",
	Voltage:                    "V",
	Current:                    "A",
	Resistance:                 "ohm",
	Temperature:                "K",
	Area:                       "m^2",
	Speed:                      "m/s",
	Pressure:                   "Pa",
	Power.Div(Area):            "W/m^2",
	Voltage.Div(Length):        "V/m",
	Current.Div(Length):        "A/m",
	Power.Div(Temperature):     "W/K",
	Boltzmann:                  "J/K",
	Temperature.Pow(-1):        "1/K",
	Length.Pow(-1):             "1/m",
	Length.Div(Time.Mul(Time)): "m/s^2",
}

// dimKind names a dimension in words for error messages ("a length").
func (d Dim) kindName() string {
	switch d {
	case None:
		return "a plain number"
	case Length:
		return "a length"
	case Time:
		return "a time"
	case Frequency:
		return "a frequency or rate"
	case Power:
		return "a power"
	case Voltage:
		return "a voltage"
	case Temperature:
		return "a temperature"
	case PowerDensity:
		return "a power density"
	case Area:
		return "an area"
	}
	return "a quantity in " + d.String()
}
