package optimizer

import (
	"context"
	"fmt"
	"math"
	"slices"
)

// Spread is the distribution of one quantity over an ensemble's members:
// least, 10th, 50th and 90th percentiles (Hyndman and Fan's definition
// 7, see quantile7) and greatest. NaN values (a member where the quantity
// has no value) are left out; all NaN when none has one.
type Spread struct {
	Min, P10, P50, P90, Max float64
}

// SpreadOf returns the Spread of xs (not modified). Time O(n log n).
func SpreadOf(xs []float64) Spread {
	v := make([]float64, 0, len(xs))
	for _, x := range xs {
		if !math.IsNaN(x) {
			v = append(v, x)
		}
	}
	if len(v) == 0 {
		return Spread{nan, nan, nan, nan, nan}
	}
	slices.Sort(v)
	return Spread{Min: v[0], P10: quantile7(v, 0.1), P50: quantile7(v, 0.5), P90: quantile7(v, 0.9), Max: v[len(v)-1]}
}

// EnsembleProfile is one profile priced on every member.
type EnsembleProfile struct {
	Profile Profile
	// Objective is the objective's value over the members' costs;
	// MeanCost their mean.
	Objective, MeanCost float64
	Fuel, Time, Cost    Spread // kg, s, fuel kg + CI x min
	// Margin is the spread of each member's least buffet margin (g);
	// MarginAboveFloor of its least margin above the floor that applied
	// (g, negative under it).
	Margin, MarginAboveFloor Spread
	// Breaking counts the members in which the profile breaks a limit
	// of the profile itself (buffet floor, ceilings, Mach band, ...).
	Breaking int
}

// MemberResult is the chosen profile on one member, and that member's
// own best profile.
type MemberResult struct {
	Member           int // perturbation number
	Fuel, Time, Cost float64
	MinMargin        float64 // least buffet margin, g (NaN: no cruise leg)
	MarginAboveFloor float64 // least margin above the floor, g
	Violations       int     // limits broken (Plan.Violations)
	// OwnProfile is the member's own best profile (EnsembleProblem.Regret
	// or the control; nil otherwise), OwnCost its cost on the member and
	// Regret = Cost - OwnCost, what it would have saved (NaN when not
	// computed). A negative regret means the ensemble's profile priced
	// below the member's own search on that member (the search's
	// approximations, see Solve).
	OwnProfile      *Profile
	OwnCost, Regret float64
}

// BandPoint is the spread of fuel used over the members at one distance
// along the route (for charts: the fuel remaining is the fuel on board
// less it).
type BandPoint struct {
	Dist float64 // m from departure
	Used Spread  // kg
}

// EnsembleReport is a plan's distribution over an ensemble's members.
type EnsembleReport struct {
	Members     int    // number of members
	Numbers     []int  // their perturbation numbers, the control first
	Objective   string // "mean" or "quantile:Q"
	RobustShare float64
	// Need is the members in which every edge had to keep its limits
	// (ceil(RobustShare x Members)).
	Need int
	// Chosen says where the profile came from: "ensemble search",
	// "control member's own plan" or "assessed".
	Chosen string
	// Profile is the chosen (or assessed) profile on every member;
	// Control the control member's own best profile on every member
	// (nil when not computed).
	Profile *EnsembleProfile
	Control *EnsembleProfile
	// PerMember is the chosen profile on each member, in Numbers' order.
	PerMember []MemberResult
	// Regret is the spread of the members' regrets (nil without).
	Regret *Spread
	// FuelBand is the spread of fuel used by the chosen profile at the
	// control plan's waypoints.
	FuelBand []BandPoint
	// Approximations names what the ensemble search approximates (shown
	// with the report, see SolveEnsemble).
	Approximations []string
}

// summarise prices the spread of one profile over the members' plans.
func summarise(o Objective, prof Profile, plans []*Plan) *EnsembleProfile {
	n := len(plans)
	fuel, tm, cost, mg, above := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for i, p := range plans {
		fuel[i], tm[i], cost[i] = p.Totals.Fuel, p.Totals.Time, p.Totals.Cost
		mg[i], above[i] = p.MinMargin(), marginAboveFloor(p)
	}
	return &EnsembleProfile{Profile: prof, Objective: o.of(cost), MeanCost: meanRel(cost),
		Fuel: SpreadOf(fuel), Time: SpreadOf(tm), Cost: SpreadOf(cost), Margin: SpreadOf(mg), MarginAboveFloor: SpreadOf(above),
		Breaking: breaking(plans)}
}

// marginAboveFloor is the least buffet margin above the leg's floor over
// a plan's cruise and step legs (NaN when none).
func marginAboveFloor(p *Plan) float64 {
	m := nan
	for _, l := range p.Legs {
		if d := l.BuffetMargin - l.Floor; d == d && (m != m || d < m) {
			m = d
		}
	}
	return m
}

// buildReport assembles the report of plans (the chosen profile on every
// member), ctrl (the control's own profile on every member, or nil) and
// own (each member's own plan, or nil).
func buildReport(ep *EnsembleProblem, need int, plans, ctrl, own []*Plan, chosen string) *EnsembleReport {
	r := &EnsembleReport{Members: len(plans), Objective: ep.Objective.String(), RobustShare: ep.RobustShare, Need: need, Chosen: chosen}
	for _, m := range ep.Members {
		r.Numbers = append(r.Numbers, m.Number)
	}
	r.Profile = summarise(ep.Objective, plans[0].Profile, plans)
	if ctrl != nil {
		r.Control = summarise(ep.Objective, ctrl[0].Profile, ctrl)
	}
	var regrets []float64
	for i, p := range plans {
		mr := MemberResult{Member: ep.Members[i].Number, Fuel: p.Totals.Fuel, Time: p.Totals.Time, Cost: p.Totals.Cost,
			MinMargin: p.MinMargin(), MarginAboveFloor: marginAboveFloor(p), Violations: len(p.Violations), OwnCost: nan, Regret: nan}
		if i < len(own) && own[i] != nil {
			pr := own[i].Profile
			mr.OwnProfile, mr.OwnCost = &pr, own[i].Totals.Cost
			mr.Regret = p.Totals.Cost - mr.OwnCost
			regrets = append(regrets, mr.Regret)
		}
		r.PerMember = append(r.PerMember, mr)
	}
	if len(regrets) > 0 && ep.Regret {
		s := SpreadOf(regrets)
		r.Regret = &s
	}
	for _, w := range plans[0].Waypoints {
		used := make([]float64, len(plans))
		for i, p := range plans {
			used[i] = fuelUsedAt(p, w.Dist)
		}
		r.FuelBand = append(r.FuelBand, BandPoint{Dist: w.Dist, Used: SpreadOf(used)})
	}
	if len(plans) > 1 && chosen != "assessed" {
		r.Approximations = append(r.Approximations, "the search prices every member at the members' mean mass (exact per-member masses in the priced results)")
		if ep.Objective.Quantile > 0 {
			r.Approximations = append(r.Approximations, fmt.Sprintf("the %s objective is searched as the quantile of each edge's member costs (a heuristic)", ep.Objective))
		}
		if need < len(plans) {
			r.Approximations = append(r.Approximations, fmt.Sprintf("edges kept their limits in at least %d of %d members; their cost is over those members", need, len(plans)))
		}
	}
	return r
}

// fuelUsedAt is the fuel a priced plan has used at distance d from
// departure, interpolated linearly within its legs.
func fuelUsedAt(p *Plan, d float64) float64 {
	used := 0.0
	for _, l := range p.Legs {
		if d <= l.ToDist {
			if l.ToDist > l.FromDist && d > l.FromDist {
				used += l.Fuel * (d - l.FromDist) / (l.ToDist - l.FromDist)
			}
			return used
		}
		used += l.Fuel
	}
	return used
}

// AssessEnsemble prices a proposed profile on every member of an
// ensemble: the plan returned is the profile on the control member (as
// Assess gives it, baseline included), with Plan.Ensemble holding its
// distribution over the members; with ep.Regret each member's own best
// profile is planned too, and the control's is always (one search).
// Complexity: members exact pricings, plus the searches.
func AssessEnsemble(ctx context.Context, ep *EnsembleProblem, prof Profile) (*Plan, error) {
	if err := ctxErr(ctx); err != nil {
		return nil, err
	}
	e := *ep
	qs, warn, err := e.prepare()
	if err != nil {
		return nil, err
	}
	plans, err := assessMembers(ctx, qs, prof, warn)
	if err != nil {
		return nil, err
	}
	if err := assessBaseline(ctx, &qs[0], plans[0]); err != nil {
		return nil, err
	}
	own, ctrl, err := ownProfiles(ctx, &e, qs, warn)
	if err != nil {
		return nil, err
	}
	plans[0].Ensemble = buildReport(&e, e.need(), plans, ctrl, own, "assessed")
	return plans[0], nil
}
