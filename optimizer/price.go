package optimizer

import (
	"fmt"
	"math"

	"levelpath/perf"
)

// cruiseVal is cruise performance on one segment at one level and mass.
type cruiseVal struct {
	ok     bool
	lim    Limit // limit broken when !ok
	why    string
	mach   float64
	tas    float64
	ff     float64 // kg/s
	resid  float64 // residual climb at max climb thrust, m/s
	margin float64 // buffet margin at this mass, g
	cruise bool    // drag is within 10 % of max cruise thrust
}

// transVal is a level change: fuel, time and air distance.
type transVal struct {
	ok   bool
	why  string
	fuel float64
	time float64
	dist float64
	mach float64
}

// speeds is what cruise pricing asks of the aircraft: a *perf.Aircraft,
// or a *perf.Cruiser, which keeps the parts that repeat between calls and
// returns the same values bit for bit.
type speeds interface {
	EconMach(mass, p, isaDev, floor, ci, windAlong float64) (float64, bool)
	LRCMach(mass, p, isaDev, floor float64) (float64, bool)
	MachBand(mass, p, isaDev, floor float64) (lo, hi float64, ok bool)
	BuffetMachs(mass, p, n float64) (lo, hi float64, ok bool)
	Point(s perf.State) perf.Point
}

// machFor picks the Mach of the speed policy at mass m, pressure p and the
// given conditions; ok is false when no Mach satisfies the floor, MMO, VMO
// and thrust.
func machFor(a speeds, sp Speed, ci, m, p float64, c cond) (float64, bool) {
	switch sp.Kind {
	case SpeedLRC:
		return a.LRCMach(m, p, c.isaDev, c.floor)
	case SpeedFixed:
		lo, hi, ok := a.MachBand(m, p, c.isaDev, c.floor)
		if !ok || sp.Mach < lo-1e-9 || sp.Mach > hi+1e-9 {
			return sp.Mach, false
		}
		return sp.Mach, true
	}
	return a.EconMach(m, p, c.isaDev, c.floor, ci, c.wind)
}

// cruisePoint evaluates cruise at one level, mass and condition exactly.
// The reason of an infeasible result is left empty (the search asks
// millions of times); explainCruise fills it.
func cruisePoint(a *perf.Aircraft, sp Speed, ci, m, p float64, c cond) cruiseVal {
	return cruiseEval(a, a, sp, ci, m, p, c, false)
}

// priceCruise is cruisePoint on segment k at level li through the
// solver's perf.Cruiser (the same values, the repeated parts kept).
func (s *solver) priceCruise(sp Speed, m float64, k, li int) cruiseVal {
	return cruiseEval(s.a, s.cr, sp, s.p.CI, m, s.press[li], s.conds[k][li], false)
}

// explainCruise is cruisePoint with the reason of an infeasible result.
func explainCruise(a *perf.Aircraft, sp Speed, ci, m, p float64, c cond) cruiseVal {
	return cruiseEval(a, a, sp, ci, m, p, c, true)
}

// cruiseEval prices cruise for aircraft a, asking sv (a itself, or a's
// perf.Cruiser) for the speeds and the point performance.
func cruiseEval(a *perf.Aircraft, sv speeds, sp Speed, ci, m, p float64, c cond, explain bool) cruiseVal {
	why := func(format string, args ...any) string {
		if !explain {
			return ""
		}
		return fmt.Sprintf(format, args...)
	}
	if c.closed {
		lim := c.closedLim
		if lim == "" {
			lim = LimitTurbulence
		}
		return cruiseVal{lim: lim, why: c.closedWhy}
	}
	mach, ok := machFor(sv, sp, ci, m, p, c)
	if !ok && !explain {
		// Which limit closed the band matters only to an explanation;
		// the search asks often, so it is not worked out here.
		return cruiseVal{lim: LimitMachBand}
	}
	if !ok {
		lo, hi, bok := sv.BuffetMachs(m, p, c.floor)
		if !bok || lo >= math.Min(hi, a.MMO) {
			return cruiseVal{lim: LimitBuffet, why: why("no Mach keeps %.2f g to buffet", c.floor)}
		}
		if sp.Kind == SpeedFixed {
			return cruiseVal{lim: LimitMachBand, why: why("Mach %.3f outside the band %.3f-%.3f at %.2f g, MMO and thrust", sp.Mach, lo, math.Min(hi, a.MMO), c.floor)}
		}
		return cruiseVal{lim: LimitThrust, why: "drag exceeds maximum cruise thrust across the buffet band"}
	}
	st := perf.State{Mass: m, Pressure: p, Mach: mach, ISADev: c.isaDev, LoadFactor: 1}
	var pt perf.Point
	if cr, ok := sv.(*perf.Cruiser); ok {
		pt = cr.PointNoCAS(st) // CAS is not read here
	} else {
		pt = sv.Point(st)
	}
	v := cruiseVal{mach: mach, tas: pt.TAS, ff: pt.FuelFlow, resid: pt.ResidualClimb, margin: pt.BuffetMargin,
		cruise: pt.Drag > 0.9*pt.MaxCruiseThrust}
	switch {
	case pt.ThrustLimited:
		v.lim, v.why = LimitThrust, "drag exceeds maximum cruise thrust"
	case pt.ResidualClimb < fpm300:
		v.lim, v.why = LimitThrust, why("residual climb %.0f ft/min under 300 ft/min", pt.ResidualClimb/perf.FtToM*60)
	case pt.BuffetMargin < c.floor-1e-9:
		v.lim, v.why = LimitBuffet, why("buffet margin %.3f g under the %.2f g floor", pt.BuffetMargin, c.floor)
	default:
		v.ok = true
	}
	return v
}

// lerpCruise interpolates two feasible cruise values.
func lerpCruise(v0, v1 *cruiseVal, t float64) cruiseVal {
	l := func(a, b float64) float64 { return a + (b-a)*t }
	return cruiseVal{ok: true, mach: l(v0.mach, v1.mach), tas: l(v0.tas, v1.tas), ff: l(v0.ff, v1.ff),
		resid: l(v0.resid, v1.resid), margin: l(v0.margin, v1.margin), cruise: v0.cruise || v1.cruise}
}

// transitions integrates climbs and descents: a *perf.Aircraft, or a
// *perf.Cruiser (the same values, the standard atmosphere on the
// integration's heights kept).
type transitions interface {
	Climb(mass, fromP, toP, isaDev float64, s perf.Schedule) (perf.Transition, error)
	Descent(mass, fromP, toP, isaDev float64, s perf.Schedule) (perf.Transition, error)
}

// transition prices a climb (to > from) or descent between two pressures,
// with the reason of a failure in why.
func transition(a transitions, m, pFrom, pTo, isaDev float64, s perf.Schedule, climb bool) transVal {
	v, err := transitionErr(a, m, pFrom, pTo, isaDev, s, climb)
	if err != nil {
		v.why = err.Error()
	}
	return v
}

// quietTransition is transition for the search: a failure's reason is
// not formatted (explanations ask transition again).
func quietTransition(a transitions, m, pFrom, pTo, isaDev float64, s perf.Schedule, climb bool) transVal {
	v, _ := transitionErr(a, m, pFrom, pTo, isaDev, s, climb)
	return v
}

func transitionErr(a transitions, m, pFrom, pTo, isaDev float64, s perf.Schedule, climb bool) (transVal, error) {
	var tr perf.Transition
	var err error
	if climb {
		tr, err = a.Climb(m, pFrom, pTo, isaDev, s)
	} else {
		tr, err = a.Descent(m, pFrom, pTo, isaDev, s)
	}
	if err != nil {
		return transVal{}, err
	}
	return transVal{ok: true, fuel: tr.Fuel, time: tr.Time, dist: tr.Distance, mach: s.Mach}, nil
}

// machSchedule returns the schedule of a step: Mach mach, but never above
// VMO, so that a step from a VMO-limited level accelerates to the new
// level's Mach as it climbs (the climb integration charges the kinetic
// energy) instead of starting at that Mach.
func machSchedule(a *perf.Aircraft, base perf.Schedule, mach, pLow float64) perf.Schedule {
	cas := perf.MachToCAS(mach, pLow) * 1.001
	if cas <= a.VMO && pLow < perf.PressureAt(10000*perf.FtToM) {
		// The Mach's CAS is highest at the lower level and still under
		// VMO there: Mach governs throughout, and no CAS limit is needed
		// (perf: a zero field sets no limit).
		return perf.Schedule{Mach: mach}
	}
	return perf.Schedule{CASLow: base.CASLow, CAS: math.Min(a.VMO, cas), Mach: mach}
}
