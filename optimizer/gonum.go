package optimizer

import (
	"math"

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
		ls[i] = label{id: n.ID()}
	}
	return s.profileOf(ls)
}
