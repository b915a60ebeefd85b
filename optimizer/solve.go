package optimizer

import (
	"fmt"
	"sort"
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
// interpolated between mass grid points 1 % of MTOW apart where both are
// feasible. The profile found is then priced by Assess with the weather at
// the true times, which fills the plan's legs and totals.
//
// The baseline is the best constant-level profile (the same search with
// steps forbidden), also priced by Assess.
func Solve(p *Problem) (*Plan, error) {
	q := *p
	warn, err := q.normalise()
	if err != nil {
		return nil, err
	}
	s, err := newSolver(&q)
	if err != nil {
		return nil, err
	}
	res, ok := s.search()
	if !ok {
		return nil, s.infeasible()
	}
	prof := s.profileOf(res.path)
	plan, err := assess(&q, prof, warn, q.LegCeilings)
	if err != nil {
		return nil, err
	}
	plan.SearchCost = res.cost
	plan.Nodes, plan.Edges = res.nodes, s.edges
	// Mass limits at landing are the loading's, not the profile's: warn.
	// Anything else means the exact pricing disagrees with the search at
	// a limit (a value interpolated at the edge of feasibility); say so.
	var other []Violation
	for _, v := range plan.Violations {
		switch v.Limit {
		case "landing-mass", "fuel":
			plan.Warnings = append(plan.Warnings, v.Detail)
		default:
			other = append(other, v)
		}
	}
	if len(other) > 0 {
		plan.Warnings = append(plan.Warnings, fmt.Sprintf("exact pricing found %d limit(s) broken that the search did not see; first: %s", len(other), other[0].Detail))
	}
	// Baseline: the same problem with steps forbidden.
	bs := s.withoutSteps()
	if br, ok := bs.search(); ok {
		bp := bs.profileOf(br.path)
		if bplan, err := assess(bs.p, bp, nil, false); err == nil && !breaksProfileLimits(bplan.Violations) {
			plan.Baseline = &Baseline{FL: bp.Initial, Totals: bplan.Totals}
			if bplan.Totals.Cost > 0 {
				plan.Baseline.SavingPct = (bplan.Totals.Cost - plan.Totals.Cost) / bplan.Totals.Cost * 100
			}
		}
	}
	if plan.Baseline == nil {
		plan.Warnings = append(plan.Warnings, "no constant level is feasible along the whole route: no baseline")
	}
	return plan, nil
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

// infeasible explains why no profile exists: the limits at take-off mass
// on the first segment, level by level.
func (s *solver) infeasible() error {
	m := s.p.TakeoffMass
	byLim := map[string][]int{}
	var why = map[string]string{}
	for li, fl := range s.levels {
		if !s.allow[0][li] {
			byLim["level-rule"] = append(byLim["level-rule"], fl)
			continue
		}
		v := explainCruise(s.a, s.p.Speed, s.p.CI, m, s.press[li], s.conds[0][li])
		if v.ok {
			c, g := s.initialClimb(li)
			switch {
			case !c.ok:
				byLim["climb"] = append(byLim["climb"], fl)
				why["climb"] = c.why
			case g >= s.total/2:
				byLim["route too short"] = append(byLim["route too short"], fl)
			default:
				byLim["later segments"] = append(byLim["later segments"], fl)
			}
			continue
		}
		byLim[v.lim] = append(byLim[v.lim], fl)
		if why[v.lim] == "" {
			why[v.lim] = v.why
		}
	}
	var parts []string
	keys := make([]string, 0, len(byLim))
	for k := range byLim {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
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
		if v.Limit != "landing-mass" && v.Limit != "fuel" {
			return true
		}
	}
	return false
}
