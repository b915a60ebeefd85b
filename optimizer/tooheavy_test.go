package optimizer

import (
	"math"
	"slices"
	"testing"
	"time"
)

// TestTooLightForTrip: a take-off mass that leaves less fuel above OEW
// than the trip burns is a plan whose status is impossible with a
// landing-mass violation, from Solve and from Assess alike, never a bare
// "no feasible profile" error. The check is mass conservation: landing
// mass = take-off mass - trip fuel, and it must lie under OEW.
func TestTooLightForTrip(t *testing.T) {
	a := aircraft(t, "demo-widebody")
	p := &Problem{Track: track(t, longHaulRoute, "", 50), Aircraft: a,
		Depart: time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC), TakeoffMass: a.OEW + 20000}
	plan, err := Solve(p)
	if err != nil {
		t.Fatalf("Solve: %v; want a plan with status impossible", err)
	}
	check := func(what string, pl *Plan) {
		t.Helper()
		if pl.Status() != StatusImpossible || !slices.ContainsFunc(pl.Violations, func(v Violation) bool { return v.Limit == LimitLandingMass }) {
			t.Errorf("%s: status %s, violations %v; want impossible with landing-mass", what, pl.Status(), pl.Violations)
		}
		if got := p.TakeoffMass - pl.Totals.Fuel; math.Abs(got-pl.Totals.LandingMass) > 1e-6 || !(pl.Totals.LandingMass < a.OEW) {
			t.Errorf("%s: landing mass %.1f kg, take-off mass - fuel %.1f kg, OEW %.0f kg", what, pl.Totals.LandingMass, got, a.OEW)
		}
	}
	check("Solve", plan)
	if len(plan.Warnings) == 0 {
		t.Errorf("Solve: no warning that the profile shown was not searched")
	}
	as, err := Assess(p, Profile{Initial: 370})
	if err != nil {
		t.Fatalf("Assess FL370: %v; want a plan with violations", err)
	}
	check("Assess", as)
}
