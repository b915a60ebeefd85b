package serve

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"levelpath/perf"
)

// A directory of operator tables in the data directory is an aircraft the
// service plans with; its record's aircraft digest is the tables' digest,
// and a table file that leads outside the data directory is refused.
func TestServeTablesAircraft(t *testing.T) {
	src, err := demoDir()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, f := range []string{"route-lakeport.geojson", "weather.grib2"} {
		b, err := os.ReadFile(filepath.Join(src, f))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, f), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	a, err := perf.Builtin("demo-regional")
	if err != nil {
		t.Fatal(err)
	}
	tdir := filepath.Join(dir, "regional-tables")
	if err := a.ExportTables(tdir, perf.DefaultExportGrid(a)); err != nil {
		t.Fatal(err)
	}
	s := testServer(t, func(c *Config) { c.DataDir = dir })
	req := shortFlight()
	req["aircraft"] = "regional-tables"
	p := call(t, s.Handler(), "POST", "/v1/plan", req)
	if p.code != 200 {
		t.Fatalf("plan from tables: %d %s", p.code, p.raw)
	}
	if !strings.Contains(string(p.raw), "performance from the operator tables") {
		t.Errorf("the served plan does not say it comes from tables: %s", p.raw)
	}
	id := int64(p.doc["id"].(float64))
	rec := call(t, s.Handler(), "GET", "/v1/plans/"+strconv.FormatInt(id, 10), nil)
	want, err := perf.TablesDigest(tdir)
	if err != nil || rec.doc["aircraft_digest"] != want {
		t.Errorf("aircraft digest %v, want %s (%v)", rec.doc["aircraft_digest"], want, err)
	}

	// The second request reuses the tables read for the first (same
	// directory and digest); a changed file is read again.
	a1, d1, err1 := s.aircraft("regional-tables")
	a2, d2, err2 := s.aircraft("regional-tables")
	if err1 != nil || err2 != nil || a1 != a2 || d1 != d2 || d1 != want {
		t.Errorf("cached tables: %p %p %v %v", a1, a2, err1, err2)
	}
	man := filepath.Join(tdir, perf.TablesManifest)
	b, _ := os.ReadFile(man)
	os.WriteFile(man, []byte(strings.Replace(string(b), "name: demo-regional", "name: regional-2", 1)), 0o644)
	if a3, d3, err := s.aircraft("regional-tables"); err != nil {
		t.Errorf("after a change: %v", err)
	} else if d3 == d1 || a3.Name != "regional-2" {
		t.Errorf("after a change: digest changed %v, name %q", d3 != d1, a3.Name)
	}

	// A table file that is a symlink out of the data directory.
	out := t.TempDir()
	bdir := filepath.Join(dir, "escape-tables")
	if err := a.ExportTables(bdir, perf.DefaultExportGrid(a)); err != nil {
		t.Fatal(err)
	}
	os.Rename(filepath.Join(bdir, perf.BuffetFile), filepath.Join(out, perf.BuffetFile))
	if err := os.Symlink(filepath.Join(out, perf.BuffetFile), filepath.Join(bdir, perf.BuffetFile)); err != nil {
		t.Skip("no symlinks here:", err)
	}
	req["aircraft"] = "escape-tables"
	if e := call(t, s.Handler(), "POST", "/v1/plan", req); e.code != 400 || !strings.Contains(string(e.raw), "leads outside the data directory") {
		t.Errorf("tables with a file outside: %d %s", e.code, e.raw)
	}
}
