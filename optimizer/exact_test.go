package optimizer

import (
	"context"
	"math"
	"testing"
	"time"
)

// smallProblem is a short flight with few levels, small enough to
// enumerate every profile: an eastbound narrowbody near MTOW with a
// tailwind at FL330 that it can only reach once some fuel is burnt, so
// that the best profile steps.
func smallProblem(t testing.TB, bucket float64) *Problem {
	t.Helper()
	wind := func(fl int) float64 {
		if fl == 330 {
			return 40
		}
		return 0
	}
	return &Problem{
		Track:       track(t, "45.0,-73.0 44.0,-61.0", "every-1000:310-330", 50),
		Aircraft:    aircraft(t, "demo-narrowbody"),
		Weather:     levelField(t, []int{300, 310, 320, 330, 340}, wind),
		Depart:      time.Date(2026, 12, 1, 6, 0, 0, 0, time.UTC),
		TakeoffMass: 76000, CI: 30, MassBucket: bucket,
		Steps: StepRules{MaxChange: 2000 * ftToM, AllowDescent: true, NoMinDistance: true},
	}
}

// bruteForce enumerates every path of the search graph from the source to
// the sink, carrying exact masses (no bucket merging), and returns the
// least cost.
func bruteForce(s *solver) (float64, int) {
	best, n := math.Inf(1), 0
	var walk func(id int64, mass, cost float64)
	walk = func(id int64, mass, cost float64) {
		if id == sinkID {
			n++
			best = math.Min(best, cost)
			return
		}
		s.successors(id, mass, func(e edge) { walk(e.to, mass-e.fuel, cost+e.cost) })
	}
	walk(sourceID, s.p.TakeoffMass, 0)
	return best, n
}

func prepared(t testing.TB, p *Problem) *solver {
	t.Helper()
	q := *p
	if _, err := q.normalise(); err != nil {
		t.Fatal(err)
	}
	s, err := newSolver(&q)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestSearchMatchesGonumAndBruteForce checks the implicit search against
// gonum's path.DijkstraFrom on the same graph built explicitly, gonum's
// path.DijkstraFromTo on the implicit graph, and an exhaustive enumeration
// of every profile (Dijkstra's algorithm is exact on non-negative weights:
// Dijkstra 1959; gonum is the reference implementation).
func TestSearchMatchesGonumAndBruteForce(t *testing.T) {
	for _, bucket := range []float64{0.01, 0} { // 0.01 kg: no merging; 0: default
		p := smallProblem(t, bucket)
		s := prepared(t, p)
		res, ok := s.search()
		if !ok {
			t.Fatal("no path")
		}
		ex := buildExplicit(prepared(t, p))
		exCost, exProf, ok := ex.Search()
		if !ok {
			t.Fatal("explicit: no path")
		}
		im := newImplicit(prepared(t, p))
		imCost, imProf, ok := im.SearchImplicit()
		if !ok {
			t.Fatal("implicit gonum: no path")
		}
		if relDiff(res.cost, exCost) > 1e-12 || relDiff(res.cost, imCost) > 1e-12 {
			t.Errorf("bucket %v: search %.6f, explicit DijkstraFrom %.6f, implicit DijkstraFromTo %.6f", bucket, res.cost, exCost, imCost)
		}
		prof := s.profileOf(res.path)
		if prof.String() != exProf.String() || prof.String() != imProf.String() {
			t.Errorf("bucket %v: profiles differ: %s / %s / %s", bucket, prof, exProf, imProf)
		}
		if bucket > 0 {
			bf, n := bruteForce(prepared(t, p))
			if n < 50 {
				t.Fatalf("brute force enumerated only %d profiles; the instance is too small to test", n)
			}
			if relDiff(res.cost, bf) > 1e-12 {
				t.Errorf("search %.6f, brute force over %d profiles %.6f", res.cost, n, bf)
			}
			t.Logf("%d profiles enumerated; least cost %.3f; profile %s", n, bf, prof)
		}
	}
}

// TestPlanIsCheapestAssessedProfile prices every profile of the small
// instance with Assess (the exact model) and checks that none feasible is
// cheaper than the plan by more than 0.05 %.
func TestPlanIsCheapestAssessedProfile(t *testing.T) {
	p := smallProblem(t, 0)
	plan := solve(t, p)
	s := prepared(t, p)
	// Enumerate levels at each boundary between the shortest top of climb
	// and the longest top of descent.
	toc, tod := plan.Legs[0].ToDist, plan.Legs[len(plan.Legs)-1].FromDist
	var bounds []float64
	for k := 1; k < len(s.bounds)-1; k++ {
		if s.bounds[k] > toc-60*nmToM && s.bounds[k] < tod+60*nmToM && len(bounds) < 7 {
			bounds = append(bounds, s.bounds[k])
		}
	}
	best, n, rejected := math.Inf(1), 0, 0
	var prof []int
	var rec func(i int)
	rec = func(i int) {
		if i == len(bounds) {
			pr := Profile{Initial: prof[0]}
			for j := 1; j < len(prof); j++ {
				if prof[j] != prof[j-1] {
					pr.Changes = append(pr.Changes, Change{AtDist: bounds[j-1], FL: prof[j]})
				}
			}
			ap, err := assessProblem(context.Background(), p, pr, false) // no baseline search
			if err != nil || breaksProfileLimits(ap.Violations) {
				rejected++
				return
			}
			n++
			best = math.Min(best, ap.Totals.Cost)
			return
		}
		for _, fl := range s.levels {
			prof = append(prof, fl)
			rec(i + 1)
			prof = prof[:len(prof)-1]
		}
	}
	// prof[0] is the initial level; prof[j] the level after bounds[j-1].
	for _, fl := range s.levels {
		prof = []int{fl}
		rec(0)
	}
	if n < 20 {
		t.Fatalf("only %d feasible profiles enumerated (%d rejected)", n, rejected)
	}
	if plan.Totals.Cost > best*(1+5e-4) {
		t.Errorf("plan cost %.3f exceeds the best of %d assessed profiles %.3f", plan.Totals.Cost, n, best)
	}
	t.Logf("plan %s cost %.3f; best of %d feasible assessed profiles %.3f (%d rejected)", plan.Profile, plan.Totals.Cost, n, best, rejected)
}

// TestAssessReproducesPlan: pricing the plan's own profile, also through
// its printed form, gives the plan's totals.
func TestAssessReproducesPlan(t *testing.T) {
	p := &Problem{Track: track(t, longHaulRoute, "odd-even-magnetic", 50), Aircraft: aircraft(t, "demo-widebody"), TakeoffMass: 245000, CI: 40}
	plan := solve(t, p)
	for _, prof := range []string{plan.Profile.String()} {
		pr, err := ParseProfile(prof)
		if err != nil {
			t.Fatal(err)
		}
		ap, err := Assess(p, pr)
		if err != nil {
			t.Fatal(err)
		}
		if relDiff(ap.Totals.Cost, plan.Totals.Cost) > 1e-7 || len(ap.Violations) != 0 {
			t.Errorf("assess %s: cost %.3f (plan %.3f), %d violations %v", prof, ap.Totals.Cost, plan.Totals.Cost, len(ap.Violations), ap.Violations)
		}
	}
	if relDiff(plan.SearchCost, plan.Totals.Cost) > 2e-3 {
		t.Errorf("search cost %.1f and exact cost %.1f differ by more than 0.2 %%", plan.SearchCost, plan.Totals.Cost)
	}
}

// TestMassBucketConvergence: the default bucket changes the total cost by
// under 0.05 % against one ten times finer.
func TestMassBucketConvergence(t *testing.T) {
	a := aircraft(t, "demo-widebody")
	tr := track(t, longHaulRoute, "every-1000:290-430", 50)
	wx, ref := demoWeather(t)
	p := Problem{Track: tr, Aircraft: a, Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
	coarse := solve(t, &p)
	p.MassBucket = 0.00025 * a.MTOW // the default is 0.25 % of MTOW
	fine := solve(t, &p)
	if d := relDiff(coarse.Totals.Cost, fine.Totals.Cost); d > 5e-4 {
		t.Errorf("default bucket cost %.1f, ten times finer %.1f: %.4f %%", coarse.Totals.Cost, fine.Totals.Cost, 100*d)
	}
	t.Logf("default %.2f (%d nodes), fine %.2f (%d nodes)", coarse.Totals.Cost, coarse.Nodes, fine.Totals.Cost, fine.Nodes)
}
