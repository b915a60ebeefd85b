package optimizer

import (
	"errors"
	"testing"
	"time"
)

// TestImpossibleLoading: with only a take-off mass, a trip that burns more
// than the tanks hold and "lands" under the empty mass is impossible,
// whatever the search finds: the mass balance landing = take-off - trip
// puts the landing mass under OEW exactly when trip > TOW - OEW.
func TestImpossibleLoading(t *testing.T) {
	a := aircraft(t, "demo-regional")
	tr := track(t, longHaulRoute, "odd-even-magnetic", 50)
	wx, ref := demoWeather(t)
	plan := solve(t, &Problem{Track: tr, Aircraft: a, TakeoffMass: 40000, Weather: wx, Depart: ref.Add(2 * time.Hour)})
	trip := plan.Totals.Fuel
	if plan.Status() != StatusImpossible {
		t.Fatalf("status %s, want impossible (trip %.0f kg, capacity %.0f kg)", plan.Status(), trip, a.FuelCapacity)
	}
	var le *LoadingError
	if err := plan.LoadingFailure(); !errors.As(err, &le) {
		t.Fatalf("LoadingFailure = %v", err)
	}
	want := map[Limit]bool{"fuel-capacity": trip > a.FuelCapacity, "landing-mass": 40000-trip < a.OEW}
	got := map[Limit]bool{}
	for _, l := range le.Limits {
		got[l] = true
	}
	for l, w := range want {
		if got[l] != w {
			t.Errorf("limit %s listed %v, want %v (trip %.0f kg)", l, got[l], w, trip)
		}
	}
}

// TestAssessComputesBaseline: Assess computes the same baseline as Solve
// for the same problem (one search with steps forbidden).
func TestAssessComputesBaseline(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "odd-even-magnetic", 50)
	p := &Problem{Track: tr, Aircraft: aircraft(t, "demo-narrowbody"), TakeoffMass: 70000}
	sp := solve(t, p)
	ap, err := Assess(p, sp.Profile)
	if err != nil {
		t.Fatal(err)
	}
	if sp.Baseline == nil || ap.Baseline == nil {
		t.Fatalf("baseline: plan %v, assess %v (%s)", sp.Baseline, ap.Baseline, ap.BaselineNote)
	}
	if sp.Baseline.FL != ap.Baseline.FL || sp.Baseline.Totals != ap.Baseline.Totals {
		t.Errorf("assess baseline %+v, plan %+v", ap.Baseline, sp.Baseline)
	}
	if ap.Status() != StatusOK {
		t.Errorf("the plan's own profile: status %s, %v", ap.Status(), ap.Violations)
	}
}
