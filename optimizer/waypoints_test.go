package optimizer

import (
	"math"
	"testing"
	"time"
)

// TestWaypoints: the waypoint table runs from departure to destination in
// order, carries the route's own names, top of climb, steps and top of
// descent, and its fuel and time at the destination are the plan's
// totals (the legs summed); fuel remaining is fuel on board minus used.
func TestWaypoints(t *testing.T) {
	wx, ref := demoWeather(t)
	tr := track(t, longHaulRoute, "odd-even-magnetic", 50)
	const zfw, fuel = 170000.0, 72000.0
	plan := solve(t, &Problem{Track: tr, Aircraft: aircraft(t, "demo-widebody"), Weather: wx, Depart: ref.Add(2 * time.Hour), CI: 40,
		TakeoffMass: zfw + fuel, ZFW: zfw})
	ws := plan.Waypoints
	if len(ws) < len(tr.Legs)+3 {
		t.Fatalf("%d waypoints for %d route legs", len(ws), len(tr.Legs))
	}
	if ws[0].Name != tr.Route.Points[0].Name || ws[len(ws)-1].Name != tr.Route.Points[len(tr.Route.Points)-1].Name {
		t.Errorf("first %q, last %q", ws[0].Name, ws[len(ws)-1].Name)
	}
	kinds := map[string]int{}
	for i, w := range ws {
		kinds[w.Kind]++
		if i > 0 && (w.Dist < ws[i-1].Dist || w.Time < ws[i-1].Time || w.FuelUsed < ws[i-1].FuelUsed) {
			t.Errorf("waypoint %d (%s) goes back", i, w.Name)
		}
		if math.Abs(w.FuelRemaining-(fuel-w.FuelUsed)) > 1e-6 {
			t.Errorf("%s: remaining %.1f, used %.1f of %.0f", w.Name, w.FuelRemaining, w.FuelUsed, fuel)
		}
	}
	if kinds[WaypointTOC] != 1 || kinds[WaypointTOD] != 1 || kinds[WaypointStep] != len(plan.Steps) || kinds[WaypointRoute] != len(tr.Route.Points) {
		t.Errorf("kinds %v, steps %d, route points %d", kinds, len(plan.Steps), len(tr.Route.Points))
	}
	end := ws[len(ws)-1]
	if math.Abs(end.FuelUsed-plan.Totals.Fuel) > 1e-6 || math.Abs(end.Time-plan.Totals.Time) > 1e-6 || end.FL != 15 {
		t.Errorf("destination: used %.3f kg, %.1f s, FL%.0f; totals %.3f kg, %.1f s", end.FuelUsed, end.Time, end.FL, plan.Totals.Fuel, plan.Totals.Time)
	}
}
