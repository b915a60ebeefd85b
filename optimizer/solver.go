package optimizer

import (
	"context"
	"math"
	"slices"
	"sort"

	"levelpath/perf"
	"levelpath/route"
)

// solver holds a prepared problem: levels, per-segment conditions and the
// memoised edge prices.
type solver struct {
	p      *Problem
	a      *perf.Aircraft
	levels []int     // candidate cruise levels, ascending
	press  []float64 // their pressures, Pa
	conds  [][]cond  // [segment][level]
	allow  [][]bool  // [segment][level]: rule and blocks allow it
	bounds []float64 // segment boundary distances, len(segments)+1
	total  float64
	grid   float64 // mass spacing of the interpolation memo, kg

	// Memos of prices at grid masses gLo..gHi (memo.go), shared with the
	// baseline's solver.
	gLo, gHi int
	memo     *memo
	// cr prices cruise speeds with their repeated parts kept (the same
	// values as the aircraft's own methods), shared like the memo.
	cr *perf.Cruiser

	// limits for step-state bookkeeping
	sinceCap int // segments after which MinDistance is surely met
	stepCap  int // MaxSteps, or 0 when unlimited

	edges int // edges priced

	// mergeSince merges states that differ only in the segments flown
	// since the last step, keeping the cheapest (an approximation:
	// Problem.Exact turns it off).
	mergeSince bool
	// machStep and devStep round a step's Mach and temperature deviation
	// for the step memo.
	machStep, devStep float64
	bisect            int // bisection steps for a feasibility boundary
	// dijkstra turns the A* bound off (plain Dijkstra, for tests).
	dijkstra bool
	// boundCost is the total cost the current A* bound assumes at most;
	// costGuess, when positive, is the guess to start from.
	boundCost, costGuess float64
	// reuse is the last A* bound (valid for boundCost), which the
	// baseline's solver, a subgraph, reuses.
	reuse []float64
	fixed *boundParts // see bound.go
	// boundScratch holds leastCostPerMetre's levels (reused).
	boundScratch []levelBound
	// overflowed is set when an arrival's mass bucket exceeds the node ID.
	overflowed bool
	// ctx stops the search when done (see ctxErr); nil: never done.
	ctx context.Context
}

// newSolver prepares p (already normalised).
func newSolver(p *Problem) (*solver, error) {
	s := &solver{p: p, a: p.Aircraft, grid: 0.01 * p.Aircraft.MTOW, cr: perf.NewCruiser(p.Aircraft)}
	if !p.Exact {
		s.grid *= 2 // an approximation: prices interpolated over 2 % of MTOW
	}
	s.gLo = int(math.Floor(p.Aircraft.OEW/s.grid)) - 1
	s.gHi = int(math.Ceil(p.TakeoffMass/s.grid)) + 1
	segs := p.Track.Segments
	set := map[int]bool{}
	for _, seg := range segs {
		for _, fl := range seg.Levels {
			if fl >= p.MinFL && fl <= p.MaxFL {
				set[fl] = true
			}
		}
	}
	for fl := range set {
		s.levels = append(s.levels, fl)
	}
	sort.Ints(s.levels)
	if len(s.levels) == 0 {
		return nil, inputErrorf("levels", "no allowed level between FL%d and FL%d on this route", p.MinFL, p.MaxFL)
	}
	if len(s.levels) > 255 {
		return nil, inputErrorf("levels", "%d candidate levels; at most 255", len(s.levels))
	}
	if n := (p.TakeoffMass - p.Aircraft.OEW) / p.MassBucket; n >= 1<<23 {
		return nil, inputErrorf("mass-bucket", "mass bucket %.4g kg is too fine: the %.0f kg between the take-off mass and OEW would need %.3g buckets, at most %d (the default is %.0f kg)",
			p.MassBucket, p.TakeoffMass-p.Aircraft.OEW, n, 1<<23-1, 0.0025*p.Aircraft.MTOW)
	}
	if len(segs) >= 1<<16-1 {
		return nil, inputErrorf("route", "%d segments; at most 65534", len(segs))
	}
	s.press = make([]float64, len(s.levels))
	for i, fl := range s.levels {
		s.press[i] = perf.FLToPressure(float64(fl))
	}
	s.bounds = make([]float64, len(segs)+1)
	minLen := math.Inf(1)
	for k, seg := range segs {
		s.bounds[k] = seg.FromDist
		s.bounds[k+1] = seg.ToDist
		minLen = math.Min(minLen, seg.Length)
	}
	s.total = s.bounds[len(segs)]
	s.allow = make([][]bool, len(segs))
	for k, seg := range segs {
		row := make([]bool, len(s.levels))
		for _, fl := range seg.Levels {
			if i := sort.SearchInts(s.levels, fl); i < len(s.levels) && s.levels[i] == fl {
				row[i] = !blocked(p.Blocked, seg.FromDist, seg.ToDist, fl)
			}
		}
		s.allow[k] = row
	}
	if p.Steps.MinDistance > 0 {
		// The counter must reach a number of segments that surely spans
		// MinDistance; it has 10 bits in a node ID.
		s.sinceCap = int(math.Ceil(p.Steps.MinDistance/minLen)) + 1
		if s.sinceCap > maxSinceCap {
			return nil, inputErrorf("Steps.MinDistance", "the least distance between steps, %.0f NM, spans more than %d of the route's shortest segments (%.1f NM); segment the route more coarsely or shorten the distance", p.Steps.MinDistance/nmToM, maxSinceCap-1, minLen/nmToM)
		}
	}
	s.mergeSince = !p.Exact
	s.machStep, s.devStep, s.bisect = machStep, devStep, 12
	if !p.Exact {
		s.bisect = 8
		s.machStep, s.devStep = 2*machStep, 2*devStep
	}
	s.stepCap = min(p.Steps.MaxSteps, 60)
	conds, err := buildConds(p, s.levels)
	if err != nil {
		return nil, err
	}
	s.conds = conds
	s.memo = newMemo(len(segs), len(s.levels))
	return s, nil
}

// blocked reports whether fl is blocked anywhere over [from, to).
func blocked(bs []Block, from, to float64, fl int) bool {
	for _, b := range bs {
		if b.FromDist < to && b.ToDist > from {
			if slices.Contains(b.Levels, fl) {
				return true
			}
		}
	}
	return false
}

// gridVal is a memoised cruise price at a grid mass, and, when the next
// heavier grid mass is infeasible, the feasibility boundary between them.
type gridVal struct {
	v     cruiseVal
	done  bool
	bDone bool
	bm    float64   // heaviest feasible mass found below the next grid mass
	bv    cruiseVal // cruise at bm
}

// gridTrans is a memoised descent price at a grid mass.
type gridTrans struct {
	v    transVal
	done bool
}

// cruiseAt is cruise at mass m, interpolated between grid masses where
// both neighbours are feasible, and evaluated exactly otherwise, so that
// feasibility is always decided at the true mass.
//
// Feasibility falls as mass rises (the buffet margin and the residual
// climb both shrink), so where the lighter grid mass is feasible and the
// heavier is not, the boundary between them is found once by bisection
// (to 1/256 of the grid spacing by default, 1/4096 with Problem.Exact)
// and kept: masses up to it interpolate towards
// the boundary's price, heavier ones are infeasible. The boundary kept is
// the feasible side, so the search never accepts an infeasible mass.
func (s *solver) cruiseAt(k, li int, m float64) cruiseVal {
	g := int(math.Floor(m / s.grid))
	e0 := s.gridEntry(k, li, g)
	if e0 == nil {
		return s.cruiseOffGrid(k, li, m, g)
	}
	// The memo's entries, read in place (they never move).
	v0 := &e0.v
	var v1 *cruiseVal
	if e1 := s.gridEntry(k, li, g+1); e1 != nil {
		v1 = &e1.v
	} else {
		v := s.cruiseGrid(k, li, g+1)
		v1 = &v
	}
	switch {
	case v0.ok && v1.ok:
		return lerpCruise(v0, v1, (m-float64(g)*s.grid)/s.grid)
	case !v0.ok && !v1.ok:
		return *v0
	case v0.ok:
		if !e0.bDone {
			e0.bm, e0.bv = s.boundary(k, li, float64(g)*s.grid, *v0)
			e0.bDone = true
		}
		if m > e0.bm {
			return *v1
		}
		m0 := float64(g) * s.grid
		if e0.bm-m0 < 1e-9 {
			return *v0
		}
		return lerpCruise(v0, &e0.bv, (m-m0)/(e0.bm-m0))
	}
	return s.priceCruise(s.p.Speed, m, k, li)
}

// cruiseOffGrid is cruiseAt where grid mass g lies outside the memo's
// grid: interpolated where g and g+1 are both feasible, else exact.
func (s *solver) cruiseOffGrid(k, li int, m float64, g int) cruiseVal {
	v0, v1 := s.cruiseGrid(k, li, g), s.cruiseGrid(k, li, g+1)
	switch {
	case v0.ok && v1.ok:
		return lerpCruise(&v0, &v1, (m-float64(g)*s.grid)/s.grid)
	case !v0.ok && !v1.ok:
		return v0
	}
	return s.priceCruise(s.p.Speed, m, k, li)
}

// boundary bisects between the feasible mass lo (value vlo) and lo + grid
// for the heaviest feasible mass.
func (s *solver) boundary(k, li int, lo float64, vlo cruiseVal) (float64, cruiseVal) {
	hi := lo + s.grid
	for i := 0; i < s.bisect; i++ {
		mid := (lo + hi) / 2
		if v := s.priceCruise(s.p.Speed, mid, k, li); v.ok {
			lo, vlo = mid, v
		} else {
			hi = mid
		}
	}
	return lo, vlo
}

// cruiseLeg prices level flight over ground distance d on segment k at
// level li from mass m. Fuel is evaluated at the mid-leg mass (one
// fixed-point iteration); feasibility at the start, the heaviest point. A
// negative d (a step that ends beyond its segment) returns negative fuel
// and time, crediting the overlap.
func (s *solver) cruiseLeg(k, li int, m, d float64) (fuel, t float64, v cruiseVal) {
	v = s.cruiseAt(k, li, m)
	if !v.ok {
		return 0, 0, v
	}
	w := s.conds[k][li].wind
	gs := v.tas + w
	if gs < 50 {
		v.ok, v.lim, v.why = false, "weather", "ground speed under 50 m/s"
		return 0, 0, v
	}
	f0 := v.ff * d / gs
	v2 := s.cruiseAt(k, li, m-f0/2)
	if !v2.ok {
		v2 = v
	}
	gs = v2.tas + w
	t = d / gs
	return v2.ff * t, t, v
}

// transAt prices a step from level li to lj starting on segment k at mass
// m. The step is flown at the cruise Mach of the new level (or of the old
// one where the new level is not feasible at that mass) and at the mean
// temperature deviation of the two levels; both are rounded (Mach to
// 0.005, deviation to 1 K) so that steps on many segments share one memo,
// and the price is interpolated between grid masses like cruiseAt.
func (s *solver) transAt(k, li, lj int, m float64) transVal {
	c := s.cruiseAt(k, lj, m)
	if !c.ok {
		c = s.cruiseAt(k, li, m)
	}
	if !c.ok {
		return transVal{why: "no feasible cruise Mach at either level"}
	}
	mi := int(math.Round(c.mach / s.machStep))
	di := int(math.Round((s.conds[k][li].isaDev+s.conds[k][lj].isaDev)/2/s.devStep)) + 200
	if di < 0 || di > 400 {
		return s.transExact(li, lj, m, c.mach, (s.conds[k][li].isaDev+s.conds[k][lj].isaDev)/2)
	}
	g := int(math.Floor(m / s.grid))
	v0, v1 := s.transGrid(li, lj, g, mi, di)
	if !v0.ok || !v1.ok {
		return s.transExact(li, lj, m, float64(mi)*s.machStep, float64(di-200)*s.devStep)
	}
	t := (m - float64(g)*s.grid) / s.grid
	l := func(a, b float64) float64 { return a + (b-a)*t }
	return transVal{ok: true, fuel: l(v0.fuel, v1.fuel), time: l(v0.time, v1.time), dist: l(v0.dist, v1.dist), mach: v0.mach}
}

// Rounding of a step's Mach and temperature deviation for its memo with
// Problem.Exact; by default both are twice as coarse (an approximation
// that halves the step climbs integrated).
const (
	machStep = 0.005
	devStep  = 1.0
)

func (s *solver) transExact(li, lj int, m, mach, dev float64) transVal {
	pLow := math.Max(s.press[li], s.press[lj])
	sch := machSchedule(s.a, s.p.ClimbSchedule, mach, pLow)
	return quietTransition(s.cr, m, s.press[li], s.press[lj], dev, sch, lj > li)
}

// descent prices the final descent from level li at mass m, memoised on
// a mass grid ten times coarser than cruise (an idle descent's fuel, time
// and distance change little and smoothly with mass) and interpolated.
func (s *solver) descent(li int, m float64) transVal {
	const coarse = 10
	dg := coarse * s.grid
	g := int(math.Floor(m / dg))
	get := func(g int) transVal {
		i := g - s.gLo/coarse
		if i < 0 || i > (s.gHi-s.gLo)/coarse+2 {
			return s.descentExact(li, float64(g)*dg)
		}
		row := s.memo.desc[li]
		if row == nil {
			row = make([]gridTrans, (s.gHi-s.gLo)/coarse+3)
			s.memo.desc[li] = row
		}
		e := &row[i]
		if !e.done {
			e.v, e.done = s.descentExact(li, float64(g)*dg), true
		}
		return e.v
	}
	v0, v1 := get(g), get(g+1)
	if !v0.ok || !v1.ok {
		return s.descentExact(li, m)
	}
	t := (m - float64(g)*dg) / dg
	l := func(a, b float64) float64 { return a + (b-a)*t }
	return transVal{ok: true, fuel: l(v0.fuel, v1.fuel), time: l(v0.time, v1.time), dist: l(v0.dist, v1.dist), mach: v0.mach}
}

func (s *solver) descentExact(li int, m float64) transVal {
	last := len(s.conds) - 1
	return quietTransition(s.cr, m, s.press[li], perf.PressureAt(s.p.EndAltitude), s.conds[last][li].isaDev, s.p.DescentSchedule, false)
}

// descentGround returns the ground distance of the final descent from
// level li at mass m, with half the cruise-level wind of the last segment
// as the mean wind over the descent (an approximation: wind usually grows
// with height).
func (s *solver) descentGround(li int, m float64) (transVal, float64) {
	d := s.descent(li, m)
	if !d.ok {
		return d, 0
	}
	w := 0.5 * s.conds[len(s.conds)-1][li].wind
	return d, d.dist + w*d.time
}

// initialClimb prices the climb from the end altitude to level li at the
// take-off mass (memoised: the baseline asks again); ground distance uses
// half the first segment's wind at that level.
func (s *solver) initialClimb(li int) (transVal, float64) {
	m := s.memo
	if m.climb == nil {
		m.climb = make([]transVal, len(s.levels))
		m.climbDone = make([]bool, len(s.levels))
	}
	if !m.climbDone[li] {
		m.climb[li] = transition(s.cr, s.p.TakeoffMass, perf.PressureAt(s.p.EndAltitude), s.press[li], s.conds[0][li].isaDev, s.p.ClimbSchedule, true)
		m.climbDone[li] = true
	}
	c := m.climb[li]
	if !c.ok {
		return c, 0
	}
	return c, c.dist + 0.5*s.conds[0][li].wind*c.time
}

// segmentIndex returns the index of the segment holding distance d from
// departure (the segment that starts at d when d is a boundary; the last
// one at or past the end).
func segmentIndex(segs []route.Segment, d float64) int {
	k := sort.Search(len(segs), func(i int) bool { return segs[i].ToDist > d })
	if k >= len(segs) {
		k = len(segs) - 1
	}
	return k
}

// withoutSteps returns the solver of the same problem with steps
// forbidden (the constant-level baseline). It shares s's prepared levels,
// weather and memoised prices, which do not depend on the step rules.
func (s *solver) withoutSteps() *solver {
	q := *s.p
	q.Steps.NoSteps = true
	c := *s
	c.p, c.edges = &q, 0
	return &c
}

// stateBudget is the most states one search may create, from the
// problem's size: 64 mass buckets for every (boundary, level, step
// counters) combination, within 2^16 and 2^23 (about 500 MB of labels and
// queue). A search that needs more is working with an absurdly fine mass
// bucket.
func (s *solver) stateBudget() int {
	n := float64(len(s.conds)+1) * float64(len(s.levels)) * float64(s.stepCap+1) * float64(s.sinceCap+1) * 64
	return int(math.Min(math.Max(n, 1<<16), 1<<23))
}

func (s *solver) budgetError(budget int) error {
	return inputErrorf("mass-bucket", "the search reached %d states, the most this problem (%d boundaries, %d levels) is allowed: the mass bucket %.4g kg is too fine (the default is %.0f kg, 0.25 %% of MTOW)",
		budget, len(s.conds)+1, len(s.levels), s.p.MassBucket, 0.0025*s.a.MTOW)
}

func (s *solver) bucketError() error {
	return inputErrorf("mass-bucket", "mass bucket %.4g kg: a mass reached in the search lies more than 2^23 buckets below the take-off mass %.0f kg", s.p.MassBucket, s.p.TakeoffMass)
}
