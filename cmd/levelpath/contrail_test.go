package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"levelpath/cmd/levelpath/internal/demo"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// dryWeatherFile writes the demo weather without its humidity.
func dryWeatherFile(t *testing.T) string {
	t.Helper()
	var msgs []winds.Message
	for _, m := range synthetic.Weather(demo.Ref()) {
		if m.Param != winds.ParamRH {
			msgs = append(msgs, m)
		}
	}
	var buf bytes.Buffer
	if err := winds.WriteGRIB2(&buf, msgs); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "dry.grib2")
	if err := os.WriteFile(p, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// --contrail-cost 0 prints exactly what no option prints, in every
// format, for plan and assess; a positive cost changes the profile on the
// demo flight through an invented ice-supersaturated layer and lowers its
// persistent-contrail distance; legs carry their contrail class in JSON,
// the table and the CSV.
func TestContrailCostCLI(t *testing.T) {
	fs := demoFiles(t)
	args := []string{"--route", fs.Routes[2], "--aircraft", "demo-narrowbody", "--mass", "70000", "--weather", fs.Weather,
		"--depart", "2026-12-01T21:00:00Z", "--ci", "0"}
	for _, cmd := range [][]string{{"plan"}, {"assess", "--profile", "FL340,FL360@194"}} {
		for _, f := range []string{"table", "json", "csv"} {
			base := append(append(append([]string{}, cmd...), args...), "--format", f)
			c1, o1, e1 := runCLI(t, base...)
			c2, o2, _ := runCLI(t, append(base, "--contrail-cost", "0")...)
			if c1 != 0 || c2 != 0 || o1 != o2 {
				t.Errorf("%s --format %s: --contrail-cost 0 differs (exit %d, %d) %s", cmd[0], f, c1, c2, e1)
			}
		}
	}
	get := func(extra ...string) map[string]any {
		return planJSON(t, append(append([]string{"plan"}, args...), extra...)...)
	}
	zero, cost := get(), get("--contrail-cost", "20")
	zc, cc := zero["contrail"].(map[string]any), cost["contrail"].(map[string]any)
	if !(cc["persistent_contrail_nm"].(float64) < zc["persistent_contrail_nm"].(float64)) || zero["profile"] == cost["profile"] {
		t.Errorf("--contrail-cost 20: %v, %v NM; without %v, %v NM", cost["profile"], cc["persistent_contrail_nm"], zero["profile"], zc["persistent_contrail_nm"])
	}
	if !strings.Contains(zc["caution"].(string), "not a guarantee of avoidance") {
		t.Errorf("contrail caution %q", zc["caution"])
	}
	classes := map[string]int{}
	for _, l := range zero["legs"].([]any) {
		leg := l.(map[string]any)
		c, _ := leg["contrail"].(string)
		if (leg["phase"] == "cruise") != (c != "") {
			t.Errorf("%s leg with contrail %q", leg["phase"], c)
		}
		classes[c]++
	}
	if classes["persistent"] == 0 {
		t.Errorf("classes %v: no persistent leg on the demo flight", classes)
	}
	_, out, _ := runCLI(t, append(append([]string{"plan"}, args...), "--format", "csv")...)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(rows) < 3 || rows[0][17] != "contrail" || rows[2][17] == "" {
		t.Errorf("CSV contrail column: %v %v", err, rows[:min(3, len(rows))])
	}
	_, out, _ = runCLI(t, append([]string{"plan"}, args...)...)
	if !strings.Contains(out, "Contrails persistent") || !strings.Contains(out, "persistent\n") && !strings.Contains(out, " persistent ") {
		t.Errorf("table lacks the contrail summary or column:\n%s", out)
	}
}

// Bad contrail costs exit 2 naming the value; a cost with weather that
// has no humidity names the file; without weather says so.
func TestContrailCostBadCLI(t *testing.T) {
	fs := demoFiles(t)
	base := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--depart", "2026-12-01T21:00:00Z"}
	dry := dryWeatherFile(t)
	for _, c := range []struct {
		extra []string
		want  string
	}{
		{[]string{"--weather", fs.Weather, "--contrail-cost", "-1"}, "--contrail-cost -1"},
		{[]string{"--weather", fs.Weather, "--contrail-cost", "NaN"}, "--contrail-cost NaN"},
		{[]string{"--weather", fs.Weather, "--contrail-cost", "Inf"}, "--contrail-cost +Inf"},
		{[]string{"--weather", fs.Weather, "--contrail-cost", "5", "--contrail-rhi", "300"}, "--contrail-rhi 300"},
		{[]string{"--weather", dry, "--contrail-cost", "5"}, "dry.grib2 holds no humidity"},
		{[]string{"--contrail-cost", "5"}, "needs --weather"},
	} {
		code, _, errs := runCLI(t, append(append([]string{}, base...), c.extra...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 naming %q", c.extra, code, errs, c.want)
		}
	}
	// The dry weather without a cost plans as before, without contrail figures.
	code, out, errs := runCLI(t, append(append([]string{}, base...), "--weather", dry, "--format", "json")...)
	var d map[string]any
	if code != 0 || json.Unmarshal([]byte(out), &d) != nil || d["contrail"] != nil {
		t.Errorf("dry weather: exit %d %s, contrail %v", code, errs, d["contrail"])
	}
}

// batch: --contrail-cost 0 writes the same results.csv and summary as no
// option; --contrail-sweep prints a line per cost whose persistent
// distance never rises and fuel never falls with the cost, with CO2 3.16
// x fuel (ICAO Carbon Emissions Calculator Methodology), day + night =
// persistent, a changed share within 0..100 % and 0 at the reference; it
// writes contrail_sweep.csv and the trade-off chart. Bad sweeps exit 2.
func TestBatchContrail(t *testing.T) {
	fs := demoFiles(t)
	sched := filepath.Join(fs.Dir, "sched-contrail.csv")
	os.WriteFile(sched, []byte("flight,departure,route,aircraft,tow_kg,ci\n"+
		"C1,2026-12-01T21:00:00Z,route-sunhaven.geojson,demo-narrowbody,70000,0\n"+
		"C2,2026-12-01T20:00:00Z,route.geojson,demo-widebody,230000,0\n"+
		"C3,2026-12-01T21:00:00Z,route-lakeport.geojson,demo-regional,36000,10\n"), 0o644)
	dir := t.TempDir()
	run := func(out string, extra ...string) (int, string, string) {
		return runCLI(t, append([]string{"batch", "--schedule", sched, "--weather", fs.Weather, "--out", filepath.Join(dir, out)}, extra...)...)
	}
	c1, o1, e1 := run("a")
	c2, o2, _ := run("b", "--contrail-cost", "0")
	r1, _ := os.ReadFile(filepath.Join(dir, "a", "results.csv"))
	r2, _ := os.ReadFile(filepath.Join(dir, "b", "results.csv"))
	if c1 != 0 || c2 != 0 || o1 != o2 || !bytes.Equal(r1, r2) || len(r1) == 0 {
		t.Fatalf("--contrail-cost 0: exit %d/%d %s; outputs equal %v, results equal %v", c1, c2, e1, o1 == o2, bytes.Equal(r1, r2))
	}
	code, out, errs := run("s", "--contrail-sweep", "0,2,20,100", "--format", "json", "--chart", filepath.Join(dir, "tradeoff.svg"))
	if code != 0 {
		t.Fatalf("sweep: exit %d %s", code, errs)
	}
	var doc struct {
		Sweep []contrailLine `json:"contrail_sweep"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Sweep) != 4 {
		t.Fatalf("sweep JSON: %v\n%s", err, out)
	}
	for i, l := range doc.Sweep {
		if l.Flights != 3 || abs(l.CO2Kg-3.16*l.FuelKg) > 1e-6*l.FuelKg || abs(l.DayNM+l.NightNM-l.PersistentNM) > 1e-6 {
			t.Errorf("line %d: %+v", i, l)
		}
		if l.ChangedPct == nil || *l.ChangedPct < 0 || *l.ChangedPct > 100 || i == 0 && *l.ChangedPct != 0 {
			t.Errorf("line %d: changed %v", i, l.ChangedPct)
		}
		if i > 0 && (l.PersistentNM > doc.Sweep[i-1].PersistentNM+1e-9 || l.FuelKg < doc.Sweep[i-1].FuelKg-1e-9) {
			t.Errorf("cost %v: persistent %.1f NM, fuel %.1f kg after %.1f NM, %.1f kg", l.CostPerNM, l.PersistentNM, l.FuelKg, doc.Sweep[i-1].PersistentNM, doc.Sweep[i-1].FuelKg)
		}
	}
	if last := doc.Sweep[3]; !(last.PersistentNM < doc.Sweep[0].PersistentNM) || *last.ChangedPct == 0 {
		t.Errorf("the sweep avoided nothing: %+v", doc.Sweep)
	}
	for _, f := range []string{"s/contrail_sweep.csv", "s/contrail-0/results.csv", "s/contrail-100/results.csv", "tradeoff.svg"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s: %v", f, err)
		}
	}
	dry := dryWeatherFile(t)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--contrail-sweep", "0,-5"}, `"-5"`},
		{[]string{"--contrail-sweep", "0,5,5"}, "twice"},
		{[]string{"--contrail-sweep", "0,5", "--ci-sweep", "0,10"}, "--ci-sweep"},
		{[]string{"--contrail-sweep", "0,5", "--contrail-cost", "5"}, "not both"},
		{[]string{"--contrail-cost", "-2"}, "--contrail-cost -2"},
		{[]string{"--contrail-sweep", "0,5"}, "dry.grib2 holds no humidity"},
	} {
		weather := fs.Weather
		if strings.Contains(c.want, "dry") {
			weather = dry
		}
		code, _, errs := runCLI(t, append([]string{"batch", "--schedule", sched, "--weather", weather, "--out", filepath.Join(dir, "bad")}, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d %q, want 2 naming %q", c.args, code, errs, c.want)
		}
	}
}

// The profile chart shades persistent-contrail conditions and the report
// lists the contrail legs with the contrail caution, when the weather
// holds humidity; with dry weather neither appears.
func TestContrailChartAndReport(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	dry := dryWeatherFile(t)
	for _, c := range []struct {
		weather string
		want    bool
	}{{fs.Weather, true}, {dry, false}} {
		svg, html := filepath.Join(dir, "p.svg"), filepath.Join(dir, "r.html")
		code, _, errs := runCLI(t, "plan", "--route", fs.Routes[0], "--aircraft", "demo-widebody", "--mass", "245000", "--weather", c.weather,
			"--depart", "2026-12-01T20:00:00Z", "--ci", "40", "--chart", svg, "--report", html)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		s, _ := os.ReadFile(svg)
		h, _ := os.ReadFile(html)
		if got := strings.Contains(string(s), "persistent contrail conditions"); got != c.want {
			t.Errorf("%s: chart shading legend %v, want %v", c.weather, got, c.want)
		}
		for _, w := range []string{"<h2>Contrails</h2>", "not a guarantee of avoidance", "persistent (RHi", `href="#leg-`} {
			if got := strings.Contains(string(h), w); got != c.want && !(w == `href="#leg-` && !c.want) {
				t.Errorf("%s: report has %q: %v, want %v", c.weather, w, got, c.want)
			}
		}
	}
}
