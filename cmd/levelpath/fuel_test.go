package main

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestPlanKeepsItsRules: with a block that forces the flight off its
// levels, the plan steps down only where the level stops being available
// and breaks none of the rules it was asked to keep (assess of its own
// profile agrees).
func TestPlanKeepsItsRules(t *testing.T) {
	fs := demoFiles(t)
	args := []string{"--route", fs.Route, "--aircraft", "demo-widebody", "--mass", "245000", "--weather", fs.Weather,
		"--depart", "2026-12-01T20:00:00Z", "--ci", "40", "--block", "FL350,FL370@1000-3000"}
	d := planJSON(t, append([]string{"plan"}, args...)...)
	if v := d["violations"].([]any); len(v) != 0 || d["status"] != "ok" {
		t.Errorf("plan %s: status %v, violations %v", d["profile"], d["status"], v)
	}
	a := planJSON(t, append([]string{"assess", "--profile", d["profile"].(string)}, args...)...)
	if v := a["violations"].([]any); len(v) != 0 {
		t.Errorf("assess of %s: %v", d["profile"], v)
	}
	if a["baseline"] == nil {
		t.Errorf("assess computed no baseline: %v", a["baseline_note"])
	}
}

// TestPlanImpossibleWithMass: a take-off mass whose trip burns more than
// the tanks hold fails with exit 2 after the plan, naming the limit.
func TestPlanImpossibleWithMass(t *testing.T) {
	fs := demoFiles(t)
	code, out, errs := runCLI(t, "plan", "--route", fs.Route, "--aircraft", "demo-regional", "--mass", "40000", "--weather", fs.Weather, "--depart", "2026-12-01T20:00:00Z")
	if code != 2 || !strings.Contains(errs, "fuel-capacity") || !strings.Contains(out, "IMPOSSIBLE") {
		t.Errorf("exit %d, stderr %q, table status missing: %v", code, errs, !strings.Contains(out, "IMPOSSIBLE"))
	}
}

// TestPlanFuelFromZFW: plan --zfw alone makes the fuel plan; its JSON
// carries the fuel section, block is the sum of the ICAO Annex 6 Part I
// 4.3.6.3 components, and re-planning with --mass at the reported
// take-off mass gives the same trip fuel within 0.05 % (the fixed point).
func TestPlanFuelFromZFW(t *testing.T) {
	fs := demoFiles(t)
	base := []string{"plan", "--route", fs.Route, "--aircraft", "demo-widebody", "--weather", fs.Weather,
		"--depart", "2026-12-01T20:00:00Z", "--ci", "40"}
	d := planJSON(t, append(base, "--zfw", "170000", "--alternate", "25.3,55.8 24.4,54.6", "--extra-kg", "300")...)
	f, ok := d["fuel"].(map[string]any)
	if !ok {
		t.Fatalf("no fuel section: %v", d["fuel"])
	}
	num := func(k string) float64 {
		v, ok := f[k].(float64)
		if !ok {
			t.Fatalf("fuel.%s = %v", k, f[k])
		}
		return v
	}
	sum := 0.0
	for _, k := range []string{"taxi_kg", "trip_kg", "contingency_kg", "alternate_kg", "final_reserve_kg", "additional_kg", "extra_kg"} {
		sum += num(k)
	}
	if b := num("block_kg"); abs(b-sum) > 1e-6*b {
		t.Errorf("block %.3f, sum %.3f", b, sum)
	}
	if num("extra_kg") != 300 || f["limited_by"] != "none" || d["status"] != "ok" {
		t.Errorf("extra %v, limited by %v, status %v", f["extra_kg"], f["limited_by"], d["status"])
	}
	num("max_payload_zfw_kg")
	num("landing_mass_kg")
	tow := num("takeoff_mass_kg")
	re := planJSON(t, append(base, "--mass", strconv.FormatFloat(tow, 'f', 3, 64))...)
	trip := re["totals"].(map[string]any)["fuel_kg"].(float64)
	if dd := abs(trip-num("trip_kg")) / trip; dd > 5e-4 {
		t.Errorf("re-planned at %.0f kg: trip %.1f kg, fuel plan %.1f kg", tow, trip, num("trip_kg"))
	}
}

// TestPlanFuelBadInput: a bad policy, an alternate that does not start at
// the destination and fuel-plan flags with --mass exit 2 naming the input.
func TestPlanFuelBadInput(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	bad := filepath.Join(dir, "policy.yaml")
	if err := os.WriteFile(bad, []byte("contingency_percent: 150\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	base := []string{"plan", "--route", fs.Route, "--aircraft", "demo-widebody"}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--zfw", "170000", "--policy", bad}, "contingency_percent"},
		{[]string{"--zfw", "170000", "--alternate", "20,50 21,51"}, "alternate"},
		{[]string{"--mass", "240000", "--policy", bad}, "--zfw alone"},
		{[]string{"--zfw", "170000", "--extra-kg", "-5"}, "--extra-kg"},
	} {
		code, _, errs := runCLI(t, append(base, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", c.args, code, errs, c.want)
		}
	}
}

// TestPlanInFlight: plan --from-waypoint with --fl, --mass, --time and
// --zfw re-plans the remainder with the reserves from there; a distance
// beyond the route, a level not allowed there and a mass under the ZFW
// exit 2 naming the field.
func TestPlanInFlight(t *testing.T) {
	fs := demoFiles(t)
	base := []string{"plan", "--route", fs.Route, "--aircraft", "demo-widebody", "--weather", fs.Weather,
		"--depart", "2026-12-01T20:00:00Z", "--ci", "40", "--time", "2026-12-02T00:17:00Z"}
	d := planJSON(t, append(base, "--from-waypoint", "WPT03", "--fl", "350", "--mass", "215000", "--zfw", "170000")...)
	f := d["fuel"].(map[string]any)
	w := d["waypoints"].([]any)[0].(map[string]any)
	if f["in_flight"] != true || w["kind"] != "start" || d["status"] != "ok" {
		t.Errorf("in flight %v, first waypoint %v, status %v", f["in_flight"], w, d["status"])
	}
	if fob := f["fuel_on_board_kg"].(float64); fob != 45000 {
		t.Errorf("fuel on board %v, want 215000 - 170000", fob)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--from-nm", "9000", "--fl", "350", "--mass", "215000"}, "from-nm"},
		{[]string{"--from-nm", "2000", "--fl", "340", "--mass", "215000"}, "FL340"},
		{[]string{"--from-nm", "2000", "--fl", "350", "--mass", "165000", "--zfw", "170000"}, "zero-fuel mass"},
		{[]string{"--from-waypoint", "NOWHERE", "--fl", "350", "--mass", "215000"}, "NOWHERE"},
	} {
		code, _, errs := runCLI(t, append(base, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", c.args, code, errs, c.want)
		}
	}
}
