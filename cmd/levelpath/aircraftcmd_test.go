package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"levelpath/perf"
)

// aircraft list and show describe the built-ins and files with the
// caution; an unknown name is bad input (exit 2).
func TestAircraftCommands(t *testing.T) {
	code, out, errs := runCLI(t, "aircraft", "list", "--format", "json")
	if code != 0 {
		t.Fatalf("list: exit %d: %s", code, errs)
	}
	var l struct {
		Caution  string         `json:"caution"`
		Aircraft []aircraftJSON `json:"aircraft"`
	}
	if err := json.Unmarshal([]byte(out), &l); err != nil {
		t.Fatal(err)
	}
	if len(l.Aircraft) != len(perf.BuiltinNames()) || !strings.Contains(l.Caution, "not certified") {
		t.Fatalf("list: %+v", l)
	}
	for i, n := range perf.BuiltinNames() {
		a, _ := perf.Builtin(n)
		d := l.Aircraft[i]
		if d.Name != n || d.MTOWKg != a.MTOW || !strings.Contains(d.Source, "invented") {
			t.Errorf("list[%d] = %+v", i, d)
		}
		// A hot day lowers the thrust-limited level (flat-rated engines).
		if d.RefMaxFLThrust == nil || d.RefMaxFLHot == nil || !(*d.RefMaxFLHot < *d.RefMaxFLThrust) {
			t.Errorf("%s: thrust levels %v / %v", n, d.RefMaxFLThrust, d.RefMaxFLHot)
		}
	}
	src, err := os.ReadFile("../../perf/aircraft/demo-regional.yaml")
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "mine.yaml")
	if err := os.WriteFile(path, []byte(strings.Replace(string(src), "name: demo-regional", "name: mine", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runCLI(t, "aircraft", "show", path)
	if code != 0 || !strings.Contains(out, "mine:") || !strings.Contains(out, "source: file "+path) || !strings.Contains(out, "Caution: ") {
		t.Errorf("show file: exit %d\n%s%s", code, out, errs)
	}
	if code, _, errs := runCLI(t, "aircraft", "show", "no-such-type"); code != 2 || !strings.Contains(errs, "no-such-type") {
		t.Errorf("show unknown: exit %d, %q", code, errs)
	}
}

// aircraft export writes tables that perf.LoadTables accepts, with the
// model's fuel flow at the grid points, and aircraft show reads them.
func TestAircraftExport(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "tables")
	code, out, errs := runCLI(t, "aircraft", "export", "--aircraft", "demo-narrowbody", "--out", dir, "--perf-factor", "2")
	if code != 0 || !strings.Contains(out, "cruise fuel-flow and thrust-limit points") || !strings.Contains(errs, "performance factor +2.0 %") {
		t.Fatalf("export: exit %d\n%s%s", code, out, errs)
	}
	tb, err := perf.LoadTables(dir)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := perf.Builtin("demo-narrowbody")
	a, _ = a.WithPerfFactor(2)
	m := tb.CruiseFuelFlow.Axes[0].Values[10]
	got, err := tb.CruiseFuelFlow.At(m, 350, 0.78, 10)
	want := a.Point(perf.State{Mass: m, Pressure: perf.FLToPressure(350), Mach: 0.78, ISADev: 10}).FuelFlow
	if err != nil || abs(got-want) > 1e-8*want {
		t.Errorf("exported fuel flow %v (%v), model %v", got, err, want)
	}
	if code, out, errs := runCLI(t, "aircraft", "show", dir); code != 0 || !strings.Contains(out, "operator tables "+dir+" (format version 2") {
		t.Errorf("show tables: exit %d\n%s%s", code, out, errs)
	}
	if code, _, errs := runCLI(t, "aircraft", "export", "--aircraft", "demo-narrowbody"); code != 2 || !strings.Contains(errs, "--out") {
		t.Errorf("export without --out: exit %d, %q", code, errs)
	}
}
