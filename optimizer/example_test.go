package optimizer_test

import (
	"fmt"
	"time"

	"levelpath/optimizer"
	"levelpath/perf"
	"levelpath/route"
)

// problem is an eastbound flight of an invented narrowbody in still air at
// ISA, built from the exported API only.
func problem() *optimizer.Problem {
	r, err := route.ParseInline("45.0,-73.0 44.0,-40.0")
	if err != nil {
		panic(err)
	}
	dep := time.Date(2026, 12, 1, 6, 0, 0, 0, time.UTC)
	tr, err := route.Build(r, route.Options{MaxSegment: 50 * perf.NMToM, Date: dep})
	if err != nil {
		panic(err)
	}
	a, err := perf.Builtin("demo-narrowbody")
	if err != nil {
		panic(err)
	}
	tow, zfw, err := optimizer.Loading{ZFW: 60000, Fuel: 12000}.Resolve(a)
	if err != nil {
		panic(err)
	}
	return &optimizer.Problem{Track: tr, Aircraft: a, Depart: dep, TakeoffMass: tow, ZFW: zfw, CI: 20}
}

// Solve plans the cheapest profile. Every cruise leg keeps its buffet
// margin at or above the floor it had, the plan breaks none of its own
// rules, and Assess prices its profile back to the plan's own cost.
func ExampleSolve() {
	p := problem()
	plan, err := optimizer.Solve(p)
	if err != nil {
		panic(err)
	}
	ok := true
	for _, l := range plan.Legs {
		if l.BuffetMargin == l.BuffetMargin && l.BuffetMargin < l.Floor {
			ok = false
		}
	}
	again, err := optimizer.Assess(p, plan.Profile)
	if err != nil {
		panic(err)
	}
	d := again.Totals.Cost - plan.Totals.Cost
	fmt.Println(plan.Status(), ok, len(again.Violations), d*d < 1e-6)
	// Output: ok true 0 true
}

// Assess prices a proposed profile and lists the limits it breaks:
// FL340 is an even level, which the semicircular rule (ICAO Annex 2,
// Appendix 3) gives to westbound flights only.
func ExampleAssess() {
	p := problem()
	prof, err := optimizer.ParseProfile("FL340")
	if err != nil {
		panic(err)
	}
	plan, err := optimizer.Assess(p, prof)
	if err != nil {
		panic(err)
	}
	broken := map[optimizer.Limit]bool{}
	for _, v := range plan.Violations {
		broken[v.Limit] = true
	}
	fmt.Println(plan.Status(), broken[optimizer.LimitLevelRule])
	// Output: violations true
}
