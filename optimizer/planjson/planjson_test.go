package planjson

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"strings"
	"testing"
	"time"

	"levelpath/optimizer"
)

// testPlan is a hand-made plan with round SI values; the checks convert
// them with the international definitions 1 NM = 1852 m and 1 kt = 1 NM/h.
func testPlan() *optimizer.Plan {
	return &optimizer.Plan{
		Aircraft: "test", CI: 30, Floor: 1.3, Speed: "econ", Depart: time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC),
		TakeoffMass: 70000, Distance: 185200,
		Profile: optimizer.Profile{Initial: 350, Changes: []optimizer.Change{{AtDist: 92600, FL: 370}}},
		Totals:  optimizer.Totals{Fuel: 1000, Time: 1800, Cost: 1900, CO2: 3160, LandingMass: 69000},
		Legs: []optimizer.Leg{
			{Phase: optimizer.PhaseClimb, FromDist: 0, ToDist: 92600, FromFL: 15, FL: 350, TAS: 200, GS: 210, WindAlong: 10,
				Fuel: 600, Time: 900, MassStart: 70000, BuffetMargin: math.NaN(), EDR: math.NaN(), ResidualClimb: math.NaN(),
				MaxFLBuffet: math.NaN(), MaxFLThrust: math.NaN(), Floor: 1.3},
			{Phase: optimizer.PhaseCruise, FromDist: 92600, ToDist: 185200, FromFL: 350, FL: 350, Mach: 0.78, TAS: 250, GS: 240,
				WindAlong: -10, ISADev: 5, EDR: 0.1, Fuel: 400, Time: 900, MassStart: 69400, BuffetMargin: 1.45, Floor: 1.3,
				FloorReason: "protection floor", ResidualClimb: 2.54, MaxFLBuffet: 380.5, MaxFLThrust: 390.25},
		},
		Steps:    []optimizer.Step{{AtDist: 92600, FromFL: 350, ToFL: 370}},
		Baseline: &optimizer.Baseline{FL: 350, Totals: optimizer.Totals{Fuel: 1010, Time: 1800, Cost: 1910}, SavingPct: 0.52},
		Warnings: []string{"a warning"},
	}
}

func TestJSONUnitsAndNulls(t *testing.T) {
	var buf bytes.Buffer
	if err := WriteJSON(&buf, testPlan(), false); err != nil {
		t.Fatal(err)
	}
	var d map[string]any
	if err := json.Unmarshal(buf.Bytes(), &d); err != nil {
		t.Fatal(err)
	}
	if d["caution"] != optimizer.Caution || d["distance_nm"].(float64) != 100 || d["profile"] != "FL350,FL370@50" {
		t.Errorf("header: caution %v, distance %v NM, profile %v", d["caution"], d["distance_nm"], d["profile"])
	}
	if tm := d["totals"].(map[string]any)["time_min"].(float64); tm != 30 {
		t.Errorf("time_min %v, want 30", tm)
	}
	legs := d["legs"].([]any)
	climb, cruise := legs[0].(map[string]any), legs[1].(map[string]any)
	for _, k := range []string{"buffet_margin_g", "edr", "residual_climb_fpm", "max_fl_buffet"} {
		if climb[k] != nil {
			t.Errorf("climb %s = %v, want null for NaN", k, climb[k])
		}
	}
	cases := []struct {
		key  string
		want float64
	}{
		{"from_nm", 50}, {"to_nm", 100}, {"tas_kt", 250 * 3600 / 1852.0}, {"gs_kt", 240 * 3600 / 1852.0},
		{"wind_kt", -10 * 3600 / 1852.0}, {"time_min", 15}, {"residual_climb_fpm", 2.54 / 0.3048 * 60}, {"max_fl_thrust", 390.25},
	}
	for _, c := range cases {
		if got := cruise[c.key].(float64); math.Abs(got-c.want) > 1e-9*math.Abs(c.want) {
			t.Errorf("%s = %v, want %v", c.key, got, c.want)
		}
	}
	if s := d["steps"].([]any)[0].(map[string]any); s["at_nm"].(float64) != 50 || s["to_fl"].(float64) != 370 {
		t.Errorf("step %v", s)
	}
	if v, ok := d["violations"].([]any); !ok || len(v) != 0 {
		t.Errorf("violations %v, want []", d["violations"])
	}
}

func TestCSVAndTableCarryCaution(t *testing.T) {
	var buf bytes.Buffer
	if err := WriteCSV(&buf, testPlan(), false); err != nil {
		t.Fatal(err)
	}
	// A plain CSV (RFC 4180): the header first, as readers with default
	// settings expect, and the caution in its own column on every row.
	recs, err := csv.NewReader(strings.NewReader(buf.String())).ReadAll()
	if err != nil || len(recs) != 3 || recs[0][0] != "from_nm" || recs[2][0] != "50" {
		t.Fatalf("CSV rows %v, %v", recs, err)
	}
	last := len(recs[0]) - 1
	if recs[0][last] != "caution" || recs[1][last] != optimizer.Caution || recs[2][last] != optimizer.Caution {
		t.Errorf("caution column: header %q, rows %q, %q", recs[0][last], recs[1][last], recs[2][last])
	}
	buf.Reset()
	if err := WriteTable(&buf, testPlan(), true); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{optimizer.Caution, "FL350 -> FL370", "Violations: 0", "a warning", "saves 0.52 %"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q", want)
		}
	}
}

func TestViolationGroups(t *testing.T) {
	p := testPlan()
	p.Violations = []optimizer.Violation{
		{Leg: 2, Limit: "buffet", By: 0.1, Unit: "g", Detail: "a"},
		{Leg: 2, Limit: "thrust", By: 50, Unit: "fpm", Detail: "t"},
		{Leg: 3, Limit: "buffet", By: 0.3, Unit: "g", Detail: "worst"},
		{Leg: 4, Limit: "buffet", By: 0.2, Unit: "g", Detail: "c"},
		{Leg: 7, Limit: "buffet", By: 0.05, Unit: "g", Detail: "later"},
	}
	gs := groupViolations(FromPlan(p, true))
	if len(gs) != 3 {
		t.Fatalf("%d groups, want 3: %+v", len(gs), gs)
	}
	if g := gs[0]; g.limit != "buffet" || g.first != 2 || g.last != 4 || g.count != 3 || g.worst != 0.3 || g.detail != "worst" {
		t.Errorf("first group %+v", g)
	}
	if g := gs[2]; g.first != 7 || g.count != 1 {
		t.Errorf("last group %+v", g)
	}
	var buf bytes.Buffer
	WriteTable(&buf, p, true)
	if !strings.Contains(buf.String(), "legs 2-4 (3 legs): buffet, worst by 0.300 g: worst") {
		t.Errorf("table:\n%s", buf.String())
	}
}

// TestEnsembleSectionNaN: an ensemble report whose members have no
// cruise leg (no margin) and no regret writes nulls, not invalid JSON,
// and the table still prints.
func TestEnsembleSectionNaN(t *testing.T) {
	nan := math.NaN()
	none := optimizer.SpreadOf([]float64{nan, nan})
	p := &optimizer.Plan{Ensemble: &optimizer.EnsembleReport{Members: 2, Numbers: []int{0, 1}, Objective: "mean", RobustShare: 1, Need: 2,
		Chosen: "assessed", Profile: &optimizer.EnsembleProfile{Objective: nan, MeanCost: 10, Fuel: optimizer.SpreadOf([]float64{1, 3}), Margin: none, MarginAboveFloor: none},
		PerMember: []optimizer.MemberResult{{Member: 0, Fuel: 1, MinMargin: nan, MarginAboveFloor: nan, OwnCost: nan, Regret: nan}}}}
	var buf bytes.Buffer
	if err := WriteJSON(&buf, p, true); err != nil {
		t.Fatal(err)
	}
	var d struct {
		Ensemble struct {
			Profile struct {
				Objective *float64            `json:"objective"`
				Fuel      map[string]float64  `json:"fuel_kg"`
				Margin    map[string]*float64 `json:"min_margin_g"`
			} `json:"profile"`
		} `json:"ensemble"`
	}
	if err := json.Unmarshal(buf.Bytes(), &d); err != nil {
		t.Fatal(err)
	}
	// The median of {1, 3} is 2 (any definition); the margins are null.
	if d.Ensemble.Profile.Objective != nil || d.Ensemble.Profile.Fuel["p50"] != 2 || d.Ensemble.Profile.Margin["min"] != nil {
		t.Errorf("ensemble section: %s", buf.String())
	}
}
