package optimizer

import (
	"testing"
	"time"
)

// benchProblem is the demo long-haul flight: 50 NM segments, FL290 to
// FL430 every 1,000 ft, econ speed, the invented 4-D weather.
func benchProblem(b *testing.B) *Problem {
	wx, ref := demoWeather(b)
	return &Problem{Track: track(b, longHaulRoute, "every-1000:290-430", 50), Aircraft: aircraft(b, "demo-widebody"),
		Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
}

// BenchmarkPlanLongHaul is a whole plan: preparation, the implicit search,
// exact pricing and the constant-level baseline.
func BenchmarkPlanLongHaul(b *testing.B) {
	p := benchProblem(b)
	b.ReportAllocs()
	b.ResetTimer()
	var plan *Plan
	for i := 0; i < b.N; i++ {
		var err error
		if plan, err = Solve(p); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(plan.SearchCost, "cost")
	b.ReportMetric(float64(plan.Nodes), "nodes")
}

// BenchmarkSearchLongHaul is the implicit search alone (with preparation).
func BenchmarkSearchLongHaul(b *testing.B) {
	p := benchProblem(b)
	b.ReportAllocs()
	b.ResetTimer()
	var cost float64
	for i := 0; i < b.N; i++ {
		s := prepared(b, p)
		res, ok := s.search()
		if !ok {
			b.Fatal("no path")
		}
		cost = res.cost
	}
	b.ReportMetric(cost, "cost")
}

// BenchmarkPlanLongHaulExplicit builds the same problem as an explicit
// gonum graph and searches it with path.DijkstraFrom.
func BenchmarkPlanLongHaulExplicit(b *testing.B) {
	p := benchProblem(b)
	b.ReportAllocs()
	b.ResetTimer()
	var cost float64
	for i := 0; i < b.N; i++ {
		x := buildExplicit(prepared(b, p))
		c, _, ok := x.Search()
		if !ok {
			b.Fatal("no path")
		}
		cost = c
	}
	b.ReportMetric(cost, "cost")
}

// BenchmarkPlanLongHaulContrail is BenchmarkPlanLongHaul with a contrail
// cost of 20 kg/NM over the invented humidity of the demo weather.
func BenchmarkPlanLongHaulContrail(b *testing.B) {
	p := benchProblem(b)
	p.ContrailCost = 20
	b.ReportAllocs()
	b.ResetTimer()
	var plan *Plan
	for i := 0; i < b.N; i++ {
		var err error
		if plan, err = Solve(p); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(plan.SearchCost, "cost")
	b.ReportMetric(float64(plan.Nodes), "nodes")
}
