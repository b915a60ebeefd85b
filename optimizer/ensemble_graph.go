package optimizer

import (
	"math"
	"slices"

	"levelpath/perf"
)

// ensSearch prices the edges of one search graph on every member of an
// ensemble: the graph (boundaries, levels, step rules) is the control
// member's, each edge is priced on each member at the node's mass, and
// the members' prices are combined into one edge (combine). Where the
// members would place a piece of the profile differently (the top of
// climb's segment, the top of descent's segment), the control member
// decides and every member prices that piece from its own ground
// distances.
//
// Work shared across members: the control prices every edge with the
// search's own model (econ Mach and memo, as Solve does); a member whose
// weather on the edge's segment and levels equals the control's takes
// the control's price; any other member flies the control's Mach
// (sharedMach): one aircraft point per mass with the member's own wind,
// temperature and floor, instead of a Mach optimisation. At the econ Mach
// the cost's derivative in Mach is zero, so flying the control's econ
// Mach instead of the member's own costs the member only a second-order
// amount in the Mach difference (the envelope theorem); the exact pricing
// afterwards flies each member's own econ Mach. Steps are priced from the
// control's step memo at the member's mean temperature deviation (the
// memo's key); with memberMach every member is priced with its own econ
// Mach and memo instead (members times the control's work).
type ensSearch struct {
	members    []*solver // members[0] is the control
	need       int       // members an edge must be feasible in
	obj        Objective
	memberMach bool
	costs      []float64 // scratch: the feasible members' costs
	fuels      []float64
	// epoch counts the edges combined; the control's leg and step Mach
	// are worked out once an edge, by the first member that asks.
	epoch     int
	last      ctrlLeg
	stepMach  cruiseVal
	stepEpoch int
	// stepTr is the last step priced from the memo this edge, for the
	// members whose rounded temperature deviation (the memo's key) is
	// the same.
	stepTr              transVal
	stepDi, stepTrEpoch int
}

// ctrlLeg is the control's cruise over distance d on segment k at level
// li from mass m: its start point v0 and the ratios of fuel flow and true
// airspeed at its mid-leg mass to the start's.
type ctrlLeg struct {
	k, li, epoch int
	v0           cruiseVal
	rFF, rTAS    float64
	ok           bool
}

// ctrlLegAt returns the control's leg on segment k at level li (see
// ctrlLeg), worked out once an edge at the mass m and distance d of the
// first member that asks (a step's members start their level flight at
// masses and distances a few kilograms and metres apart; the leg gives
// them the Mach and the mass effect only).
func (e *ensSearch) ctrlLegAt(k, li int, m, d float64) *ctrlLeg {
	l := &e.last
	if l.epoch == e.epoch && l.k == k && l.li == li {
		return l
	}
	c := e.members[0]
	*l = ctrlLeg{k: k, li: li, epoch: e.epoch, rFF: 1, rTAS: 1}
	l.v0 = c.cruiseAt(k, li, m)
	if l.ok = l.v0.ok; !l.ok {
		return l
	}
	if gs := l.v0.tas + c.conds[k][li].wind; gs >= 50 {
		if vm := c.cruiseAt(k, li, m-l.v0.ff*d/gs/2); vm.ok {
			l.rFF, l.rTAS = vm.ff/l.v0.ff, vm.tas/l.v0.tas
		}
	}
	return l
}

// legPrice is one member's price of an edge: fuel (kg), time (s), the
// cost beyond fuel and time (the contrail cost, Problem.ContrailCost), and
// whether the edge is feasible in that member.
type legPrice struct {
	fuel, time, extra float64
	ok                bool
}

// plus adds a transition's fuel and time to a leg; the sum must be
// positive (a step overlapping the next segment must not price below
// zero).
func (p legPrice) plus(fuel, t float64) legPrice {
	p.fuel += fuel
	p.time += t
	p.ok = p.ok && p.fuel > 0 && p.time > 0
	return p
}

// memberPrice prices an edge on one member.
type memberPrice func(s *solver) legPrice

// ownCruise is solver.cruiseLeg with the contrail cost, as Solve prices
// level flight.
func ownCruise(s *solver, k, li int, m, d float64) legPrice {
	f, t, v := s.cruiseLeg(k, li, m, d)
	return legPrice{fuel: f, time: t, extra: s.contrailCost(k, li, m, v, d), ok: v.ok}
}

// combine prices an edge on every member and returns its fuel and cost:
// infeasible when it is feasible in fewer than need members; otherwise
// the mean fuel of the feasible members (the mass the search carries on)
// and, for the objective, the mean (or the q-quantile) of their costs.
// ctrl is the search's own price (the control's, and every member's with
// memberMach), shared the shared-Mach price (see ensSearch); keys are the
// (segment, level) pairs whose weather the edge depends on. The mean is
// taken as x0 + sum(xi - x0)/n, so that identical members give x0
// exactly. Time O(members); the quantile O(members log members).
func (e *ensSearch) combine(ctrl, shared memberPrice, keys ...[2]int) (fuel, cost float64, ok bool) {
	e.costs, e.fuels = e.costs[:0], e.fuels[:0]
	e.epoch++
	c := e.members[0]
	p0 := ctrl(c)
	for i, s := range e.members {
		var p legPrice
		switch {
		case i == 0:
			p = p0
		case e.memberMach:
			p = ctrl(s)
		case sameConds(c, s, keys):
			p = p0
		default:
			p = shared(s)
		}
		if p.ok {
			e.costs = append(e.costs, s.costOf(p.fuel, p.time)+p.extra)
			e.fuels = append(e.fuels, p.fuel)
		} else if len(e.members)-i-1 < e.need-len(e.costs) {
			return 0, 0, false // too few members left to reach need
		}
	}
	if len(e.costs) < e.need || len(e.costs) == 0 {
		return 0, 0, false
	}
	fuel = meanRel(e.fuels)
	if e.obj.Quantile > 0 {
		return fuel, quantile7(e.costs, e.obj.Quantile), true
	}
	return fuel, meanRel(e.costs), true
}

// sameConds reports whether member s has the control's weather at every
// (segment, level) of keys (contrail conditions compared by value).
func sameConds(c, s *solver, keys [][2]int) bool {
	for _, k := range keys {
		a, b := c.conds[k[0]][k[1]], s.conds[k[0]][k[1]]
		ca, cb := a.con, b.con
		a.con, b.con = nil, nil
		if a != b || (ca == nil) != (cb == nil) || ca != nil && *ca != *cb {
			return false
		}
	}
	return true
}

// sharedCruise is cruiseLeg for member s at the control's Mach at mass m
// (its own econ Mach where the control has none): the member's wind,
// temperature and floor at the start of the leg, where feasibility is
// decided; over the leg, fuel flow and true airspeed change from the
// start by the control's own ratios between its start and mid-leg masses
// (the mass effect: the members' mid-leg masses differ from the control's
// by half their difference in the leg's fuel, a few tens of kilograms).
// A member whose temperature, floor and closure equal the control's flies
// the control's aircraft point itself (only the ground speed differs): no
// aircraft point is evaluated for it.
func (e *ensSearch) sharedCruise(s *solver, k, li int, m, d float64) legPrice {
	l := e.ctrlLegAt(k, li, m, d)
	if !l.ok {
		return ownCruise(s, k, li, m, d)
	}
	c, cc := s.conds[k][li], e.members[0].conds[k][li]
	v := l.v0
	if c.isaDev != cc.isaDev || c.floor != cc.floor || c.closed != cc.closed {
		if v = cruiseAtMach(s, li, m, l.v0.mach, c); !v.ok {
			return legPrice{}
		}
	}
	if v.tas+c.wind < 50 {
		return legPrice{}
	}
	t := d / (v.tas*l.rTAS + c.wind)
	return legPrice{fuel: v.ff * l.rFF * t, time: t, extra: s.contrailCost(k, li, m, v, d), ok: true}
}

// cruiseAtMach is cruise at level li, mass m and the given Mach in
// conditions c: one aircraft point and the limits cruiseEval checks
// (closed level, thrust, residual climb, buffet floor) and the Mach band
// a fixed Mach keeps (buffet Machs at the floor, MMO: a Mach the control
// flies at the same mass and level is inside them unless the member's
// floor is higher).
func cruiseAtMach(s *solver, li int, m, mach float64, c cond) cruiseVal {
	if c.closed {
		return cruiseVal{lim: LimitTurbulence}
	}
	pt := s.a.Point(perf.State{Mass: m, Pressure: s.press[li], Mach: mach, ISADev: c.isaDev, LoadFactor: 1})
	v := cruiseVal{mach: mach, tas: pt.TAS, ff: pt.FuelFlow, resid: pt.ResidualClimb, margin: pt.BuffetMargin}
	switch {
	case pt.ThrustLimited:
		v.lim = LimitThrust
	case pt.ResidualClimb < fpm300:
		v.lim = LimitThrust
	case pt.BuffetMargin < c.floor-1e-9:
		v.lim = LimitBuffet
	case mach > s.a.MMO+1e-9:
		v.lim = LimitMachBand
	default:
		v.ok = true
	}
	return v
}

// sharedStep prices member s's step from level li to lj on segment k at
// mass m at the control's Mach (as transAt chooses it) and the member's
// mean temperature deviation, from the control's step memo.
func (e *ensSearch) sharedStep(s *solver, k, li, lj int, m float64) transVal {
	c := e.members[0]
	if e.stepEpoch != e.epoch { // the Mach is the edge's, at the node's mass
		e.stepMach, e.stepEpoch = c.cruiseAt(k, lj, m), e.epoch
		if !e.stepMach.ok {
			e.stepMach = c.cruiseAt(k, li, m)
		}
	}
	v := e.stepMach
	if !v.ok {
		return s.transAt(k, li, lj, m)
	}
	dev := (s.conds[k][li].isaDev + s.conds[k][lj].isaDev) / 2
	mi := int(math.Round(v.mach / c.machStep))
	di := int(math.Round(dev/c.devStep)) + 200
	if di < 0 || di > 400 {
		return c.transExact(li, lj, m, v.mach, dev)
	}
	if e.stepTrEpoch == e.epoch && e.stepDi == di {
		return e.stepTr // same Mach (the edge's) and key: the same price
	}
	g := int(math.Floor(m / c.grid))
	v0, v1 := c.transGrid(li, lj, g, mi, di)
	var tr transVal
	if !v0.ok || !v1.ok {
		tr = c.transExact(li, lj, m, float64(mi)*c.machStep, float64(di-200)*c.devStep)
	} else {
		t := (m - float64(g)*c.grid) / c.grid
		l := func(a, b float64) float64 { return a + (b-a)*t }
		tr = transVal{ok: true, fuel: l(v0.fuel, v1.fuel), time: l(v0.time, v1.time), dist: l(v0.dist, v1.dist), mach: v0.mach}
	}
	e.stepTr, e.stepDi, e.stepTrEpoch = tr, di, e.epoch
	return tr
}

// meanRel is the mean of xs as xs[0] + sum(xi - xs[0])/n (exact when all
// are equal).
func meanRel(xs []float64) float64 {
	d := 0.0
	for _, x := range xs[1:] {
		d += x - xs[0]
	}
	return xs[0] + d/float64(len(xs))
}

// quantile7 is the q-quantile of xs by definition 7 of Hyndman and Fan,
// "Sample quantiles in statistical packages", The American Statistician
// 50(4), 1996 (linear interpolation between order statistics at
// h = (n-1) q; R's default and numpy's "linear"). It sorts xs in place.
func quantile7(xs []float64, q float64) float64 {
	slices.Sort(xs)
	h := float64(len(xs)-1) * q
	lo := int(math.Floor(h))
	if lo >= len(xs)-1 {
		return xs[len(xs)-1]
	}
	return xs[lo] + (h-float64(lo))*(xs[lo+1]-xs[lo])
}

// successors is solver.successors on the ensemble (see ensSearch).
func (e *ensSearch) successors(id int64, m float64, emit func(edge)) {
	c := e.members[0]
	if id == sinkID {
		return
	}
	if id == sourceID {
		e.climbEdges(emit)
		return
	}
	st := stateOf(id)
	if st.k >= len(c.conds) {
		return
	}
	next := st
	next.k = st.k + 1
	if c.sinceCap > 0 && next.since < c.sinceCap {
		next.since++
	}
	e.descentEdge(st, m, emit)
	e.cruiseEdge(st, next, m, emit)
	if c.stepAllowed(st) {
		e.stepEdges(st, next, m, emit)
	}
}

// descentEdge is solver.descentEdge: the control's top of descent decides
// the segment; each member cruises to its own top of descent and descends.
func (e *ensSearch) descentEdge(st state, m float64, emit func(edge)) {
	c := e.members[0]
	k, li := st.k, st.li
	if !c.allow[k][li] {
		return
	}
	d, dg := c.descentGround(li, m)
	if !d.ok {
		return
	}
	if tod := c.total - dg; tod < c.bounds[k] || tod >= c.bounds[k+1] {
		return
	}
	c.edges++
	last := len(c.conds) - 1
	descend := func(s *solver, cruise func(s *solver, d float64) legPrice) legPrice {
		d, dg := s.descentGround(li, m)
		if !d.ok {
			return legPrice{}
		}
		return cruise(s, s.total-dg-s.bounds[k]).plus(d.fuel, d.time)
	}
	fuel, cost, ok := e.combine(func(s *solver) legPrice {
		return descend(s, func(s *solver, d float64) legPrice { return ownCruise(s, k, li, m, d) })
	}, func(s *solver) legPrice {
		return descend(s, func(s *solver, d float64) legPrice { return e.sharedCruise(s, k, li, m, d) })
	}, [2]int{k, li}, [2]int{last, li})
	if ok {
		emit(edge{to: sinkID, fuel: fuel, cost: cost})
	}
}

// cruiseEdge is solver.cruiseEdge on every member; the control's top of
// descent decides whether the next boundary is reached in cruise.
func (e *ensSearch) cruiseEdge(st, next state, m float64, emit func(edge)) {
	c := e.members[0]
	k, li := st.k, st.li
	if !c.allow[k][li] {
		return
	}
	c.edges++
	segLen := c.bounds[k+1] - c.bounds[k]
	fuel, cost, ok := e.combine(func(s *solver) legPrice {
		return ownCruise(s, k, li, m, segLen)
	}, func(s *solver) legPrice {
		return e.sharedCruise(s, k, li, m, segLen)
	}, [2]int{k, li})
	if !ok || !c.beforeTOD(li, m-fuel, k+1) {
		return
	}
	if b, ok := c.bucket(m - fuel); ok {
		n := next
		n.b = b
		emit(edge{to: n.id(), fuel: fuel, cost: cost})
	}
}

// stepEdges is solver.stepEdges on every member: each member flies the
// step at its own cruise Mach and wind and must end it within the next
// segment.
func (e *ensSearch) stepEdges(st, next state, m float64, emit func(edge)) {
	c := e.members[0]
	k, li := st.k, st.li
	K := len(c.conds)
	segLen := c.bounds[k+1] - c.bounds[k]
	maxD := c.p.Steps.maxChangeFt() / 100
	for lj := range c.levels {
		dfl := c.levels[lj] - c.levels[li]
		if dfl == 0 || dfl > maxD || -dfl > maxD || !c.allow[k][lj] {
			continue
		}
		if dfl < 0 && !c.p.Steps.AllowDescent && c.allow[k][li] && !c.conds[k][li].closed {
			continue
		}
		c.edges++
		step := func(s *solver, tr transVal, cruise func(s *solver, m, d float64) legPrice) legPrice {
			if !tr.ok {
				return legPrice{}
			}
			w := 0.5 * (s.conds[k][li].wind + s.conds[k][lj].wind)
			rem := segLen - (tr.dist + w*tr.time)
			if k+1 < K && rem < -(s.bounds[k+2]-s.bounds[k+1]) || k+1 == K && rem < 0 {
				return legPrice{}
			}
			return cruise(s, m-tr.fuel, rem).plus(tr.fuel, tr.time)
		}
		fuel, cost, ok := e.combine(func(s *solver) legPrice {
			return step(s, s.transAt(k, li, lj, m), func(s *solver, m, d float64) legPrice { return ownCruise(s, k, lj, m, d) })
		}, func(s *solver) legPrice {
			return step(s, e.sharedStep(s, k, li, lj, m), func(s *solver, m, d float64) legPrice { return e.sharedCruise(s, k, lj, m, d) })
		}, [2]int{k, li}, [2]int{k, lj})
		if !ok || !c.beforeTOD(lj, m-fuel, k+1) {
			continue
		}
		b, ok := c.bucket(m - fuel)
		if !ok {
			continue
		}
		n := next
		n.li, n.b = lj, b
		if c.stepCap > 0 {
			n.steps = st.steps + 1
		}
		if c.sinceCap > 0 {
			n.since = 1
		}
		emit(edge{to: n.id(), fuel: fuel, cost: cost})
	}
}

// climbEdges is solver.climbEdges: the control's top of climb decides the
// segment the climb ends in; each member climbs with its own temperature
// and wind and cruises from its own top of climb to that segment's end.
func (e *ensSearch) climbEdges(emit func(edge)) {
	c := e.members[0]
	tow := c.p.TakeoffMass
	for li := range c.levels {
		c.edges++
		cl, ground := c.initialClimb(li)
		if !cl.ok || ground >= c.total {
			continue
		}
		j := segmentIndex(c.p.Track.Segments, ground)
		if !c.allow[j][li] {
			continue
		}
		climb := func(s *solver, cruise func(s *solver, m, d float64) legPrice) legPrice {
			cl, ground := s.initialClimb(li)
			if !cl.ok || ground >= s.total {
				return legPrice{}
			}
			return cruise(s, tow-cl.fuel, s.bounds[j+1]-ground).plus(cl.fuel, cl.time)
		}
		fuel, cost, ok := e.combine(func(s *solver) legPrice {
			return climb(s, func(s *solver, m, d float64) legPrice { return ownCruise(s, j, li, m, d) })
		}, func(s *solver) legPrice {
			return climb(s, func(s *solver, m, d float64) legPrice { return e.sharedCruise(s, j, li, m, d) })
		}, [2]int{0, li}, [2]int{j, li})
		if !ok || !c.beforeTOD(li, tow-fuel, j+1) {
			continue
		}
		b, ok := c.bucket(tow - fuel)
		if !ok {
			continue
		}
		n := state{k: j + 1, li: li, b: b}
		if c.sinceCap > 0 {
			n.since = 1
		}
		emit(edge{to: n.id(), fuel: fuel, cost: cost})
	}
}

// search runs the ensemble's search: plain Dijkstra (no A* bound; the
// members' bounds, one per member, would cost about what the cheaper
// member pricing saves, and plain Dijkstra settles only about half as
// many nodes again on the demo long haul). Any objective works with it.
func (e *ensSearch) search(d *solver) (searchResult, bool) {
	return d.run(nil)
}
