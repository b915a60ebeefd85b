package optimizer

import "math"

// label is the best known arrival at a node.
type label struct {
	id      int64
	cost    float64 // g: cost from the source
	key     float64 // g + h, the priority it was queued with
	mass    float64
	pred    int32 // slot of the predecessor, -1 for the source
	settled bool
}

// heapItem is an entry of the search's priority queue.
type heapItem struct {
	key  float64
	id   int64
	slot int32
}

func (a heapItem) less(b heapItem) bool {
	if a.key != b.key {
		return a.key < b.key
	}
	return a.id < b.id // deterministic ties
}

// minHeap is a binary heap of heapItems (lazy deletion: stale entries are
// skipped when popped).
type minHeap []heapItem

func (h *minHeap) push(x heapItem) {
	*h = append(*h, x)
	a := *h
	i := len(a) - 1
	for i > 0 {
		p := (i - 1) / 2
		if !a[i].less(a[p]) {
			break
		}
		a[i], a[p] = a[p], a[i]
		i = p
	}
}

func (h *minHeap) pop() heapItem {
	a := *h
	top := a[0]
	n := len(a) - 1
	a[0] = a[n]
	a = a[:n]
	i := 0
	for {
		l := 2*i + 1
		if l >= n {
			break
		}
		m := l
		if r := l + 1; r < n && a[r].less(a[l]) {
			m = r
		}
		if !a[m].less(a[i]) {
			break
		}
		a[i], a[m] = a[m], a[i]
		i = m
	}
	*h = a
	return top
}

// searchResult is the cheapest path found.
type searchResult struct {
	path  []label // source first, sink last
	cost  float64
	nodes int   // nodes settled (by the last search run)
	err   error // the state budget was exceeded, or a bucket overflowed
	// violations counts edges whose reduced cost under the A* bound was
	// negative (then the search was rerun without the bound).
	violations int
	reruns     int // searches run after the first (bound too tight, see searchBound)
}

// search finds the cheapest path from the source to the sink: A* (Hart,
// Nilsson and Raphael, "A formal basis for the heuristic determination of
// minimum cost paths", IEEE Trans. SSC 4(2), 1968) with the lower bound of
// bound.go, or plain Dijkstra (1959) when s.dijkstra is set. A node's
// label carries the exact mass of its cheapest arrival, and its outgoing
// edges are priced from that mass when the node is settled (label-setting
// over mass buckets: arrivals in the same bucket are merged, keeping the
// cheapest; this is the only approximation of the graph, bounded by the
// bucket width times the sensitivity of the remaining cost to mass).
//
// A* with a consistent bound h is Dijkstra's algorithm on the reduced
// costs c(u,v) - h(u) + h(v) >= 0, so it settles every node with its
// cheapest arrival, as Dijkstra does, and returns the same cost. The bound
// depends only on a node's boundary, so arrivals at one node keep their
// order and the merging of a bucket keeps the same arrival. Every edge
// relaxed is checked against the bound; if one has a negative reduced
// cost (the bound's assumptions failed), the search is rerun as plain
// Dijkstra and the result is Dijkstra's.
//
// Edge costs are non-negative except for the credit of a step that ends in
// the next segment, which is always smaller than the step's own fuel, so
// every edge's net cost stays non-negative and Dijkstra's invariant holds.
//
// Complexity: O((V + E) log V) for the V nodes and E edges reached, plus
// O(segments x levels) cruise evaluations for the bound.
func (s *solver) search() (searchResult, bool) {
	if s.dijkstra {
		return s.run(nil)
	}
	var h []float64
	switch {
	case s.reuse != nil && s.boundCost > 0:
		h = s.reuse // the bound of a supergraph, under the same assumption
	case s.costGuess > 0:
		h = s.searchBound(s.costGuess)
	default:
		h = s.searchBound(s.guessCost())
	}
	s.reuse = h
	if err := ctxErr(s.ctx); err != nil {
		return searchResult{err: err}, false
	}
	res, ok := s.run(h)
	for i := 0; i < 3 && ok && res.err == nil; i++ {
		switch {
		case res.cost > s.boundCost*(1+1e-12):
			// The bound assumed a total cost under boundCost; the path
			// found costs more, so the bound may not hold: rebuild it from
			// the cost found (an upper bound of the optimum) and search
			// again. That search is exact (see searchBound).
			h = s.searchBound(res.cost)
			r, ok2 := s.run(h)
			r.reruns = res.reruns + 1
			res, ok = r, ok2
		case res.violations > 0:
			r, ok2 := s.run(nil)
			r.violations, r.reruns = res.violations, res.reruns+1
			return r, ok2
		default:
			return res, ok
		}
	}
	return res, ok
}

// run is one label-setting search with the bound h per boundary (nil: plain
// Dijkstra).
func (s *solver) run(h []float64) (searchResult, bool) {
	hk := func(k int) float64 {
		if h == nil {
			return 0
		}
		return h[k]
	}
	nsince := s.sinceCap + 1
	if s.mergeSince {
		nsince = 1
	}
	idx := newNodeIndex(len(s.conds)+1, len(s.levels), s.stepCap+1, nsince)
	slots := make([]label, 0, 1024)
	var h0 heapItem
	h0.id, h0.slot = sourceID, 0
	hp := minHeap{h0}
	slots = append(slots, label{id: sourceID, mass: s.p.TakeoffMass, pred: -1})
	sinkSlot := int32(-1)
	nodes, viol := 0, 0
	budget := s.stateBudget()
	succ := s.successors
	if s.expand != nil {
		succ = s.expand // an ensemble's edges (ensemble_graph.go)
	}
	// relax is the edge relaxation of the node being expanded (cur, popped
	// as it, with bound from): one closure for the whole search, so that
	// expanding a node allocates nothing.
	var cur label
	var it heapItem
	var from float64
	relax := func(e edge) {
		c := cur.cost + e.cost
		hv := 0.0
		var cell *int32
		if e.to == sinkID {
			cell = &sinkSlot
		} else {
			st := stateOf(e.to)
			hv = hk(st.k)
			if s.mergeSince {
				// One node for every since-last-step count: the
				// label's ID keeps the count of its cheapest arrival.
				st.since = 0
			}
			cell = idx.cell(st)
		}
		if cur.id != sourceID && e.cost+hv < from-1e-9*math.Abs(from) {
			viol++
		}
		nl := label{id: e.to, cost: c, key: c + hv, mass: cur.mass - e.fuel, pred: it.slot}
		if j := *cell; j >= 0 {
			y := &slots[j]
			if y.settled || c >= y.cost {
				return
			}
			*y = nl
			hp.push(heapItem{nl.key, e.to, j})
			return
		}
		j := int32(len(slots))
		*cell = j
		slots = append(slots, nl)
		hp.push(heapItem{nl.key, e.to, j})
	}
	for len(hp) > 0 {
		popped := hp.pop()
		x := &slots[popped.slot]
		if x.settled || popped.key != x.key {
			continue
		}
		x.settled = true
		nodes++
		if nodes&(cancelEvery-1) == 0 {
			if err := ctxErr(s.ctx); err != nil {
				return searchResult{nodes: nodes, err: err}, false
			}
		}
		if x.id == sinkID {
			return searchResult{path: trace(slots, popped.slot), cost: x.cost, nodes: nodes, violations: viol}, true
		}
		cur, it = *x, popped
		from = 0.0
		if cur.id != sourceID {
			from = hk(stateOf(cur.id).k)
		}
		succ(cur.id, cur.mass, relax)
		if s.overflowed {
			return searchResult{nodes: nodes, err: s.bucketError()}, false
		}
		if len(slots) > budget {
			return searchResult{nodes: nodes, err: s.budgetError(budget)}, false
		}
	}
	return searchResult{nodes: nodes, violations: viol}, false
}

// trace follows predecessors from slot back to the source.
func trace(slots []label, slot int32) []label {
	var rev []label
	for i := slot; i >= 0; i = slots[i].pred {
		rev = append(rev, slots[i])
	}
	for i, j := 0, len(rev)-1; i < j; i, j = i+1, j-1 {
		rev[i], rev[j] = rev[j], rev[i]
	}
	return rev
}

// nodeIndex maps a state to its slot with dense arrays: one row per
// (boundary, level), allocated when first reached, holding a window of
// mass buckets (grown as arrivals fall outside it) times the step-counter
// values. An empty cell holds -1.
type nodeIndex struct {
	rows           []idxRow
	levels, nsteps int
	nsince         int
}

type idxRow struct {
	base  int // first bucket of the window
	cells []int32
}

func newNodeIndex(bounds, levels, nsteps, nsince int) *nodeIndex {
	return &nodeIndex{rows: make([]idxRow, bounds*levels), levels: levels, nsteps: nsteps, nsince: nsince}
}

// cell returns the slot cell of st, growing its row's window as needed.
func (x *nodeIndex) cell(st state) *int32 {
	r := &x.rows[st.k*x.levels+st.li]
	per := x.nsteps * x.nsince
	if r.cells == nil {
		r.base = max(st.b-2, 0)
		r.cells = fillEmpty(make([]int32, 8*per))
	}
	if st.b < r.base {
		nb := max(st.b-4, 0)
		grown := fillEmpty(make([]int32, len(r.cells)+(r.base-nb)*per))
		copy(grown[(r.base-nb)*per:], r.cells)
		r.base, r.cells = nb, grown
	}
	i := ((st.b-r.base)*x.nsteps+st.steps)*x.nsince + st.since
	if i >= len(r.cells) {
		n := 2 * len(r.cells)
		for n <= i {
			n *= 2
		}
		grown := fillEmpty(make([]int32, n))
		copy(grown, r.cells)
		r.cells = grown
	}
	return &r.cells[i]
}

func fillEmpty(a []int32) []int32 {
	for i := range a {
		a[i] = -1
	}
	return a
}
