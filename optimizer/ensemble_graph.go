package optimizer

import (
	"math"
	"slices"
)

// ensSearch prices the edges of one search graph on every member of an
// ensemble: the graph (boundaries, levels, step rules) is the control
// member's, each edge is priced by each member's own solver (its own
// winds, temperatures, econ Mach and memo) at the node's mass, and the
// members' prices are combined into one edge (combine). Where the members
// would place a piece of the profile differently (the top of climb's
// segment, the top of descent's segment, whether a step fits in the next
// segment's ground), the control member decides and every member prices
// that piece from its own ground distances.
type ensSearch struct {
	members []*solver // members[0] is the control
	need    int       // members an edge must be feasible in
	obj     Objective
	costs   []float64 // scratch: the feasible members' costs
	fuels   []float64
}

// memberPrice is one member's price of an edge: fuel (kg), time (s), and
// whether the edge is feasible in that member.
type memberPrice func(s *solver) (fuel, t float64, ok bool)

// combine prices an edge on every member and returns its fuel and cost:
// infeasible when it is feasible in fewer than need members; otherwise
// the mean fuel of the feasible members (the mass the search carries on)
// and, for the objective, the mean (or the q-quantile) of their costs.
// The mean is taken as x0 + sum(xi - x0)/n, so that identical members
// give x0 exactly. Time O(members); the quantile O(members log members).
func (e *ensSearch) combine(price memberPrice) (fuel, cost float64, ok bool) {
	e.costs, e.fuels = e.costs[:0], e.fuels[:0]
	for i, s := range e.members {
		f, t, ok := price(s)
		if ok {
			e.costs = append(e.costs, s.costOf(f, t))
			e.fuels = append(e.fuels, f)
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
	fuel, cost, ok := e.combine(func(s *solver) (float64, float64, bool) {
		d, dg := s.descentGround(li, m)
		if !d.ok {
			return 0, 0, false
		}
		f, t, v := s.cruiseLeg(k, li, m, s.total-dg-s.bounds[k])
		return f + d.fuel, t + d.time, v.ok && f+d.fuel > 0 && t+d.time > 0
	})
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
	fuel, cost, ok := e.combine(func(s *solver) (float64, float64, bool) {
		f, t, v := s.cruiseLeg(k, li, m, segLen)
		return f, t, v.ok
	})
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
	maxD := c.p.Steps.MaxChange / 100
	for lj := range c.levels {
		dfl := c.levels[lj] - c.levels[li]
		if dfl == 0 || dfl > maxD || -dfl > maxD || !c.allow[k][lj] {
			continue
		}
		if dfl < 0 && !c.p.Steps.AllowDescent && c.allow[k][li] && !c.conds[k][li].closed {
			continue
		}
		c.edges++
		fuel, cost, ok := e.combine(func(s *solver) (float64, float64, bool) {
			tr := s.transAt(k, li, lj, m)
			if !tr.ok {
				return 0, 0, false
			}
			w := 0.5 * (s.conds[k][li].wind + s.conds[k][lj].wind)
			rem := segLen - (tr.dist + w*tr.time)
			if k+1 < K && rem < -(s.bounds[k+2]-s.bounds[k+1]) || k+1 == K && rem < 0 {
				return 0, 0, false
			}
			f, t, v := s.cruiseLeg(k, lj, m-tr.fuel, rem)
			f += tr.fuel
			t += tr.time
			return f, t, v.ok && f > 0 && t > 0
		})
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
		fuel, cost, ok := e.combine(func(s *solver) (float64, float64, bool) {
			cl, ground := s.initialClimb(li)
			if !cl.ok || ground >= s.total {
				return 0, 0, false
			}
			f, t, v := s.cruiseLeg(j, li, tow-cl.fuel, s.bounds[j+1]-ground)
			f += cl.fuel
			t += cl.time
			return f, t, v.ok && f > 0 && t > 0
		})
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

// search is solver.search on the ensemble: A* under the members' mean
// bound (mean of each member's searchBound at the same assumed cost; for
// the mean objective each member's bound is consistent on its own edge
// prices, so their mean is on the mean's, up to the mass the members
// share, see SolveEnsemble), with solver.search's reruns: from the cost
// found when it passes the assumed cost, and plain Dijkstra when an edge's
// reduced cost is negative. The quantile objective is searched by plain
// Dijkstra (a quantile of sums is no sum of quantiles, so no bound of the
// members' is one of the objective).
func (e *ensSearch) search(d *solver) (searchResult, bool) {
	if e.obj.Quantile > 0 || d.dijkstra {
		return d.run(nil)
	}
	bound := func(u float64) []float64 {
		hs := make([][]float64, len(e.members))
		for i, s := range e.members {
			hs[i] = s.searchBound(u)
		}
		h := make([]float64, len(hs[0]))
		col := make([]float64, len(hs))
		for k := range h {
			for i := range hs {
				col[i] = hs[i][k]
			}
			h[k] = meanRel(col)
		}
		d.boundCost = u
		return h
	}
	h := bound(e.members[0].guessCost())
	if err := ctxErr(d.ctx); err != nil {
		return searchResult{err: err}, false
	}
	res, ok := d.run(h)
	for i := 0; i < 3 && ok && res.err == nil; i++ {
		switch {
		case res.cost > d.boundCost*(1+1e-12):
			h = bound(res.cost)
			r, ok2 := d.run(h)
			r.reruns = res.reruns + 1
			res, ok = r, ok2
		case res.violations > 0:
			r, ok2 := d.run(nil)
			r.violations, r.reruns = res.violations, res.reruns+1
			return r, ok2
		default:
			return res, ok
		}
	}
	return res, ok
}
