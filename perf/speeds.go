package perf

import "math"

// machSearchMin is the lowest Mach the buffet search considers.
const machSearchMin = 0.05

// BuffetMachs returns the low- and high-speed buffet-onset Mach numbers at
// load factor n for mass (kg) at static pressure p (Pa): the two roots of
// CL_buffet(M) = CL(M, n) = 2 n m g/(γ p M² S). ok is false when no Mach is
// free of buffet (the "coffin corner" is passed) or the inputs are not
// positive.
//
// Method: the roots are those of M²·CL_buffet(M) = 2 n m g/(γ p S); on each
// table segment the left side is a cubic, whose peak is found in closed form
// and whose crossings are bracketed and bisected to 1e-12. Validation
// guarantees a single peak. Beyond the table the boundary is unknown: the
// search ends at the last table Mach, which is returned as hi when that
// Mach is still buffet-free (the table reaches at least MMO). Cost: O(rows).
func (a *Aircraft) BuffetMachs(mass, p, n float64) (lo, hi float64, ok bool) {
	b := a.Buffet
	if !(mass > 0 && p > 0 && n > 0) || len(b) < 2 {
		return math.NaN(), math.NaN(), false
	}
	c := 2 * n * mass * G0 / (Gamma * p * a.WingArea)
	// Segments: [machSearchMin, b0] with flat CL, then table segments.
	nseg := len(b)
	seg := func(j int) (x0, y0, x1, y1 float64) {
		if j == 0 {
			return machSearchMin, b[0].CL, b[0].Mach, b[0].CL
		}
		return b[j-1].Mach, b[j-1].CL, b[j].Mach, b[j].CL
	}
	// Peak of h(M) = M² CL(M).
	peakM, peakH, peakSeg := machSearchMin, -1.0, 0
	for j := 0; j < nseg; j++ {
		x0, y0, x1, y1 := seg(j)
		if x1 <= x0 {
			continue
		}
		for _, x := range [3]float64{x0, x1, segPeak(x0, y0, x1, y1)} {
			if x >= x0 && x <= x1 {
				if h := x * x * lerp(x0, y0, x1, y1, x); h > peakH {
					peakM, peakH, peakSeg = x, h, j
				}
			}
		}
	}
	if peakH < c {
		return math.NaN(), math.NaN(), false
	}
	// Low root: first segment up to the peak where h crosses c.
	lo = machSearchMin
	if machSearchMin*machSearchMin*b[0].CL < c {
		for j := 0; j <= peakSeg; j++ {
			x0, y0, x1, y1 := seg(j)
			xe := x1
			if j == peakSeg {
				xe = peakM
			}
			if xe*xe*lerp(x0, y0, x1, y1, xe) >= c {
				lo = bisectSeg(x0, y0, x1, y1, math.Max(x0, machSearchMin), xe, c)
				break
			}
		}
	}
	// High root: first segment from the peak where h falls below c.
	hi = b[len(b)-1].Mach
	for j := peakSeg; j < nseg; j++ {
		x0, y0, x1, y1 := seg(j)
		xs := x0
		if j == peakSeg {
			xs = peakM
		}
		if x1*x1*y1 < c {
			hi = bisectSeg(x0, y0, x1, y1, xs, x1, c)
			break
		}
	}
	return lo, hi, lo < hi
}

func lerp(x0, y0, x1, y1, x float64) float64 {
	if x1 == x0 {
		return y0
	}
	return y0 + (y1-y0)*(x-x0)/(x1-x0)
}

// segPeak returns the stationary point of M²(α + βM) on a linear segment,
// M = -2α/(3β), or NaN when there is none (β >= 0).
func segPeak(x0, y0, x1, y1 float64) float64 {
	if x1 == x0 {
		return math.NaN()
	}
	beta := (y1 - y0) / (x1 - x0)
	if beta >= 0 {
		return math.NaN()
	}
	alpha := y0 - beta*x0
	return -2 * alpha / (3 * beta)
}

// bisectSeg finds x in [xa, xb] with x² CL(x) = c on one segment, the sign
// of h - c differing at the ends.
func bisectSeg(x0, y0, x1, y1, xa, xb, c float64) float64 {
	fa := xa*xa*lerp(x0, y0, x1, y1, xa) - c
	for i := 0; i < 60 && xb-xa > 1e-12; i++ {
		xm := 0.5 * (xa + xb)
		fm := xm*xm*lerp(x0, y0, x1, y1, xm) - c
		if (fm < 0) == (fa < 0) {
			xa, fa = xm, fm
		} else {
			xb = xm
		}
	}
	return 0.5 * (xa + xb)
}

// excessThrust returns max cruise thrust minus level-flight drag (N).
func (a *Aircraft) excessThrust(mass, p, t, mach, cosL float64) float64 {
	d, _, _ := a.drag(mass, p, mach, cosL)
	return a.climbThrust(p, t, mach)*a.Engines.CruiseRatio - d
}

// machTol is the Mach resolution of the speed searches.
const machTol = 1e-7

// invPhi is 1/φ, the golden-section ratio (Kiefer, "Sequential minimax
// search for a maximum", Proc. AMS 4, 1953).
var invPhi = (math.Sqrt(5) - 1) / 2

// MachBand returns the Mach range usable in level flight: buffet-free at
// load factor floor (g), at most MMO and the Mach of VMO (CAS), and with
// drag no more than max cruise thrust. ok is false when the range is empty.
//
// The thrust test assumes excess thrust is unimodal in Mach (drag is
// U-shaped, thrust smooth): the ends are tested first; if either fails,
// the maximum is found by golden-section search and the feasible ends by
// bisection to 1e-7 Mach. Cost: 2 to about 150 drag evaluations.
func (a *Aircraft) MachBand(mass, p, isaDev, floor float64) (lo, hi float64, ok bool) {
	nan := math.NaN()
	lo, hi, ok = a.BuffetMachs(mass, p, floor)
	if !ok || math.IsNaN(isaDev) {
		return nan, nan, false
	}
	hi = math.Min(hi, a.MMO)
	if mv := CASToMach(a.VMO, p); mv < hi {
		hi = mv
	}
	if !(lo < hi) {
		return nan, nan, false
	}
	t := isaTemperatureAtPressure(p) + isaDev
	cosL := math.Cos(a.Sweep)
	elo := a.excessThrust(mass, p, t, lo, cosL)
	ehi := a.excessThrust(mass, p, t, hi, cosL)
	if elo >= 0 && ehi >= 0 {
		return lo, hi, true
	}
	// Golden-section search for the maximum excess thrust.
	x0, x3 := lo, hi
	x1 := x3 - invPhi*(x3-x0)
	x2 := x0 + invPhi*(x3-x0)
	e1 := a.excessThrust(mass, p, t, x1, cosL)
	e2 := a.excessThrust(mass, p, t, x2, cosL)
	for x3-x0 > 1e-5 {
		if e1 >= 0 || e2 >= 0 {
			break
		}
		if e1 > e2 {
			x3, x2, e2 = x2, x1, e1
			x1 = x3 - invPhi*(x3-x0)
			e1 = a.excessThrust(mass, p, t, x1, cosL)
		} else {
			x0, x1, e1 = x1, x2, e2
			x2 = x0 + invPhi*(x3-x0)
			e2 = a.excessThrust(mass, p, t, x2, cosL)
		}
	}
	xm, em := x1, e1
	if e2 > e1 {
		xm, em = x2, e2
	}
	if em < 0 {
		return nan, nan, false
	}
	if elo < 0 {
		a2, b2 := lo, xm
		for b2-a2 > machTol {
			m := 0.5 * (a2 + b2)
			if a.excessThrust(mass, p, t, m, cosL) >= 0 {
				b2 = m
			} else {
				a2 = m
			}
		}
		lo = b2
	}
	if ehi < 0 {
		a2, b2 := xm, hi
		for b2-a2 > machTol {
			m := 0.5 * (a2 + b2)
			if a.excessThrust(mass, p, t, m, cosL) >= 0 {
				a2 = m
			} else {
				b2 = m
			}
		}
		hi = a2
	}
	return lo, hi, lo <= hi
}

// econCost returns (fuel flow + ci/60)/(TAS + wind) in kg per metre of
// ground distance, +Inf when the ground speed is not positive.
func (a *Aircraft) econCost(mass, p, t, mach, cosL, ciPerS, wind float64) float64 {
	gs := mach*SpeedOfSound(t) + wind
	if !(gs > 0) {
		return math.Inf(1)
	}
	d, _, _ := a.drag(mass, p, mach, cosL)
	return (a.tsfc(t, mach)*d + ciPerS) / gs
}

// EconMach returns the Mach within MachBand that minimises the cost per
// ground distance (FuelFlow + ci/60)/(TAS + windAlong), ci the cost index in
// kg/min and windAlong the tailwind component (m/s). With ci = 0 and no
// wind it is MaxRangeMach. Method: golden-section search (Kiefer 1953) to
// 1e-7 Mach, about 35 evaluations, assuming the cost is unimodal in Mach;
// the band ends are compared too so a boundary optimum is exact.
func (a *Aircraft) EconMach(mass, p, isaDev, floor, ci, windAlong float64) (float64, bool) {
	lo, hi, ok := a.MachBand(mass, p, isaDev, floor)
	if !ok || math.IsNaN(ci) || math.IsNaN(windAlong) {
		return math.NaN(), false
	}
	t := isaTemperatureAtPressure(p) + isaDev
	return a.econMachIn(mass, p, t, lo, hi, ci/60, windAlong), true
}

func (a *Aircraft) econMachIn(mass, p, t, lo, hi, ciPerS, wind float64) float64 {
	cosL := math.Cos(a.Sweep)
	f := func(m float64) float64 { return a.econCost(mass, p, t, m, cosL, ciPerS, wind) }
	x0, x3 := lo, hi
	x1 := x3 - invPhi*(x3-x0)
	x2 := x0 + invPhi*(x3-x0)
	f1, f2 := f(x1), f(x2)
	for x3-x0 > machTol {
		if f1 < f2 {
			x3, x2, f2 = x2, x1, f1
			x1 = x3 - invPhi*(x3-x0)
			f1 = f(x1)
		} else {
			x0, x1, f1 = x1, x2, f2
			x2 = x0 + invPhi*(x3-x0)
			f2 = f(x2)
		}
	}
	best, fb := 0.5*(x0+x3), f(0.5*(x0+x3))
	if fl := f(lo); fl < fb {
		best, fb = lo, fl
	}
	if fh := f(hi); fh < fb {
		best = hi
	}
	return best
}

// MaxRangeMach returns the Mach of greatest specific range within
// MachBand (EconMach with no cost index and no wind).
func (a *Aircraft) MaxRangeMach(mass, p, isaDev, floor float64) (float64, bool) {
	return a.EconMach(mass, p, isaDev, floor, 0, 0)
}

// specificRange returns TAS/fuel flow (m/kg) at level flight.
func (a *Aircraft) specificRange(mass, p, t, mach, cosL float64) float64 {
	d, _, _ := a.drag(mass, p, mach, cosL)
	return mach * SpeedOfSound(t) / (a.tsfc(t, mach) * d)
}

// LRCMach returns the long-range cruise Mach: the Mach above MaxRangeMach
// where specific range has fallen to 99 % of its maximum (common
// practice), found by bisection to 1e-7 Mach; the top of MachBand if the
// range is still above 99 % there.
func (a *Aircraft) LRCMach(mass, p, isaDev, floor float64) (float64, bool) {
	lo, hi, ok := a.MachBand(mass, p, isaDev, floor)
	if !ok {
		return math.NaN(), false
	}
	t := isaTemperatureAtPressure(p) + isaDev
	m, _ := a.lrcIn(mass, p, t, lo, hi)
	return m, true
}

// lrcIn returns LRC Mach and the max-range Mach within [lo, hi].
func (a *Aircraft) lrcIn(mass, p, t, lo, hi float64) (lrc, mr float64) {
	cosL := math.Cos(a.Sweep)
	mr = a.econMachIn(mass, p, t, lo, hi, 0, 0)
	target := 0.99 * a.specificRange(mass, p, t, mr, cosL)
	if a.specificRange(mass, p, t, hi, cosL) >= target {
		return hi, mr
	}
	x0, x1 := mr, hi
	for x1-x0 > machTol {
		m := 0.5 * (x0 + x1)
		if a.specificRange(mass, p, t, m, cosL) >= target {
			x0 = m
		} else {
			x1 = m
		}
	}
	return x0, mr
}
