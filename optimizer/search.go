package optimizer

// label is the best known arrival at a node.
type label struct {
	id      int64
	cost    float64
	mass    float64
	pred    int32 // slot of the predecessor, -1 for the source
	settled bool
}

// heapItem is an entry of the search's priority queue.
type heapItem struct {
	cost float64
	id   int64
	slot int32
}

func (a heapItem) less(b heapItem) bool {
	if a.cost != b.cost {
		return a.cost < b.cost
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
	nodes int
}

// search runs Dijkstra's algorithm from the source over the implicit graph
// until the sink is settled. A node's label carries the exact mass of its
// cheapest arrival, and its outgoing edges are priced from that mass when
// the node is settled (label-setting over mass buckets: arrivals in the
// same bucket are merged, keeping the cheapest; this is the only
// approximation, bounded by the bucket width times the sensitivity of the
// remaining cost to mass).
//
// Edge costs are non-negative except for the credit of a step that ends in
// the next segment, which is always smaller than the step's own fuel, so
// every edge's net cost stays non-negative and Dijkstra's invariant holds.
//
// Complexity: O((V + E) log V) for the V nodes and E edges reached.
func (s *solver) search() (searchResult, bool) {
	slots := make([]label, 0, 1024)
	index := make(map[int64]int32, 1024)
	var h minHeap
	slots = append(slots, label{id: sourceID, mass: s.p.TakeoffMass, pred: -1})
	index[sourceID] = 0
	h.push(heapItem{0, sourceID, 0})
	nodes := 0
	for len(h) > 0 {
		it := h.pop()
		x := &slots[it.slot]
		if x.settled || it.cost > x.cost {
			continue
		}
		x.settled = true
		nodes++
		if x.id == sinkID {
			return searchResult{path: trace(slots, it.slot), cost: x.cost, nodes: nodes}, true
		}
		cur := *x
		s.successors(cur.id, cur.mass, func(e edge) {
			c := cur.cost + e.cost
			nl := label{id: e.to, cost: c, mass: cur.mass - e.fuel, pred: it.slot}
			if j, ok := index[e.to]; ok {
				y := &slots[j]
				if y.settled || c >= y.cost {
					return
				}
				*y = nl
				h.push(heapItem{c, e.to, j})
				return
			}
			j := int32(len(slots))
			slots = append(slots, nl)
			index[e.to] = j
			h.push(heapItem{c, e.to, j})
		})
	}
	return searchResult{nodes: nodes}, false
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
