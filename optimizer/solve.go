package optimizer

import (
	"context"
	"fmt"
	"maps"
	"math"
	"slices"
	"strings"
)

// Solve finds the cheapest vertical profile for p and prices it exactly.
//
// The search (see solver.search) runs over nodes (segment boundary, level,
// mass bucket) with edges for the initial climb (from departure to each
// cruise level, top of climb inside the route), cruise along a segment,
// step climbs (maximum climb thrust at the cruise Mach, inside the
// segment; a step may run into the next segment, which is credited), step
// descents where the rules allow them, and the final descent (idle, top of
// descent inside the route). Deviations from a plain shortest path: weather
// is sampled at a nominal time of passage, and cruise and step prices are
// interpolated between mass grid points where both are feasible (1 % of
// MTOW apart with Problem.Exact; by default 2 %, with states that differ
// only in the segments since the last step merged and a coarser step
// memo, within 0.02 % of Exact on the test instances). The search is A*
// with a lower bound that leaves its result equal to Dijkstra's (see
// solver.search and searchBound). The profile found is then priced by Assess with the weather at
// the true times, which fills the plan's legs and totals.
//
// The baseline is the best constant-level profile (the same search with
// steps forbidden), also priced by Assess.
//
// Solve is SolveContext with context.Background(): it is never cancelled.
func Solve(p *Problem) (*Plan, error) {
	return SolveContext(context.Background(), p)
}

// SolveContext is Solve, stopped when ctx is done: the search checks ctx
// every 256 settled nodes, the exact pricing at every piece of the
// profile, and the baseline's search and pricing likewise. A cancelled
// call returns an error that wraps ctx.Err() (errors.Is(err,
// context.Canceled) or context.DeadlineExceeded) and no plan. A context
// that is never done gives exactly Solve's result.
func SolveContext(ctx context.Context, p *Problem) (*Plan, error) {
	if err := ctxErr(ctx); err != nil {
		return nil, err
	}
	q := *p
	warn, err := q.normalise()
	if err != nil {
		return nil, err
	}
	// The search samples the weather at a nominal time of passage and
	// prices on a mass grid; exact pricing uses the true times and
	// masses. Where the two disagree at a limit (a cruise leg exact
	// pricing finds over the thrust or buffet limit), that level is
	// closed on that segment for the search and it runs again, at most
	// maxRecheck times, so that the plan keeps the limits it was asked to.
	qs := q // the search's problem: q plus the levels exact pricing closed
	var closed []string
	var s *solver
	var res searchResult
	var plan *Plan
	for round := 0; ; round++ {
		if s, err = newSolver(&qs); err != nil {
			return nil, err
		}
		s.ctx = ctx
		var ok bool
		res, ok = s.search()
		if res.err != nil {
			return nil, res.err
		}
		if !ok {
			if round > 0 {
				break // keep the last plan found: its violations are listed
			}
			if pl, err := s.tooHeavyForFuel(ctx, &q, warn); pl != nil || err != nil {
				return pl, err
			}
			return nil, s.infeasible()
		}
		next, err := assess(ctx, &q, s.profileOf(res.path), warn, q.LegCeilings)
		if err != nil {
			return nil, err
		}
		plan = next
		blocks := recheckBlocks(&q, plan)
		if len(blocks) == 0 || round == maxRecheck {
			break
		}
		for _, b := range blocks {
			closed = append(closed, fmt.Sprintf("FL%03d at %.0f-%.0f NM", b.Levels[0], b.FromDist/nmToM, b.ToDist/nmToM))
		}
		qs.Blocked = append(slices.Clip(qs.Blocked), blocks...)
	}
	if len(closed) > 0 {
		plan.Warnings = append(plan.Warnings, "exact pricing found limits the search's nominal weather times did not: planned again without "+strings.Join(closed, ", "))
	}
	noteSearch(plan, res, s.edges)
	// Baseline: the same problem with steps forbidden.
	if err := s.addBaseline(plan, res.cost); err != nil {
		return nil, err
	}
	return plan, nil
}

// noteSearch records the search's cost, nodes and edges in plan and says
// in its warnings where the bound failed and where exact pricing found
// limits the search did not see. Loading limits (fuel, landing mass) stay
// in Violations and make the plan's status impossible; any other
// violation means the exact pricing disagrees with the search at a limit
// (a value interpolated at the edge of feasibility): it stays listed and
// is named here.
func noteSearch(plan *Plan, res searchResult, edges int) {
	plan.SearchCost = res.cost
	if res.violations > 0 {
		plan.Warnings = append(plan.Warnings, fmt.Sprintf("the search's lower bound failed on %d edges; the profile was found again by plain Dijkstra", res.violations))
	}
	plan.Nodes, plan.Edges = res.nodes, edges
	var other []Violation
	for _, v := range plan.Violations {
		if !IsLoadingLimit(v.Limit) {
			other = append(other, v)
		}
	}
	if len(other) > 0 {
		plan.Warnings = append(plan.Warnings, fmt.Sprintf("exact pricing found %d limit(s) broken that the search did not see; first: %s", len(other), other[0].Detail))
	}
}

// maxRecheck bounds the searches SolveContext runs again after exact
// pricing closed a level.
const maxRecheck = 3

// recheckBlocks returns a block for each cruise leg of plan that exact
// pricing found over the thrust, buffet or Mach-band limit: its level
// over the inside of its segment.
func recheckBlocks(q *Problem, plan *Plan) []Block {
	var out []Block
	seen := map[[2]int]bool{}
	for _, v := range plan.Violations {
		if v.Leg < 0 || v.Leg >= len(plan.Legs) {
			continue
		}
		switch v.Limit {
		case LimitThrust, LimitBuffet, LimitMachBand:
		default:
			continue
		}
		l := plan.Legs[v.Leg]
		if l.Phase != PhaseCruise || l.Segment < 0 || l.Segment >= len(q.Track.Segments) {
			continue
		}
		fl := int(math.Round(l.FL))
		if seen[[2]int{l.Segment, fl}] {
			continue
		}
		seen[[2]int{l.Segment, fl}] = true
		seg := q.Track.Segments[l.Segment]
		out = append(out, Block{FromDist: seg.FromDist + 1, ToDist: seg.ToDist - 1, Levels: []int{fl}})
	}
	return out
}

// profileOf turns a search path into a Profile.
func (s *solver) profileOf(path []label) Profile {
	var prof Profile
	prev := -1
	for _, l := range path {
		if l.id == sourceID || l.id == sinkID {
			continue
		}
		st := stateOf(l.id)
		if prev < 0 {
			prof.Initial = s.levels[st.li]
		} else if st.li != prev {
			// The change begins at the boundary before this node.
			prof.Changes = append(prof.Changes, Change{AtDist: s.bounds[st.k-1], FL: s.levels[st.li]})
		}
		prev = st.li
	}
	return prof
}

// tooHeavyForFuel handles a search that found no profile although some
// level is open on the first segment: where the reason is that the trip
// burns the mass down below OEW (states under OEW are never priced), it
// returns the constant-level profile of least fuel among those levels, as
// Assess prices it, whose violations say so (status impossible, as for
// any loading that cannot be flown) and a warning that no profile was
// searched. It returns nil, nil when no such plan explains the failure.
// Cost: one Assess per open level.
func (s *solver) tooHeavyForFuel(ctx context.Context, q *Problem, warn []string) (*Plan, error) {
	var best *Plan
	for li, fl := range s.levels {
		if !s.allow[0][li] || !explainCruise(s.a, s.p.Speed, s.p.CI, s.p.TakeoffMass, s.press[li], s.conds[0][li]).ok {
			continue
		}
		pl, err := assess(ctx, q, Profile{Initial: fl}, warn, q.LegCeilings)
		if err != nil {
			if ctxErr(ctx) != nil {
				return nil, err
			}
			continue
		}
		if !slices.ContainsFunc(pl.Violations, func(v Violation) bool { return v.Limit == LimitLandingMass && pl.Totals.LandingMass < s.a.OEW }) {
			continue
		}
		if best == nil || pl.Totals.Fuel < best.Totals.Fuel {
			best = pl
		}
	}
	if best != nil {
		best.Warnings = append(best.Warnings, fmt.Sprintf("no profile reaches the destination above the operating empty mass %.0f kg: shown is the constant level of least fuel, FL%03d, not a searched profile", s.a.OEW, best.Profile.Initial))
		best.BaselineNote = "not computed: the flight cannot be flown at this take-off mass"
	}
	return best, nil
}

// infeasible explains why no profile exists: the limits at take-off mass
// on the first segment, level by level.
func (s *solver) infeasible() error {
	m := s.p.TakeoffMass
	byLim := map[string][]int{}
	var why = map[string]string{}
	for li, fl := range s.levels {
		if !s.allow[0][li] {
			byLim[string(LimitLevelRule)] = append(byLim[string(LimitLevelRule)], fl)
			continue
		}
		v := explainCruise(s.a, s.p.Speed, s.p.CI, m, s.press[li], s.conds[0][li])
		if v.ok {
			c, g := s.initialClimb(li)
			switch {
			case !c.ok:
				byLim[string(LimitClimb)] = append(byLim[string(LimitClimb)], fl)
				why[string(LimitClimb)] = c.why
			case g >= s.total/2:
				byLim["route too short"] = append(byLim["route too short"], fl)
			default:
				byLim["later segments"] = append(byLim["later segments"], fl)
			}
			continue
		}
		k := string(v.lim)
		byLim[k] = append(byLim[k], fl)
		if why[k] == "" {
			why[k] = v.why
		}
	}
	var parts []string
	for _, k := range slices.Sorted(maps.Keys(byLim)) {
		fls := byLim[k]
		part := fmt.Sprintf("%s at %s", k, flRange(fls))
		if why[k] != "" {
			part += " (" + why[k] + ")"
		}
		parts = append(parts, part)
	}
	return inputErrorf("TakeoffMass", "no feasible profile at take-off mass %.0f kg: %s", m, strings.Join(parts, "; "))
}

// flRange formats a list of levels compactly.
func flRange(fls []int) string {
	if len(fls) == 0 {
		return "none"
	}
	if len(fls) <= 3 {
		s := make([]string, len(fls))
		for i, f := range fls {
			s[i] = fmt.Sprintf("FL%03d", f)
		}
		return strings.Join(s, ",")
	}
	return fmt.Sprintf("FL%03d-FL%03d", fls[0], fls[len(fls)-1])
}

// breaksProfileLimits reports whether vs holds a limit of the profile
// itself; landing mass and fuel on board are the loading's.
func breaksProfileLimits(vs []Violation) bool {
	for _, v := range vs {
		if !IsLoadingLimit(v.Limit) {
			return true
		}
	}
	return false
}
