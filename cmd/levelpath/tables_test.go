package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// stepSegments returns each step of a plan JSON as "FROM>TO" and the
// route segment where it starts (the segment of the step leg).
func stepSegments(t *testing.T, d map[string]any) (names []string, segs []int) {
	t.Helper()
	for _, s := range d["steps"].([]any) {
		sm := s.(map[string]any)
		at := sm["at_nm"].(float64)
		seg := -1
		for _, l := range d["legs"].([]any) {
			lm := l.(map[string]any)
			if lm["phase"] == "step" && abs(lm["from_nm"].(float64)-at) < 0.5 {
				seg = int(lm["segment"].(float64))
				break
			}
		}
		if seg < 0 {
			t.Fatalf("no step leg at %.1f NM", at)
		}
		names = append(names, fmt.Sprintf("FL%.0f>FL%.0f", sm["from_fl"], sm["to_fl"]))
		segs = append(segs, seg)
	}
	return names, segs
}

// Self-consistency check, not an outside one: the demo long-haul planned
// from the demo-widebody model's own exported tables (aircraft export,
// default grid) must cost within 0.3 % of planning with the model, with
// the same steps, each starting in the same route segment or the next or
// previous one. The tables are the model sampled on a grid and
// interpolated multilinearly, so this checks the table reader, the
// interpolation and the table-backed aircraft against the model they came
// from; the model's outside checks (perf tests) stay as they are.
func TestPlanFromExportedTables(t *testing.T) {
	fs := demoFiles(t)
	dir := filepath.Join(t.TempDir(), "widebody-tables")
	if code, out, errs := runCLI(t, "aircraft", "export", "--aircraft", "demo-widebody", "--out", dir); code != 0 || !strings.Contains(out, "format version 2") {
		t.Fatalf("export: exit %d\n%s%s", code, out, errs)
	}
	args := []string{"--route", fs.Route, "--mass", "245000", "--weather", fs.Weather, "--depart", "2026-12-01T20:00:00Z", "--ci", "40"}
	model := planJSON(t, append([]string{"plan", "--aircraft", "demo-widebody"}, args...)...)
	tab := planJSON(t, append([]string{"plan", "--aircraft", dir}, args...)...)
	cm := model["totals"].(map[string]any)["cost"].(float64)
	ct := tab["totals"].(map[string]any)["cost"].(float64)
	if rel := abs(ct-cm) / cm; rel > 0.003 {
		t.Errorf("cost from tables %.1f, from the model %.1f: %.3f %% apart, want at most 0.3 %%", ct, cm, 100*rel)
	}
	found := false
	for _, w := range tab["warnings"].([]any) {
		found = found || strings.Contains(w.(string), "performance from the operator tables "+dir)
	}
	if !found {
		t.Errorf("the plan from tables does not say so: warnings %v", tab["warnings"])
	}
	nm, sm := stepSegments(t, model)
	nt, st := stepSegments(t, tab)
	if strings.Join(nm, " ") != strings.Join(nt, " ") {
		t.Fatalf("steps from tables %v, from the model %v", nt, nm)
	}
	for i := range sm {
		if d := st[i] - sm[i]; d < -1 || d > 1 {
			t.Errorf("step %s starts in segment %d from tables, %d from the model", nm[i], st[i], sm[i])
		}
	}
	t.Logf("cost: model %.1f, tables %.1f (%+.3f %%); steps %v in segments %v (model) and %v (tables)", cm, ct, 100*(ct-cm)/cm, nm, sm, st)

	// Assess and envelope take the directory too.
	a := planJSON(t, append([]string{"assess", "--aircraft", dir, "--profile", tab["profile"].(string)}, args...)...)
	if ca := a["totals"].(map[string]any)["cost"].(float64); abs(ca-ct) > 1e-6*ct {
		t.Errorf("assess of the tables' plan costs %.3f, the plan %.3f", ca, ct)
	}
	if code, out, errs := runCLI(t, "envelope", "--aircraft", dir, "--mass", "231000", "--isa-dev", "10"); code != 0 || !strings.Contains(out, "Maximum level") || strings.Contains(out, "top of the tables") {
		t.Errorf("envelope from tables: exit %d\n%s%s", code, out, errs)
	}
	// Light and cold, the thrust ceiling lies above the tables' top level
	// (FL450, 2,000 ft above the ceiling): said, not extrapolated.
	if code, out, errs := runCLI(t, "envelope", "--aircraft", dir, "--mass", "150000", "--isa-dev", "-10"); code != 0 || !strings.Contains(out, "thrust FL450 or above (top of the tables)") {
		t.Errorf("light envelope from tables: exit %d\n%s%s", code, out, errs)
	}
	var env map[string]any
	if code, out, _ := runCLI(t, "envelope", "--aircraft", dir, "--mass", "150000", "--isa-dev", "-10", "--format", "json"); code != 0 || json.Unmarshal([]byte(out), &env) != nil || env["max_fl_thrust_at_table_top"] != true {
		t.Errorf("light envelope JSON from tables: exit %d, max_fl_thrust_at_table_top %v", code, env["max_fl_thrust_at_table_top"])
	}
	// Outside the tables (ISA+35, the table ends at ISA+30) a plan is an
	// input error naming the segment, the axis and the table's range.
	code, _, errs := runCLI(t, "plan", "--aircraft", dir, "--route", fs.Route, "--mass", "245000", "--isa-dev", "35", "--ci", "40")
	if code != 2 || !strings.Contains(errs, "segment 0") || !strings.Contains(errs, "isa_dev_k 35 outside the table's -30..30") {
		t.Errorf("plan at ISA+35 from tables: exit %d, %q", code, errs)
	}
}

// A batch schedule names a table directory in its aircraft column and a
// per-row perf_factor_pct: the factor scales the fuel flow of the table
// aircraft (fuel rises, by about the factor), appears in results.csv and
// in the plan's warnings, and is part of the resume key.
func TestBatchTablesAndPerfFactor(t *testing.T) {
	fs := demoFiles(t)
	dir := filepath.Join(t.TempDir(), "nb-tables")
	if code, _, errs := runCLI(t, "aircraft", "export", "--aircraft", "demo-narrowbody", "--out", dir); code != 0 {
		t.Fatalf("export: exit %d: %s", code, errs)
	}
	sched := filepath.Join(t.TempDir(), "sched.csv")
	write := func(pf string) {
		route, _ := filepath.Abs(fs.Routes[2])
		body := "flight,departure,route,aircraft,tow_kg,ci,perf_factor_pct\n" +
			"P0,2026-12-01T21:00:00Z," + route + "," + dir + ",72000,20,\n" +
			"P1,2026-12-01T21:00:00Z," + route + "," + dir + ",72000,20," + pf + "\n"
		if err := os.WriteFile(sched, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("4")
	out := filepath.Join(t.TempDir(), "out")
	if code, stdout, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", out); code != 0 {
		t.Fatalf("batch: exit %d\n%s%s", code, stdout, errs)
	}
	read := func() map[string]map[string]string {
		f, err := os.Open(filepath.Join(out, "results.csv"))
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		recs, err := csv.NewReader(f).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		res := map[string]map[string]string{}
		for _, r := range recs[1:] {
			m := map[string]string{}
			for i, h := range recs[0] {
				m[h] = r[i]
			}
			res[m["flight"]] = m
		}
		return res
	}
	res := read()
	if res["P0"]["perf_factor_pct"] != "0" || res["P1"]["perf_factor_pct"] != "4" {
		t.Fatalf("perf_factor_pct column: P0 %q, P1 %q", res["P0"]["perf_factor_pct"], res["P1"]["perf_factor_pct"])
	}
	type pqRow struct {
		Flight        string  `parquet:"flight"`
		PerfFactorPct float64 `parquet:"perf_factor_pct"`
	}
	pq, err := parquet.ReadFile[pqRow](filepath.Join(out, "results.parquet"))
	if err != nil || len(pq) != 2 || pq[0].Flight != "P0" || pq[0].PerfFactorPct != 0 || pq[1].PerfFactorPct != 4 {
		t.Errorf("results.parquet perf_factor_pct: %+v (%v)", pq, err)
	}
	f0, _ := strconv.ParseFloat(res["P0"]["fuel_kg"], 64)
	f1, _ := strconv.ParseFloat(res["P1"]["fuel_kg"], 64)
	// Fuel flow x 1.04 raises trip fuel by about 4 % (a little more: the
	// extra fuel is carried; less if the profile changes).
	if r := f1 / f0; r < 1.03 || r > 1.05 {
		t.Errorf("fuel with +4 %% %.1f kg, without %.1f kg: ratio %.4f", f1, f0, r)
	}
	if !strings.Contains(res["P1"]["warnings"], "performance factor +4.0 %") || strings.Contains(res["P0"]["warnings"], "performance factor") {
		t.Errorf("warnings: P0 %q, P1 %q", res["P0"]["warnings"], res["P1"]["warnings"])
	}
	// A resume after changing the factor re-plans that row only.
	write("6")
	code, stdout, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", out, "--resume")
	if code != 0 {
		t.Fatalf("resume: exit %d\n%s%s", code, stdout, errs)
	}
	if got := read()["P1"]["perf_factor_pct"]; got != "6" {
		t.Errorf("after resume with 6 %%, P1 has %q", got)
	}
	if read()["P0"]["fuel_kg"] != res["P0"]["fuel_kg"] {
		t.Error("P0 changed on resume")
	}
	write("45")
	o2 := filepath.Join(t.TempDir(), "o2")
	code, _, errs = runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", o2)
	eb, _ := os.ReadFile(filepath.Join(o2, "errors.csv"))
	if code != 3 || !strings.Contains(string(eb), "perf_factor_pct") || !strings.Contains(string(eb), "-20..30 percent") {
		t.Errorf("factor 45 %%: exit %d, %s\nerrors.csv: %s", code, errs, eb)
	}
}
