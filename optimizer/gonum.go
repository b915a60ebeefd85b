package optimizer

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/iterator"
	"gonum.org/v1/gonum/graph/path"
	"gonum.org/v1/gonum/graph/simple"
)

// Implicit exposes the search graph of a problem through gonum's graph
// interfaces (traverse.Graph and path.Weighted), so that gonum's own
// path.DijkstraFromTo can search it. Nodes and edges are generated and
// priced when reached.
//
// A node's mass is that of its cheapest arrival, which depends on the
// search: Implicit follows the relaxations that Weight reports, exactly as
// Dijkstra's algorithm performs them (Weight(u, v) is asked once for every
// edge out of a settled node u), and prices the edges out of u from the
// mass recorded for u when From(u) is called. Use a fresh Implicit for
// each search.
type Implicit struct {
	s     *solver
	rec   map[int64]arrival
	edges map[int64][]edge
}

type arrival struct{ cost, mass float64 }

// Source and Sink return the search's end nodes.
func (g *Implicit) Source() graph.Node { return simple.Node(sourceID) }

// Sink is the destination node.
func (g *Implicit) Sink() graph.Node { return simple.Node(sinkID) }

// From returns the nodes reachable from id, pricing its edges.
func (g *Implicit) From(id int64) graph.Nodes {
	es := g.out(id)
	if len(es) == 0 {
		return graph.Empty
	}
	ns := make([]graph.Node, len(es))
	for i, e := range es {
		ns[i] = simple.Node(e.to)
	}
	return iterator.NewOrderedNodes(ns)
}

func (g *Implicit) out(id int64) []edge {
	if es, ok := g.edges[id]; ok {
		return es
	}
	r, ok := g.rec[id]
	if !ok {
		return nil
	}
	var es []edge
	g.s.successors(id, r.mass, func(e edge) { es = append(es, e) })
	g.edges[id] = es
	return es
}

// Edge returns the edge from uid to vid, or nil.
func (g *Implicit) Edge(uid, vid int64) graph.Edge {
	w, ok := g.Weight(uid, vid)
	if !ok {
		return nil
	}
	return simple.WeightedEdge{F: simple.Node(uid), T: simple.Node(vid), W: w}
}

// Weight returns the cost of the edge from xid to yid and records the
// arrival at yid when it improves on the best one known.
func (g *Implicit) Weight(xid, yid int64) (float64, bool) {
	for _, e := range g.out(xid) {
		if e.to == yid {
			rx := g.rec[xid]
			c := rx.cost + e.cost
			if ry, ok := g.rec[yid]; !ok || c < ry.cost {
				g.rec[yid] = arrival{cost: c, mass: rx.mass - e.fuel}
			}
			return e.cost, true
		}
	}
	return math.Inf(1), false
}

// NewImplicit prepares the implicit graph of p.
func NewImplicit(p *Problem) (*Implicit, error) {
	s, err := prepare(p)
	if err != nil {
		return nil, err
	}
	return newImplicit(s), nil
}

// prepare normalises a copy of p and builds its solver.
func prepare(p *Problem) (*solver, error) {
	q := *p
	if _, err := q.normalise(); err != nil {
		return nil, err
	}
	return newSolver(&q)
}

func newImplicit(s *solver) *Implicit {
	return &Implicit{s: s, rec: map[int64]arrival{sourceID: {0, s.p.TakeoffMass}}, edges: map[int64][]edge{}}
}

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
		sort.Slice(ids, func(i, j int) bool { return ids[i] < ids[j] })
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
	return w, x.s.profileOfIDs(nodes), true
}

// SearchImplicit runs gonum's path.DijkstraFromTo over the implicit graph.
func (g *Implicit) SearchImplicit() (float64, Profile, bool) {
	nodes, w := path.DijkstraFromTo(g.Source(), g.Sink(), g)
	if len(nodes) == 0 {
		return math.Inf(1), Profile{}, false
	}
	return w, g.s.profileOfIDs(nodes), true
}

func (s *solver) profileOfIDs(nodes []graph.Node) Profile {
	ls := make([]label, len(nodes))
	for i, n := range nodes {
		id := n.ID()
		switch id {
		case expSource:
			id = sourceID
		case expSink:
			id = sinkID
		}
		ls[i] = label{id: id}
	}
	return s.profileOf(ls)
}
