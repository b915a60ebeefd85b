package optimizer

import (
	"context"
	"fmt"
	"math"
	"time"
)

// InFlight is the state of a flight in cruise: distance flown along the
// route (m from departure), level, mass (kg) and time.
type InFlight struct {
	Dist float64
	FL   int
	Mass float64
	Time time.Time
}

// replanStages bounds the steps the re-plan adds.
const replanStages = 3

// Replan plans the remainder of p's route from the in-flight state st:
// the plan starts in level flight at st.FL at st.Dist with mass st.Mass at
// st.Time (p.TakeoffMass and p.Depart are replaced by them), and ends with
// the final descent. Legs, waypoints and totals cover the remainder only.
//
// Method: exact pricing (the forward simulation of Assess) of candidate
// profiles, improved greedily: the constant level, then, up to three
// times, the single added step (to a level allowed on its segment,
// within the step rules, at a segment boundary after the previous change)
// that lowers the cost most. Deviation from Solve: the graph search
// starts with a climb from departure, so it is not used here; the greedy
// search may miss a profile of several steps that is cheaper only as a
// whole. A candidate that breaks a limit of the profile is not taken.
//
// Complexity: O(stages x boundaries x levels) simulations of O(segments).
func Replan(p *Problem, st InFlight) (*Plan, error) {
	q := *p
	q.TakeoffMass, q.Depart = st.Mass, st.Time
	if st.Time.IsZero() {
		return nil, inputErrorf("time", "the time of the in-flight state is required")
	}
	warn, err := q.normalise()
	if err != nil {
		return nil, err
	}
	segs := q.Track.Segments
	total := segs[len(segs)-1].ToDist
	if !(st.Dist >= 0) || st.Dist >= total {
		return nil, inputErrorf("from-nm", "%.1f NM is not on the route (0 to %.1f NM)", st.Dist/nmToM, total/nmToM)
	}
	if q.ZFW > 0 && st.Mass < q.ZFW {
		return nil, inputErrorf("mass", "mass %.0f kg is under the zero-fuel mass %.0f kg", st.Mass, q.ZFW)
	}
	k := segmentIndex(segs, st.Dist)
	if !containsInt(segs[k].Levels, st.FL) || blocked(q.Blocked, st.Dist, st.Dist+1, st.FL) {
		return nil, inputErrorf("fl", "FL%03d is not allowed at %.0f NM (segment %d allows %s)", st.FL, st.Dist/nmToM, k, flRange(segs[k].Levels))
	}
	price := func(pr Profile) (*Plan, float64) {
		pl, err := assessFrom(context.Background(), &q, pr, warn, false, &st)
		if err != nil || breaksProfileLimits(pl.Violations) {
			return pl, math.Inf(1)
		}
		return pl, pl.Totals.Cost
	}
	best := Profile{Initial: st.FL}
	bestPlan, bestCost := price(best)
	stages := replanStages
	if q.Steps.NoSteps {
		stages = 0
	} else if q.Steps.MaxSteps > 0 && q.Steps.MaxSteps < stages {
		stages = q.Steps.MaxSteps
	}
	for stage := 0; stage < stages; stage++ {
		from, cur := st.Dist, best.Initial
		if n := len(best.Changes); n > 0 {
			from, cur = best.Changes[n-1].AtDist+q.Steps.MinDistance, best.Changes[n-1].FL
		}
		cand, candPlan, candCost := best, bestPlan, bestCost
		for j := k + 1; j < len(segs); j++ {
			b := segs[j].FromDist
			if b < from-1e-6 {
				continue
			}
			curOK := containsInt(segs[j].Levels, cur) && !blocked(q.Blocked, segs[j].FromDist, segs[j].ToDist, cur)
			for _, fl := range segs[j].Levels {
				d := fl - cur
				if d == 0 || abs(d)*100 > q.Steps.maxChangeFt() || fl < q.MinFL || fl > q.MaxFL {
					continue
				}
				if d < 0 && !q.Steps.AllowDescent && curOK {
					continue
				}
				pr := Profile{Initial: best.Initial, Changes: append(append([]Change(nil), best.Changes...), Change{AtDist: b, FL: fl})}
				if pl, c := price(pr); c < candCost {
					cand, candPlan, candCost = pr, pl, c
				}
			}
		}
		if len(cand.Changes) == len(best.Changes) {
			break
		}
		best, bestPlan, bestCost = cand, candPlan, candCost
	}
	if bestPlan == nil {
		_, err := assessFrom(context.Background(), &q, best, warn, false, &st)
		return nil, err
	}
	if math.IsInf(bestCost, 1) {
		bestPlan.Warnings = append(bestPlan.Warnings, fmt.Sprintf("no profile from FL%03d keeps every limit: the constant level is shown with its violations", st.FL))
	}
	if q.LegCeilings {
		if pl, err := assessFrom(context.Background(), &q, best, warn, true, &st); err == nil {
			bestPlan = pl
		}
	}
	bestPlan.BaselineNote = "not computed for a re-plan"
	return bestPlan, nil
}
