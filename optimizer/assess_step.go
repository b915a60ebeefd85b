package optimizer

import (
	"fmt"
	"math"

	"levelpath/perf"
)

// step flies the level change ch that begins at s.x on segment k.
func (s *sim) step(k int, ch Change, c cond, steps *int, lastStep *float64) error {
	q, a := s.q, s.a
	from, to := s.fl, ch.FL
	s.target = to
	if to == from {
		return nil
	}
	// Step rules.
	seg := &s.segs[k]
	switch {
	case q.Steps.NoSteps:
		s.violate(LimitStepRule, 0, "", fmt.Sprintf("change at %.0f NM: steps are not allowed", s.x/nmToM))
	case abs(to-from)*100 > q.Steps.maxChangeFt():
		s.violate(LimitStepRule, float64(abs(to-from)*100-q.Steps.maxChangeFt()), "ft", fmt.Sprintf("change FL%03d to FL%03d exceeds the largest step %d ft", from, to, q.Steps.maxChangeFt()))
	case to < from && !q.Steps.AllowDescent && containsInt(seg.Levels, from) && !blocked(q.Blocked, seg.FromDist, seg.ToDist, from) && !c.closed:
		// A step descent is forced (and allowed) where the level stops
		// being available on the segment: the search's rule.
		s.violate(LimitStepRule, 0, "", fmt.Sprintf("step descent FL%03d to FL%03d at %.0f NM: step descents are not allowed", from, to, s.x/nmToM))
	}
	if to > q.MaxFL {
		s.violateLeg(len(s.plan.Legs), "certified", float64(to-q.MaxFL)*100, "ft", fmt.Sprintf("FL%03d asked at %.0f NM is above the highest usable level FL%03d", to, s.x/nmToM, q.MaxFL))
	}
	*steps++
	if q.Steps.MaxSteps > 0 && *steps > q.Steps.MaxSteps {
		s.violate(LimitStepRule, float64(*steps-q.Steps.MaxSteps), "steps", fmt.Sprintf("step %d exceeds the limit of %d steps", *steps, q.Steps.MaxSteps))
	}
	if d := s.x - *lastStep; q.Steps.MinDistance > 0 && d < q.Steps.MinDistance-1e-6 {
		s.violate(LimitStepRule, (q.Steps.MinDistance-d)/nmToM, "NM", fmt.Sprintf("step at %.0f NM is %.0f NM after the previous one (minimum %.0f NM)", s.x/nmToM, d/nmToM, q.Steps.MinDistance/nmToM))
	}
	*lastStep = s.x
	cNew, err := s.condAt(k, to)
	if err != nil {
		return err
	}
	pFrom, pTo := perf.FLToPressure(float64(from)), perf.FLToPressure(float64(to))
	v := cruisePoint(a, q.Speed, q.CI, s.pm(), pTo, cNew)
	if !v.ok {
		v = cruisePoint(a, q.Speed, q.CI, s.pm(), pFrom, c)
	}
	mach := v.mach
	if mach == 0 && len(s.plan.Legs) > 0 {
		mach = s.plan.Legs[len(s.plan.Legs)-1].Mach
	}
	sch := machSchedule(a, q.ClimbSchedule, mach, math.Max(pFrom, pTo))
	isa := (c.isaDev + cNew.isaDev) / 2
	tr := transition(a, s.pm(), pFrom, pTo, isa, sch, to > from)
	if !tr.ok && to > from {
		// Climb as high as the aircraft can and level off there.
		lf, ok := reachableFL(from, to, func(fl int) bool {
			return transition(a, s.pm(), pFrom, perf.FLToPressure(float64(fl)), isa, sch, true).ok
		})
		if !ok || lf == from {
			s.violateLeg(len(s.plan.Legs), "climb", float64(to-from)*100, "ft", fmt.Sprintf("step FL%03d to FL%03d at %.0f NM cannot be flown at %.0f kg (%s): the aircraft stays at FL%03d and climbs when it can", from, to, s.x/nmToM, s.m, tr.why, from))
			return nil
		}
		s.violateLeg(len(s.plan.Legs), "climb", float64(to-lf)*100, "ft", fmt.Sprintf("step FL%03d to FL%03d at %.0f NM cannot be completed at %.0f kg (%s): the aircraft levels off at FL%03d and climbs to FL%03d when it can", from, to, s.x/nmToM, s.m, tr.why, lf, to))
		to, pTo = lf, perf.FLToPressure(float64(lf))
		if cNew, err = s.condAt(k, to); err != nil {
			return err
		}
		tr = transition(a, s.pm(), pFrom, pTo, (c.isaDev+cNew.isaDev)/2, sch, true)
	}
	if !tr.ok {
		return inputErrorf("profile", "change FL%03d to FL%03d at %.0f NM at %.0f kg: %s", from, to, s.x/nmToM, s.m, tr.why)
	}
	w := 0.5 * (c.wind + cNew.wind)
	g := tr.dist + w*tr.time
	cm := cNew
	cm.wind = w
	s.addTransLeg(PhaseStep, k, float64(from), float64(to), g, tr, cm)
	s.fl = to
	return nil
}

// resumeClimb climbs from a level-off level to the profile's level once
// the aircraft can (lighter), when the climb ends before the top of
// descent (whose ground distance was last priced as descGround). The
// climb is flown at maximum climb thrust at the cruise Mach like a step;
// it is not a step of the profile, so the step rules do not apply to it.
func (s *sim) resumeClimb(k int, descGround, total float64) error {
	q, a := s.q, s.a
	c, err := s.condAt(k, s.fl)
	if err != nil {
		return err
	}
	cNew, err := s.condAt(k, s.target)
	if err != nil {
		return err
	}
	pFrom, pTo := perf.FLToPressure(float64(s.fl)), perf.FLToPressure(float64(s.target))
	mach := 0.0
	if len(s.plan.Legs) > 0 {
		mach = s.plan.Legs[len(s.plan.Legs)-1].Mach
	}
	if v := cruisePoint(a, q.Speed, q.CI, s.pm(), pTo, cNew); v.ok {
		mach = v.mach
	}
	if mach == 0 {
		return nil
	}
	sch := machSchedule(a, q.ClimbSchedule, mach, pFrom)
	tr := transition(a, s.pm(), pFrom, pTo, (c.isaDev+cNew.isaDev)/2, sch, true)
	if !tr.ok {
		return nil
	}
	w := 0.5 * (c.wind + cNew.wind)
	g := tr.dist + w*tr.time
	if s.x+g >= total-descGround {
		return nil
	}
	cm := cNew
	cm.wind = w
	s.addTransLeg(PhaseStep, k, float64(s.fl), float64(s.target), g, tr, cm)
	s.fl = s.target
	return nil
}

// reachableFL returns the highest whole flight level in (from, to) that
// ok accepts, by bisection (ok must hold low and fail high, as a climb's
// completion does); ok is false when none does.
//
// Complexity: O(log(to-from)) calls of ok.
func reachableFL(from, to int, ok func(int) bool) (int, bool) {
	lo, hi := from, to // ok(hi) is false; ok(lo) is assumed
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if ok(mid) {
			lo = mid
		} else {
			hi = mid
		}
	}
	if lo == from && !ok(from) {
		return 0, false
	}
	return lo, true
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// addTransLeg appends a climb, step or descent leg of ground length g.
func (s *sim) addTransLeg(ph Phase, k int, fromFL, toFL, g float64, tr transVal, c cond) {
	mach := tr.mach
	if ph != PhaseStep {
		// The Mach at the cruise end of a climb or descent on its
		// CAS/Mach schedule (the schedule's Mach may not be reached).
		sch, fl := s.q.ClimbSchedule, toFL
		if ph == PhaseDescent {
			sch, fl = s.q.DescentSchedule, fromFL
		}
		mach = scheduleMach(sch, perf.FLToPressure(fl))
	}
	leg := Leg{Segment: k, Phase: ph, FromDist: s.x, ToDist: s.x + g, FromFL: fromFL, FL: toFL, Mach: mach,
		ISADev: c.isaDev, EDR: c.edr, Fuel: tr.fuel, Time: tr.time, MassStart: s.m,
		BuffetMargin: nan, Floor: c.floor, FloorReason: c.why, MaxFLBuffet: nan, MaxFLThrust: nan, ResidualClimb: nan}
	if tr.time > 0 {
		leg.TAS = tr.dist / tr.time
		leg.GS = g / tr.time
		leg.WindAlong = leg.GS - leg.TAS
	}
	s.plan.Legs = append(s.plan.Legs, leg)
	if ph == PhaseStep {
		s.plan.Steps = append(s.plan.Steps, Step{AtDist: s.x, FromFL: int(fromFL), ToFL: int(toFL)})
	}
	s.m -= tr.fuel
	s.t += tr.time
	s.x += g
}
