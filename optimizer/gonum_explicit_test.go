package optimizer

// The explicit form of the search graph, kept as a cross-check of the
// implicit search (TestSearchMatchesGonumAndBruteForce) and for the
// benchmarks: a test-only file, so the product carries one graph.

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/path"
	"gonum.org/v1/gonum/graph/simple"
)

// Explicit is the search graph of a problem materialised up front as a
// gonum simple.WeightedDirectedGraph, for comparison with the implicit
// search. Because every edge leads to a later boundary, nodes are created
// boundary by boundary and each node's mass is that of its cheapest
// arrival, the same mass the implicit search settles it with.
type Explicit struct {
	G      *simple.WeightedDirectedGraph
	Source graph.Node
	Sink   graph.Node
	s      *solver
}

// explicit IDs: the source and sink are moved to non-negative IDs.
const (
	expSource int64 = 1 << 62
	expSink   int64 = 1<<62 + 1
)

func expID(id int64) int64 {
	switch id {
	case sourceID:
		return expSource
	case sinkID:
		return expSink
	}
	return id
}

// NewExplicit builds the explicit graph of p.
//
// Complexity: O(V + E) edge pricings plus gonum's graph construction.
func NewExplicit(p *Problem) (*Explicit, error) {
	s, err := prepare(p)
	if err != nil {
		return nil, err
	}
	return buildExplicit(s), nil
}

func buildExplicit(s *solver) *Explicit {
	g := simple.NewWeightedDirectedGraph(0, math.Inf(1))
	best := map[int64]arrival{sourceID: {0, s.p.TakeoffMass}}
	layers := make([][]int64, len(s.conds)+2)
	node := func(id int64) graph.Node {
		n := g.Node(expID(id))
		if n == nil {
			n = simple.Node(expID(id))
			g.AddNode(n)
		}
		return n
	}
	expand := func(id int64) {
		r := best[id]
		from := node(id)
		s.successors(id, r.mass, func(e edge) {
			to := node(e.to)
			g.SetWeightedEdge(simple.WeightedEdge{F: from, T: to, W: e.cost})
			c := r.cost + e.cost
			b, ok := best[e.to]
			if !ok {
				if e.to != sinkID {
					k := stateOf(e.to).k
					layers[k] = append(layers[k], e.to)
				}
			}
			if !ok || c < b.cost {
				best[e.to] = arrival{cost: c, mass: r.mass - e.fuel}
			}
		})
	}
	expand(sourceID)
	for k := range layers {
		ids := layers[k]
		slices.Sort(ids)
		for _, id := range ids {
			expand(id)
		}
	}
	node(sinkID)
	return &Explicit{G: g, Source: g.Node(expSource), Sink: g.Node(expSink), s: s}
}

// Search runs gonum's path.DijkstraFrom over the explicit graph and
// returns the cost to the sink and the profile.
func (x *Explicit) Search() (float64, Profile, bool) {
	sh := path.DijkstraFrom(x.Source, x.G)
	nodes, w := sh.To(expSink)
	if len(nodes) == 0 {
		return math.Inf(1), Profile{}, false
	}
	for i, n := range nodes {
		switch n.ID() {
		case expSource:
			nodes[i] = simple.Node(sourceID)
		case expSink:
			nodes[i] = simple.Node(sinkID)
		}
	}
	return w, x.s.profileOfIDs(nodes), true
}
