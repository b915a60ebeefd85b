package optimizer

import (
	"context"
	"fmt"
	"testing"
	"time"
)

// benchEnsemble is the demo long-haul flight (50 NM segments, FL290 to
// FL430) on n members of the invented ensemble.
func benchEnsemble(b *testing.B, n int) *EnsembleProblem {
	ref := time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC)
	p := Problem{Track: track(b, longHaulRoute, "every-1000:290-430", 50), Aircraft: aircraft(b, "demo-widebody"),
		Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
	return &EnsembleProblem{Problem: p, Members: ensembleMembers(b, n)}
}

// BenchmarkEnsemble compares one ensemble plan (one search pricing every
// member, each member's exact pricing, the control's own plan and
// baseline; without the regrets) with a deterministic plan of every
// member (Solve each); ensemble-member-mach prices every member at its
// own econ Mach in the search.
func BenchmarkEnsemble(b *testing.B) {
	for _, n := range []int{10, 50} {
		ep := benchEnsemble(b, n)
		b.Run(fmt.Sprintf("ensemble-%d", n), func(b *testing.B) {
			b.ReportAllocs()
			var plan *Plan
			for b.Loop() {
				var err error
				if plan, err = SolveEnsemble(context.Background(), ep); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(plan.Nodes), "nodes")
		})
		if n == 10 {
			b.Run(fmt.Sprintf("ensemble-member-mach-%d", n), func(b *testing.B) {
				b.ReportAllocs()
				e := *ep
				e.MemberMach = true
				for b.Loop() {
					if _, err := SolveEnsemble(context.Background(), &e); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
		b.Run(fmt.Sprintf("deterministic-%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				for _, m := range ep.Members {
					if _, err := Solve(memberProblem(ep.Problem, m)); err != nil {
						b.Fatal(err)
					}
				}
			}
		})
	}
}
