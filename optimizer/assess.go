package optimizer

import (
	"context"
	"fmt"
	"math"
	"slices"
	"time"

	"levelpath/perf"
	"levelpath/route"
)

// Assess prices a proposed profile with the same model as Solve and lists,
// in Plan.Violations, every limit it breaks (buffet margin under the floor,
// level above the thrust-limited or certified ceiling, empty Mach band,
// level not allowed by the rule or blocked, closed by turbulence, step
// rules, landing mass over MLW, fuel exhausted) instead of failing. A
// change that begins within 0.5 NM of a segment boundary is taken at the
// boundary, so a profile printed in whole NM prices as the plan it came
// from. Pricing the profile of a Solve result gives that plan's totals.
// The baseline (best constant level, as in Solve) is computed too, or
// Plan.BaselineNote says why not.
//
// Complexity: O(segments + changes) point evaluations.
//
// Assess is AssessContext with context.Background(): it is never
// cancelled.
func Assess(p *Problem, prof Profile) (*Plan, error) {
	return AssessContext(context.Background(), p, prof)
}

// AssessContext is Assess, stopped when ctx is done: the pricing checks
// ctx at every piece of the profile, the baseline's search every 256
// settled nodes. A cancelled call returns an error that wraps ctx.Err()
// and no plan; a context that is never done gives exactly Assess's result.
func AssessContext(ctx context.Context, p *Problem, prof Profile) (*Plan, error) {
	return assessProblem(ctx, p, prof, true)
}

// assessProblem is AssessContext, with the baseline only when asked (a
// search: tests that price thousands of profiles skip it).
func assessProblem(ctx context.Context, p *Problem, prof Profile, baseline bool) (*Plan, error) {
	if err := ctxErr(ctx); err != nil {
		return nil, err
	}
	q := *p
	warn, err := q.normalise()
	if err != nil {
		return nil, err
	}
	plan, err := assess(ctx, &q, prof, warn, q.LegCeilings)
	if err != nil {
		return nil, err
	}
	if baseline {
		if err := assessBaseline(ctx, &q, plan); err != nil {
			return nil, err
		}
	} else {
		plan.BaselineNote = "not computed"
	}
	return plan, nil
}

// sim is the state of the forward simulation of a profile.
// pm is the mass the aircraft's performance is priced at: the mass, or
// OEW once the trip has burnt it below that (a flight that cannot be
// flown; its landing-mass violation says so), so that such a profile is
// priced to the end rather than refused.
func (s *sim) pm() float64 { return math.Max(s.m, s.a.OEW) }

type sim struct {
	q    *Problem
	a    *perf.Aircraft
	plan *Plan
	m    float64 // mass
	t    float64 // seconds since departure
	x    float64 // distance flown
	fl   int     // level flown
	// target is the level the profile asks for; it differs from fl
	// while the aircraft cannot reach it (levelled off below).
	target int
	segs   []route.Segment
	start  *InFlight       // nil: from brake release; else in cruise from this state
	ctx    context.Context // checked at every piece; nil: never done
}

func (s *sim) violate(limit Limit, by float64, unit, detail string) {
	s.violateLeg(len(s.plan.Legs)-1, limit, by, unit, detail)
}

// violateLeg records a violation on leg i (which may be the next leg).
func (s *sim) violateLeg(i int, limit Limit, by float64, unit, detail string) {
	s.plan.Violations = append(s.plan.Violations, Violation{Leg: i, Limit: limit, By: by, Unit: unit, Detail: detail})
}

// segAt returns the segment holding distance d.
func (s *sim) segAt(d float64) int { return segmentIndex(s.segs, d) }

// condAt samples the weather on segment k at level fl at the current time.
func (s *sim) condAt(k, fl int) (cond, error) {
	pr := perf.FLToPressure(float64(fl))
	w, d, e, err := segWeather(s.q.Weather, &s.segs[k], pr, s.q.Depart.Add(time.Duration(s.t*float64(time.Second))))
	if err != nil {
		return cond{}, &InputError{Field: "Weather", Msg: fmt.Sprintf("segment %d at FL%d: %v", k, fl, err), Err: err}
	}
	c := cond{wind: w, isaDev: s.q.isaDevOr(d), edr: e}
	if err := s.q.Aircraft.CheckTableDomain(float64(fl), c.isaDev); err != nil {
		// Operator tables only: never extrapolated.
		return cond{}, &InputError{Field: "Aircraft", Msg: fmt.Sprintf("segment %d at FL%d, ISA%+.1f: %v", k, fl, c.isaDev, err), Err: err}
	}
	c.floor, c.why, c.closed = floorFor(s.q.Floor, e, s.q.Turbulence)
	c.closedLim, c.closedWhy = LimitTurbulence, c.why
	return c, nil
}

func assess(ctx context.Context, q *Problem, prof Profile, warn []string, detail bool) (*Plan, error) {
	return assessFrom(ctx, q, prof, warn, detail, nil)
}

// assessFrom is assess from an in-flight state when start is not nil:
// the profile's initial level is the level flown at start.Dist, and the
// plan's take-off mass and departure are the state's mass and time.
// When ctx is done the pricing stops with ctxErr's error.
func assessFrom(ctx context.Context, q *Problem, prof Profile, warn []string, detail bool, start *InFlight) (*Plan, error) {
	if prof.Initial < 10 || !prof.sorted() {
		return nil, inputErrorf("profile", "profile %s: needs an initial level and changes in increasing distance", prof)
	}
	segs := q.Track.Segments
	total := segs[len(segs)-1].ToDist
	// Snap changes to boundaries within 0.5 NM.
	pr := Profile{Initial: prof.Initial, Changes: make([]Change, len(prof.Changes))}
	copy(pr.Changes, prof.Changes)
	for i := range pr.Changes {
		d := pr.Changes[i].AtDist
		best := 0.5 * nmToM
		for _, sg := range segs {
			if b := sg.FromDist; math.Abs(b-d) <= best {
				best, pr.Changes[i].AtDist = math.Abs(b-d), b
			}
		}
	}
	plan := &Plan{Policy: policyOf(q), Aircraft: q.Aircraft.Name, CI: q.CI, Floor: q.Floor, Speed: q.Speed.String(), Depart: q.Depart,
		TakeoffMass: q.TakeoffMass, Distance: total, Profile: pr, Warnings: append([]string(nil), warn...)}
	plan.Warnings = append(plan.Warnings, edrLevelWarnings(q.Weather, pr)...)
	s := &sim{q: q, a: q.Aircraft, plan: plan, m: q.TakeoffMass, fl: pr.Initial, target: pr.Initial, segs: segs, start: start, ctx: ctx}
	if start != nil {
		s.x = start.Dist
	}
	if err := s.run(pr, total, detail); err != nil {
		return nil, err
	}
	plan.Totals.LandingMass = s.m
	plan.Totals.Fuel = q.TakeoffMass - s.m
	plan.Totals.Time = s.t
	plan.Totals.Cost = plan.Totals.Fuel + q.CI*s.t/60
	plan.Totals.CO2 = 3.16 * plan.Totals.Fuel
	classifyContrails(q, plan)
	s.checkLoading()
	fob := nan
	if q.ZFW > 0 {
		fob = q.TakeoffMass - q.ZFW
	}
	plan.Waypoints = waypoints(plan, q.Track, fob)
	if w := lowFuelWarning(plan.Waypoints); w != "" {
		plan.Warnings = append(plan.Warnings, w)
	}
	addWarnings(plan)
	return plan, nil
}

// run flies the profile: climb, cruise pieces split at segment boundaries
// and changes, steps, and the final descent.
func (s *sim) run(pr Profile, total float64, detail bool) error {
	q := s.q
	endP := perf.PressureAt(q.EndAltitude)
	if s.start == nil {
		if err := s.initialClimb(endP); err != nil {
			return err
		}
	}
	ci := 0
	if ci < len(pr.Changes) && pr.Changes[ci].AtDist < s.x-1e-6 {
		s.violate(LimitProfile, (s.x-pr.Changes[ci].AtDist)/nmToM, "NM", fmt.Sprintf("change to FL%03d at %.0f NM begins before the top of climb (%.0f NM); taken there", pr.Changes[ci].FL, pr.Changes[ci].AtDist/nmToM, s.x/nmToM))
		pr.Changes[ci].AtDist = s.x
	}
	steps := 0
	descFL, descGround := -1, 0.0 // level and ground distance of the last descent priced
	// The minimum step distance counts from the start of the segment that
	// holds the top of climb, as the search does.
	lastStep := s.segs[s.segAt(s.x)].FromDist
	if s.start != nil {
		lastStep = math.Inf(-1) // in flight: the next step may come at once
	}
	for guard := 0; guard < 10*len(s.segs)+10*len(pr.Changes)+10; guard++ {
		if err := ctxErr(s.ctx); err != nil {
			return err
		}
		if s.x >= total-1e-6 {
			s.violate(LimitProfile, 0, "", "the profile reaches the destination without a final descent")
			return nil
		}
		k := s.segAt(s.x)
		if s.fl < s.target {
			if err := s.resumeClimb(k, descGround, total); err != nil {
				return err
			}
			k = s.segAt(s.x)
		}
		c, err := s.condAt(k, s.fl)
		if err != nil {
			return err
		}
		xc := math.Inf(1)
		if ci < len(pr.Changes) {
			xc = pr.Changes[ci].AtDist
		}
		end := math.Min(s.segs[k].ToDist, xc)
		// The final descent is priced exactly only where its top may fall
		// in this piece. Its ground distance, first priced on reaching a
		// level, changes with mass and wind by a few NM: far less than
		// the margin of half that distance plus 50 NM.
		if s.fl != descFL {
			de, cLast, err := s.finalDescent(endP)
			if err != nil {
				return err
			}
			descFL, descGround = s.fl, de.dist+0.5*cLast.wind*de.time
		}
		tod := math.Inf(1)
		var de transVal
		var cLast cond
		if end >= total-1.5*descGround-50*nmToM {
			if de, cLast, err = s.finalDescent(endP); err != nil {
				return err
			}
			tod = total - (de.dist + 0.5*cLast.wind*de.time)
			end = math.Min(end, tod)
		}
		if end > s.x+1e-6 {
			s.cruise(k, end, c, detail)
		}
		if s.x >= tod-1e-6 || tod <= s.x {
			for ; ci < len(pr.Changes); ci++ {
				s.violate(LimitProfile, 0, "", fmt.Sprintf("change to FL%03d at %.0f NM lies past the top of descent (%.0f NM); ignored", pr.Changes[ci].FL, pr.Changes[ci].AtDist/nmToM, tod/nmToM))
			}
			s.addTransLeg(PhaseDescent, s.segAt(s.x), float64(s.fl), q.EndAltitude/(100*perf.FtToM), total-s.x, de, cLast)
			return nil
		}
		if ci < len(pr.Changes) && s.x >= xc-1e-6 {
			ch := pr.Changes[ci]
			ci++
			// A change that begins on a boundary is judged with the
			// segment that begins there, as the search does.
			if k+1 < len(s.segs) && s.x >= s.segs[k].ToDist-1e-6 {
				k++
				if c, err = s.condAt(k, s.fl); err != nil {
					return err
				}
			}
			if err := s.step(k, ch, c, &steps, &lastStep); err != nil {
				return err
			}
		}
	}
	return fmt.Errorf("optimizer: profile simulation did not converge")
}

// initialClimb flies the climb from the end altitude (pressure endP) to
// the profile's initial level, or as high as the aircraft can.
func (s *sim) initialClimb(endP float64) error {
	q, a := s.q, s.a
	c0, err := s.condAt(0, s.fl)
	if err != nil {
		return err
	}
	cl := transition(a, s.pm(), endP, perf.FLToPressure(float64(s.fl)), c0.isaDev, q.ClimbSchedule, true)
	if !cl.ok {
		// Climb as high as the aircraft can and level off there; the
		// profile's level is taken when the aircraft can reach it.
		startFL := int(math.Ceil(q.EndAltitude / (100 * perf.FtToM)))
		lf, ok := reachableFL(startFL, s.fl, func(fl int) bool {
			return transition(a, s.pm(), endP, perf.FLToPressure(float64(fl)), c0.isaDev, q.ClimbSchedule, true).ok
		})
		if !ok || lf <= startFL {
			return inputErrorf("profile", "initial climb to FL%03d at %.0f kg: %s", s.fl, s.m, cl.why)
		}
		s.violateLeg(0, LimitClimb, float64(s.fl-lf)*100, "ft", fmt.Sprintf("initial climb to FL%03d cannot be completed at %.0f kg (%s): the aircraft levels off at FL%03d and climbs to FL%03d when it can", s.fl, s.m, cl.why, lf, s.fl))
		s.fl = lf
		cl = transition(a, s.pm(), endP, perf.FLToPressure(float64(s.fl)), c0.isaDev, q.ClimbSchedule, true)
	}
	if s.target > q.MaxFL {
		s.violateLeg(0, LimitCertified, float64(s.target-q.MaxFL)*100, "ft", fmt.Sprintf("initial level FL%03d is above the highest usable level FL%03d", s.target, q.MaxFL))
	}
	g := cl.dist + 0.5*c0.wind*cl.time
	s.addTransLeg(PhaseClimb, 0, q.EndAltitude/(100*perf.FtToM), float64(s.fl), g, cl, c0)
	return nil
}

// finalDescent prices the idle descent from the current level and mass
// to the end altitude, with the last segment's weather at the current time.
func (s *sim) finalDescent(endP float64) (transVal, cond, error) {
	cLast, err := s.condAt(len(s.segs)-1, s.fl)
	if err != nil {
		return transVal{}, cond{}, err
	}
	de := transition(s.a, s.pm(), perf.FLToPressure(float64(s.fl)), endP, cLast.isaDev, s.q.DescentSchedule, false)
	if !de.ok {
		return transVal{}, cond{}, inputErrorf("profile", "final descent from FL%03d: %s", s.fl, de.why)
	}
	return de, cLast, nil
}

// cruise flies level from s.x to end on segment k.
func (s *sim) cruise(k int, end float64, c cond, detail bool) {
	q, a := s.q, s.a
	seg := &s.segs[k]
	p := perf.FLToPressure(float64(s.fl))
	v := cruisePoint(a, q.Speed, q.CI, s.pm(), p, c)
	leg := Leg{Segment: k, Phase: PhaseCruise, FromDist: s.x, ToDist: end, FromFL: float64(s.fl), FL: float64(s.fl),
		WindAlong: c.wind, ISADev: c.isaDev, EDR: c.edr, MassStart: s.m, Floor: c.floor, FloorReason: c.why}
	if !v.ok {
		// Keep pricing with the best Mach available, and record the limit.
		relaxed := c
		relaxed.floor, relaxed.closed = 1, false
		v2 := cruisePoint(a, q.Speed, q.CI, s.pm(), p, relaxed)
		if v2.mach == 0 {
			v2.mach = math.Min(q.Speed.Mach, a.MMO)
			if v2.mach == 0 {
				v2.mach = a.MMO - 0.02
			}
		}
		pt := a.Point(perf.State{Mass: s.pm(), Pressure: p, Mach: v2.mach, ISADev: c.isaDev, LoadFactor: 1})
		v = cruiseVal{mach: v2.mach, tas: pt.TAS, ff: pt.FuelFlow, resid: pt.ResidualClimb, margin: pt.BuffetMargin}
	}
	gs := v.tas + c.wind
	if gs < 50 {
		gs = 50
	}
	f0 := v.ff * (end - s.x) / gs
	pt := a.Point(perf.State{Mass: math.Max(s.m-f0/2, a.OEW), Pressure: p, Mach: v.mach, ISADev: c.isaDev, LoadFactor: 1})
	gs = math.Max(pt.TAS+c.wind, 50)
	dt := (end - s.x) / gs
	leg.Mach, leg.TAS, leg.GS = v.mach, pt.TAS, gs
	leg.Time, leg.Fuel = dt, pt.FuelFlow*dt
	leg.BuffetMargin = v.margin
	leg.ResidualClimb = v.resid
	if detail {
		leg.MaxFLBuffet = a.MaxFLBuffet(s.pm(), c.floor)
		leg.MaxFLThrust = a.MaxFLThrust(s.pm(), c.isaDev)
	} else {
		leg.MaxFLBuffet, leg.MaxFLThrust = nan, nan
	}
	s.plan.Legs = append(s.plan.Legs, leg)
	s.checkLimits(seg, end, c, v)
	s.m -= leg.Fuel
	s.t += dt
	s.x = end
}

// checkLimits records the limits a cruise leg breaks.
func (s *sim) checkLimits(seg *route.Segment, end float64, c cond, v cruiseVal) {
	q, a := s.q, s.a
	if c.closed {
		s.violate(LimitTurbulence, c.edr, "m^(2/3)/s", fmt.Sprintf("FL%03d on segment %d: %s", s.fl, seg.Index, c.closedWhy))
	}
	if s.fl != s.target {
		// Levelled off below the profile's level: the climb violation
		// says so; the rule and blocks are judged at the level asked for.
	} else if !containsInt(seg.Levels, s.fl) {
		s.violate(LimitLevelRule, 0, "", fmt.Sprintf("FL%03d is not an allowed level on segment %d (course %.0f° magnetic)%s", s.fl, seg.Index, seg.MagCourse, s.nearestOpen(seg, end)))
	}
	if s.fl == s.target && blocked(q.Blocked, s.x, end, s.fl) {
		s.violate(LimitBlocked, 0, "", fmt.Sprintf("FL%03d is blocked on %.0f-%.0f NM%s", s.fl, s.x/nmToM, end/nmToM, s.nearestOpen(seg, end)))
	}
	if s.fl > q.MaxFL {
		s.violate(LimitCertified, float64(s.fl-q.MaxFL)*100, "ft", fmt.Sprintf("FL%03d is above the highest usable level FL%03d", s.fl, q.MaxFL))
	}
	if v.margin < c.floor-1e-9 {
		s.violate(LimitBuffet, c.floor-v.margin, "g", fmt.Sprintf("buffet margin %.3f g under the %.2f g floor at FL%03d, %.0f kg", v.margin, c.floor, s.fl, s.m))
	}
	if v.resid < fpm300 {
		s.violate(LimitThrust, (fpm300-v.resid)/perf.FtToM*60, "fpm", fmt.Sprintf("residual climb %.0f ft/min under 300 ft/min at FL%03d", v.resid/perf.FtToM*60, s.fl))
	}
	if lo, hi, ok := a.MachBand(s.pm(), perf.FLToPressure(float64(s.fl)), c.isaDev, c.floor); !ok {
		s.violate(LimitMachBand, 0, "", fmt.Sprintf("no Mach band at %.2f g at FL%03d", c.floor, s.fl))
	} else if q.Speed.Kind == SpeedFixed && (q.Speed.Mach < lo-1e-9 || q.Speed.Mach > hi+1e-9) {
		s.violate(LimitMachBand, math.Max(lo-q.Speed.Mach, q.Speed.Mach-hi), "Mach", fmt.Sprintf("Mach %.3f outside the band %.3f-%.3f at FL%03d", q.Speed.Mach, lo, hi, s.fl))
	}
}

// nearestOpen names the allowed, unblocked levels of seg nearest to the
// level flown (what the aircraft would fly instead), or "".
func (s *sim) nearestOpen(seg *route.Segment, end float64) string {
	below, above := -1, -1
	for _, fl := range seg.Levels {
		if fl < s.q.MinFL || fl > s.q.MaxFL || blocked(s.q.Blocked, s.x, end, fl) {
			continue
		}
		if fl < s.fl {
			below = fl
		} else if fl > s.fl && above < 0 {
			above = fl
		}
	}
	switch {
	case below > 0 && above > 0:
		return fmt.Sprintf("; nearest open levels FL%03d and FL%03d", below, above)
	case below > 0:
		return fmt.Sprintf("; nearest open level FL%03d", below)
	case above > 0:
		return fmt.Sprintf("; nearest open level FL%03d", above)
	}
	return ""
}

func containsInt(xs []int, x int) bool {
	return slices.Contains(xs, x)
}
