package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parquet-go/parquet-go"
)

// arrivalDoc is the part of the plan document the arrival tests read.
type arrivalDoc struct {
	CI     float64 `json:"ci"`
	Depart string  `json:"depart"`
	Status string  `json:"status"`
	Totals struct {
		FuelKg  float64 `json:"fuel_kg"`
		TimeMin float64 `json:"time_min"`
	} `json:"totals"`
	Violations []struct{ Limit string } `json:"violations"`
	Arrival    *struct {
		TargetUTC  string  `json:"target_utc"`
		ArrivalUTC string  `json:"arrival_utc"`
		CIUsed     float64 `json:"ci_used"`
		Met        bool    `json:"met"`
		Slowest    *struct {
			ArrivalUTC string `json:"arrival_utc"`
		} `json:"slowest"`
		Fastest *struct {
			ArrivalUTC string `json:"arrival_utc"`
		} `json:"fastest"`
	} `json:"arrival"`
	Delay *struct {
		CIUsed      float64 `json:"ci_used"`
		DelayMin    float64 `json:"delay_min"`
		DelayCostKg float64 `json:"delay_cost_kg"`
		TotalKg     float64 `json:"total_kg"`
	} `json:"delay_cost"`
}

func parseDoc(t *testing.T, out string) arrivalDoc {
	t.Helper()
	var d arrivalDoc
	dec := json.NewDecoder(strings.NewReader(out))
	if err := dec.Decode(&d); err != nil {
		t.Fatalf("%v: %.300s", err, out)
	}
	return d
}

func mustTime(t *testing.T, s string) time.Time {
	t.Helper()
	v, err := time.Parse(time.RFC3339, s)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestPlanArriveBy: plan --arrive-by reports the target, window, CI and
// arrival in every format; the arrival the test computes from the
// document's own departure and trip time lies in the window when the
// plan says met; an unreachable window exits 2 after the output with the
// violation and both ends of the speed range.
func TestPlanArriveBy(t *testing.T) {
	fs := demoFiles(t)
	base := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--depart", "2026-12-01T20:00:00Z"}
	code, out, errs := runCLI(t, append(base, "--arrive-by", "2026-12-01T21:27:00Z", "--arrive-window", "-2m,+2m", "--format", "json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	d := parseDoc(t, out)
	if d.Arrival == nil || !d.Arrival.Met || d.Arrival.CIUsed != d.CI || d.Status != "ok" {
		t.Fatalf("arrival %+v, ci %g, status %s", d.Arrival, d.CI, d.Status)
	}
	// RFC 3339 keeps whole seconds: the window's ends are whole minutes.
	arr := mustTime(t, d.Depart).Add(time.Duration(d.Totals.TimeMin * float64(time.Minute)))
	if arr.Before(mustTime(t, "2026-12-01T21:25:00Z")) || arr.After(mustTime(t, "2026-12-01T21:29:00Z")) {
		t.Errorf("departure + trip time = %s, outside 21:25-21:29", arr)
	}
	// The fuel plan (--zfw alone) is searched over the CI the same way.
	fuelBase := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--zfw", "30000", "--depart", "2026-12-01T20:00:00Z"}
	code, out, errs = runCLI(t, append(fuelBase, "--arrive-by", "2026-12-01T21:27:00Z", "--arrive-window", "-2m,+2m", "--format", "json")...)
	fd := parseDoc(t, out)
	farr := mustTime(t, fd.Depart).Add(time.Duration(fd.Totals.TimeMin * float64(time.Minute)))
	if code != 0 || fd.Arrival == nil || !fd.Arrival.Met || farr.Before(mustTime(t, "2026-12-01T21:25:00Z")) || farr.After(mustTime(t, "2026-12-01T21:29:00Z")) {
		t.Errorf("fuel plan: exit %d %s, arrival %+v, departure + trip time %s", code, errs, fd.Arrival, farr)
	}
	code, out, _ = runCLI(t, append(base, "--arrive-by", "2026-12-01T21:27:00Z", "--arrive-window", "-2m,+2m")...)
	if code != 0 || !strings.Contains(out, "Arrival  target 2026-12-01T21:27:00Z, window -2m..+2m") || !strings.Contains(out, "planned arrival") {
		t.Errorf("table: exit %d\n%s", code, out)
	}
	code, out, _ = runCLI(t, append(base, "--arrive-by", "2026-12-01T21:27:00Z", "--arrive-window", "-2m,+2m", "--format", "csv")...)
	if recs, err := csv.NewReader(strings.NewReader(out)).ReadAll(); code != 0 || err != nil || !strings.Contains(strings.Join(recs[0], ","), "arrive_by_utc,window_early_min,window_late_min,ci_used,arrival_utc,arrival_met") {
		t.Errorf("csv: exit %d, %v, %q", code, err, recs[0])
	}
	// Unreachable: faster than the fastest plan.
	code, out, errs = runCLI(t, append(base, "--arrive-by", "2026-12-01T21:05:00Z", "--arrive-window", "-2m,+2m", "--format", "json")...)
	d = parseDoc(t, out)
	if code != 2 || d.Arrival == nil || d.Arrival.Met || d.Arrival.Slowest == nil || d.Arrival.Fastest == nil || d.Status != "violations" ||
		len(d.Violations) == 0 || d.Violations[len(d.Violations)-1].Limit != "arrival-window" || !strings.Contains(errs, "cannot be met") {
		t.Errorf("unreachable: exit %d, %+v, status %s, violations %v, stderr %s", code, d.Arrival, d.Status, d.Violations, errs)
	} else if fa := mustTime(t, d.Arrival.Fastest.ArrivalUTC); !fa.After(mustTime(t, "2026-12-01T21:07:00Z")) {
		t.Errorf("reported unreachable, but the fastest plan arrives %s", fa)
	}
	// Zero-valued options: no arrival in the document.
	if _, out, _ := runCLI(t, append(base, "--format", "json")...); strings.Contains(out, `"arrival"`) || strings.Contains(out, `"delay_cost"`) {
		t.Errorf("a plan without a target carries arrival fields")
	}
}

// TestPlanDelayCost: the document's objective is fuel + CI x time + the
// delay cost of its lateness, recomputed here from the file's points with
// the test's own interpolation (lateCostCLI), and the CI flown is the
// one reported.
func TestPlanDelayCost(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	file := filepath.Join(dir, "delay.csv")
	if err := os.WriteFile(file, []byte("# grace 2 min\nminutes_late,cost_kg\n0,0\n2,0\n30,6000\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--depart", "2026-12-01T20:00:00Z",
		"--ci", "10", "--arrive-by", "2026-12-01T21:22:00Z", "--delay-cost", file, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	d := parseDoc(t, out)
	if d.Delay == nil || d.Delay.CIUsed != d.CI {
		t.Fatalf("delay %+v, ci %g", d.Delay, d.CI)
	}
	late := mustTime(t, d.Depart).Add(time.Duration(d.Totals.TimeMin * float64(time.Minute))).Sub(mustTime(t, "2026-12-01T21:22:00Z")).Minutes()
	dc := 0.0
	if late > 2 {
		dc = (late - 2) * 6000 / 28
	}
	if want := d.Totals.FuelKg + 10*d.Totals.TimeMin + dc; math.Abs(d.Delay.TotalKg-want) > 1e-6*want || math.Abs(d.Delay.DelayMin-late) > 1e-6 {
		t.Errorf("total %v kg, want %v (late %.3f min, delay %v kg); reported late %v", d.Delay.TotalKg, want, late, dc, d.Delay.DelayMin)
	}
}

// TestArrivalBadInput: every bad arrival input exits 2 naming the value.
func TestArrivalBadInput(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	write := func(name, data string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	falling := write("falling.csv", "minutes_late,cost_kg\n0,0\n30,3000\n40,100\n")
	nan := write("nan.csv", "minutes_late,cost_kg\n0,0\nNaN,5\n")
	good := write("good.csv", "minutes_late,cost_kg\n0,0\n30,3000\n")
	base := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--depart", "2026-12-01T20:00:00Z"}
	by := []string{"--arrive-by", "2026-12-01T21:27:00Z"}
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"before departure", append(base, "--arrive-by", "2026-12-01T19:00:00Z"), []string{"2026-12-01T19:00:00Z", "departure"}},
		{"malformed time", append(base, "--arrive-by", "21:27"), []string{`"21:27"`}},
		{"reversed window", append(append(base, by...), "--arrive-window", "+2m,-2m"), []string{"+2m,-2m", "reversed"}},
		{"one-ended window", append(append(base, by...), "--arrive-window", "2m"), []string{`"2m"`}},
		{"non-finite window", append(append(base, by...), "--arrive-window", "-Infm,+2m"), []string{"-Infm"}},
		{"window without arrive-by", append(base, "--arrive-window", "-2m,+2m"), []string{"--arrive-by"}},
		{"falling delay cost", append(append(base, by...), "--delay-cost", falling), []string{"falling.csv", "line 4", `"100"`}},
		{"non-finite delay cost", append(append(base, by...), "--delay-cost", nan), []string{"nan.csv", "line 3", `"NaN"`}},
		{"missing delay cost", append(append(base, by...), "--delay-cost", filepath.Join(dir, "none.csv")), []string{"none.csv"}},
		{"delay cost and window", append(append(base, by...), "--delay-cost", good, "--arrive-window", "-2m,+2m"), []string{"--arrive-window"}},
		{"alternatives", append(append(base, by...), "--alternatives", "2"), []string{"--alternatives"}},
		{"batch falling delay cost", []string{"batch", "--schedule", fs.Schedule, "--out", filepath.Join(dir, "o"), "--delay-cost", falling}, []string{"falling.csv", "line 4", `"100"`}},
	}
	for _, c := range cases {
		code, _, errs := runCLI(t, c.args...)
		if code != 2 {
			t.Errorf("%s: exit %d, want 2: %s", c.name, code, errs)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%s: %q does not name %q", c.name, errs, w)
			}
		}
	}
}

// readCSVFile reads a CSV file into maps by column name.
func readCSVFile(t *testing.T, path string) []map[string]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = r[i]
		}
		out = append(out, m)
	}
	return out
}

// arrivalParquet reads back the arrival columns of results.parquet.
type arrivalParquet struct {
	Flight   string   `parquet:"flight"`
	CI       float64  `parquet:"ci"`
	Arrival  *int64   `parquet:"arrival_utc,optional"`
	ArriveBy *int64   `parquet:"arrive_by_utc,optional"`
	Window   string   `parquet:"arrive_window"`
	CIUsed   *float64 `parquet:"ci_used,optional"`
	DelayMin *float64 `parquet:"delay_min,optional"`
	OnTime   *bool    `parquet:"on_time,optional"`
}

// TestBatchArrivalColumns: a schedule with arrive_by rows gets ci_used,
// delay_min and on_time in results.csv and results.parquet, consistent
// with its own arrival_utc and window; the sweep's summary counts the
// flights on time per CI as the test counts them from results.csv; a
// schedule without the columns keeps its files' columns.
func TestBatchArrivalColumns(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	sched := filepath.Join(dir, "s.csv")
	rows := "flight,departure,route,aircraft,tow_kg,ci,arrive_by,arrive_window\n" +
		"A1,2026-12-01T20:00:00Z," + fs.Routes[3] + ",demo-regional,36000,0,2026-12-01T21:27:00Z,\"-2m,+2m\"\n" +
		"A2,2026-12-01T20:00:00Z," + fs.Routes[3] + ",demo-regional,35000,20,2026-12-01T21:40:00Z,\n" +
		"A3,2026-12-01T20:00:00Z," + fs.Routes[3] + ",demo-regional,35000,20,,\n"
	if err := os.WriteFile(sched, []byte(rows), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	code, table, errs := runCLI(t, "batch", "--schedule", sched, "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(table, "Arrival targets: 2/2 (100 %)") {
		t.Errorf("batch table does not count the flights on time:\n%s", table)
	}
	res := readCSVFile(t, filepath.Join(out, "results.csv"))
	windows := map[string][2]time.Duration{"A1": {-2 * time.Minute, 2 * time.Minute}, "A2": {-100 * time.Minute, 0}}
	for _, r := range res {
		arr := mustTime(t, r["arrival_utc"])
		w, target := windows[r["flight"]]
		if !target {
			if r["arrive_by_utc"] != "" || r["ci_used"] != r["ci"] || r["on_time"] != "" {
				t.Errorf("%s without a target: %v", r["flight"], r)
			}
			continue
		}
		by := mustTime(t, r["arrive_by_utc"])
		delay, err := strconv.ParseFloat(r["delay_min"], 64)
		// results.csv keeps arrival to the second and delay to 0.01 min.
		if err != nil || math.Abs(delay-arr.Sub(by).Minutes()) > 0.02 {
			t.Errorf("%s: delay_min %q, arrival %s, target %s", r["flight"], r["delay_min"], arr, by)
		}
		in := !arr.Before(by.Add(w[0]).Add(-time.Second)) && !arr.After(by.Add(w[1]).Add(time.Second))
		if r["on_time"] != "true" || !in || r["status"] != "ok" && r["status"] != "warning" {
			t.Errorf("%s: on_time %q, status %s, arrival %s, window %v around %s", r["flight"], r["on_time"], r["status"], arr, w, by)
		}
	}
	pq, err := parquet.ReadFile[arrivalParquet](filepath.Join(out, "results.parquet"))
	if err != nil || len(pq) != 3 || pq[0].CIUsed == nil || pq[0].OnTime == nil || !*pq[0].OnTime || pq[0].Window != "-2m,+2m" || pq[2].ArriveBy != nil {
		t.Errorf("parquet %+v %v", pq, err)
	}
	// A sweep measures arrival at each CI; the summary counts on-time plans.
	sw := filepath.Join(dir, "sweep")
	if code, _, errs := runCLI(t, "batch", "--schedule", sched, "--out", sw, "--ci-sweep", "0,20,500"); code != 0 {
		t.Fatalf("sweep: exit %d: %s", code, errs)
	}
	count := map[string]int{}
	for _, r := range readCSVFile(t, filepath.Join(sw, "results.csv")) {
		if r["arrive_by_utc"] == "" {
			continue
		}
		arr, by := mustTime(t, r["arrival_utc"]), mustTime(t, r["arrive_by_utc"])
		w := windows[r["flight"]]
		if !arr.Before(by.Add(w[0])) && !arr.After(by.Add(w[1])) {
			count[r["ci"]]++
		}
		if r["ci_used"] != r["ci"] {
			t.Errorf("sweep flies the sweep's CI: %v", r)
		}
	}
	summary := readCSVFile(t, filepath.Join(sw, "summary.csv"))
	if len(summary) != 3 {
		t.Fatalf("summary has %d CIs, want 3", len(summary))
	}
	for _, s := range summary {
		if s["with_arrive_by"] != "2" || s["on_time"] != strconv.Itoa(count[s["ci"]]) {
			t.Errorf("summary CI %s: with_arrive_by %s, on_time %s; counted %d", s["ci"], s["with_arrive_by"], s["on_time"], count[s["ci"]])
		}
	}
	// Without the columns: the files keep today's columns.
	plain := filepath.Join(dir, "plain")
	if code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--out", plain, "--ci-sweep", "0,20"); code != 0 {
		t.Fatalf("plain: exit %d: %s", code, errs)
	}
	for _, f := range []string{"results.csv", "summary.csv"} {
		data, err := os.ReadFile(filepath.Join(plain, f))
		if err != nil || strings.Contains(string(data), "arrive_by") || strings.Contains(string(data), "on_time") {
			t.Errorf("%s of a schedule without targets carries arrival columns (%v)", f, err)
		}
	}
}
