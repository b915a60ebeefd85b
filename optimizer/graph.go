package optimizer

import (
	"math"
)

// state is a search node: boundary k (0..len(segments)), level index li,
// mass bucket b, steps flown and segments since the last step (both only
// tracked when the step rules need them).
type state struct {
	k, li, b     int
	steps, since int
}

// Node IDs: sourceID and sinkID are reserved; others pack a state.
const (
	sourceID int64 = -1
	sinkID   int64 = -2
)

// id packs a state into a node ID: 16 bits boundary, 8 level, 6 steps, 10
// since, 23 bucket.
func (st state) id() int64 {
	return int64(st.k)<<47 | int64(st.li)<<39 | int64(st.steps)<<33 | int64(st.since)<<23 | int64(st.b)
}

// maxSinceCap is the largest segments-since-the-last-step counter a node ID
// holds.
const maxSinceCap = 1<<10 - 1

func stateOf(id int64) state {
	return state{k: int(id >> 47), li: int(id>>39) & 0xff, steps: int(id>>33) & 0x3f, since: int(id>>23) & 0x3ff, b: int(id & (1<<23 - 1))}
}

// edge is one priced edge out of a node: the node it leads to, the fuel
// it burns (which sets the mass there) and its cost.
type edge struct {
	to   int64 // node ID
	fuel float64
	cost float64
}

// bucket returns the mass bucket of mass m.
func (s *solver) bucket(m float64) (int, bool) {
	b := math.Floor((s.p.TakeoffMass - m) / s.p.MassBucket)
	if b < 0 {
		b = 0
	}
	if b >= 1<<23 {
		s.overflowed = true
		return 0, false
	}
	return int(b), true
}

func (s *solver) costOf(fuel, t float64) float64 { return fuel + s.p.CI*t/60 }

// successors calls emit for every feasible edge out of the node id whose
// mass is m. Edges are priced as they are generated; infeasible edges
// (buffet margin under the floor at the heaviest point, level above the
// thrust-limited or certified ceiling, empty Mach band, closed level, level
// rule) are never emitted.
func (s *solver) successors(id int64, m float64, emit func(edge)) {
	if id == sinkID {
		return
	}
	if id == sourceID {
		s.climbEdges(emit)
		return
	}
	st := stateOf(id)
	if st.k >= len(s.conds) {
		return
	}
	next := st
	next.k = st.k + 1
	if s.sinceCap > 0 && next.since < s.sinceCap {
		next.since++
	}
	s.descentEdge(st, m, emit)
	s.cruiseEdge(st, next, m, emit)
	if s.stepAllowed(st) {
		s.stepEdges(st, next, m, emit)
	}
}

// descentEdge emits the final descent to the sink from state st at mass m
// when the top of descent from st's level falls in st's segment: level
// flight to the top of descent, then the descent.
func (s *solver) descentEdge(st state, m float64, emit func(edge)) {
	k, li := st.k, st.li
	if !s.allow[k][li] {
		return
	}
	d, dg := s.descentGround(li, m)
	if !d.ok {
		return
	}
	tod := s.total - dg
	if tod < s.bounds[k] || tod >= s.bounds[k+1] {
		return
	}
	s.edges++
	f, t, v := s.cruiseLeg(k, li, m, tod-s.bounds[k])
	if v.ok {
		f += d.fuel
		t += d.time
		emit(edge{to: sinkID, fuel: f, cost: s.costOf(f, t) + s.contrailCost(k, li, m, v, tod-s.bounds[k])})
	}
}

// cruiseEdge emits level flight through st's segment to next (the same
// level at the next boundary) when the level is open and the boundary lies
// before the top of descent.
func (s *solver) cruiseEdge(st, next state, m float64, emit func(edge)) {
	k, li := st.k, st.li
	if !s.allow[k][li] {
		return
	}
	s.edges++
	f, t, v := s.cruiseLeg(k, li, m, s.bounds[k+1]-s.bounds[k])
	if v.ok && s.beforeTOD(li, m-f, k+1) {
		if b, ok := s.bucket(m - f); ok {
			n := next
			n.b = b
			emit(edge{to: n.id(), fuel: f, cost: s.costOf(f, t) + s.contrailCost(k, li, m, v, s.bounds[k+1]-s.bounds[k])})
		}
	}
}

// stepEdges emits the step climbs and descents from st at the start of its
// segment to every other allowed level within the maximum change: the
// transition, then level flight to the next boundary (a step may end in
// the next segment, priced at the new level).
func (s *solver) stepEdges(st, next state, m float64, emit func(edge)) {
	k, li := st.k, st.li
	K := len(s.conds)
	segLen := s.bounds[k+1] - s.bounds[k]
	maxD := s.p.Steps.maxChangeFt() / 100
	for lj := range s.levels {
		dfl := s.levels[lj] - s.levels[li]
		if dfl == 0 || dfl > maxD || -dfl > maxD || !s.allow[k][lj] {
			continue
		}
		if dfl < 0 && !s.p.Steps.AllowDescent && s.allow[k][li] && !s.conds[k][li].closed {
			// A step descent is taken only where allowed, or where the
			// current level stops being available (a change of direction,
			// a block, turbulence).
			continue
		}
		s.edges++
		tr := s.transAt(k, li, lj, m)
		if !tr.ok {
			continue
		}
		w := 0.5 * (s.conds[k][li].wind + s.conds[k][lj].wind)
		ground := tr.dist + w*tr.time
		rem := segLen - ground
		if k+1 < K && rem < -(s.bounds[k+2]-s.bounds[k+1]) || k+1 == K && rem < 0 {
			continue // the step would not end within the next segment
		}
		m2 := m - tr.fuel
		f, t, v := s.cruiseLeg(k, lj, m2, rem)
		if !v.ok {
			continue
		}
		f += tr.fuel
		t += tr.time
		if f <= 0 || t <= 0 {
			continue // a step overlapping the next segment must not price below zero
		}
		if !s.beforeTOD(lj, m-f, k+1) {
			continue
		}
		b, ok := s.bucket(m - f)
		if !ok {
			continue
		}
		n := next
		n.li, n.b = lj, b
		if s.stepCap > 0 {
			n.steps = st.steps + 1
		}
		if s.sinceCap > 0 {
			n.since = 1
		}
		emit(edge{to: n.id(), fuel: f, cost: s.costOf(f, t) + s.contrailCost(k, lj, m2, v, rem)})
	}
}

// stepAllowed applies the step rules at node st.
func (s *solver) stepAllowed(st state) bool {
	if s.p.Steps.NoSteps {
		return false
	}
	if s.stepCap > 0 && st.steps >= s.stepCap {
		return false
	}
	if s.sinceCap > 0 && st.since < s.sinceCap {
		return s.bounds[st.k]-s.bounds[st.k-st.since] >= s.p.Steps.MinDistance-1e-6
	}
	return true
}

// beforeTOD reports whether boundary k lies at or before the top of
// descent from level li at mass m.
func (s *solver) beforeTOD(li int, m float64, k int) bool {
	if k >= len(s.conds) {
		return false
	}
	d, dg := s.descentGround(li, m)
	return d.ok && s.bounds[k] <= s.total-dg
}

// climbEdges emits the initial climbs to every level whose top of climb
// lies inside the route, with level flight to the next boundary.
func (s *solver) climbEdges(emit func(edge)) {
	tow := s.p.TakeoffMass
	for li := range s.levels {
		s.edges++
		c, ground := s.initialClimb(li)
		if !c.ok || ground >= s.total {
			continue
		}
		j := segmentIndex(s.p.Track.Segments, ground)
		if !s.allow[j][li] {
			continue
		}
		f, t, v := s.cruiseLeg(j, li, tow-c.fuel, s.bounds[j+1]-ground)
		if !v.ok {
			continue
		}
		f += c.fuel
		t += c.time
		if !s.beforeTOD(li, tow-f, j+1) {
			continue
		}
		b, ok := s.bucket(tow - f)
		if !ok {
			continue
		}
		n := state{k: j + 1, li: li, b: b}
		if s.sinceCap > 0 {
			n.since = 1 // the climb counts as a step for the minimum distance
		}
		emit(edge{to: n.id(), fuel: f, cost: s.costOf(f, t) + s.contrailCost(j, li, tow-c.fuel, v, s.bounds[j+1]-ground)})
	}
}
