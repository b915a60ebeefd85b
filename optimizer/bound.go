package optimizer

import (
	"math"

	"levelpath/perf"
)

// searchBound returns the A* lower bound h[k] on the cost from any node at
// boundary k to the sink, assuming the least total cost C* is at most u
// (u = +Inf assumes nothing), and records u in s.boundCost. Hart, Nilsson
// and Raphael (1968) show that A* with a consistent bound (h(u) <= c(u,v)
// + h(v) on every edge, h = 0 at the goal) settles each node at its least
// cost, so the search returns what Dijkstra's algorithm returns.
//
// The bound is a backward pass over the segments:
//
//	h[K] = 0,  h[k] = h[k+1] + len(k) * Q(k)
//
// where Q(k) is the least cruise cost per ground metre, (fuel flow +
// CI/60) / (TAS + wind), over the levels allowed and open on segment k,
// with each level's own wind there, at the econ Mach, at a mass mu(k) no
// heavier than any mass at which a cheapest path prices segment k:
//
//	mu(k) = max(OEW, TOW - u + h[k+2] + tau[k+2])  (on the memo's grid)
//
// and tau[k] = CI/60 x (the least time to reach boundary k, each segment at
// its fastest ground speed: MMO at its warmest level plus its strongest
// tailwind, less the longest segment's time), the least time cost of
// reaching boundary k.
//
// Q(k) is 0 where a step descent can start at boundary k (an idle descent
// costs less per metre than cruise). The final descent is credited: with
// H[k] = sum over j >= k of len(j) Q(j), h[k] = max(0, H[k] - Qt dgMax),
// where dgMax is 1.25 times the longest final descent found from any level
// at the take-off mass and at OEW (over ground) and Qt the largest Q on
// the segments that can hold the top of descent (those ending within
// dgMax of the end). A final-descent edge from boundary k costs at least
// its cruise to the top of descent, Q(k) (tod - bounds[k]) >= H[k] - Qt
// dgMax, the descent itself costing at least nothing.
//
// Why it is a lower bound, and consistent. (1) Per metre: at a fixed Mach,
// drag rises with mass (induced and compressibility drag grow with CL) and
// TSFC does not depend on it, while the Mach band at the floor only
// narrows as mass rises; so the econ cost per metre, the least over the
// band, does not fall as mass rises, and the LRC or a fixed Mach, inside
// the same band, cost at least the econ value. Cruise prices between grid
// masses interpolate fuel flow and TAS linearly, so their cost per metre
// (a ratio of two linear functions) lies between its values at the two
// grid masses, both at or above mu(k)'s grid mass. A cruise edge therefore
// costs at least len(k) Q(k). A step climb flies at the cruise Mach with
// thrust above drag, so its fuel flow exceeds level flight's and its cost
// per metre is at least Q(k) (the one assumption here not reduced to the
// model's monotonicity: the level-flight cost between two levels is not
// below both levels' values); the cruise that follows it or is credited
// for its overshoot is priced at the new level. Hence every edge from k to
// k+1 costs at least H[k] - H[k+1] >= h[k] - h[k+1] (consistency; max(0, .)
// keeps it), and edges to the sink cost at least h[k] (above).
//
// (2) Masses: every edge costs its fuel plus CI/60 times its time, and a
// path reaching boundary k has covered each segment before it at most at
// that segment's fastest ground speed (a step's overshoot credit moves at
// most one segment's ground to the next edge, hence "less the longest
// segment's time"); so a node at boundary k reached at cost g weighs at least
// TOW - g + tau[k]. On a cheapest path to a node popped with key at most
// C* <= u, backward induction along the path gives g(n) + h(n) <= C* at
// each node n, so the masses at boundary k+1 (and, for a step that
// overshoots into the next segment, k+2) are at least TOW - u + h[k+2] +
// tau[k+2] >= mu(k): the bound holds on every edge A* relies on (masses
// under OEW, which no flight reaches, are not covered).
//
// (3) When u is only a guess, a result costing more than u proves the
// guess wrong and search rebuilds the bound from that cost, which is an
// upper bound of C*; a result costing at most u proves the guess right.
// TestAStarMatchesDijkstra and TestBoundAdmissibleOnOptimalPath check all
// of this against plain Dijkstra.
//
// A relative slack of 1e-6 covers the golden-section tolerance of the
// econ Mach. Cost: at most one cruise evaluation per segment and level
// (see leastCostPerMetre for the levels skipped).
func (s *solver) searchBound(u float64) []float64 {
	s.boundCost = u
	h, _ := s.bound(u, 1)
	return h
}

// guessMargin is the ratio of the guessed total cost to the bound it
// gives; guessCost iterates guess = guessMargin x bound(guess).
const guessMargin = 1.11

// guessCost guesses the least total cost for searchBound: three rounds of
// guess = guessMargin x (H[0] + the cheapest initial climb's extra cost
// over cruise; H is the bound without the final descent's credit), each
// evaluating the ten highest levels on about 8 sampled
// segments that stand for their neighbours, starting from no assumption
// (OEW). A wrong guess costs a second search, never a wrong result.
func (s *solver) guessCost() float64 {
	stride := len(s.conds)/8 + 1
	u := math.Inf(1)
	for range 3 {
		_, H := s.bound(u, stride)
		if !(H[0] > 0) {
			return math.Inf(1)
		}
		u = guessMargin * (H[0] + s.climbExtra(H[0]/s.total))
	}
	return u
}

// bound is searchBound's pass; with stride > 1 it evaluates Q(k) only on
// every stride-th segment, over the ten highest levels only, and uses it
// for the following segments (a guess, not a bound). It returns h and H, h without the final descent's credit.
func (s *solver) bound(u float64, stride int) (h, H []float64) {
	K := len(s.conds)
	H = make([]float64, K+1)
	h = make([]float64, K+1)
	if s.fixed == nil {
		kT, dgMax := s.tailStart()
		s.fixed = &boundParts{kT: kT, dgMax: dgMax, desc: s.descentStarts(), tau: s.timeCostBound()}
	}
	kT, dgMax, desc, tau := s.fixed.kT, s.fixed.dgMax, s.fixed.desc, s.fixed.tau
	qTail := 0.0
	for k := K - 1; k >= 0; k-- {
		h2, t2 := 0.0, tau[K]
		if k+2 <= K {
			h2, t2 = h[k+2], tau[k+2]
		}
		mu := math.Max(s.a.OEW, s.p.TakeoffMass-u+h2+t2)
		q := 0.0
		switch {
		case stride > 1 && k%stride != 0 && k+1 < K:
			q = (H[k+1] - H[k+2]) / (s.bounds[k+2] - s.bounds[k+1]) // the sampled neighbour's
		case !desc[k]:
			from := 0
			if stride > 1 {
				from = max(0, len(s.levels)-10) // a guess: the ten highest levels
			}
			q = s.leastCostPerMetre(k, mu, from)
		}
		H[k] = H[k+1] + (s.bounds[k+1]-s.bounds[k])*q
		if k >= kT {
			qTail = math.Max(qTail, q)
		}
		// h[k+1..] are final once qTail covers the tail (k < kT), and
		// mu only reads h[k+2]; recompute the tail's h once kT is passed.
		if k == kT {
			for j := K; j >= kT; j-- {
				h[j] = math.Max(0, H[j]-qTail*dgMax)
			}
		} else if k < kT {
			h[k] = math.Max(0, H[k]-qTail*dgMax)
		}
	}
	return h, H
}

// climbExtra is what the cheapest initial climb costs beyond cruising its
// ground at q per metre (0 when no climb is feasible), for guessCost.
func (s *solver) climbExtra(q float64) float64 {
	best := math.Inf(1)
	for li := range s.levels {
		if c, ground := s.initialClimb(li); c.ok && ground < s.total {
			best = math.Min(best, s.costOf(c.fuel, c.time)-q*ground)
		}
	}
	if math.IsInf(best, 1) || best < 0 {
		return 0
	}
	return best
}

// boundParts are the parts of the bound that do not depend on the
// assumed cost, worked out once per problem.
type boundParts struct {
	kT    int
	dgMax float64
	desc  []bool
	tau   []float64
}

// leastCostPerMetre is Q(k) of searchBound at mass mu: the grid mass at or
// below mu (OEW itself when that is lighter than OEW), econ Mach, over the
// levels from index from up (0 for the bound).
//
// Levels are priced in the order of perf.Cruiser.EconCostBelow, a lower
// bound of each level's cost per metre over its whole Mach band that
// costs a few dozen operations, and a level whose bound is above the least
// cost found is not priced: its cost, at least the bound, cannot be the
// least. Q(k) is therefore the same number as when every level is priced
// (bit for bit; the margin of 1e-9 covers the rounding of the bound),
// after about a quarter of the econ-Mach searches (510 instead of 1,920
// for the demo long-haul's bound).
func (s *solver) leastCostPerMetre(k int, mu float64, from int) float64 {
	m := math.Floor(mu/s.grid) * s.grid
	if m < s.a.OEW {
		m = s.a.OEW
	}
	econ := Speed{Kind: SpeedEcon}
	cands := s.boundScratch[:0]
	for li := from; li < len(s.levels); li++ {
		c := s.conds[k][li]
		if !s.allow[k][li] || c.closed {
			continue
		}
		lb, ok := s.cr.EconCostBelow(m, s.press[li], c.isaDev, c.floor, s.p.CI, c.wind)
		if !ok {
			continue // no band: the level is infeasible at m, as cruiseEval finds
		}
		// Insertion by bound, ascending.
		cands = append(cands, levelBound{})
		j := len(cands) - 1
		for j > 0 && cands[j-1].lb > lb {
			cands[j] = cands[j-1]
			j--
		}
		cands[j] = levelBound{lb: lb, li: li}
	}
	s.boundScratch = cands
	best := math.Inf(1)
	for _, cb := range cands {
		if cb.lb*(1-1e-9) > best {
			break // this level and the rest cost more than best
		}
		li, c := cb.li, s.conds[k][cb.li]
		var v cruiseVal
		if g := int(math.Round(m / s.grid)); s.p.Speed.Kind == SpeedEcon && float64(g)*s.grid == m {
			v = s.cruiseGrid(k, li, g) // the search's own memo
		} else {
			v = s.priceCruise(econ, m, k, li)
		}
		if !v.ok {
			continue // infeasible here is infeasible at every heavier mass
		}
		gs := v.tas + c.wind
		if gs < 50 {
			continue
		}
		best = math.Min(best, (v.ff+s.p.CI/60)/gs)
	}
	if math.IsInf(best, 1) {
		return 0
	}
	return best * (1 - 1e-6)
}

// levelBound is a level and its perf.Cruiser.EconCostBelow.
type levelBound struct {
	lb float64
	li int
}

// timeCostBound returns tau[k] of searchBound for every boundary: CI/60
// times the least time to cover the ground to boundary k, segment by
// segment at that segment's fastest ground speed (MMO at its warmest level
// plus its strongest tailwind), less the longest of those segment times.
func (s *solver) timeCostBound() []float64 {
	tau := make([]float64, len(s.bounds))
	t, longest := 0.0, 0.0
	for k, row := range s.conds {
		gsMax := 0.0
		for li, c := range row {
			temp := perf.ISATemperature(perf.AltitudeAt(s.press[li])) + c.isaDev
			gsMax = math.Max(gsMax, s.a.MMO*perf.SpeedOfSound(temp)+math.Max(c.wind, 0))
		}
		dt := (s.bounds[k+1] - s.bounds[k]) / gsMax
		t += dt
		longest = math.Max(longest, dt)
		tau[k+1] = t
	}
	for k := range tau {
		tau[k] = s.p.CI / 60 * math.Max(0, tau[k]-longest)
	}
	return tau
}

// tailStart returns the first segment kT that can hold the top of
// descent and dgMax, 1.25 times the longest final descent found (from
// every level, at the take-off mass and at OEW): the first k with
// bounds[k+1] beyond the total less dgMax.
func (s *solver) tailStart() (int, float64) {
	longest := 0.0
	for li := range s.levels {
		for _, m := range [2]float64{s.p.TakeoffMass, s.a.OEW} {
			if d, dg := s.descentGround(li, m); d.ok {
				longest = math.Max(longest, dg)
			}
		}
	}
	dgMax := 1.25 * longest
	for k := range s.conds {
		if s.bounds[k+1] > s.total-dgMax {
			return k, dgMax
		}
	}
	return len(s.conds), dgMax
}

// descentStarts reports, per boundary k, whether a step descent can start
// there: step descents are allowed, or a level reachable at k (allowed on
// segment k-1) stops being available on segment k.
func (s *solver) descentStarts() []bool {
	out := make([]bool, len(s.conds))
	if s.p.Steps.NoSteps {
		return out
	}
	for k := 1; k < len(s.conds); k++ { // boundary 0 holds only the source
		if s.p.Steps.AllowDescent {
			out[k] = true
			continue
		}
		for li := range s.levels {
			if s.allow[k-1][li] && (!s.allow[k][li] || s.conds[k][li].closed) {
				out[k] = true
				break
			}
		}
	}
	return out
}
