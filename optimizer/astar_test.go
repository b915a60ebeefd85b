package optimizer

import (
	"errors"
	"fmt"
	"math"
	"math/rand"
	"testing"
	"time"

	"levelpath/route"
)

// randomProblem draws a short flight: a route between two random points
// of the northern mid-latitudes, a random level rule, mass, cost index,
// speed policy and step rules, in the invented weather.
func randomProblem(t testing.TB, rng *rand.Rand) (*Problem, string) {
	t.Helper()
	wx, ref := demoWeather(t)
	lat1, lon1 := 25+30*rng.Float64(), -170+340*rng.Float64()
	az, dist := 360*rng.Float64(), (300+1200*rng.Float64())*nmToM
	lat2, lon2, _ := route.Direct(lat1, lon1, az, dist)
	lon2 = route.NormalizeLon(lon2)
	rules := []string{"odd-even-magnetic", "odd-even-true", "every-1000:280-430", "list:310,330,350,370,390"}
	rule := rules[rng.Intn(len(rules))]
	seg := []float64{25, 50}[rng.Intn(2)]
	names := []string{"demo-narrowbody", "demo-widebody"}
	name := names[rng.Intn(2)]
	a := aircraft(t, name)
	mass := a.OEW + (0.55+0.4*rng.Float64())*(a.MTOW-a.OEW)
	sp := Speed{Kind: SpeedEcon}
	switch rng.Intn(4) {
	case 0:
		sp = Speed{Kind: SpeedLRC}
	case 1:
		sp = Speed{Kind: SpeedFixed, Mach: 0.76 + 0.04*rng.Float64()}
	}
	steps := StepRules{AllowDescent: rng.Intn(3) == 0, MaxSteps: rng.Intn(3)}
	switch rng.Intn(3) {
	case 0:
		steps.NoMinDistance = true
	case 1:
		steps.MinDistance = (50 + 150*rng.Float64()) * nmToM
	}
	p := &Problem{Track: track(t, fmt.Sprintf("%.4f,%.4f %.4f,%.4f", lat1, lon1, lat2, lon2), rule, seg), Aircraft: a,
		Weather: wx, Depart: ref.Add(time.Duration(rng.Intn(6)) * time.Hour), TakeoffMass: mass,
		CI: 100 * rng.Float64(), Speed: sp, Steps: steps}
	desc := fmt.Sprintf("%s %.0f kg, %.0f NM %s/%.0f NM, CI %.0f, %s, %+v", name, mass, dist/nmToM, rule, seg, p.CI, sp, steps)
	return p, desc
}

// TestAStarMatchesDijkstra checks A* against plain Dijkstra (Dijkstra
// 1959, the search the bound is meant not to change; Hart, Nilsson and
// Raphael 1968 prove A* returns the same cost with an admissible,
// consistent bound) on random instances, with and without the merged
// step counters: identical cost and profile, no edge whose reduced cost is
// negative (the bound held on every edge relaxed), and no more nodes. On
// these short routes the bound is weak (climb and descent are a large
// share), so few nodes are saved; TestBoundAdmissibleOnOptimalPath checks
// the saving on a long-haul.
func TestAStarMatchesDijkstra(t *testing.T) {
	rng := rand.New(rand.NewSource(13))
	n, fewer := 0, 0
	for range 16 {
		p, desc := randomProblem(t, rng)
		for _, exact := range []bool{true, false} {
			p.Exact = exact
			dj := prepared(t, p)
			dj.dijkstra = true
			rd, okd := dj.search()
			as := prepared(t, p)
			ra, oka := as.search()
			if okd != oka {
				t.Fatalf("%s (exact %v): Dijkstra found a path %v, A* %v", desc, exact, okd, oka)
			}
			if !okd {
				continue
			}
			n++
			if ra.cost != rd.cost || relDiff(ra.cost, rd.cost) > 1e-12 {
				t.Errorf("%s (exact %v): A* cost %.9f, Dijkstra %.9f", desc, exact, ra.cost, rd.cost)
			}
			if pa, pd := as.profileOf(ra.path).String(), dj.profileOf(rd.path).String(); pa != pd {
				t.Errorf("%s (exact %v): A* profile %s, Dijkstra %s", desc, exact, pa, pd)
			}
			if ra.violations != 0 {
				t.Errorf("%s (exact %v): %d edges broke the bound", desc, exact, ra.violations)
			}
			if ra.nodes > rd.nodes {
				t.Errorf("%s (exact %v): A* settled %d nodes, Dijkstra %d", desc, exact, ra.nodes, rd.nodes)
			}
			if ra.nodes < rd.nodes {
				fewer++
			}
		}
	}
	if n < 16 {
		t.Fatalf("only %d of 32 searches found a path; the instances test too little", n)
	}
	t.Logf("%d searches agree; A* settled fewer nodes in %d", n, fewer)
}

// TestBoundAdmissibleOnOptimalPath checks the bound directly: along the
// cheapest path Dijkstra finds, the bound at every node is at most the
// cost still to go (admissibility, Hart, Nilsson and Raphael 1968).
func TestBoundAdmissibleOnOptimalPath(t *testing.T) {
	wx, ref := demoWeather(t)
	p := &Problem{Track: track(t, longHaulRoute, "odd-even-magnetic", 50), Aircraft: aircraft(t, "demo-widebody"),
		Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40, Exact: true}
	s := prepared(t, p)
	s.dijkstra = true
	res, ok := s.search()
	if !ok {
		t.Fatal("no path")
	}
	h := s.searchBound(res.cost)
	worst := math.Inf(-1)
	for _, l := range res.path {
		if l.id < 0 {
			continue
		}
		k := stateOf(l.id).k
		if togo := res.cost - l.cost; h[k] > togo*(1+1e-12) {
			t.Errorf("boundary %d: bound %.3f over the cost to go %.3f", k, h[k], togo)
		} else if togo > 0 {
			worst = math.Max(worst, h[k]/togo)
		}
	}
	as := prepared(t, p)
	ra, _ := as.search()
	if ra.cost != res.cost || ra.nodes*2 > res.nodes {
		t.Errorf("A* cost %.6f with %d nodes, Dijkstra %.6f with %d: want the same cost with under half the nodes", ra.cost, ra.nodes, res.cost, res.nodes)
	}
	t.Logf("A* %d nodes, Dijkstra %d", ra.nodes, res.nodes)
	if !(h[0] > 0.8*res.cost) {
		t.Errorf("bound at departure %.1f is under 80 %% of the cost %.1f: too weak to help", h[0], res.cost)
	}
	t.Logf("bound/cost at departure %.4f; highest bound/cost-to-go on the path %.4f", h[0]/res.cost, worst)
}

// TestDefaultWithinExact: the default search (merged step counters) costs
// within 0.02 % of the exact search, priced exactly by Assess, on the demo
// long-haul with the CLI's defaults, a 2,000 NM route with 10 NM segments
// and random instances.
func TestDefaultWithinExact(t *testing.T) {
	wx, ref := demoWeather(t)
	cases := []struct {
		name string
		p    *Problem
	}{
		{"long-haul", &Problem{Track: track(t, longHaulRoute, "odd-even-magnetic", 50), Aircraft: aircraft(t, "demo-widebody"),
			Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}},
		{"2000 NM", &Problem{Track: scaleTrack(t, 2000), Aircraft: aircraft(t, "demo-widebody"),
			Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}},
	}
	rng := rand.New(rand.NewSource(17))
	for range 8 {
		p, desc := randomProblem(t, rng)
		cases = append(cases, struct {
			name string
			p    *Problem
		}{desc, p})
	}
	for _, c := range cases {
		def, err := Solve(c.p)
		if err != nil {
			continue // infeasible random draw
		}
		q := *c.p
		q.Exact = true
		ex := solve(t, &q)
		if d := (def.Totals.Cost - ex.Totals.Cost) / ex.Totals.Cost; d > 2e-4 {
			t.Errorf("%s: default %.2f, exact %.2f: %.4f %% more", c.name, def.Totals.Cost, ex.Totals.Cost, 100*d)
		}
		t.Logf("%s: default %.2f (%d nodes), exact %.2f (%d nodes)", c.name, def.Totals.Cost, def.Nodes, ex.Totals.Cost, ex.Nodes)
	}
}

// TestAbsurdMassBucket: a mass bucket far too fine is refused with an
// input error naming the field, before or during the search, never a
// long run or a misleading "no feasible profile".
func TestAbsurdMassBucket(t *testing.T) {
	for _, kg := range []float64{0.001, 2} {
		p := &Problem{Track: track(t, longHaulRoute, "odd-even-magnetic", 50), Aircraft: aircraft(t, "demo-widebody"),
			TakeoffMass: 245000, CI: 40, MassBucket: kg}
		_, err := Solve(p)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != "mass-bucket" {
			t.Errorf("bucket %v kg: error %v, want an InputError on mass-bucket", kg, err)
			continue
		}
		t.Logf("bucket %v kg: %v", kg, err)
	}
}
