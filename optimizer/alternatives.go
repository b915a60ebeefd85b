package optimizer

import (
	"cmp"
	"context"
	"math"
	"slices"

	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/iterator"
	"gonum.org/v1/gonum/graph/path"
	"gonum.org/v1/gonum/graph/simple"
)

// Alternative is a profile other than the plan's own, priced exactly.
type Alternative struct {
	Profile Profile
	Totals  Totals
	// CostDelta is the alternative's cost less the plan's (fuel_kg +
	// CI x time_min); never negative for a plan found by Solve, up to the
	// search's interpolation tolerance.
	CostDelta float64
	// MinMargin is the least buffet margin over its cruise legs, g.
	MinMargin float64
	// Plan is the full priced alternative.
	Plan *Plan
}

// Alternatives returns up to k distinct profiles for p that are next in
// cost after plan (the result of Solve(p)), cheapest first, each priced
// exactly by Assess and breaking none of the problem's limits or rules.
// Profiles differ in their levels or step points; profiles that differ
// only in the search's mass buckets are one profile.
//
// Method: Yen's k-shortest loopless paths (Yen, "Finding the k shortest
// loopless paths in a network", Management Science 17, 1971), run by
// gonum's path.YenKShortestPaths on the level graph: the search graph with
// its mass buckets removed, so that its nodes are (segment boundary,
// level, steps flown, segments since the last step) and the step rules
// hold on every path by construction. Deviation from the plain algorithm:
// edge prices in the search graph depend on the mass at the start of the
// edge, which depends on the path taken, so Yen's algorithm cannot run on
// it directly. The level graph prices every edge out of boundary k at the
// mass the plan itself has at that boundary (profiles differ there by a
// few hundred kilograms, which moves an edge's price by well under 1 %).
// Each path found is therefore priced again exactly by Assess at its own
// masses, paths that break a limit there are dropped, and the rest are
// sorted by their exact cost. Yen's algorithm is asked for 2k+2 paths so
// that dropped paths still leave k.
//
// Complexity: Yen's algorithm runs O(K L) Dijkstra searches on the level
// graph (L nodes on a path, K paths asked for); each node's edges are
// priced once and kept.
//
// Alternatives is AlternativesContext with context.Background().
func Alternatives(p *Problem, plan *Plan, k int) ([]Alternative, error) {
	return AlternativesContext(context.Background(), p, plan, k)
}

// AlternativesContext is Alternatives, stopped when ctx is done: it looks
// at ctx before Yen's search and before and during each exact pricing
// (Yen's search itself, in gonum, runs to its end). A cancelled call
// returns an error that wraps ctx.Err() (a *CancelledError) and no
// alternatives.
func AlternativesContext(ctx context.Context, p *Problem, plan *Plan, k int) ([]Alternative, error) {
	if k <= 0 || plan == nil {
		return nil, nil
	}
	if k > maxAlternatives {
		return nil, inputErrorf("Alternatives", "%d alternatives asked for; at most %d", k, maxAlternatives)
	}
	s, err := prepare(p)
	if err != nil {
		return nil, err
	}
	if err := ctxErr(ctx); err != nil {
		return nil, err
	}
	g := newLevelGraph(s, plan)
	paths := path.YenKShortestPaths(g, 2*k+2, math.Inf(1), simple.Node(sourceID), simple.Node(sinkID))
	seen := map[string]bool{plan.Profile.String(): true}
	var out []Alternative
	for _, nodes := range paths {
		prof := g.profile(nodes)
		key := prof.String()
		if seen[key] {
			continue
		}
		seen[key] = true
		alt, err := AssessContext(ctx, p, prof)
		if isCancelled(err) {
			return nil, err
		}
		if err != nil || breaksProfileLimits(alt.Violations) {
			continue // not flyable as the level graph priced it
		}
		out = append(out, Alternative{Profile: prof, Totals: alt.Totals, CostDelta: alt.Totals.Cost - plan.Totals.Cost, MinMargin: alt.MinMargin(), Plan: alt})
	}
	sortAlternatives(out)
	if len(out) > k {
		out = out[:k]
	}
	return out, nil
}

// maxAlternatives bounds Alternatives' k: each costs several searches of
// the level graph and an exact pricing.
const maxAlternatives = 20

func sortAlternatives(a []Alternative) {
	slices.SortStableFunc(a, func(x, y Alternative) int { return cmp.Compare(x.Totals.Cost, y.Totals.Cost) })
}

// levelGraph is the search graph without mass buckets, with edges priced
// at fixed masses (see Alternatives). Its node IDs are the search's state
// IDs with the bucket zero. It implements graph.Graph and path.Weighted
// for gonum's path package; nodes are generated when reached, and edges
// out of a node are priced when first asked for and kept.
type levelGraph struct {
	s     *solver
	mass  []float64 // mass at each boundary, kg
	edges map[int64]map[int64]float64
}

func newLevelGraph(s *solver, plan *Plan) *levelGraph {
	g := &levelGraph{s: s, mass: make([]float64, len(s.bounds)), edges: map[int64]map[int64]float64{}}
	for k, x := range s.bounds {
		g.mass[k] = massAt(plan, x)
	}
	return g
}

// massAt is the plan's mass at distance x from departure, interpolated
// linearly inside the leg that holds x.
func massAt(plan *Plan, x float64) float64 {
	for _, l := range plan.Legs {
		if x <= l.ToDist && l.ToDist > l.FromDist {
			f := math.Max(0, math.Min(1, (x-l.FromDist)/(l.ToDist-l.FromDist)))
			return l.MassStart - f*l.Fuel
		}
	}
	return plan.Totals.LandingMass
}

func (g *levelGraph) out(id int64) map[int64]float64 {
	if es, ok := g.edges[id]; ok {
		return es
	}
	es := map[int64]float64{}
	g.edges[id] = es
	var sid int64
	var m float64
	switch {
	case id == sinkID:
		return es
	case id == sourceID:
		sid, m = sourceID, g.s.p.TakeoffMass
	default:
		st := stateOf(id)
		m = g.mass[st.k]
		b, ok := g.s.bucket(m)
		if !ok {
			return es
		}
		st.b = b
		sid = st.id()
	}
	g.s.successors(sid, m, func(e edge) {
		to := sinkID
		if e.to != sinkID {
			st := stateOf(e.to)
			st.b = 0
			to = st.id()
		}
		if c, ok := es[to]; !ok || e.cost < c {
			es[to] = e.cost
		}
	})
	return es
}

// Node returns the node with the given ID.
func (g *levelGraph) Node(id int64) graph.Node {
	if id == sourceID || id == sinkID || (id >= 0 && stateOf(id).k < len(g.mass)) {
		return simple.Node(id)
	}
	return nil
}

// Nodes returns the nodes reached so far (the graph is implicit: gonum's
// searches with a target, which Yen's algorithm uses, never ask for it).
func (g *levelGraph) Nodes() graph.Nodes {
	set := map[int64]bool{sourceID: true, sinkID: true}
	for from, es := range g.edges {
		set[from] = true
		for to := range es {
			set[to] = true
		}
	}
	ns := make([]graph.Node, 0, len(set))
	for id := range set {
		ns = append(ns, simple.Node(id))
	}
	slices.SortFunc(ns, func(a, b graph.Node) int { return cmp.Compare(a.ID(), b.ID()) })
	return iterator.NewOrderedNodes(ns)
}

// From returns the nodes reached by an edge out of id, in ID order.
func (g *levelGraph) From(id int64) graph.Nodes {
	es := g.out(id)
	if len(es) == 0 {
		return graph.Empty
	}
	ns := make([]graph.Node, 0, len(es))
	for to := range es {
		ns = append(ns, simple.Node(to))
	}
	slices.SortFunc(ns, func(a, b graph.Node) int { return cmp.Compare(a.ID(), b.ID()) })
	return iterator.NewOrderedNodes(ns)
}

// HasEdgeBetween reports whether an edge joins x and y in either direction.
func (g *levelGraph) HasEdgeBetween(x, y int64) bool {
	_, a := g.out(x)[y]
	_, b := g.out(y)[x]
	return a || b
}

// Edge returns the edge from u to v, or nil.
func (g *levelGraph) Edge(u, v int64) graph.Edge {
	w, ok := g.out(u)[v]
	if !ok {
		return nil
	}
	return simple.WeightedEdge{F: simple.Node(u), T: simple.Node(v), W: w}
}

// Weight returns the price of the edge from x to y (0 from a node to
// itself, as path.Weighted requires).
func (g *levelGraph) Weight(x, y int64) (float64, bool) {
	if x == y {
		return 0, true
	}
	w, ok := g.out(x)[y]
	if !ok {
		return math.Inf(1), false
	}
	return w, true
}

// profile turns a level-graph path into a Profile.
func (g *levelGraph) profile(nodes []graph.Node) Profile {
	ls := make([]label, 0, len(nodes))
	for _, n := range nodes {
		ls = append(ls, label{id: n.ID()})
	}
	return g.s.profileOf(ls)
}
