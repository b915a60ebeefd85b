package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"errors"
	pngdec "image/png"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/spf13/cobra"

	"levelpath/cmd/levelpath/internal/demo"
	"levelpath/winds"
)

// runCLI runs the command line and returns exit code, stdout and stderr.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

var (
	scenarioOnce sync.Once
	scenario     demo.Files
	scenarioErr  error
)

// demoFiles writes the invented scenario once for all tests.
func demoFiles(t *testing.T) demo.Files {
	t.Helper()
	scenarioOnce.Do(func() {
		dir, err := os.MkdirTemp("", "levelpath-cli-")
		if err != nil {
			scenarioErr = err
			return
		}
		scenario, scenarioErr = demo.Write(dir)
	})
	if scenarioErr != nil {
		t.Fatal(scenarioErr)
	}
	return scenario
}

func TestMain(m *testing.M) {
	code := m.Run()
	if scenario.Dir != "" {
		os.RemoveAll(scenario.Dir)
	}
	os.Exit(code)
}

func TestVersionAndHelp(t *testing.T) {
	if code, out, _ := runCLI(t, "--version"); code != 0 || !strings.Contains(out, version) {
		t.Errorf("--version: code %d, %q", code, out)
	}
	if code, out, _ := runCLI(t, "--help"); code != 0 || !strings.Contains(out, "not certified for operational use") {
		t.Errorf("--help: code %d, caution missing", code)
	}
	if code, _, _ := runCLI(t, "completion", "bash"); code != 0 {
		t.Errorf("completion bash: code %d", code)
	}
}

func TestEnvelopeJSON(t *testing.T) {
	code, out, errs := runCLI(t, "envelope", "--aircraft", "demo-widebody", "--mass", "231000", "--isa-dev", "10", "--format", "json")
	if code != 0 {
		t.Fatalf("code %d: %s", code, errs)
	}
	var d map[string]any
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"aircraft", "mass_kg", "isa_dev_c", "floor_g", "max_fl_buffet", "max_fl_thrust", "max_fl_certified", "max_fl", "optimum_fl", "rows", "caution"} {
		if _, ok := d[k]; !ok {
			t.Errorf("envelope JSON lacks %q", k)
		}
	}
	rows := d["rows"].([]any)
	row := rows[0].(map[string]any)
	for _, k := range []string{"fl", "pressure_hpa", "oat_c", "sound_kt", "low_buffet_mach_1g", "high_buffet_mach_1g", "low_buffet_mach_floor", "high_buffet_mach_floor", "mmo", "lrc_mach", "residual_climb_fpm"} {
		if _, ok := row[k]; !ok {
			t.Errorf("envelope row lacks %q", k)
		}
	}
	// FL100 at ISA+10: OAT is the ISA temperature at 10,000 ft (-4.81 °C,
	// U.S. Standard Atmosphere 1976) plus 10.
	if fl, oat := row["fl"].(float64), row["oat_c"].(float64); fl != 100 || abs(oat-(-4.812+10)) > 0.01 {
		t.Errorf("first row FL%.0f OAT %.3f °C, want FL100 and 5.188 °C", fl, oat)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// TestBadInput: each bad input exits 2 with a message naming what is wrong.
func TestBadInput(t *testing.T) {
	fs := demoFiles(t)
	bad := filepath.Join(t.TempDir(), "bad.yaml")
	os.WriteFile(bad, []byte("name: x\noew_kg: [1,\n"), 0o644)
	base := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional"}
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"unknown aircraft", []string{"envelope", "--aircraft", "nope", "--mass", "1000"}, "demo-widebody"},
		{"mass below OEW", []string{"envelope", "--aircraft", "demo-widebody", "--mass", "1000"}, "1000"},
		{"floor under 1", []string{"envelope", "--aircraft", "demo-widebody", "--mass", "200000", "--floor", "0.9"}, "floor"},
		{"malformed YAML", []string{"envelope", "--aircraft", bad, "--mass", "200000"}, "bad.yaml"},
		{"bad format", []string{"envelope", "--aircraft", "demo-widebody", "--mass", "200000", "--format", "xml"}, "--format"},
		{"mass over MTOW", append(base, "--mass", "99000"), "MTOW"},
		{"fuel over capacity", []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--zfw", "25000", "--fuel", "90000"}, "fuel capacity"},
		{"route missing", []string{"plan", "--route", "/nonexistent/route.geojson", "--aircraft", "demo-regional", "--mass", "35000"}, "route.geojson"},
		{"weather missing", append(base, "--mass", "35000", "--weather", "/nonexistent/wx.grib2"), "wx.grib2"},
		{"weather off the route", append(base, "--mass", "35000", "--weather", "../../testdata/winds/g2_regional.grib2", "--depart", "2024-01-15T06:00:00Z"), "weather"},
		{"no feasible level", append(base, "--mass", "39000", "--floor", "2.4", "--min-fl", "390"), "no feasible profile"},
		{"malformed profile", []string{"assess", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "35000", "--profile", "FL350,FL370"}, "FL370"},
		{"bad speed", append(base, "--mass", "35000", "--speed", "fast"), "speed"},
		{"unknown flag", []string{"plan", "--nonsense"}, "nonsense"},
		{"bad depart", append(base, "--mass", "35000", "--depart", "tomorrow"), "--depart"},
		{"report not HTML", append(base, "--mass", "35000", "--report", "r.txt"), "r.txt"},
		{"chart directory missing", append(base, "--mass", "35000", "--chart", "/nonexistent/p.svg"), "/nonexistent"},
		{"envelope chart directory missing", []string{"envelope", "--aircraft", "demo-widebody", "--mass", "200000", "--chart", "/nonexistent/e.png"}, "/nonexistent"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errs := runCLI(t, c.args...)
			if code != 2 {
				t.Errorf("exit %d, want 2; stderr %q", code, errs)
			}
			if !strings.Contains(errs, c.want) {
				t.Errorf("stderr %q does not name %q", errs, c.want)
			}
		})
	}
}

func planJSON(t *testing.T, args ...string) map[string]any {
	t.Helper()
	code, out, errs := runCLI(t, append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	var d map[string]any
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	return d
}

// TestPlanAndAssess: the plan JSON carries the documented fields and the
// caution; assessing the plan's own profile gives the plan's cost.
func TestPlanAndAssess(t *testing.T) {
	fs := demoFiles(t)
	args := []string{"--route", fs.Routes[2], "--aircraft", "demo-narrowbody", "--mass", "72000", "--weather", fs.Weather,
		"--depart", "2026-12-01T21:00:00Z", "--ci", "20"}
	d := planJSON(t, append([]string{"plan"}, args...)...)
	for _, k := range []string{"caution", "aircraft", "ci", "floor_g", "totals", "legs", "steps", "baseline", "profile", "warnings"} {
		if _, ok := d[k]; !ok {
			t.Errorf("plan JSON lacks %q", k)
		}
	}
	if !strings.Contains(d["caution"].(string), "not certified") {
		t.Errorf("caution %q", d["caution"])
	}
	tot := d["totals"].(map[string]any)
	for _, k := range []string{"fuel_kg", "time_min", "cost", "co2_kg", "landing_mass_kg"} {
		if _, ok := tot[k]; !ok {
			t.Errorf("totals lack %q", k)
		}
	}
	// CO2 = 3.16 x fuel (ICAO); cost = fuel + CI x minutes.
	fuel, tm, cost := tot["fuel_kg"].(float64), tot["time_min"].(float64), tot["cost"].(float64)
	if abs(tot["co2_kg"].(float64)-3.16*fuel) > 1e-6*fuel || abs(cost-(fuel+20*tm)) > 1e-6*cost {
		t.Errorf("totals inconsistent: %v", tot)
	}
	leg := d["legs"].([]any)[1].(map[string]any)
	for _, k := range []string{"from_nm", "to_nm", "phase", "fl", "mach", "tas_kt", "wind_kt", "gs_kt", "isa_dev_c", "fuel_kg", "time_min", "mass_start_kg", "buffet_margin_g", "floor_g"} {
		if _, ok := leg[k]; !ok {
			t.Errorf("leg lacks %q", k)
		}
	}
	a := planJSON(t, append([]string{"assess", "--profile", d["profile"].(string)}, args...)...)
	acost := a["totals"].(map[string]any)["cost"].(float64)
	if abs(acost-cost) > 1e-6*cost {
		t.Errorf("assess of the plan's profile %s costs %.3f, the plan %.3f", d["profile"], acost, cost)
	}
	if v := a["violations"].([]any); len(v) != 0 {
		t.Errorf("the plan's own profile breaks limits: %v", v)
	}
	// A southbound flight at an odd level breaks the semicircular rule
	// (ICAO Annex 2, Appendix 3): priced, with its violations listed.
	a = planJSON(t, append([]string{"assess", "--profile", "FL330"}, args...)...)
	found := false
	for _, v := range a["violations"].([]any) {
		found = found || v.(map[string]any)["limit"] == "level-rule"
	}
	if !found {
		t.Errorf("FL330 southbound: no level-rule violation in %v", a["violations"])
	}
	// A profile the aircraft cannot climb to is priced as far as the
	// climb goes, with a climb violation naming the level (exit 0).
	a = planJSON(t, append([]string{"assess", "--profile", "FL410"}, args...)...)
	found = false
	for _, v := range a["violations"].([]any) {
		vm := v.(map[string]any)
		found = found || vm["limit"] == "climb" && strings.Contains(vm["detail"].(string), "FL410")
	}
	if !found {
		t.Errorf("FL410 at 72 t: no climb violation naming FL410 in %v", a["violations"])
	}
}

func TestTableCarriesCaution(t *testing.T) {
	fs := demoFiles(t)
	code, out, errs := runCLI(t, "plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"Steps", "Legs", "not certified for operational use", "no weather given"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q", want)
		}
	}
}

func TestDemo(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "d")
	code, out, errs := runCLI(t, "demo", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "Profile") || !strings.Contains(out, "not certified") || !strings.Contains(errs, "levelpath plan --route") {
		t.Errorf("demo output lacks the plan, the caution or the command:\n%s\n%s", out, errs)
	}
	for _, f := range []string{"route.geojson", "weather.grib2", "schedule.csv"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Error(err)
		}
	}
}

func TestGridCommands(t *testing.T) {
	fs := demoFiles(t)
	code, out, errs := runCLI(t, "grid", "info", fs.Weather, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var msgs []map[string]any
	if err := json.Unmarshal([]byte(out), &msgs); err != nil || len(msgs) == 0 {
		t.Fatalf("grid info JSON: %v", err)
	}
	for _, k := range []string{"edition", "discipline", "category", "number", "parameter", "level_hpa", "ref_time", "valid_time", "ni", "nj", "lat1", "lon1", "lat2", "lon2", "packing"} {
		if _, ok := msgs[0][k]; !ok {
			t.Errorf("grid info lacks %q", k)
		}
	}
	code, out, errs = runCLI(t, "grid", "sample", fs.Weather, "--at", "50,-30", "--hpa", "250", "--time", "2026-12-02T00:00:00Z", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var s map[string]any
	json.Unmarshal([]byte(out), &s)
	for _, k := range []string{"lat", "lon", "hpa", "time", "u_ms", "v_ms", "t_k", "edr"} {
		if _, ok := s[k]; !ok {
			t.Errorf("grid sample lacks %q", k)
		}
	}
	// --fl 340 is 250.0 hPa in the ICAO standard atmosphere (FL340 = 10,363 m, 250.0 hPa).
	code, out, _ = runCLI(t, "grid", "sample", fs.Weather, "--at", "50,-30", "--fl", "340", "--format", "json")
	json.Unmarshal([]byte(out), &s)
	if code != 0 || abs(s["hpa"].(float64)-250.0) > 0.1 {
		t.Errorf("--fl 340: exit %d, %v hPa", code, s["hpa"])
	}
	if code, _, errs := runCLI(t, "grid", "sample", fs.Weather, "--at", "50,-30", "--hpa", "5"); code != 2 || !strings.Contains(errs, "pressure") && !strings.Contains(errs, "500") && !strings.Contains(errs, "hPa") {
		t.Errorf("sample outside the levels: exit %d, %q", code, errs)
	}
}

// TestBatchCLI: a bad row lands in errors.csv and the run exits 3 while the
// rest succeed; over a CI sweep, CI 0 never burns more fuel than a higher
// CI for the same flight (cost = fuel + CI x time).
func TestBatchCLI(t *testing.T) {
	fs := demoFiles(t)
	sched := filepath.Join(fs.Dir, "sched-test.csv")
	os.WriteFile(sched, []byte("flight,departure,route,aircraft,tow_kg,ci\n"+
		"T1,2026-12-01T21:00:00Z,route-lakeport.geojson,demo-regional,36000,10\n"+
		"T2,2026-12-01T22:00:00Z,route-sunhaven.geojson,demo-narrowbody,70000,20\n"+
		"T3,2026-12-01T22:00:00Z,route-sunhaven.geojson,demo-narrowbody,-5,20\n"), 0o644)
	out := filepath.Join(t.TempDir(), "out")
	code, stdout, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", out, "--ci-sweep", "0,30,100")
	if code != 3 {
		t.Fatalf("exit %d, want 3 (one bad row): %s %s", code, stdout, errs)
	}
	eb, _ := os.ReadFile(filepath.Join(out, "errors.csv"))
	if !strings.Contains(string(eb), "T3") || !strings.Contains(string(eb), "tow_kg") {
		t.Errorf("errors.csv lacks the bad row: %s", eb)
	}
	f, err := os.Open(filepath.Join(out, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	fuel := map[string]map[float64]float64{}
	for _, r := range recs[1:] {
		if r[col["status"]] != "ok" {
			t.Errorf("flight %s ci %s: %s", r[col["flight"]], r[col["ci"]], r[col["status"]])
			continue
		}
		ci, _ := strconv.ParseFloat(r[col["ci"]], 64)
		fu, _ := strconv.ParseFloat(r[col["fuel_kg"]], 64)
		if fuel[r[0]] == nil {
			fuel[r[0]] = map[float64]float64{}
		}
		fuel[r[0]][ci] = fu
	}
	if len(fuel) != 2 {
		t.Fatalf("results for %d flights, want 2", len(fuel))
	}
	for fl, byCI := range fuel {
		for ci, fu := range byCI {
			if ci > 0 && byCI[0] > fu+0.1 {
				t.Errorf("%s: CI 0 burns %.1f kg, CI %g burns %.1f kg", fl, byCI[0], ci, fu)
			}
		}
	}
	if !strings.Contains(stdout, "CI") || !strings.Contains(stdout, "time h:mm") {
		t.Errorf("no sweep table (with h:mm times) on stdout: %s", stdout)
	}
}

// TestRouteCommand: JSON fields, the GeoJSON form, and a bad route naming
// its point. The length is checked against GeographicLib (GeodSolve 2.1.2,
// GeographicLib GeodSolve 2.1.2): (40.6, -73.8) -> (51.6, -0.5) is 5551759.400319 m.
func TestRouteCommand(t *testing.T) {
	code, out, errs := runCLI(t, "route", "40.6,-73.8 51.6,-0.5", "--date", "2026-12-01", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var d map[string]any
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	if got := d["total_nm"].(float64) * 1852; abs(got-5551759.400319) > 0.005 {
		t.Errorf("total %.4f m, GeodSolve 5551759.4003 m", got)
	}
	leg := d["legs"].([]any)[0].(map[string]any)
	for _, k := range []string{"index", "from", "to", "length_nm", "initial_course_deg"} {
		if _, ok := leg[k]; !ok {
			t.Errorf("leg lacks %q", k)
		}
	}
	if c := leg["initial_course_deg"].(float64); abs(c-51.198883) > 1e-6 {
		t.Errorf("initial course %.7f, GeodSolve 51.198883", c)
	}
	seg := d["segments"].([]any)[0].(map[string]any)
	for _, k := range []string{"index", "leg", "from_nm", "to_nm", "length_nm", "start", "end", "true_course_deg", "mag_var_deg", "mag_course_deg", "levels"} {
		if _, ok := seg[k]; !ok {
			t.Errorf("segment lacks %q", k)
		}
	}
	code, out, _ = runCLI(t, "route", "40.6,-73.8 51.6,-0.5", "--date", "2026-12-01", "--format", "geojson")
	var fc struct {
		Type     string
		Features []struct{ Geometry struct{ Type string } }
	}
	if err := json.Unmarshal([]byte(out), &fc); code != 0 || err != nil || fc.Features[0].Geometry.Type != "LineString" {
		t.Errorf("geojson: exit %d, %v, %+v", code, err, fc)
	}
	if code, _, errs := runCLI(t, "route", "40.6,-73.8 95,-0.5"); code != 2 || !strings.Contains(errs, "point 2") {
		t.Errorf("latitude 95: exit %d, %q", code, errs)
	}
}

// TestWeatherCoverage: weather that does not cover the route, and weather
// without winds aloft, are bad input naming the weather.
func TestWeatherCoverage(t *testing.T) {
	fs := demoFiles(t)
	// A regional field over the Pacific: the Lakeport route lies outside.
	dir := t.TempDir()
	var msgs []winds.Message
	ref := demo.Ref()
	for _, h := range []int{0, 24} {
		for _, p := range []float64{30000, 25000, 20000} {
			for _, f := range []struct {
				c, n int
				par  winds.Param
			}{{2, 2, "u"}, {2, 3, "v"}, {0, 0, "t"}} {
				vals := make([]float32, 11*11)
				for i := range vals {
					vals[i] = 220
				}
				msgs = append(msgs, winds.Message{Discipline: 0, Category: f.c, Number: f.n, Param: f.par, LevelType: 100, Level: p,
					RefTime: ref, ValidTime: ref.Add(time.Duration(h) * time.Hour), Ni: 11, Nj: 11, Lat1: 50, Lon1: 150, Lat2: 40, Lon2: 160,
					Di: 1, Dj: 1, Ensemble: -1, Values: vals})
			}
		}
	}
	path := filepath.Join(dir, "pacific.grib2")
	var buf bytes.Buffer
	if err := winds.WriteGRIB2(&buf, msgs); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(path, buf.Bytes(), 0o644)
	code, _, errs := runCLI(t, "plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--weather", path, "--depart", "2026-12-01T20:00:00Z")
	if code != 2 || !strings.Contains(strings.ToLower(errs), "weather") || !strings.Contains(errs, "segment 0") {
		t.Errorf("weather off the route: exit %d, %q", code, errs)
	}
	// The ecCodes fixture g2_regional.grib2 holds temperature only.
	code, _, errs = runCLI(t, "plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--weather", "../../testdata/winds/g2_regional.grib2", "--depart", "2024-01-15T06:00:00Z")
	if code != 2 || !strings.Contains(errs, "no winds aloft") {
		t.Errorf("weather without winds: exit %d, %q", code, errs)
	}
}

// TestCharts: the plan's chart and report and the sweep chart are written;
// the SVG parses as XML and the PNG decodes at 1200 x 700.
func TestCharts(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	svg, png, html := filepath.Join(dir, "p.svg"), filepath.Join(dir, "p.png"), filepath.Join(dir, "r.html")
	args := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--weather", fs.Weather, "--depart", "2026-12-01T20:00:00Z"}
	if code, _, errs := runCLI(t, append(args, "--chart", svg, "--report", html)...); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if code, _, errs := runCLI(t, append(args, "--chart", png)...); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, _ := os.ReadFile(svg)
	dec := xml.NewDecoder(bytes.NewReader(b))
	for {
		if _, err := dec.Token(); err != nil {
			if err != io.EOF {
				t.Errorf("SVG does not parse: %v", err)
			}
			break
		}
	}
	f, _ := os.Open(png)
	img, err := pngdec.Decode(f)
	f.Close()
	if err != nil || img.Bounds().Dx() != 1200 || img.Bounds().Dy() != 700 {
		t.Errorf("PNG: %v %v", err, img)
	}
	// Nothing loaded from elsewhere: no src attribute, no link, no href to
	// a URL (the SVG namespace declarations are names, not loads).
	rb, _ := os.ReadFile(html)
	page := string(rb)
	if !strings.Contains(page, "not certified") || strings.Contains(page, "src=") || strings.Contains(page, "<link") || strings.Contains(page, `href="http`) {
		t.Errorf("report lacks the caution or loads from the network")
	}
	if code, _, errs := runCLI(t, append(args, "--chart", filepath.Join(dir, "p.gif"))...); code != 2 || !strings.Contains(errs, "p.gif") {
		t.Errorf("--chart p.gif: exit %d, %q", code, errs)
	}
	sched := filepath.Join(fs.Dir, "sched-chart.csv")
	os.WriteFile(sched, []byte("flight,departure,route,aircraft,tow_kg,ci\nC1,2026-12-01T21:00:00Z,route-lakeport.geojson,demo-regional,36000,10\n"), 0o644)
	sweep := filepath.Join(dir, "sweep.svg")
	if code, _, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", filepath.Join(dir, "o"), "--ci-sweep", "0,50", "--chart", sweep); code != 0 {
		t.Fatalf("sweep: exit %d: %s", code, errs)
	}
	if sb, _ := os.ReadFile(sweep); !strings.Contains(string(sb), "CI 50") {
		t.Errorf("sweep chart lacks the CI 50 label")
	}
}

// TestBatchStepPolicy: a step rule given to batch applies to every flight
// (a researcher comparing step policies): with --no-steps no flight steps.
func TestBatchStepPolicy(t *testing.T) {
	fs := demoFiles(t)
	out := filepath.Join(t.TempDir(), "o")
	code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", out, "--no-steps")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	f, err := os.Open(filepath.Join(out, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, _ := csv.NewReader(f).ReadAll()
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for _, r := range recs[1:] {
		if r[col["steps"]] != "0" || strings.Contains(r[col["profile"]], "@") {
			t.Errorf("%s: %s steps, profile %s", r[col["flight"]], r[col["steps"]], r[col["profile"]])
		}
	}
	if code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--out", filepath.Join(t.TempDir(), "x"), "--max-step-ft", "50"); code != 2 || !strings.Contains(errs, "--max-step-ft") {
		t.Errorf("--max-step-ft 50: exit %d, %q", code, errs)
	}
}

// TestExitCodeClasses: a command's own failure exits 1, its bad-input
// error 2, and cobra's rejection of the command line 2 (the exit codes the README documents under "Commands").
func TestExitCodeClasses(t *testing.T) {
	saved := subcommands
	defer func() { subcommands = saved }()
	subcommands = append(append([]func() *cobra.Command(nil), saved...),
		func() *cobra.Command {
			return &cobra.Command{Use: "fail-internal", RunE: func(*cobra.Command, []string) error { return errors.New("boom") }}
		},
		func() *cobra.Command {
			return &cobra.Command{Use: "fail-input", RunE: func(*cobra.Command, []string) error { return badInputf("bad value") }}
		})
	for _, c := range []struct {
		args []string
		want int
	}{{[]string{"fail-internal"}, 1}, {[]string{"fail-input"}, 2}, {[]string{"no-such-command"}, 2}, {[]string{"route"}, 2}, {[]string{"fail-internal", "--nope"}, 2}} {
		if code, _, errs := runCLI(t, c.args...); code != c.want {
			t.Errorf("%v: exit %d, want %d (%s)", c.args, code, c.want, errs)
		}
	}
}

// TestBatchZFWAndFuel: a schedule row with zfw_kg and fuel_kg is checked
// against the aircraft's fuel capacity as `plan --zfw --fuel` is.
func TestBatchZFWAndFuel(t *testing.T) {
	fs := demoFiles(t)
	sched := filepath.Join(fs.Dir, "sched-zfw.csv")
	os.WriteFile(sched, []byte("flight,departure,route,aircraft,tow_kg,ci,zfw_kg,fuel_kg\n"+
		"Z1,2026-12-01T21:00:00Z,route-lakeport.geojson,demo-regional,,10,30000,5000\n"+
		"Z2,2026-12-01T21:00:00Z,route-lakeport.geojson,demo-regional,,10,28000,12000\n"), 0o644)
	out := filepath.Join(t.TempDir(), "o")
	code, _, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", out)
	if code != 3 {
		t.Fatalf("exit %d, want 3: %s", code, errs)
	}
	eb, _ := os.ReadFile(filepath.Join(out, "errors.csv"))
	if !strings.Contains(string(eb), "Z2") || !strings.Contains(string(eb), "fuel capacity") || strings.Contains(string(eb), "Z1") {
		t.Errorf("errors.csv: %s", eb)
	}
}

// TestPlanAlternatives: --alternatives K lists K distinct profiles besides
// the plan's own in the JSON, none cheaper than the plan beyond the
// search's 0.2 % pricing tolerance (optimizer.TestAlternativesMatchEnumeration
// checks them against an exhaustive enumeration).
func TestPlanAlternatives(t *testing.T) {
	fs := demoFiles(t)
	code, out, errs := runCLI(t, "plan", "--route", fs.Routes[2], "--aircraft", "demo-narrowbody", "--mass", "70000",
		"--weather", fs.Weather, "--depart", "2026-12-01T20:00:00Z", "--alternatives", "2", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var d struct {
		Profile string `json:"profile"`
		Totals  struct {
			Cost float64 `json:"cost"`
		} `json:"totals"`
		Alternatives []struct {
			Profile   string  `json:"profile"`
			CostDelta float64 `json:"cost_delta"`
		} `json:"alternatives"`
	}
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	if len(d.Alternatives) != 2 {
		t.Fatalf("%d alternatives, want 2", len(d.Alternatives))
	}
	seen := map[string]bool{d.Profile: true}
	for _, a := range d.Alternatives {
		if seen[a.Profile] || a.CostDelta < -2e-3*d.Totals.Cost {
			t.Errorf("alternative %s (delta %.2f) repeats a profile or beats the plan %s", a.Profile, a.CostDelta, d.Profile)
		}
		seen[a.Profile] = true
	}
	if code, _, _ := runCLI(t, "plan", "--route", fs.Routes[2], "--aircraft", "demo-narrowbody", "--mass", "70000", "--alternatives", "-1"); code != 2 {
		t.Errorf("--alternatives -1: exit %d, want 2", code)
	}
}
