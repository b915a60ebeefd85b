package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// TestSameVerdictEveryDoor runs the same flight inputs through levelpath
// plan, a one-row levelpath batch schedule and the library's checks, and
// asserts one verdict: planned by every door, or refused by every door
// (plan exits 2; batch lists the row in errors.csv and exits 3).
func TestSameVerdictEveryDoor(t *testing.T) {
	fs := demoFiles(t)
	route := fs.Routes[3] // the short regional route
	type in struct {
		tow, zfw, fuel, floor string
		speed, levels         string
		arriveBy, window      string
	}
	cases := []struct {
		name string
		in   in
		ok   bool
	}{
		{"take-off mass", in{tow: "36000"}, true},
		{"floor 1.0 g", in{tow: "36000", floor: "1.0"}, true},
		{"floor 2.6 g", in{tow: "36000", floor: "2.6"}, false},
		{"zfw and fuel", in{zfw: "30000", fuel: "5000"}, true},
		{"all three agreeing", in{tow: "35000", zfw: "30000", fuel: "5000"}, true},
		{"all three disagreeing", in{tow: "36000", zfw: "30000", fuel: "5000"}, false},
		{"zfw over MZFW", in{zfw: "60000", fuel: "5000"}, false},
		{"bad speed", in{tow: "36000", speed: "0.99"}, false},
		{"bad levels", in{tow: "36000", levels: "every-1000:FL355-FL400"}, false},
		// Arrival targets (departure 20:00Z; the flight takes about 83 to
		// 90 minutes between CI 500 and CI 0 in still air).
		{"arrive-by inside the speed range", in{tow: "36000", arriveBy: "2026-12-01T21:27:00Z", window: "-2m,+2m"}, true},
		{"fuel plan with arrive-by", in{zfw: "30000", arriveBy: "2026-12-01T21:27:00Z", window: "-2m,+2m"}, true},
		{"arrive-by alone, any earlier arrival on time", in{tow: "36000", arriveBy: "2026-12-01T21:45:00Z"}, true},
		{"arrive-by before departure", in{tow: "36000", arriveBy: "2026-12-01T19:00:00Z"}, false},
		{"arrive-by at departure", in{tow: "36000", arriveBy: "2026-12-01T20:00:00Z"}, false},
		{"arrive-by malformed", in{tow: "36000", arriveBy: "2026-12-01 21:27"}, false},
		{"arrive window reversed", in{tow: "36000", arriveBy: "2026-12-01T21:27:00Z", window: "+2m,-2m"}, false},
		{"arrive window malformed", in{tow: "36000", arriveBy: "2026-12-01T21:27:00Z", window: "2m"}, false},
		{"arrive window not finite", in{tow: "36000", arriveBy: "2026-12-01T21:27:00Z", window: "NaN,1m"}, false},
		{"arrive window without arrive-by", in{tow: "36000", window: "-2m,+2m"}, false},
		{"arrive-by faster than the fastest plan", in{tow: "36000", arriveBy: "2026-12-01T21:05:00Z", window: "-2m,+2m"}, false},
		{"arrive-by with lrc speed", in{tow: "36000", speed: "lrc", arriveBy: "2026-12-01T21:27:00Z"}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := []string{"plan", "--route", route, "--aircraft", "demo-regional", "--depart", "2026-12-01T20:00:00Z"}
			for _, f := range []struct{ flag, v string }{{"--mass", c.in.tow}, {"--zfw", c.in.zfw}, {"--fuel", c.in.fuel},
				{"--floor", c.in.floor}, {"--speed", c.in.speed}, {"--levels", c.in.levels},
				{"--arrive-by", c.in.arriveBy}, {"--arrive-window", c.in.window}} {
				if f.v != "" {
					args = append(args, f.flag, f.v)
				}
			}
			planCode, _, planErr := runCLI(t, args...)
			dir := t.TempDir()
			sched := filepath.Join(dir, "s.csv")
			window := c.in.window
			if window != "" {
				window = `"` + window + `"` // the comma needs CSV quotes
			}
			row := fmt.Sprintf("flight,departure,route,aircraft,tow_kg,ci,zfw_kg,fuel_kg,floor_g,levels,speed,arrive_by,arrive_window\nV1,2026-12-01T20:00:00Z,%s,demo-regional,%s,0,%s,%s,%s,%s,%s,%s,%s\n",
				route, c.in.tow, c.in.zfw, c.in.fuel, c.in.floor, c.in.levels, c.in.speed, c.in.arriveBy, window)
			if err := os.WriteFile(sched, []byte(row), 0o644); err != nil {
				t.Fatal(err)
			}
			batchCode, _, batchErr := runCLI(t, "batch", "--schedule", sched, "--out", filepath.Join(dir, "out"))
			wantPlan, wantBatch := 0, 0
			if !c.ok {
				wantPlan, wantBatch = 2, 3
			}
			if planCode != wantPlan || batchCode != wantBatch {
				t.Errorf("plan exit %d (want %d) %s; batch exit %d (want %d) %s", planCode, wantPlan, planErr, batchCode, wantBatch, batchErr)
			}
		})
	}
}

// TestBatchFuelPlanRow: a schedule row with zfw_kg alone gets the dispatch
// fuel plan: results carry block_kg, and the take-off mass is the fixed
// point ZFW + block - taxi, above the ZFW (ICAO Annex 6 Part I 4.3.6.3
// structure; the components are checked in optimizer's fuel-plan tests).
func TestBatchFuelPlanRow(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	sched := filepath.Join(dir, "s.csv")
	// F2 is F1 with a policy file of its own that adds 1,000 kg of extra fuel.
	if err := os.WriteFile(filepath.Join(dir, "extra.yaml"), []byte("extra_kg: 1000\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	row := "flight,departure,route,aircraft,tow_kg,ci,zfw_kg,policy\n" +
		"F1,2026-12-01T20:00:00Z," + fs.Routes[3] + ",demo-regional,,15,30000,\n" +
		"F2,2026-12-01T20:00:00Z," + fs.Routes[3] + ",demo-regional,,15,30000,extra.yaml\n"
	if err := os.WriteFile(sched, []byte(row), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", out); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	f, err := os.Open(filepath.Join(out, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil || len(recs) != 3 {
		t.Fatalf("results %v %v", recs, err)
	}
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	block, _ := strconv.ParseFloat(recs[1][col["block_kg"]], 64)
	tow, _ := strconv.ParseFloat(recs[1][col["takeoff_mass_kg"]], 64)
	fuel, _ := strconv.ParseFloat(recs[1][col["fuel_kg"]], 64)
	if !(block > fuel && tow > 30000 && tow < 30000+block) {
		t.Errorf("block %v kg, trip %v kg, take-off mass %v kg for ZFW 30000 kg", block, fuel, tow)
	}
	block2, _ := strconv.ParseFloat(recs[2][col["block_kg"]], 64)
	if d := block2 - block; d < 1000 || d > 1250 { // the extra fuel, plus the trip, contingency and reserve fuel a heavier aircraft burns
		t.Errorf("with 1,000 kg extra: block %v kg against %v kg", block2, block)
	}
}

// TestPlanKeepsItsLimits: a plan never returns a profile that breaks a
// limit it was asked to keep. On this flight the search's nominal weather
// times put FL400 inside the 300 ft/min residual-climb limit while exact
// pricing put it 0.2 ft/min outside; the level is closed there and the
// flight planned again (the plan says so).
func TestPlanKeepsItsLimits(t *testing.T) {
	fs := demoFiles(t)
	code, out, errs := runCLI(t, "plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--zfw", "30000",
		"--weather", fs.Weather, "--depart", "2026-12-01T20:20:00Z", "--ci", "15", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var d struct {
		Status     string `json:"status"`
		Violations []struct {
			Limit, Detail string
		} `json:"violations"`
	}
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	if d.Status != "ok" || len(d.Violations) != 0 {
		t.Errorf("status %s, violations %+v", d.Status, d.Violations)
	}
}
