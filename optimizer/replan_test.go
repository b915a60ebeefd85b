package optimizer

import (
	"math"
	"testing"
	"time"
)

// TestReplanReproducesPlan: re-planning from a waypoint of a plan, with
// the plan's own state there, gives the plan's remainder (the same later
// step, and the remaining fuel and time within 0.05 %): the remainder of
// an optimal profile is optimal (Bellman's principle of optimality).
// With the next step refused (its levels blocked ahead), the re-plan
// keeps its level or finds another, and burns no less.
func TestReplanReproducesPlan(t *testing.T) {
	wx, ref := demoWeather(t)
	tr := track(t, longHaulRoute, "odd-even-magnetic", 50)
	p := &Problem{Track: tr, Aircraft: aircraft(t, "demo-widebody"), Weather: wx, Depart: ref.Add(2 * time.Hour), CI: 40, TakeoffMass: 245000, ZFW: 170000}
	plan := solve(t, p)
	if len(plan.Steps) == 0 {
		t.Skip("the plan has no step to re-plan before")
	}
	last := plan.Steps[len(plan.Steps)-1]
	var w Waypoint
	for _, x := range plan.Waypoints {
		if x.Kind == WaypointRoute && x.Dist < last.AtDist-p.Steps.MinDistance && x.Dist > plan.Legs[0].ToDist {
			w = x
		}
	}
	if w.Name == "" {
		t.Skip("no waypoint before the last step")
	}
	st := InFlight{Dist: w.Dist, FL: int(w.FL), Mass: p.TakeoffMass - w.FuelUsed, Time: plan.Depart.Add(time.Duration(w.Time * float64(time.Second)))}
	rp, err := Replan(p, st)
	if err != nil {
		t.Fatal(err)
	}
	remFuel, remTime := plan.Totals.Fuel-w.FuelUsed, plan.Totals.Time-w.Time
	if math.Abs(rp.Totals.Fuel-remFuel) > 5e-4*remFuel || math.Abs(rp.Totals.Time-remTime) > 5e-4*remTime {
		t.Errorf("re-plan from %s: %.1f kg, %.0f s; plan's remainder %.1f kg, %.0f s (%s vs %s)", w.Name, rp.Totals.Fuel, rp.Totals.Time, remFuel, remTime, rp.Profile, plan.Profile)
	}
	if len(rp.Violations) != 0 || rp.Waypoints[0].Kind != WaypointStart || rp.Legs[0].Phase != PhaseCruise {
		t.Errorf("re-plan violations %v, first waypoint %+v, first leg %s", rp.Violations, rp.Waypoints[0], rp.Legs[0].Phase)
	}
	// The step refused: its level blocked from the re-planning point on.
	q := *p
	q.Blocked = []Block{{FromDist: w.Dist + 1, ToDist: plan.Distance, Levels: []int{last.ToFL}}}
	rq, err := Replan(&q, st)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range rq.Steps {
		if s.ToFL == last.ToFL {
			t.Errorf("refused step to FL%03d taken: %s", last.ToFL, rq.Profile)
		}
	}
	if rq.Totals.Cost < rp.Totals.Cost-1e-6 {
		t.Errorf("with the step refused the cost %.1f is under %.1f", rq.Totals.Cost, rp.Totals.Cost)
	}
	// Reserves from the re-planning point: the contingency is on the
	// remaining trip.
	req := FuelRequest{Problem: p, ZFW: p.ZFW, Policy: DefaultFuelPolicy()}
	if err := InFlightFuel(req, rp); err != nil {
		t.Fatal(err)
	}
	f := rp.Fuel
	if f.Trip != rp.Totals.Fuel || f.Contingency < 0.05*f.Trip-1e-9 || math.Abs(f.FuelOnBoard-(st.Mass-p.ZFW)) > 1e-9 ||
		math.Abs(f.ExpectedAtDestination-(f.FuelOnBoard-f.Trip)) > 1e-9 {
		t.Errorf("in-flight fuel %+v", *f)
	}
}

func TestReplanBadInput(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "odd-even-magnetic", 50)
	p := &Problem{Track: tr, Aircraft: aircraft(t, "demo-narrowbody"), ZFW: 55000}
	now := time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC)
	for name, c := range map[string]struct {
		st    InFlight
		field string
	}{
		"beyond the route":  {InFlight{Dist: 1e7, FL: 350, Mass: 65000, Time: now}, "from-nm"},
		"level not allowed": {InFlight{Dist: 500 * nmToM, FL: 340, Mass: 65000, Time: now}, "fl"},
		"mass under ZFW":    {InFlight{Dist: 500 * nmToM, FL: 350, Mass: 54000, Time: now}, "mass"},
		"no time":           {InFlight{Dist: 500 * nmToM, FL: 350, Mass: 65000}, "time"},
	} {
		_, err := Replan(p, c.st)
		ie, ok := err.(*InputError)
		if !ok || ie.Field != c.field {
			t.Errorf("%s: %v, want an input error on %s", name, err, c.field)
		}
	}
}
