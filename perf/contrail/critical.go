package contrail

import "math"

// CriticalEfficiency returns η*, the overall propulsion efficiency above
// which the Schmidt-Appleman criterion is met at ambient temperature t (K),
// pressure p (Pa) and relative humidity over liquid water rhWater (a
// fraction, clamped to 0..1): a contrail forms when η > η* (Classify's
// t < T_LC), since T_LC rises with the mixing slope G and G with η.
//
// It inverts Schumann's (1996) construction rather than searching η: the
// mixing line through the ambient state (t, rhWater e_w(t)) that touches
// the liquid saturation curve touches it at the x > t where
// e_w(x) - rhWater e_w(t) = e_w'(x) (x - t) (eq. (11) with T_LC = t); its
// slope G* = e_w'(x) gives η* = 1 - EI cp p / (ε Q G*) by eq. (3). The
// left side less the right is (1 - rhWater) e_w(t) >= 0 at x = t and falls
// with x (e_w is convex), so x is found by bisection to 1e-9 K, about 60
// evaluations of e_w and e_w'. η* may be negative (a contrail forms at
// any efficiency) or 1 and above (none can); NaN for t outside Murphy and
// Koop's 123..332 K or p not positive.
func CriticalEfficiency(t, p, rhWater float64) float64 {
	if !(t >= 123 && t <= 332) || !(p > 0) {
		return math.NaN()
	}
	h, lo, hi, ok := tangentBracket(t, rhWater)
	if !ok {
		return 1 // no tangent below 400 K: no contrail at any efficiency here
	}
	for hi-lo > 1e-9 {
		mid := (lo + hi) / 2
		if h(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return criticalAt((lo+hi)/2, p)
}

// tangentBracket returns h, whose root is the temperature of the mixing
// line's tangent to the saturation curve over water through the ambient
// point (t K, rhWater over water, clamped to 0..1), and a first bracket
// [lo, hi] of it, 10 K wide, with h(lo) > 0 >= h(hi); ok is false when
// there is none below 400 K.
func tangentBracket(t, rhWater float64) (h func(float64) float64, lo, hi float64, ok bool) {
	rh := math.Max(0, math.Min(1, rhWater))
	amb := rh * SatWater(t)
	h = func(x float64) float64 { return SatWater(x) - amb - dSatWater(x)*(x-t) }
	lo, hi = t, t+10
	for h(hi) > 0 {
		lo, hi = hi, hi+10
		if hi > 400 {
			return h, lo, hi, false
		}
	}
	return h, lo, hi, true
}

// criticalAt is the critical propulsion efficiency η* = 1 - EI cp p /
// (ε Q e_w'(x)) for the tangent at temperature x (K) and pressure p (Pa).
func criticalAt(x, p float64) float64 {
	return 1 - EIWater*CpAir*p/(Epsilon*FuelHeat*dSatWater(x))
}
