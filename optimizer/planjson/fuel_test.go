package planjson

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"levelpath/optimizer"
	"levelpath/perf"
)

// TestFuelSection: the fuel plan's components appear under the field
// names of the issue, in kg, and the table's fuel block prints them; the
// waypoints carry an ETO and null for unknown fuel.
func TestFuelSection(t *testing.T) {
	p := testPlan()
	p.Fuel = &optimizer.FuelPlan{Policy: optimizer.DefaultFuelPolicy(), Taxi: 200, Trip: 1000, Contingency: 50, Alternate: 300,
		FinalReserve: 900, Extra: 100, Block: 2550, ZFW: 67650, TakeoffMass: 70000, LandingMass: 69000, LimitedBy: []string{"MLW"},
		Binding: "MLW", MaxPayloadZFW: 66000, Iterations: 3, FinalHold: perf.Hold{CAS: 110, FuelFlow: 0.5}}
	p.Waypoints = []optimizer.Waypoint{{Name: "A", Kind: optimizer.WaypointRoute, Time: 1800, FuelRemaining: math.NaN(), MinRequired: math.NaN()}}
	var buf bytes.Buffer
	if err := WriteJSON(&buf, p, false); err != nil {
		t.Fatal(err)
	}
	var d map[string]any
	if err := json.Unmarshal(buf.Bytes(), &d); err != nil {
		t.Fatal(err)
	}
	f := d["fuel"].(map[string]any)
	want := map[string]any{"taxi_kg": 200.0, "trip_kg": 1000.0, "contingency_kg": 50.0, "alternate_kg": 300.0, "final_reserve_kg": 900.0,
		"additional_kg": 0.0, "extra_kg": 100.0, "block_kg": 2550.0, "takeoff_mass_kg": 70000.0, "landing_mass_kg": 69000.0,
		"limited_by": "MLW", "max_payload_zfw_kg": 66000.0}
	for k, v := range want {
		if f[k] != v {
			t.Errorf("fuel.%s = %v, want %v", k, f[k], v)
		}
	}
	// 0.5 kg/s = 1800 kg/h; 110 m/s = 213.8 kt (1 kt = 1852/3600 m/s).
	if h := f["final_reserve_hold"].(map[string]any); h["fuel_flow_kg_h"] != 1800.0 || math.Abs(h["cas_kt"].(float64)-110*3600/1852.0) > 1e-9 {
		t.Errorf("hold %v", h)
	}
	w := d["waypoints"].([]any)[0].(map[string]any)
	if w["eto"] != "2026-12-01T20:30:00Z" || w["fuel_remaining_kg"] != nil {
		t.Errorf("waypoint %v", w)
	}
	buf.Reset()
	if err := WriteTable(&buf, p, false); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, s := range []string{"BLOCK              2550 kg", "Final reserve       900 kg", "Limited by: MLW; largest ZFW that fits 66000 kg", "Waypoints"} {
		if !strings.Contains(out, s) {
			t.Errorf("table lacks %q:\n%s", s, out)
		}
	}
	if i, j := strings.Index(out, "Fuel plan"), strings.Index(out, "\nLegs"); i < 0 || j < i {
		t.Errorf("the fuel block must come before the legs")
	}
}

// TestTableBrief: --brief keeps the summary, status, steps and caution and
// leaves out the waypoint and leg tables.
func TestTableBrief(t *testing.T) {
	var buf bytes.Buffer
	if err := WriteTableBrief(&buf, testPlan(), false, true); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, s := range []string{"Status", "Steps", optimizer.Caution} {
		if !strings.Contains(out, s) {
			t.Errorf("brief table lacks %q", s)
		}
	}
	if strings.Contains(out, "\nLegs") {
		t.Errorf("brief table has the legs")
	}
}
