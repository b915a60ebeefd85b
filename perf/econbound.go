package perf

import "math"

// econBoundPieces is the number of Mach sub-intervals of EconCostBelow.
const econBoundPieces = 8

// EconCostBelow returns a lower bound of the cost per metre of ground,
// (fuel flow + ci/60)/(TAS + windAlong) (kg/m, ci in kg/min), over every
// Mach of MachBand(mass, p, isaDev, floor): the cost at EconMach is never
// below it. ok is false when no Mach is free of buffet at the floor below
// MMO and VMO, so that MachBand is empty too. It costs a few dozen
// floating-point operations (the buffet Machs come from c's cache), against
// EconMach's dozen or so point evaluations, so a caller that wants the least
// cost over several levels can skip a level whose bound is already above
// the least cost found.
//
// Why it is a lower bound. MachBand lies within [lo, hi], the buffet-onset
// Machs at the floor cut by MMO and the Mach of VMO (the thrust test only
// narrows it). Cut [lo, hi] into econBoundPieces equal pieces [M0, M1]. In
// level flight the drag is D = qS (CD0 + K CL² + K6 CL⁶ + ΔCD_wave) with
// CL = W/(qS); the CL⁶ and wave terms are never negative (K6 >= 0, and the
// Korn/Lock rise is a fourth power), so D >= Dp(qS) = qS CD0 + K W²/(qS),
// a convex function of qS whose least value on the piece's dynamic
// pressures [qS(M0), qS(M1)] is at the minimum-drag value W √(K/CD0)
// clamped to them. The fuel flow is TSFC × D with TSFC = (A + B M) √θ (1 +
// PartPower u²) (1 + PerfFactorPct/100); the part-power factor is at least
// 1 (PartPower >= 0) and A + B M, linear, is least at an end of the piece.
// TAS + wind is at most M1 a + wind on the piece. So every Mach of the
// piece costs at least (TSFC_min Dp_min + ci/60)/(M1 a + wind) (+Inf where
// M1 a + wind <= 0: no Mach there has a positive ground speed), and the
// least over the pieces bounds the band. Aircraft outside the model's
// validated ranges (negative CD0, K, K6, PartPower, TSFC or performance
// factor) get the trivial bound 0.
func (c *Cruiser) EconCostBelow(mass, p, isaDev, floor, ci, windAlong float64) (float64, bool) {
	a := c.a
	bf := c.buffetMachs(mass, p, floor)
	if !bf.ok || math.IsNaN(isaDev) {
		return math.NaN(), false
	}
	tisa, vmo := c.atPressure(p)
	lo, hi := bf.lo, bf.hi
	if a.MMO <= hi {
		hi = a.MMO
	}
	if vmo < hi { // NaN (VMO supersonic here) does not cut
		hi = vmo
	}
	if !(lo < hi) {
		return math.NaN(), false
	}
	e := &a.Engines
	ff := a.fuelFactor()
	if !(a.CD0 > 0 && a.K >= 0 && a.K6 >= 0 && e.PartPower >= 0 && e.TSFCA >= 0 && e.TSFCB >= 0 && ff > 0 && ci >= 0) {
		return 0, true
	}
	t := tisa + isaDev
	sound := SpeedOfSound(t)
	theta := math.Sqrt(t / T0)
	w := mass * G0
	qsPerM2 := 0.5 * Gamma * p * a.WingArea // qS = qsPerM2 M²
	qsStar := w * math.Sqrt(a.K/a.CD0)      // least parabolic drag
	cps := ci / 60
	best := math.Inf(1)
	step := (hi - lo) / econBoundPieces
	for i := range econBoundPieces {
		m0, m1 := lo+float64(i)*step, lo+float64(i+1)*step
		if i == econBoundPieces-1 {
			m1 = hi
		}
		gs := m1*sound + windAlong
		if !(gs > 0) {
			continue
		}
		qs := math.Min(math.Max(qsStar, qsPerM2*m0*m0), qsPerM2*m1*m1)
		d := qs*a.CD0 + a.K*w*w/qs
		tsfc := math.Min(e.TSFCA+e.TSFCB*m0, e.TSFCA+e.TSFCB*m1) * theta * ff
		best = math.Min(best, (tsfc*d+cps)/gs)
	}
	return best, true
}
