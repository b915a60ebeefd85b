package optimizer

import (
	"context"
	"fmt"
)

// addBaseline fills plan.Baseline with the best constant-level profile of
// s's problem (the same search with steps forbidden, priced by assess)
// and plan.BaselineNote with what was found. It skips a constant level
// that breaks a limit of the profile when priced exactly. planCost, when
// positive, is the cost the main search found: the baseline's A* starts
// from a guess a little above it. The only error is s.ctx's, when it is
// done (see ctxErr); the plan is then incomplete.
func (s *solver) addBaseline(plan *Plan, planCost float64) error {
	bs := s.withoutSteps()
	if planCost > 0 {
		bs.costGuess = 1.02 * planCost // a constant level costs a little more
		if s.boundCost < bs.costGuess {
			bs.reuse = nil // the main search's bound assumed too little
		}
	}
	br, ok := bs.search()
	if isCancelled(br.err) {
		return br.err
	}
	if ok {
		bp := bs.profileOf(br.path)
		bplan, err := assess(bs.ctx, bs.p, bp, nil, false)
		if isCancelled(err) {
			return err
		}
		if err == nil && !breaksProfileLimits(bplan.Violations) {
			plan.Baseline = &Baseline{FL: bp.Initial, Totals: bplan.Totals}
			if bplan.Totals.Cost > 0 {
				plan.Baseline.SavingPct = (bplan.Totals.Cost - plan.Totals.Cost) / bplan.Totals.Cost * 100
			}
			if d := plan.Totals.Cost - bplan.Totals.Cost; d > 0 && len(plan.Profile.Changes) > 0 {
				plan.Warnings = append(plan.Warnings, fmt.Sprintf("the constant level FL%03d prices %.1f lower than this profile when both are priced exactly (the search prices on a mass grid at nominal times; within its tolerance)", bp.Initial, d))
			}
		}
	}
	if plan.Baseline == nil {
		plan.BaselineNote = "no constant level is feasible along the whole route"
		plan.Warnings = append(plan.Warnings, "no constant level is feasible along the whole route: no baseline")
	}
	return nil
}

// assessBaseline adds the baseline to an assessed plan of problem q
// (normalised). When it cannot be computed the plan says so and why. The
// only error is ctx's, when it is done.
func assessBaseline(ctx context.Context, q *Problem, plan *Plan) error {
	s, err := newSolver(q)
	if err != nil {
		plan.BaselineNote = fmt.Sprintf("not computed: %v", err)
		plan.Warnings = append(plan.Warnings, "baseline "+plan.BaselineNote)
		return nil
	}
	s.ctx = ctx
	return s.addBaseline(plan, 0)
}
