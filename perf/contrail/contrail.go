// Package contrail predicts contrail formation and persistence from the
// ambient state of the air and the engine's overall propulsion
// efficiency: saturation vapour pressures over water and ice, the
// Schmidt-Appleman criterion, relative humidity over ice, and the sun's
// elevation (to tell day from night contrails).
//
// Contrail prediction from forecast humidity is uncertain: ice
// supersaturation is poorly forecast. Results are for planning studies,
// not a guarantee of avoidance.
//
// Units are SI: temperatures K, pressures Pa, angles degrees.
package contrail

import "math"

// Saturation vapour pressures after Murphy and Koop, "Review of the vapour
// pressures of ice and supercooled water for atmospheric applications",
// Q. J. R. Meteorol. Soc. 131 (2005) 1539-1565.

// SatIce returns the saturation vapour pressure over a plane surface of
// hexagonal ice at temperature t, Pa: Murphy and Koop (2005) eq. (7),
// valid above 110 K.
func SatIce(t float64) float64 {
	return math.Exp(9.550426 - 5723.265/t + 3.53068*math.Log(t) - 0.00728332*t)
}

// SatWater returns the saturation vapour pressure over a plane surface of
// liquid (also supercooled) water at temperature t, Pa: Murphy and Koop
// (2005) eq. (10), valid from 123 K to 332 K.
func SatWater(t float64) float64 {
	lt := math.Log(t)
	return math.Exp(54.842763 - 6763.22/t - 4.210*lt + 0.000367*t +
		math.Tanh(0.0415*(t-218.8))*(53.878-1331.22/t-9.44523*lt+0.014025*t))
}

// dSatWater is d(SatWater)/dt, Pa/K, differentiated analytically.
func dSatWater(t float64) float64 {
	lt := math.Log(t)
	a := 53.878 - 1331.22/t - 9.44523*lt + 0.014025*t
	th := math.Tanh(0.0415 * (t - 218.8))
	dlne := 6763.22/(t*t) - 4.210/t + 0.000367 +
		0.0415*(1-th*th)*a + th*(1331.22/(t*t)-9.44523/t+0.014025)
	return SatWater(t) * dlne
}

// RHIce converts relative humidity over liquid water (a fraction, 1 =
// saturated) to relative humidity over ice at temperature t: RHi = RHw x
// e_w(t) / e_i(t). Below 273.15 K the result exceeds RHw.
func RHIce(rhWater, t float64) float64 { return rhWater * SatWater(t) / SatIce(t) }

// RHIceFromQ returns relative humidity over ice (a fraction) from specific
// humidity q (kg/kg) at pressure p and temperature t: the vapour pressure
// is e = q p / (ε + (1 - ε) q), ε = 0.622 the ratio of the molar masses of
// water and dry air.
func RHIceFromQ(q, p, t float64) float64 {
	e := q * p / (Epsilon + (1-Epsilon)*q)
	return e / SatIce(t)
}

// Constants of the Schmidt-Appleman criterion (Schumann, "On conditions
// for contrail formation from aircraft exhausts", Meteorol. Z. 5 (1996)
// 4-23): emission index of water vapour and specific combustion heat of
// kerosene, specific heat of air at constant pressure, and the ratio of
// the molar masses of water and dry air.
const (
	EIWater     = 1.25   // kg water per kg fuel
	FuelHeat    = 43.2e6 // J/kg
	CpAir       = 1004.0 // J/(kg K)
	Epsilon     = 0.622
	waterTriple = 273.16
)

// MixingSlope returns the slope G of the mixing line in the (T, e) plane,
// Pa/K, for ambient pressure p and overall propulsion efficiency eta
// (thrust x true airspeed / (fuel flow x FuelHeat)): Schumann (1996)
// eq. (3), G = EI cp p / (ε Q (1 - η)).
func MixingSlope(p, eta float64) float64 {
	return EIWater * CpAir * p / (Epsilon * FuelHeat * (1 - eta))
}

// ThresholdMax returns T_LM, the highest ambient temperature at which a
// contrail can form for mixing slope g (Pa/K) in perfectly saturated air:
// the temperature where the mixing line is tangent to the saturation
// curve over liquid water, de_w/dT = G (Schumann 1996, section 2). It is
// found by Newton's method on the liquid saturation curve of Murphy and
// Koop (2005), kept inside a bracket from 150 K to the triple point (a
// bisection step when Newton leaves it); NaN when g is
// not positive.
func ThresholdMax(g float64) float64 {
	if !(g > 0) {
		return math.NaN()
	}
	lo, hi := 150.0, waterTriple
	t := 230.0
	for range 60 {
		f := dSatWater(t) - g
		if f > 0 {
			hi = t
		} else {
			lo = t
		}
		// Newton step on the slope, second derivative by central difference.
		h := 1e-3
		d2 := (dSatWater(t+h) - dSatWater(t-h)) / (2 * h)
		next := t - f/d2
		if !(next > lo && next < hi) {
			next = (lo + hi) / 2
		}
		if math.Abs(next-t) < 1e-9 {
			return next
		}
		t = next
	}
	return t
}

// ThresholdApprox is Schumann's (1996) fit to ThresholdMax, eq. (31), in
// K: T_LM = -46.46 + 9.43 ln(G - 0.053) + 0.720 ln²(G - 0.053) °C, for
// G in Pa/K between about 0.24 and 2.0 Pa/K. It serves as a check of
// ThresholdMax.
func ThresholdApprox(g float64) float64 {
	x := math.Log(g - 0.053)
	return 273.15 - 46.46 + 9.43*x + 0.720*x*x
}

// Threshold returns T_LC, the highest ambient temperature at which a
// contrail forms in air of relative humidity rhWater over liquid water
// (a fraction, clamped to 0..1): the temperature where the mixing line
// through the ambient state (T, rhWater e_w(T)) touches the liquid
// saturation curve at T_LM, T_LC = T_LM - (e_w(T_LM) - rhWater e_w(T_LC))
// / G (Schumann 1996, eq. (11)). The root lies between T_LM - e_w(T_LM)/G
// (dry air) and T_LM (saturated air) and is found by bisection to 1e-9 K.
func Threshold(g, rhWater float64) float64 {
	tlm := ThresholdMax(g)
	if math.IsNaN(tlm) {
		return tlm
	}
	rh := math.Max(0, math.Min(1, rhWater))
	e := SatWater(tlm)
	f := func(t float64) float64 { return t - tlm + (e-rh*SatWater(t))/g }
	lo, hi := tlm-e/g, tlm
	for hi-lo > 1e-9 {
		mid := (lo + hi) / 2
		if f(mid) > 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	return (lo + hi) / 2
}

// Kind classifies a point of flight.
type Kind int

// Contrail kinds.
const (
	None       Kind = iota // the Schmidt-Appleman criterion is not met
	ShortLived             // it is met, but the air is subsaturated over ice
	Persistent             // met in ice-supersaturated air
)

func (k Kind) String() string {
	switch k {
	case ShortLived:
		return "short-lived"
	case Persistent:
		return "persistent"
	}
	return "none"
}

// Classify applies the Schmidt-Appleman criterion at ambient temperature
// t and pressure p for a propulsion efficiency eta and relative humidity
// over liquid water rhWater: a contrail forms when t < T_LC, and persists
// when the ambient relative humidity over ice reaches rhiPersist (1.0 is
// the usual threshold).
func Classify(t, p, eta, rhWater, rhiPersist float64) Kind {
	g := MixingSlope(p, eta)
	if !(t < Threshold(g, rhWater)) {
		return None
	}
	if RHIce(rhWater, t) >= rhiPersist {
		return Persistent
	}
	return ShortLived
}
