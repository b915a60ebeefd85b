package contrail

// ExceedsCritical reports whether eta > CriticalEfficiency(t, p, rhWater),
// always with the same answer (false where CriticalEfficiency is NaN), but
// stops the bisection as soon as the answer is settled. η* = 1 - EI cp p /
// (ε Q e_w'(x)) rises with the tangent point x (e_w' rises: e_w is convex),
// and the x CriticalEfficiency ends at lies inside every bracket of its
// bisection, which this one repeats step for step; so once eta is above η*
// at the bracket's top end, or at or below it at its bottom end, by more
// than 1e-12 (far beyond the rounding of η*, about 1e-16), the final
// comparison can only agree. The ends are looked at every fourth step;
// near the threshold the bisection runs to the end and compares as
// CriticalEfficiency's caller would. A cruise leg's class is usually
// settled in a few steps instead of about 34.
func ExceedsCritical(eta, t, p, rhWater float64) bool {
	if !(t >= 123 && t <= 332) || !(p > 0) {
		return false // CriticalEfficiency is NaN
	}
	h, lo, hi, ok := tangentBracket(t, rhWater)
	if !ok {
		return eta > 1
	}
	crit := func(x float64) float64 { return criticalAt(x, p) }
	const margin = 1e-12
	for i := 0; hi-lo > 1e-9; i++ {
		if i%4 == 0 {
			if eta > crit(hi)+margin {
				return true
			}
			if eta <= crit(lo)-margin {
				return false
			}
		}
		mid := (lo + hi) / 2
		if h(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return eta > criticalAt((lo+hi)/2, p)
}
