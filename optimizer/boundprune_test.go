package optimizer

import (
	"math"
	"math/rand"
	"testing"
	"time"
)

// TestLeastCostPerMetreSkipsOnlyDearerLevels checks that the bound's least
// cost per metre, which skips levels whose perf.Cruiser.EconCostBelow is
// above the least cost found, is the very number the plain minimum over
// every open level gives (the econ cost per ground metre at the econ Mach,
// priced here directly with perf.Aircraft.EconMach and Point, the reference
// being the definition of Q(k) in searchBound), on every segment of the
// demo long-haul and of random short flights, at several masses from OEW
// to the take-off mass, for all levels and for the ten highest (the
// guess's).
func TestLeastCostPerMetreSkipsOnlyDearerLevels(t *testing.T) {
	wx, ref := demoWeather(t)
	probs := []*Problem{{Track: track(t, longHaulRoute, "odd-even-magnetic", 50), Aircraft: aircraft(t, "demo-widebody"),
		Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}}
	rng := rand.New(rand.NewSource(5))
	for range 6 {
		p, _ := randomProblem(t, rng)
		probs = append(probs, p)
	}
	checked := 0
	for _, p := range probs {
		s := prepared(t, p)
		for k := range s.conds {
			for _, f := range []float64{0, 0.3, 0.7, 1} {
				mu := s.a.OEW + f*(s.p.TakeoffMass-s.a.OEW)
				for _, from := range []int{0, max(0, len(s.levels)-10)} {
					got := s.leastCostPerMetre(k, mu, from)
					want := plainLeastCost(s, k, mu, from)
					if got != want {
						t.Fatalf("segment %d mass %.0f from %d: %v, every level priced gives %v", k, mu, from, got, want)
					}
					checked++
				}
			}
		}
	}
	if checked < 1000 {
		t.Errorf("only %d cases", checked)
	}
}

// plainLeastCost is Q(k) of searchBound by its definition: the least econ
// cost per ground metre over every open level from index from, at the grid
// mass at or below mu (at least OEW), less the 1e-6 slack.
func plainLeastCost(s *solver, k int, mu float64, from int) float64 {
	m := math.Max(math.Floor(mu/s.grid)*s.grid, s.a.OEW)
	best := math.Inf(1)
	for li := from; li < len(s.levels); li++ {
		c := s.conds[k][li]
		if !s.allow[k][li] || c.closed {
			continue
		}
		v := cruisePoint(s.a, Speed{Kind: SpeedEcon}, s.p.CI, m, s.press[li], c)
		if !v.ok || v.tas+c.wind < 50 {
			continue
		}
		best = math.Min(best, (v.ff+s.p.CI/60)/(v.tas+c.wind))
	}
	if math.IsInf(best, 1) {
		return 0
	}
	return best * (1 - 1e-6)
}
