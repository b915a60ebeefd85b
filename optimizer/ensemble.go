package optimizer

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"levelpath/winds"
)

// Objective is what an ensemble plan minimises over the members' costs:
// their mean (the zero value), or their Quantile-quantile.
type Objective struct {
	// Quantile, in (0, 1], asks for the q-quantile of the members' costs
	// (0.9: the cost that nine members in ten stay under); 0 asks for
	// the mean.
	Quantile float64
}

// ParseObjective reads "mean" (or "") or "quantile:Q" with Q in (0, 1].
func ParseObjective(s string) (Objective, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	switch {
	case t == "mean" || t == "":
		return Objective{}, nil
	case strings.HasPrefix(t, "quantile:"):
		q, err := strconv.ParseFloat(strings.TrimPrefix(t, "quantile:"), 64)
		if err != nil || !(q > 0 && q <= 1) {
			return Objective{}, fmt.Errorf("objective %q: the quantile must be a number in (0, 1], such as quantile:0.9", s)
		}
		return Objective{Quantile: q}, nil
	}
	return Objective{}, fmt.Errorf("objective %q: want mean or quantile:Q (Q in (0, 1], such as quantile:0.9)", s)
}

func (o Objective) String() string {
	if o.Quantile > 0 {
		return "quantile:" + strconv.FormatFloat(o.Quantile, 'g', -1, 64)
	}
	return "mean"
}

// of returns the objective's value of the members' costs.
func (o Objective) of(costs []float64) float64 {
	if len(costs) == 0 {
		return nan
	}
	xs := append([]float64(nil), costs...)
	if o.Quantile > 0 {
		return quantile7(xs, o.Quantile)
	}
	return meanRel(xs)
}

// A Member is one member of an ensemble forecast.
type Member struct {
	Number  int          // perturbation number (GRIB2 product template 4.1)
	Weather *winds.Field // the member's forecast
}

// EnsembleProblem is a flight to plan against an ensemble forecast: one
// vertical profile (levels and step points) for every member, each
// member flying it at its own econ (or LRC) Mach.
type EnsembleProblem struct {
	// Problem is the flight; its Weather is ignored (each member's is
	// used).
	Problem Problem
	// Members are the ensemble's members, the control first (producers
	// number it 0, common practice). All must lie on one grid, levels and
	// valid times.
	Members []Member
	// Objective is minimised over the members' costs (default: mean).
	Objective Objective
	// RobustShare, in (0, 1], is the share of members in which every
	// edge of the profile must keep its limits (the buffet floor among
	// them): 1 (the default, for 0) asks for every member.
	RobustShare float64
	// MemberMach prices every member in the search at its own econ (or
	// LRC) Mach with its own memo, as Solve would, instead of at the
	// control's Mach (see ensSearch): members times the search's pricing
	// work, for a check of the shared Mach.
	MemberMach bool
	// Regret asks for each member's own best profile (one more search a
	// member) and its regret: what flying its own profile would have
	// saved on that member.
	Regret bool
}

// need returns the number of members an edge must be feasible in.
func (ep *EnsembleProblem) need() int {
	n := len(ep.Members)
	return max(1, min(n, int(math.Ceil(ep.RobustShare*float64(n)-1e-9))))
}

// CheckRobustShare reports whether s is a usable robust share: in (0, 1].
func CheckRobustShare(s float64) error {
	if !(s > 0 && s <= 1) {
		return fmt.Errorf("robust share %v must lie in (0, 1]: the share of members in which the profile keeps its limits", s)
	}
	return nil
}

// members prepares the members' problems: the flight with each member's
// weather, normalised; and the warnings of the control's.
func (ep *EnsembleProblem) prepare() ([]Problem, []string, error) {
	if len(ep.Members) == 0 {
		return nil, nil, inputErrorf("Members", "no ensemble members")
	}
	if len(ep.Members) > 1000 {
		return nil, nil, inputErrorf("Members", "%d ensemble members; at most 1000", len(ep.Members))
	}
	if ep.RobustShare == 0 {
		ep.RobustShare = 1
	}
	if err := CheckRobustShare(ep.RobustShare); err != nil {
		return nil, nil, &InputError{Field: "RobustShare", Msg: err.Error()}
	}
	if q := ep.Objective.Quantile; !(q >= 0 && q <= 1) {
		return nil, nil, inputErrorf("Objective", "quantile %v must lie in (0, 1]", q)
	}
	qs := make([]Problem, len(ep.Members))
	var warn, extra []string
	f0 := ep.Members[0].Weather
	for i, m := range ep.Members {
		if m.Weather == nil {
			return nil, nil, inputErrorf("Members", "member %d has no weather", m.Number)
		}
		if err := sameAxes(f0, m.Weather); err != nil {
			return nil, nil, inputErrorf("Members", "member %d: %v than member %d: members must share one grid, levels and times", m.Number, err, ep.Members[0].Number)
		}
		q := ep.Problem
		q.Weather = m.Weather
		q.Notes = slices.Clip(q.Notes)
		w, err := q.normalise()
		if err != nil {
			if i == 0 {
				return nil, nil, err
			}
			return nil, nil, fmt.Errorf("member %d: %w", m.Number, err)
		}
		if i == 0 {
			warn = w
		} else {
			// A member's own warnings (its weather's, say) are named.
			for _, x := range w {
				if !slices.Contains(qs[0].Notes, x) && !slices.Contains(warn, x) {
					extra = append(extra, fmt.Sprintf("member %d: %s", m.Number, x))
				}
			}
		}
		qs[i] = q
	}
	return qs, append(warn, extra...), nil
}

// sameAxes reports how two members' fields differ in grid, levels or
// times, or nil.
func sameAxes(a, b *winds.Field) error {
	ai, aj, adi, adj := a.Grid()
	bi, bj, bdi, bdj := b.Grid()
	if ai != bi || aj != bj || adi != bdi || adj != bdj {
		return fmt.Errorf("grid %dx%d at %g x %g degrees differs from %dx%d at %g x %g", bi, bj, bdi, bdj, ai, aj, adi, adj)
	}
	if !slices.Equal(a.Levels(), b.Levels()) {
		return fmt.Errorf("levels %v Pa differ from %v", b.Levels(), a.Levels())
	}
	at, bt := a.Times(), b.Times()
	if len(at) != len(bt) {
		return fmt.Errorf("%d valid times differ from %d", len(bt), len(at))
	}
	for i := range at {
		if !at[i].Equal(bt[i]) {
			return fmt.Errorf("valid time %v differs from %v", bt[i], at[i])
		}
	}
	return nil
}

// SolveEnsemble plans one vertical profile for every member of an
// ensemble forecast and prices it on each.
//
// The method follows Franco, Rivas and Valenzuela, "Optimal aircraft path
// planning considering wind uncertainty", 7th European Conference for
// Aeronautics and Space Sciences (EUCASS), 2017: a shortest path over a
// graph whose edges carry every ensemble member's price, minimising the
// members' mean cost with Dijkstra's algorithm. Each edge is priced on
// every member at the node's mass, in one search over one graph (the
// control member's segments and levels); the expected cost of a path is
// then the sum of its edges' mean costs, exactly (linearity of the mean).
// Deviations:
//
//   - Shared work: the control prices each edge with Solve's model; every
//     other member flies the control's Mach on it with its own wind,
//     temperature and floor (one aircraft point instead of a Mach
//     optimisation: second order in the Mach difference at the econ Mach,
//     see ensSearch), or takes the control's price where its weather is
//     the control's; EnsembleProblem.MemberMach prices each member with
//     its own econ Mach instead. The priced results below fly each
//     member's own econ Mach.
//
//   - Plain Dijkstra, not A*: a bound of the members' mean cost would be
//     the mean of one bound a member, which costs about what the shared
//     pricing saves.
//
//   - One mass per node: the members' masses are collapsed to their mean
//     (the mean fuel of each edge), so an edge is priced on every member
//     at that mean mass, not the member's own. The members' masses at a
//     node differ only by the spread of the fuel they have burnt so far
//     (about 1.5 t over the whole demo long haul, under 1 % of the mass),
//     and prices change smoothly with mass, so the error is small; the
//     chosen profile is then priced on each member exactly, with the
//     member's own mass (Assess), and those prices are what is reported.
//
//   - Where members would place a piece of the profile in different
//     segments (top of climb, top of descent, whether a step ends within
//     the next segment), the control member decides and each member
//     prices the piece from its own ground distances.
//
//   - RobustShare below 1 allows an edge that keeps its limits in that
//     share of members; its cost is the mean (or quantile) over those
//     members only.
//
//   - The quantile objective (Objective.Quantile) is a heuristic: each
//     edge costs the q-quantile of its members' costs, and the search is
//     plain Dijkstra on those. The quantile of a sum is not the sum of
//     quantiles, but the two agree when the members' costs are ranked the
//     same on every edge (comonotone costs, as with a jet stream shifted
//     as a whole: quantiles add for comonotonic variables, Dhaene, Denuit,
//     Goovaerts, Kaas and Vyncke, Insurance: Mathematics and Economics 31,
//     2002, from memory; for sample quantiles of definition 7 the order
//     statistics add, and so do their interpolations); the profile's true
//     quantile over the members is what the report gives.
//
// Garcia-Heras, Soler and Gonzalez-Arribas, "Characterization and
// enhancement of flight planning predictability under wind uncertainty",
// International Journal of Aerospace Engineering, 2019, measure a plan's
// predictability by the spread of fuel and time over the ensemble's
// members; the report gives that spread (minimum, P10, P50, P90, maximum)
// for the chosen profile and for the control member's own best profile,
// but the search minimises the objective only (no spread term).
//
// As in Solve, exact pricing may find a cruise leg over a limit that the
// search's nominal weather times did not; where it does so in more
// members than the robust share allows, that level is closed on that
// segment and the flight planned again (at most maxRecheck times). The
// control member's own best profile is planned too; when it prices below
// the search's profile on the objective and keeps the robust share, it
// is chosen instead (the search's approximations above), and the plan's
// warnings say so.
//
// The plan returned is the chosen profile priced on the control member
// (its legs, totals and baseline, the control's best constant level),
// with Plan.Ensemble holding the distribution over every member.
//
// An ensemble whose members are all equal gives exactly Solve's plan of
// one of them (with the Ensemble report added; Nodes and Edges count the
// ensemble's Dijkstra search, not Solve's A*).
//
// Complexity: one search over the graph with members x edges pricings
// (one aircraft point each, the control's a Mach optimisation),
// plus members exact pricings of each profile compared, plus one
// deterministic search (the control's own profile), plus one a member
// with Regret.
func SolveEnsemble(ctx context.Context, ep *EnsembleProblem) (*Plan, error) {
	if err := ctxErr(ctx); err != nil {
		return nil, err
	}
	e := *ep
	qs, warn, err := e.prepare()
	if err != nil {
		return nil, err
	}
	n, need := len(qs), e.need()
	searchQ := slices.Clone(qs) // with the levels exact pricing closed
	var closed []string
	var ss []*solver
	var res searchResult
	var plans []*Plan
	for round := 0; ; round++ {
		ss = make([]*solver, n)
		for i := range searchQ {
			if ss[i], err = newSolver(&searchQ[i]); err != nil {
				return nil, memberErr(ep.Members[i].Number, i, err)
			}
			ss[i].ctx = ctx
		}
		es := &ensSearch{members: ss, need: need, obj: e.Objective, memberMach: e.MemberMach}
		ss[0].expand = es.successors
		var ok bool
		res, ok = es.search(ss[0])
		ss[0].expand = nil
		if res.err != nil {
			return nil, res.err
		}
		if !ok {
			if round > 0 {
				break
			}
			if need == 1 && n == 1 {
				return nil, ss[0].infeasible()
			}
			return nil, inputErrorf("TakeoffMass", "no profile keeps its limits in %d of the %d members; the control member alone: %v", need, n, ss[0].infeasible())
		}
		prof := ss[0].profileOf(res.path)
		next, err := assessMembers(ctx, qs, prof, warn)
		if err != nil {
			return nil, err
		}
		plans = next
		blocks := ensembleBlocks(qs, plans, n-need)
		if len(blocks) == 0 || round == maxRecheck {
			break
		}
		for _, b := range blocks {
			closed = append(closed, fmt.Sprintf("FL%03d at %.0f-%.0f NM", b.Levels[0], b.FromDist/nmToM, b.ToDist/nmToM))
		}
		for i := range searchQ {
			searchQ[i].Blocked = append(slices.Clip(searchQ[i].Blocked), blocks...)
		}
	}
	own, ctrl, err := ownProfiles(ctx, &e, qs, warn)
	if err != nil {
		return nil, err
	}
	chosen := "ensemble search"
	var switched string
	searchBreaks := breaking(plans) > n-need
	switch {
	case ctrl == nil || sameProfile(own[0].Profile, plans[0].Profile) || breaking(ctrl) > n-need:
	case searchBreaks:
		switched = fmt.Sprintf("the ensemble search's %s breaks limits in %d of %d members when each is priced exactly (more than the robust share allows: %s); the control member's own profile keeps them: chosen instead",
			plans[0].Profile, breaking(plans), n, breakingMembers(ep, plans))
		plans, chosen = ctrl, "control member's own plan"
	case objectiveOf(e.Objective, ctrl) < objectiveOf(e.Objective, plans)*(1-1e-9):
		switched = fmt.Sprintf("the control member's own profile prices %.0f below the ensemble search's %s on the %s objective (the search's shared-mass approximation): chosen instead",
			objectiveOf(e.Objective, plans)-objectiveOf(e.Objective, ctrl), plans[0].Profile, e.Objective)
		plans, chosen = ctrl, "control member's own plan"
	}
	plan := plans[0]
	if len(closed) > 0 {
		plan.Warnings = append(plan.Warnings, "exact pricing found limits the search's nominal weather times did not: planned again without "+strings.Join(closed, ", "))
	}
	noteSearch(plan, res, ss[0].edges)
	if switched != "" {
		plan.Warnings = append(plan.Warnings, switched)
	} else if breaking(plans) > n-need {
		plan.Warnings = append(plan.Warnings, fmt.Sprintf("the chosen profile breaks limits in %d of %d members when each is priced exactly, more than the robust share allows: %s",
			breaking(plans), n, breakingMembers(ep, plans)))
	}
	if err := ss[0].addBaseline(plan, res.cost); err != nil {
		return nil, err
	}
	plan.Ensemble = buildReport(&e, need, plans, ctrl, own, chosen)
	return plan, nil
}

// ownProfiles plans the control member's own best profile (and each
// member's with Regret; a member whose own plan fails has nil) and prices
// the control's profile on every member (ctrl, nil when the control has
// none). The only error is ctx's.
func ownProfiles(ctx context.Context, e *EnsembleProblem, qs []Problem, warn []string) (own, ctrl []*Plan, err error) {
	own = make([]*Plan, len(qs))
	for i := range qs {
		if i > 0 && !e.Regret {
			break
		}
		if own[i], err = ownPlan(ctx, &qs[i], warn); err != nil && isCancelled(err) {
			return nil, nil, err
		}
	}
	if own[0] != nil {
		if ctrl, err = assessMembers(ctx, qs, own[0].Profile, warn); err != nil {
			return nil, nil, err
		}
	}
	return own, ctrl, nil
}

// memberErr names the member of an error in a member's problem (not the
// control's, whose errors are the flight's).
func memberErr(number, i int, err error) error {
	if i == 0 {
		return err
	}
	return fmt.Errorf("member %d: %w", number, err)
}

// assessMembers prices prof on every member's problem (normalised); the
// control's plan carries the leg ceilings when asked and the warnings.
func assessMembers(ctx context.Context, qs []Problem, prof Profile, warn []string) ([]*Plan, error) {
	out := make([]*Plan, len(qs))
	for i := range qs {
		w := warn
		if i > 0 {
			w = nil
		}
		p, err := assess(ctx, &qs[i], prof, w, i == 0 && qs[i].LegCeilings)
		if err != nil {
			return nil, err
		}
		out[i] = p
	}
	return out, nil
}

// ensembleBlocks is recheckBlocks over the members: a cruise leg's level
// is closed on its segment when exact pricing finds it over a limit in
// more than allowed members.
func ensembleBlocks(qs []Problem, plans []*Plan, allowed int) []Block {
	type key struct {
		from float64
		fl   int
	}
	count := map[key]int{}
	var order []Block
	for i, p := range plans {
		for _, b := range recheckBlocks(&qs[i], p) {
			k := key{b.FromDist, b.Levels[0]}
			if count[k] == 0 {
				order = append(order, b)
			}
			count[k]++
		}
	}
	var out []Block
	for _, b := range order {
		if count[key{b.FromDist, b.Levels[0]}] > allowed {
			out = append(out, b)
		}
	}
	return out
}

// ownPlan is a member's own best profile: Solve's search and exact
// pricing, with its rechecks, without the baseline. It returns nil and
// the error when the member has no feasible profile.
func ownPlan(ctx context.Context, q *Problem, warn []string) (*Plan, error) {
	qs := *q
	var plan *Plan
	for round := 0; ; round++ {
		s, err := newSolver(&qs)
		if err != nil {
			return nil, err
		}
		s.ctx = ctx
		res, ok := s.search()
		if res.err != nil {
			return nil, res.err
		}
		if !ok {
			if plan != nil {
				return plan, nil
			}
			return nil, s.infeasible()
		}
		if plan, err = assess(ctx, q, s.profileOf(res.path), warn, false); err != nil {
			return nil, err
		}
		blocks := recheckBlocks(q, plan)
		if len(blocks) == 0 || round == maxRecheck {
			return plan, nil
		}
		qs.Blocked = append(slices.Clip(qs.Blocked), blocks...)
	}
}

// sameProfile reports whether two profiles are the same.
func sameProfile(a, b Profile) bool {
	return a.Initial == b.Initial && slices.Equal(a.Changes, b.Changes)
}

// breaking counts the members in which a priced profile breaks a limit of
// the profile itself (not a loading limit).
// breakingMembers names the members whose plan breaks a profile limit
// and the first such limit of each: "member 2: step-rule (step at 132 NM
// ...)".
func breakingMembers(ep *EnsembleProblem, plans []*Plan) string {
	var parts []string
	for i, p := range plans {
		for _, v := range p.Violations {
			if breaksProfileLimits([]Violation{v}) {
				parts = append(parts, fmt.Sprintf("member %d: %s (%s)", ep.Members[i].Number, v.Limit, v.Detail))
				break
			}
		}
	}
	return strings.Join(parts, "; ")
}

func breaking(plans []*Plan) int {
	n := 0
	for _, p := range plans {
		if breaksProfileLimits(p.Violations) {
			n++
		}
	}
	return n
}

// objectiveOf is the objective over the members' priced costs.
func objectiveOf(o Objective, plans []*Plan) float64 {
	costs := make([]float64, len(plans))
	for i, p := range plans {
		costs[i] = p.Totals.Cost
	}
	return o.of(costs)
}
