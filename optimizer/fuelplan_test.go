package optimizer

import (
	"errors"
	"math"
	"testing"
	"time"

	"levelpath/perf"
)

// demoFuelRequest is the demo long haul with an invented 80 NM alternate.
func demoFuelRequest(t *testing.T, zfw float64) FuelRequest {
	wx, ref := demoWeather(t)
	p := &Problem{Track: track(t, longHaulRoute, "odd-even-magnetic", 50), Aircraft: aircraft(t, "demo-widebody"),
		Weather: wx, Depart: ref.Add(2 * time.Hour), CI: 40}
	return FuelRequest{Problem: p, ZFW: zfw, Policy: DefaultFuelPolicy(), Alternate: track(t, "25.3,55.8 24.4,54.6", "odd-even-magnetic", 50)}
}

// TestFuelPlanFixedPoint checks the fuel plan against its definitions:
// the ICAO Annex 6 Part I 4.3.6.3 / Doc 9976 structure (every component
// present, block their sum), TOW = ZFW + block - taxi, the fixed point
// (re-planning at the reported TOW gives the same trip fuel within
// 0.05 %), contingency = max(5 % of trip, 5 min holding), and holding fuel
// from perf's fuel flow at the holding speed (identity).
func TestFuelPlanFixedPoint(t *testing.T) {
	req := demoFuelRequest(t, 170000)
	plan, err := PlanFuel(req)
	if err != nil {
		t.Fatal(err)
	}
	f := plan.Fuel
	a := req.Problem.Aircraft
	sum := f.Taxi + f.Trip + f.Contingency + f.Alternate + f.FinalReserve + f.Additional + f.Extra
	if math.Abs(sum-f.Block) > 1e-6 {
		t.Errorf("block %.3f, sum of components %.3f", f.Block, sum)
	}
	for name, v := range map[string]float64{"taxi": f.Taxi, "trip": f.Trip, "contingency": f.Contingency, "alternate": f.Alternate, "final reserve": f.FinalReserve} {
		if !(v > 0) {
			t.Errorf("%s fuel %v, want positive", name, v)
		}
	}
	if math.Abs(f.TakeoffMass-(f.ZFW+f.Block-f.Taxi)) > 1e-6 || math.Abs(f.LandingMass-(f.TakeoffMass-f.Trip)) > 1e-6 {
		t.Errorf("masses: TOW %.1f LM %.1f from ZFW %.1f block %.1f taxi %.1f trip %.1f", f.TakeoffMass, f.LandingMass, f.ZFW, f.Block, f.Taxi, f.Trip)
	}
	if f.Iterations < 2 || f.Iterations > fuelMaxIter {
		t.Errorf("%d iterations", f.Iterations)
	}
	// The fixed point.
	q := *req.Problem
	q.TakeoffMass = f.TakeoffMass
	re := solve(t, &q)
	if d := math.Abs(re.Totals.Fuel-f.Trip) / f.Trip; d > 5e-4 {
		t.Errorf("re-planned at TOW %.0f kg: trip %.1f kg, fuel plan %.1f kg (%.3f %%)", f.TakeoffMass, re.Totals.Fuel, f.Trip, 100*d)
	}
	// Contingency: the larger of its two terms.
	hold5, _, err := holdFuel(a, f.LandingMass, perf.PressureAt(1500*perf.FtToM), 0, 5)
	if err != nil {
		t.Fatal(err)
	}
	if want := math.Max(0.05*f.Trip, hold5); math.Abs(f.Contingency-want) > 1e-6*want {
		t.Errorf("contingency %.1f kg, want max(5 %% of %.1f, %.1f) = %.1f", f.Contingency, f.Trip, hold5, want)
	}
	// Holding: perf's fuel flow at the holding speed, 30 min from the
	// mass over the alternate (fuel flow falls a little as mass does).
	h := f.FinalHold
	pt := a.Point(perf.State{Mass: f.AlternateMass, Pressure: perf.PressureAt(1500 * perf.FtToM), Mach: h.Mach, LoadFactor: 1})
	if pt.FuelFlow != h.FuelFlow {
		t.Errorf("final reserve fuel flow %g, perf %g", h.FuelFlow, pt.FuelFlow)
	}
	if top := 1800 * h.FuelFlow; f.FinalReserve > top || f.FinalReserve < 0.97*top {
		t.Errorf("final reserve %.1f kg, 30 min at the starting flow %.1f kg", f.FinalReserve, top)
	}
	// Alternate fuel: the alternate route planned from the landing mass.
	// (The plans are those of the last take-off mass tried, within the
	// 1 kg tolerance of the reported one.)
	if math.Abs(f.AlternatePlan.TakeoffMass-f.LandingMass) > 2*fuelTolerance || math.Abs(f.AlternatePlan.Totals.Fuel-f.Alternate) > 1e-9 {
		t.Errorf("alternate from %.1f kg, landing mass %.1f kg", f.AlternatePlan.TakeoffMass, f.LandingMass)
	}
	// Over the destination the fuel remaining exceeds the least required
	// by the contingency and extra fuel, which are not needed there.
	end := plan.Waypoints[len(plan.Waypoints)-1]
	if d := end.FuelRemaining - end.MinRequired - (f.Contingency + f.Extra); math.Abs(d) > 1e-6 {
		t.Errorf("destination: remaining %.1f, required %.1f, contingency %.1f", end.FuelRemaining, end.MinRequired, f.Contingency)
	}
	for _, w := range plan.Waypoints {
		if w.FuelRemaining < w.MinRequired-1e-6 {
			t.Errorf("%s: remaining %.1f under required %.1f", w.Name, w.FuelRemaining, w.MinRequired)
		}
	}
	if plan.Status() != StatusOK || len(f.LimitedBy) != 0 {
		t.Errorf("status %s, limited by %v: %v", plan.Status(), f.LimitedBy, plan.Violations)
	}
	// The largest ZFW that fits: planning it puts the take-off mass on
	// the binding limit.
	if testing.Short() {
		t.Skip("the largest-ZFW check plans again (-short)")
	}
	if f.Binding != "MTOW" {
		t.Skipf("binding limit %s; the MTOW check needs MTOW to bind", f.Binding)
	}
	req2 := demoFuelRequest(t, f.MaxPayloadZFW)
	p2, err := PlanFuel(req2)
	if err != nil {
		t.Fatal(err)
	}
	if d := p2.Fuel.TakeoffMass - a.MTOW; math.Abs(d) > 2*fuelTolerance {
		t.Errorf("at the largest ZFW %.0f kg the take-off mass is %.1f kg, MTOW %.0f kg", f.MaxPayloadZFW, p2.Fuel.TakeoffMass, a.MTOW)
	}
}

// TestFuelPlanOverMTOW: a payload whose fuel takes the take-off mass over
// MTOW is an impossible flight naming MTOW, never planned over MTOW.
func TestFuelPlanOverMTOW(t *testing.T) {
	req := demoFuelRequest(t, 185000)
	plan, err := PlanFuel(req)
	if err != nil {
		t.Fatal(err)
	}
	f := plan.Fuel
	if plan.Status() != StatusImpossible || len(f.LimitedBy) == 0 || f.LimitedBy[0] != "MTOW" || plan.TakeoffMass > req.Problem.Aircraft.MTOW {
		t.Errorf("limited by %v, status %s, planned at %.0f kg", f.LimitedBy, plan.Status(), plan.TakeoffMass)
	}
	if !(f.MaxPayloadZFW < 185000) {
		t.Errorf("largest ZFW %.0f kg", f.MaxPayloadZFW)
	}
	var le *LoadingError
	if !errors.As(plan.LoadingFailure(), &le) {
		t.Errorf("no loading failure")
	}
}

func TestFuelPlanBadInput(t *testing.T) {
	req := demoFuelRequest(t, 170000)
	far := req
	far.Alternate = track(t, "20.0,50.0 21.0,51.0", "odd-even-magnetic", 50)
	low := req
	low.ZFW = req.Problem.Aircraft.OEW - 1
	pol := req
	pol.Policy.ContingencyPct = 101
	for name, r := range map[string]FuelRequest{"alternate far away": far, "ZFW under OEW": low} {
		if _, err := PlanFuel(r); !IsInputError(err) {
			t.Errorf("%s: %v, want an input error", name, err)
		}
	}
	var pe *PolicyError
	if _, err := PlanFuel(pol); !errors.As(err, &pe) || pe.Key != "contingency_percent" {
		t.Errorf("contingency 101 %%: %v", err)
	}
}

// TestFuelPlanMLW: extra fuel that would land the aircraft over MLW is
// named, with the largest ZFW that fits; planning that ZFW lands within
// 0.1 % of MLW (the estimate is first order: landing mass = ZFW plus the
// reserves, which change little with the mass).
func TestFuelPlanMLW(t *testing.T) {
	a := aircraft(t, "demo-narrowbody")
	p := &Problem{Track: track(t, "45.0,-73.0 47.0,-60.0", "odd-even-magnetic", 50), Aircraft: a, Depart: time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC)}
	pol := DefaultFuelPolicy()
	pol.ExtraKg = 3000
	plan, err := PlanFuel(FuelRequest{Problem: p, ZFW: 62000, Policy: pol})
	if err != nil {
		t.Fatal(err)
	}
	f := plan.Fuel
	if f.LandingMass <= a.MLW || len(f.LimitedBy) == 0 || f.LimitedBy[0] != "MLW" || f.Binding != "MLW" || plan.Status() != StatusImpossible {
		t.Fatalf("landing %.0f kg (MLW %.0f): limited by %v, binding %s, status %s", f.LandingMass, a.MLW, f.LimitedBy, f.Binding, plan.Status())
	}
	p2, err := PlanFuel(FuelRequest{Problem: p, ZFW: f.MaxPayloadZFW, Policy: pol})
	if err != nil {
		t.Fatal(err)
	}
	if d := p2.Fuel.LandingMass - a.MLW; math.Abs(d) > 1e-3*a.MLW {
		t.Errorf("at the largest ZFW %.0f kg the landing mass is %.0f kg, MLW %.0f kg", f.MaxPayloadZFW, p2.Fuel.LandingMass, a.MLW)
	}
	t.Logf("largest ZFW %.0f kg lands at %.1f kg (MLW %.0f)", f.MaxPayloadZFW, p2.Fuel.LandingMass, a.MLW)
}

// TestFuelPlanCapacity: a block fuel over the tanks is named with the fuel
// that cannot be carried.
func TestFuelPlanCapacity(t *testing.T) {
	a := aircraft(t, "demo-narrowbody")
	p := &Problem{Track: track(t, "45.0,-73.0 42.0,28.0", "odd-even-magnetic", 50), Aircraft: a, Depart: time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC)}
	plan, err := PlanFuel(FuelRequest{Problem: p, ZFW: 48000, Policy: DefaultFuelPolicy()})
	if err != nil {
		t.Fatal(err)
	}
	f := plan.Fuel
	if f.Block <= a.FuelCapacity {
		t.Skipf("block %.0f kg fits the %.0f kg tanks on this route", f.Block, a.FuelCapacity)
	}
	found := false
	for _, v := range plan.Violations {
		found = found || v.Limit == "fuel-capacity" && math.Abs(v.By-(f.Block-a.FuelCapacity)) < 1e-6
	}
	if !found || plan.Status() != StatusImpossible {
		t.Errorf("block %.0f kg over %.0f kg: violations %v, status %s", f.Block, a.FuelCapacity, plan.Violations, plan.Status())
	}
}
