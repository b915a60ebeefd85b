package perf

import "math"

// Physical constants and unit conversions of the ICAO Standard Atmosphere
// (ICAO Doc 7488/3, identical to the U.S. Standard Atmosphere 1976 below
// 32 km) and the exact trade-unit definitions.
const (
	G0     = 9.80665       // standard gravity, m/s²
	RAir   = 287.05287     // specific gas constant of dry air, J/(kg K)
	Gamma  = 1.4           // ratio of specific heats of air
	T0     = 288.15        // sea-level standard temperature, K
	P0     = 101325.0      // sea-level standard pressure, Pa
	Rho0   = 1.225         // sea-level standard density, kg/m³
	FtToM  = 0.3048        // international foot, m
	KtToMS = 1852.0 / 3600 // knot, m/s
	NMToM  = 1852.0        // nautical mile, m
)

// atmosLayer is one layer of the standard atmosphere: base geopotential
// altitude (m), base temperature (K), lapse rate (K/m) and base pressure (Pa).
type atmosLayer struct {
	h, t, lapse, p float64
}

// layers holds the layers of the U.S. Standard Atmosphere 1976 from sea
// level to 47 km; base pressures follow from the hydrostatic equation so the
// model is continuous. The first layer extends below sea level (to -2 km and
// beyond) and the last one above 47 km (extrapolated).
var layers = func() [4]atmosLayer {
	l := [4]atmosLayer{
		{0, T0, -0.0065, P0},
		{11000, 0, 0, 0},
		{20000, 0, 0.001, 0},
		{32000, 0, 0.0028, 0},
	}
	for i := 1; i < len(l); i++ {
		b := l[i-1]
		l[i].t = b.t + b.lapse*(l[i].h-b.h)
		l[i].p = layerPressure(b, l[i].h)
	}
	return l
}()

func layerPressure(b atmosLayer, h float64) float64 {
	if b.lapse == 0 {
		return b.p * math.Exp(-G0*(h-b.h)/(RAir*b.t))
	}
	return b.p * math.Pow(b.t/(b.t+b.lapse*(h-b.h)), G0/(RAir*b.lapse))
}

func layerForAltitude(h float64) int {
	switch {
	case h < layers[1].h:
		return 0
	case h < layers[2].h:
		return 1
	case h < layers[3].h:
		return 2
	}
	return 3
}

func layerForPressure(p float64) int {
	switch {
	case p > layers[1].p:
		return 0
	case p > layers[2].p:
		return 1
	case p > layers[3].p:
		return 2
	}
	return 3
}

// ISATemperature returns the standard temperature (K) at pressure altitude
// h (geopotential m), U.S. Standard Atmosphere 1976.
func ISATemperature(h float64) float64 {
	b := layers[layerForAltitude(h)]
	return b.t + b.lapse*(h-b.h)
}

// PressureAt returns the standard pressure (Pa) at pressure altitude h
// (geopotential m): the hydrostatic equation integrated layer by layer,
// U.S. Standard Atmosphere 1976 eqs. 33a/33b.
func PressureAt(h float64) float64 {
	return layerPressure(layers[layerForAltitude(h)], h)
}

// AltitudeAt returns the pressure altitude (geopotential m) of static
// pressure p (Pa): the exact inverse of PressureAt within each layer.
// It returns NaN for p <= 0.
func AltitudeAt(p float64) float64 {
	if !(p > 0) {
		return math.NaN()
	}
	b := layers[layerForPressure(p)]
	if b.lapse == 0 {
		return b.h - RAir*b.t/G0*math.Log(p/b.p)
	}
	return b.h + b.t/b.lapse*(math.Pow(p/b.p, -RAir*b.lapse/G0)-1)
}

// isaTemperatureAtPressure is ISATemperature(AltitudeAt(p)) with one power
// instead of two: T = Tb (p/pb)^(-R L/g0) in a gradient layer.
func isaTemperatureAtPressure(p float64) float64 {
	b := layers[layerForPressure(p)]
	if b.lapse == 0 {
		return b.t
	}
	return b.t * math.Pow(p/b.p, -RAir*b.lapse/G0)
}

// ISATemperatureAtPressure returns the standard temperature (K) at the
// pressure altitude of static pressure p (Pa): ISATemperature(AltitudeAt(p))
// with one power instead of two, and what ISADeviation subtracts (t -
// ISATemperatureAtPressure(p) is ISADeviation(p, t) bit for bit).
func ISATemperatureAtPressure(p float64) float64 { return isaTemperatureAtPressure(p) }

// FLToPressure returns the static pressure (Pa) at flight level fl
// (hundreds of feet of pressure altitude).
func FLToPressure(fl float64) float64 { return PressureAt(fl * 100 * FtToM) }

// PressureToFL returns the flight level (hundreds of feet, continuous) of
// static pressure p (Pa).
func PressureToFL(p float64) float64 { return AltitudeAt(p) / (100 * FtToM) }

// SpeedOfSound returns a = sqrt(gamma R T) (m/s) at temperature t (K).
func SpeedOfSound(t float64) float64 { return math.Sqrt(Gamma * RAir * t) }

// Density returns rho = p/(R T) (kg/m³), the ideal-gas law.
func Density(p, t float64) float64 { return p / (RAir * t) }

// ISADeviation returns t minus the standard temperature at the pressure
// altitude of p (K).
func ISADeviation(p, t float64) float64 { return t - isaTemperatureAtPressure(p) }
