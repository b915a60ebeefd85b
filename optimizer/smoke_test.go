package optimizer

import (
	"testing"

	"levelpath/perf"
	"levelpath/route"
)

func TestSmoke(t *testing.T) {
	a, err := perf.Builtin("demo-widebody")
	if err != nil {
		t.Fatal(err)
	}
	r, err := route.ParseInline("44.6,-74.2 50,0 25.3,55.8")
	if err != nil {
		t.Fatal(err)
	}
	rule, _ := route.ParseLevelRule("every-1000:290-430")
	tr, err := route.Build(r, route.Options{MaxSegment: 50 * 1852, Levels: rule})
	if err != nil {
		t.Fatal(err)
	}
	p := &Problem{Track: tr, Aircraft: a, TakeoffMass: 245000, CI: 40}
	plan, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("profile %s fuel %.0f time %.1f min cost %.0f search %.0f nodes %d edges %d", plan.Profile, plan.Totals.Fuel, plan.Totals.Time/60, plan.Totals.Cost, plan.SearchCost, plan.Nodes, plan.Edges)
	if plan.Baseline != nil {
		t.Logf("baseline FL%d cost %.0f saving %.2f%%", plan.Baseline.FL, plan.Baseline.Totals.Cost, plan.Baseline.SavingPct)
	}
	t.Log(plan.Warnings, plan.Violations)
}
