package serve

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"levelpath/optimizer"
	"levelpath/optimizer/planjson"
	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
)

// TestPlanMatchesLibrary checks that the served plan is the plan the
// library makes from the same inputs, built by hand here as the command
// line builds it (route.Load, perf.Builtin, winds.OpenBetween, Solve),
// and that the record keeps the request, the digests and the output.
func TestPlanMatchesLibrary(t *testing.T) {
	s := testServer(t, nil)
	a := call(t, s.Handler(), "POST", "/v1/plan", shortFlight())
	if a.code != 200 {
		t.Fatalf("plan: %d %s", a.code, a.raw)
	}
	dir, _ := demoDir()
	ac, err := perf.Builtin("demo-regional")
	if err != nil {
		t.Fatal(err)
	}
	wx, err := winds.OpenBetween(perf.FLToPressure(600), perf.FLToPressure(50), filepath.Join(dir, "weather.grib2"))
	if err != nil {
		t.Fatal(err)
	}
	r, err := route.Load(filepath.Join(dir, "route-lakeport.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	dep, _ := time.Parse(time.RFC3339, "2026-12-01T20:20:00Z")
	tr, err := route.Build(r, route.Options{MaxSegment: 50 * perf.NMToM, Date: dep})
	if err != nil {
		t.Fatal(err)
	}
	pr := &optimizer.Problem{Aircraft: ac, Weather: wx, CI: 15, Floor: 1.3, TakeoffMass: 36500, Depart: dep, Track: tr, LegCeilings: true,
		Steps: optimizer.StepRules{MaxChange: 4000 * perf.FtToM, MinDistance: 100 * perf.NMToM}}
	pr.Speed, _ = optimizer.ParseSpeed("econ")
	plan, err := optimizer.Solve(pr)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := json.Marshal(planjson.FromPlan(plan, false))
	got, _ := json.Marshal(a.doc["plan"])
	var w1, g1 any
	json.Unmarshal(want, &w1)
	json.Unmarshal(got, &g1)
	wj, _ := json.Marshal(w1)
	gj, _ := json.Marshal(g1)
	if !bytes.Equal(wj, gj) {
		t.Errorf("served plan differs from the library's:\n got %s\nwant %s", gj, wj)
	}
	if c, _ := a.doc["plan"].(map[string]any)["caution"].(string); c != optimizer.Caution {
		t.Errorf("caution %q, want the optimizer's", c)
	}

	id := int64(a.doc["id"].(float64))
	rec := call(t, s.Handler(), "GET", "/v1/plans/"+strconv.FormatInt(id, 10), nil)
	if rec.code != 200 {
		t.Fatalf("record: %d %s", rec.code, rec.raw)
	}
	if out, _ := json.Marshal(rec.doc["output"].(map[string]any)["plan"]); !bytes.Equal(out, got) {
		t.Errorf("stored output differs from the answer")
	}
	reqJSON, _ := json.Marshal(shortFlight())
	if st, _ := json.Marshal(rec.doc["request"]); !jsonEqual(st, reqJSON) {
		t.Errorf("stored request %s, want %s", st, reqJSON)
	}
	// The weather digest against coreutils sha256sum when installed, else
	// crypto/sha256 (FIPS 180-4).
	wantDigest := sha256File(t, filepath.Join(dir, "weather.grib2"))
	if d := rec.doc["weather_digests"].([]any)[0]; d != wantDigest {
		t.Errorf("weather digest %v, want %s", d, wantDigest)
	}
	if d := rec.doc["route_digest"]; d != sha256File(t, filepath.Join(dir, "route-lakeport.geojson")) {
		t.Errorf("route digest %v", d)
	}
	if rec.doc["aircraft_digest"] != "builtin:demo-regional" || rec.doc["program_version"] != "test" || rec.doc["kind"] != "plan" {
		t.Errorf("record inputs: %v %v %v", rec.doc["aircraft_digest"], rec.doc["program_version"], rec.doc["kind"])
	}
	h := call(t, s.Handler(), "GET", "/v1/plans?flight=DEMO401", nil)
	list := h.doc["records"].([]any)
	if h.code != 200 || len(list) != 1 || list[0].(map[string]any)["profile"] != plan.Profile.String() {
		t.Errorf("history: %d %s", h.code, h.raw)
	}
}

func jsonEqual(a, b []byte) bool {
	var x, y any
	if json.Unmarshal(a, &x) != nil || json.Unmarshal(b, &y) != nil {
		return false
	}
	xa, _ := json.Marshal(x)
	ya, _ := json.Marshal(y)
	return bytes.Equal(xa, ya)
}

func sha256File(t *testing.T, path string) string {
	t.Helper()
	if out, err := exec.Command("sha256sum", path).Output(); err == nil {
		return strings.Fields(string(out))[0]
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	d := sha256.Sum256(b)
	return hex.EncodeToString(d[:])
}

// TestAssessAndChart prices the plan's own profile: same cost, no
// violations; and a profile above the ceiling is listed as broken.
func TestAssessAndChart(t *testing.T) {
	s := testServer(t, nil)
	req := shortFlight()
	req["chart"] = true
	p := call(t, s.Handler(), "POST", "/v1/plan", req)
	if p.code != 200 || !strings.Contains(p.doc["chart_svg"].(string), "<svg") {
		t.Fatalf("plan with chart: %d", p.code)
	}
	plan := p.doc["plan"].(map[string]any)
	req["profile"] = plan["profile"]
	a := call(t, s.Handler(), "POST", "/v1/assess", req)
	if a.code != 200 {
		t.Fatalf("assess: %d %s", a.code, a.raw)
	}
	ap := a.doc["plan"].(map[string]any)
	if ap["assessed"] != true || len(ap["violations"].([]any)) != 0 {
		t.Errorf("assessing the plan's profile: assessed %v, violations %v", ap["assessed"], ap["violations"])
	}
	pc, ac := plan["totals"].(map[string]any)["cost"].(float64), ap["totals"].(map[string]any)["cost"].(float64)
	if d := pc - ac; d > 1e-6*pc || d < -1e-6*pc {
		t.Errorf("assessed cost %v, planned %v", ac, pc)
	}
	// The route runs west (courses 258..269 degrees magnetic): the
	// semicircular rule (ICAO Annex 2, Appendix 3) gives even levels, so
	// FL370 breaks the level rule.
	req["profile"] = "FL370"
	v := call(t, s.Handler(), "POST", "/v1/assess", req)
	if v.code != 200 {
		t.Fatalf("FL370: %d %s", v.code, v.raw)
	}
	found := false
	for _, x := range v.doc["plan"].(map[string]any)["violations"].([]any) {
		found = found || x.(map[string]any)["limit"] == "level-rule"
	}
	if !found {
		t.Errorf("FL370 westbound: no level-rule violation in %s", v.raw)
	}
	// A level the aircraft cannot reach is priced as far as it climbs and
	// listed, not refused (as the CLI's assess does).
	req["profile"] = "FL450"
	u := call(t, s.Handler(), "POST", "/v1/assess", req)
	if u.code != 200 || len(u.doc["plan"].(map[string]any)["violations"].([]any)) == 0 {
		t.Errorf("FL450: %d, want 200 with violations: %s", u.code, u.raw)
	}
	if n := records(t, s); n != 4 {
		t.Errorf("%d records, want 4", n)
	}
}

// TestBadInput sends refused requests: each gets its 4xx naming the
// field, never 500, and nothing is stored.
func TestBadInput(t *testing.T) {
	s := testServer(t, func(c *Config) { c.BodyLimit = 4096 })
	with := func(k string, v any) map[string]any {
		m := shortFlight()
		if v == nil {
			delete(m, k)
		} else {
			m[k] = v
		}
		return m
	}
	big := with("flight", "X")
	big["block"] = []string{strings.Repeat("FL370,", 1000) + "FL390@1-2"}
	for _, c := range []struct {
		name, method, path string
		body               any
		code               int
		field              string
	}{
		{"unknown field", "POST", "/v1/plan", with("bogus", 1), 400, "bogus"},
		{"wrong type", "POST", "/v1/plan", with("mass", "heavy"), 400, "mass"},
		{"route not in dir", "POST", "/v1/plan", with("route", "nowhere.geojson"), 400, "route"},
		{"route dotdot", "POST", "/v1/plan", with("route", "../route.geojson"), 400, "route"},
		{"route absolute", "POST", "/v1/plan", with("route", "/etc/passwd"), 400, "route"},
		{"route number", "POST", "/v1/plan", with("route", 7), 400, "route"},
		{"route one point", "POST", "/v1/plan", with("route", "40.6,-73.8"), 400, "route"},
		{"route missing", "POST", "/v1/plan", with("route", nil), 400, "route"},
		{"weather dotdot", "POST", "/v1/plan", with("weather", []string{"../weather.grib2"}), 400, "weather"},
		{"weather not grib", "POST", "/v1/plan", with("weather", []string{"schedule.csv"}), 400, "weather"},
		{"weather wrong type", "POST", "/v1/plan", with("weather", "weather.grib2"), 400, "weather"},
		{"aircraft path", "POST", "/v1/plan", with("aircraft", "/etc/hostname"), 400, "aircraft"},
		{"aircraft missing", "POST", "/v1/plan", with("aircraft", nil), 400, "aircraft"},
		{"mass missing", "POST", "/v1/plan", with("mass", nil), 400, "mass"},
		{"mass zero", "POST", "/v1/plan", with("mass", 0), 400, "mass"},
		{"mass over MTOW", "POST", "/v1/plan", with("mass", 9e6), 400, "mass"},
		{"zfw without fuel", "POST", "/v1/plan", with("mass", nil), 400, "mass"},
		{"ci negative", "POST", "/v1/plan", with("ci", -5), 400, "ci"},
		{"floor high", "POST", "/v1/plan", with("floor", 3), 400, "floor"},
		{"depart", "POST", "/v1/plan", with("depart", "tomorrow"), 400, "depart"},
		{"speed", "POST", "/v1/plan", with("speed", "fast"), 400, "speed"},
		{"mach over MMO", "POST", "/v1/plan", with("speed", "0.99"), 400, "speed"},
		{"max step", "POST", "/v1/plan", with("max_step_ft", 500), 400, "max_step_ft"},
		{"min step", "POST", "/v1/plan", with("min_step_nm", -1), 400, "min_step_nm"},
		{"max seg", "POST", "/v1/plan", with("max_seg_nm", 0.5), 400, "max_seg_nm"},
		{"levels", "POST", "/v1/plan", with("levels", "sideways"), 400, "levels"},
		{"block", "POST", "/v1/plan", with("block", []string{"FL370"}), 400, "block"},
		{"turbulence", "POST", "/v1/plan", with("turbulence", "strong"), 400, "turbulence"},
		{"date", "POST", "/v1/plan", with("date", "1/2/26"), 400, "date"},
		{"flight", "POST", "/v1/plan", with("flight", "DEMO 101; drop"), 400, "flight"},
		{"alternatives", "POST", "/v1/plan", with("alternatives", 99), 400, "alternatives"},
		{"profile on plan", "POST", "/v1/plan", with("profile", "FL350"), 400, "profile"},
		{"body over limit", "POST", "/v1/plan", big, 413, ""},
		{"not JSON", "POST", "/v1/plan", "{route:", 400, ""},
		{"trailing data", "POST", "/v1/plan", `{"flight":"A"} {}`, 400, ""},
		{"empty body", "POST", "/v1/plan", "", 400, ""},
		{"array body", "POST", "/v1/plan", "[]", 400, ""},
		{"profile missing", "POST", "/v1/assess", shortFlight(), 400, "profile"},
		{"profile malformed", "POST", "/v1/assess", with("profile", "FL350,FL370@abc"), 400, "profile"},
		{"profile decreasing", "POST", "/v1/assess", with("profile", "FL350,FL370@900,FL390@500"), 400, "profile"},
		{"profile level", "POST", "/v1/assess", with("profile", "FL355"), 400, "profile"},
		{"envelope no mass", "POST", "/v1/envelope", map[string]any{"aircraft": "demo-regional"}, 400, "mass"},
		{"envelope unknown", "POST", "/v1/envelope", map[string]any{"aircraft": "demo-regional", "mass": 30000, "isa": 3}, 400, "isa"},
		{"envelope isa", "POST", "/v1/envelope", map[string]any{"aircraft": "demo-regional", "mass": 30000, "isa_dev": 99}, 400, "isa_dev"},
		{"envelope aircraft", "POST", "/v1/envelope", map[string]any{"aircraft": "../demo-regional", "mass": 30000}, 400, "aircraft"},
		{"history no flight", "GET", "/v1/plans", nil, 400, "flight"},
		{"history bad param", "GET", "/v1/plans?flight=A&x=1", nil, 400, "x"},
		{"history limit", "GET", "/v1/plans?flight=A&limit=0", nil, 400, "limit"},
		{"record id", "GET", "/v1/plans/abc", nil, 400, "id"},
		{"record missing", "GET", "/v1/plans/999", nil, 404, "id"},
		{"no endpoint", "GET", "/v2/plan", nil, 404, ""},
		{"static missing", "GET", "/static/secret.txt", nil, 404, ""},
		{"wrong method", "GET", "/v1/plan", nil, 404, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			a := call(t, s.Handler(), c.method, c.path, c.body)
			if a.code != c.code {
				t.Fatalf("status %d, want %d: %s", a.code, c.code, a.raw)
			}
			if a.doc == nil || a.doc["error"] == "" {
				t.Fatalf("no JSON error: %s", a.raw)
			}
			if f, _ := a.doc["field"].(string); f != c.field {
				t.Errorf("field %q, want %q (%s)", f, c.field, a.doc["error"])
			}
		})
	}
	dir, _ := demoDir()
	a := call(t, s.Handler(), "POST", "/v1/plan", with("weather", []string{"schedule.csv"}))
	if strings.Contains(string(a.raw), dir) {
		t.Errorf("the answer shows where the data directory lies: %s", a.raw)
	}
	if n := records(t, s); n != 0 {
		t.Errorf("%d records stored for refused requests", n)
	}
	a = call(t, s.Handler(), "POST", "/v1/plan", "{}", "Content-Type", "text/plain")
	if a.code != http.StatusUnsupportedMediaType {
		t.Errorf("text/plain body: %d", a.code)
	}
}

// TestCLIMessages checks a few answers word for word against the
// command line's exit-2 messages (cmd/levelpath/problemflags.go).
func TestCLIMessages(t *testing.T) {
	s := testServer(t, nil)
	m := shortFlight()
	delete(m, "mass")
	if a := call(t, s.Handler(), "POST", "/v1/plan", m); a.doc["error"] != "--mass (kg), --zfw alone (a fuel plan) or both --zfw and --fuel are required" {
		t.Errorf("got %q", a.doc["error"])
	}
	m = shortFlight()
	m["depart"] = "x"
	if a := call(t, s.Handler(), "POST", "/v1/plan", m); a.doc["error"] != `--depart "x": want RFC3339 such as 2026-12-01T22:00:00Z` {
		t.Errorf("got %q", a.doc["error"])
	}
}

func TestListsAndEnvelope(t *testing.T) {
	s := testServer(t, nil)
	h := s.Handler()
	r := call(t, h, "GET", "/v1/routes", nil)
	if r.code != 200 || len(r.doc["routes"].([]any)) != 4 {
		t.Errorf("routes: %d %s", r.code, r.raw)
	}
	a := call(t, h, "GET", "/v1/aircraft", nil)
	if a.code != 200 || len(a.doc["aircraft"].([]any)) != len(perf.BuiltinNames()) {
		t.Errorf("aircraft: %d %s", a.code, a.raw)
	}
	w := call(t, h, "GET", "/v1/weather", nil)
	ws := w.doc["weather"].([]any)
	if w.code != 200 || len(ws) != 1 || ws[0].(map[string]any)["error"] != nil {
		t.Fatalf("weather: %d %s", w.code, w.raw)
	}
	// The valid times and levels against ecCodes grib_ls when installed.
	if _, err := exec.LookPath("grib_ls"); err == nil {
		dir, _ := demoDir()
		out, err := exec.Command("grib_ls", "-p", "dataDate,dataTime,step,level", filepath.Join(dir, "weather.grib2")).Output()
		if err != nil {
			t.Fatal(err)
		}
		for _, lv := range ws[0].(map[string]any)["levels_hpa"].([]any) {
			if !strings.Contains(string(out), " "+strconv.Itoa(int(lv.(float64)))) {
				t.Errorf("level %v hPa not in grib_ls output", lv)
			}
		}
	}
	e := call(t, h, "POST", "/v1/envelope", map[string]any{"aircraft": "demo-regional", "mass": 33000, "chart": true})
	if e.code != 200 || !strings.Contains(e.doc["chart_svg"].(string), "<svg") || len(e.doc["envelope"].(map[string]any)["rows"].([]any)) == 0 {
		t.Errorf("envelope: %d", e.code)
	}
	hz := call(t, h, "GET", "/healthz", nil)
	if hz.code != 200 || hz.doc["schema_version"] != float64(SchemaVersion) {
		t.Errorf("healthz: %d %s", hz.code, hz.raw)
	}
	pg := call(t, h, "GET", "/", nil)
	if pg.code != 200 || !strings.Contains(string(pg.raw), "plan-form") || strings.Contains(string(pg.raw), "http") && strings.Contains(string(pg.raw), "://") {
		t.Errorf("page: %d, or it names a network address", pg.code)
	}
}

// TestTimeLimit: a plan that cannot finish in the time limit gets 503
// with Retry-After and is not stored.
func TestTimeLimit(t *testing.T) {
	s := testServer(t, func(c *Config) { c.Timeout = time.Millisecond })
	a := call(t, s.Handler(), "POST", "/v1/plan", longFlight())
	if a.code != 503 || a.hdr.Get("Retry-After") == "" {
		t.Fatalf("status %d, Retry-After %q: %s", a.code, a.hdr.Get("Retry-After"), a.raw)
	}
	// Wait for the slot: a time-out while the weather is first decoded
	// (which does not look at the context) leaves it held a while.
	for i := 0; i < 600 && len(s.slots) > 0; i++ {
		time.Sleep(50 * time.Millisecond)
	}
	if n := records(t, s); n != 0 {
		t.Errorf("%d records after a timed-out plan", n)
	}
}

// TestBusy: with the only slot taken, a request waits QueueWait, then
// gets 503 with Retry-After.
func TestBusy(t *testing.T) {
	s := testServer(t, func(c *Config) { c.Workers = 1; c.QueueWait = 20 * time.Millisecond })
	s.slots <- struct{}{}
	a := call(t, s.Handler(), "POST", "/v1/plan", shortFlight())
	<-s.slots
	if a.code != 503 || a.hdr.Get("Retry-After") == "" {
		t.Fatalf("status %d: %s", a.code, a.raw)
	}
	if a := call(t, s.Handler(), "POST", "/v1/plan", shortFlight()); a.code != 200 {
		t.Errorf("after the slot freed: %d %s", a.code, a.raw)
	}
}

// TestInlineRoutes: a route given as a GeoJSON object or as inline text
// plans as the same route given by name.
func TestInlineRoutes(t *testing.T) {
	s := testServer(t, nil)
	dir, _ := demoDir()
	b, err := os.ReadFile(filepath.Join(dir, "route-lakeport.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	var gj map[string]any
	if err := json.Unmarshal(b, &gj); err != nil {
		t.Fatal(err)
	}
	r, err := route.Load(filepath.Join(dir, "route-lakeport.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	var text []string
	for _, p := range r.Points {
		text = append(text, strconv.FormatFloat(p.Lat, 'g', -1, 64)+","+strconv.FormatFloat(p.Lon, 'g', -1, 64))
	}
	byName := call(t, s.Handler(), "POST", "/v1/plan", shortFlight())
	for name, rt := range map[string]any{"geojson": gj, "inline": strings.Join(text, " ")} {
		req := shortFlight()
		req["route"] = rt
		a := call(t, s.Handler(), "POST", "/v1/plan", req)
		if a.code != 200 {
			t.Fatalf("%s: %d %s", name, a.code, a.raw)
		}
		g, w := a.doc["plan"].(map[string]any), byName.doc["plan"].(map[string]any)
		if g["profile"] != w["profile"] || g["distance_nm"] != w["distance_nm"] {
			t.Errorf("%s: %v %v NM, by name %v %v NM", name, g["profile"], g["distance_nm"], w["profile"], w["distance_nm"])
		}
	}
}

// TestInternalError: a failure that is not the client's (here the
// database closed under the service) is 500 "internal error", with no
// detail in the answer; /healthz then says 503.
func TestInternalError(t *testing.T) {
	var logged bytes.Buffer
	s := testServer(t, func(c *Config) { c.Logger.SetOutput(&logged) })
	s.store.db.Close()
	a := call(t, s.Handler(), "POST", "/v1/plan", shortFlight())
	if a.code != 500 || a.doc["error"] != "internal error" || len(a.doc) != 1 {
		t.Errorf("%d %s", a.code, a.raw)
	}
	if !strings.Contains(logged.String(), "storing the record") {
		t.Errorf("the cause is not logged: %q", logged.String())
	}
	if h := call(t, s.Handler(), "GET", "/healthz", nil); h.code != 503 {
		t.Errorf("healthz with the database closed: %d", h.code)
	}
}
