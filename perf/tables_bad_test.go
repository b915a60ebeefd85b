package perf

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Bad table sets are refused naming the file and field, or the file, line
// and column.
func TestLoadTablesErrors(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	src := t.TempDir()
	if err := a.ExportTables(src, smallGrid()); err != nil {
		t.Fatal(err)
	}
	files := []string{TablesManifest, CruiseFuelFlowFile, ThrustLimitsFile, ClimbFile, DescentFile, BuffetFile}
	orig := map[string]string{}
	for _, f := range files {
		b, err := os.ReadFile(filepath.Join(src, f))
		if err != nil {
			t.Fatal(err)
		}
		orig[f] = string(b)
	}
	firstLine := func(f string, n int) string { return strings.Split(orig[f], "\n")[n] }
	tests := []struct {
		name, file, old, new, want string
		typ                        any
	}{
		{"version", TablesManifest, "version: 2", "version: 3", "unsupported: table format version 3", &UnsupportedError{}},
		{"format", TablesManifest, "format: levelpath-tables", "format: other", "field format", &FieldError{}},
		{"mtow", TablesManifest, "mtow_kg: 40000", "mtow_kg: .inf", "field mass.mtow_kg", &FieldError{}},
		{"unknown key", TablesManifest, "name: demo-regional", "name: demo-regional\ncolour: red", "field colour", &FieldError{}},
		{"no wing", TablesManifest, "wing:\n    area_m2:", "wingx:\n    area_m2:", "field wingx", &FieldError{}},
		{"engines", TablesManifest, "count: 2", "count: 2.5", "field engines.count: 2.5 is not a whole number", &FieldError{}},
		{"schedule", TablesManifest, "mach: 0.76", "mach: 0.9", "field schedule.mach", &FieldError{}},
		{"mass cover", CruiseFuelFlowFile, "\n40000,", "\n39000,", "column mass: mass axis 24000..39000 kg does not cover OEW..MTOW", &TableError{}},
		{"unit", CruiseFuelFlowFile, "mass_kg", "mass_t", `cruise_fuel_flow.csv:1: column "mass_t": unrecognised column or unit`, &TableError{}},
		{"lb accepted, bad level unit", CruiseFuelFlowFile, ",fl,", ",flight_level,", `column "flight_level": unrecognised column or unit; want altitude_ft or fl`, &TableError{}},
		{"falling", CruiseFuelFlowFile, firstLine(CruiseFuelFlowFile, 1+3*4*3*3-1), "40000,410,0.82,20,1,10", "column fuel flow: falls as mass_kg rises (mass_kg=40000, fl=410, mach=0.82, isa_dev_k=20)", &TableError{}},
		{"negative fuel flow", CruiseFuelFlowFile, firstLine(CruiseFuelFlowFile, 1), "24000,250,0.7,-10,-5,10", "cruise_fuel_flow.csv:2: column fuel_flow_kg_h: -5 is negative", &TableError{}},
		{"non-finite", CruiseFuelFlowFile, firstLine(CruiseFuelFlowFile, 1), "24000,250,0.7,-10,Inf,10", `cruise_fuel_flow.csv:2: column fuel_flow_kg_h: "Inf" is not a finite number`, &TableError{}},
		{"hole", CruiseFuelFlowFile, firstLine(CruiseFuelFlowFile, 2) + "\n", "", "hole in the grid: no row for mass_kg=24000, fl=250, mach=0.7, isa_dev_k=0", &TableError{}},
		{"mistyped level", CruiseFuelFlowFile, firstLine(CruiseFuelFlowFile, 5), strings.Replace(firstLine(CruiseFuelFlowFile, 5), ",250,", ",2500,", 1), "cruise_fuel_flow.csv:6: column fl: hole in the grid: 2500 (first on this line) is on only 1 rows", &TableError{}},
		{"thrust unit", CruiseFuelFlowFile, "thrust_kn", "thrust_t", `column "thrust_t": unrecognised column or unit; want thrust_kn or thrust_lbf`, &TableError{}},
		{"duplicate", CruiseFuelFlowFile, firstLine(CruiseFuelFlowFile, 2), firstLine(CruiseFuelFlowFile, 1), "cruise_fuel_flow.csv:3: duplicates the grid point of line 2", &TableError{}},
		{"not monotone axis is just order", CruiseFuelFlowFile, "\n", "\n", "", nil},
		{"mach short of MMO", ThrustLimitsFile, ",0.82,", ",0.80,", "column mach: Mach axis ends at 0.8, below MMO 0.82", &TableError{}},
		{"cruise above climb rating", ThrustLimitsFile, firstLine(ThrustLimitsFile, 1), "24000,250,0.7,-10,100,200", "thrust_limits.csv:2: column roc_cruise: 1.016 m/s is above roc_climb 0.508 m/s", &TableError{}},
		{"climb base", ClimbFile, firstLine(ClimbFile, 1), "24000,15,-10,1,0,0", "climb.csv:2: column time_s: not zero at 1,500 ft", &TableError{}},
		{"climb level short", ClimbFile, ",410,", ",400,", "level axis ends at FL400, below the certified ceiling FL410", &TableError{}},
		{"partly blank", DescentFile, firstLine(DescentFile, 4), "24000,200,-10,10,,20", "descent.csv:5: time, fuel and distance must be all given or all blank", &TableError{}},
		{"buffet order", BuffetFile, "0.4,", "0.95,", "buffet.csv", &TableError{}},
		{"buffet short of MMO", BuffetFile, "0.8,0.68\n0.82,0.605\n0.84,0.518\n0.86,0.421\n", "", "tables.yaml limits.mmo", &TableError{}},
	}
	for _, tc := range tests {
		dir := t.TempDir()
		for _, f := range files {
			s := orig[f]
			if f == tc.file {
				if !strings.Contains(s, tc.old) {
					t.Fatalf("%s: %q not in %s", tc.name, tc.old, f)
				}
				s = strings.ReplaceAll(s, tc.old, tc.new)
			}
			if err := os.WriteFile(filepath.Join(dir, f), []byte(s), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		_, err := LoadTables(dir)
		if tc.typ == nil {
			if err != nil {
				t.Errorf("%s: %v", tc.name, err)
			}
			continue
		}
		ok := false
		switch tc.typ.(type) {
		case *UnsupportedError:
			var e *UnsupportedError
			ok = errors.As(err, &e)
		case *FieldError:
			var e *FieldError
			ok = errors.As(err, &e)
		case *TableError:
			var e *TableError
			ok = errors.As(err, &e)
		}
		if !ok || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want %T containing %q", tc.name, err, tc.typ, tc.want)
		}
	}
	if _, err := LoadTables(t.TempDir()); err == nil || !strings.Contains(err.Error(), TablesManifest) {
		t.Errorf("empty directory: %v", err)
	}
	// A file over the size limit is refused from its size, before reading
	// (a sparse file: no data written).
	dir := t.TempDir()
	for _, f := range files {
		os.WriteFile(filepath.Join(dir, f), []byte(orig[f]), 0o644)
	}
	if err := os.Truncate(filepath.Join(dir, ThrustLimitsFile), maxTableFile+1); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadTables(dir); err == nil || !strings.Contains(err.Error(), "thrust_limits.csv: 16777217 bytes, more than the 16777216 allowed") {
		t.Errorf("oversized file: %v", err)
	}
}

// A version 1 set (manifest and cruise fuel flow) is still read and
// validated, and Load says what planning needs.
func TestTablesVersion1(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	src := t.TempDir()
	if err := a.ExportTables(src, smallGrid()); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	man, _ := os.ReadFile(filepath.Join(src, TablesManifest))
	m := string(man)
	m = strings.Replace(m, "version: 2", "version: 1", 1)
	for _, sec := range []string{"engines", "schedule", "wing"} {
		i := strings.Index(m, sec+":\n")
		j := i + len(sec) + 2
		for j < len(m) && strings.HasPrefix(m[j:], "    ") {
			j += strings.Index(m[j:], "\n") + 1
		}
		m = m[:i] + m[j:]
	}
	os.WriteFile(filepath.Join(dir, TablesManifest), []byte(m), 0o644)
	ff, _ := os.ReadFile(filepath.Join(src, CruiseFuelFlowFile))
	os.WriteFile(filepath.Join(dir, CruiseFuelFlowFile), dropLastColumn(ff), 0o644) // version 1 has no thrust column
	tb, err := LoadTables(dir)
	if err != nil || tb.Version != 1 || tb.CruiseFuelFlow == nil || tb.ClimbTime != nil {
		t.Fatalf("version 1 set: %v, %+v", err, tb)
	}
	_, err = Load(dir)
	var ue *UnsupportedError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), "thrust_limits.csv, climb.csv, descent.csv and buffet.csv") {
		t.Errorf("Load(version 1) = %v, want *UnsupportedError naming the tables planning needs", err)
	}
	os.WriteFile(filepath.Join(dir, TablesManifest), []byte(m+"wing:\n  area_m2: 80\n"), 0o644)
	if _, err := LoadTables(dir); err == nil || !strings.Contains(err.Error(), "field wing: not part of format version 1") {
		t.Errorf("version 1 with a wing: %v", err)
	}
}

// dropLastColumn removes the last field of every line of a CSV table.
func dropLastColumn(data []byte) []byte {
	var out []string
	for _, l := range strings.Split(strings.TrimRight(string(data), "\n"), "\n") {
		out = append(out, l[:strings.LastIndex(l, ",")])
	}
	return []byte(strings.Join(out, "\n") + "\n")
}

// Without the cruise table's optional thrust column a table aircraft
// plans as well, but has no drag (NaN) and says it knows no thrust.
func TestTablesWithoutThrust(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	dir := t.TempDir()
	if err := a.ExportTables(dir, smallGrid()); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, CruiseFuelFlowFile)
	ff, _ := os.ReadFile(path)
	if err := os.WriteFile(path, dropLastColumn(ff), 0o644); err != nil {
		t.Fatal(err)
	}
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	st := State{Mass: 32000, Pressure: FLToPressure(330), Mach: 0.76}
	p, want := ta.Point(st), a.Point(st)
	if ta.Tables().CruiseThrust != nil || ta.KnowsThrust() || !a.KnowsThrust() || !math.IsNaN(p.Drag) || relErr(p.FuelFlow, want.FuelFlow) > 1e-8 {
		t.Errorf("without thrust: knows %v, drag %v, fuel flow %v (model %v)", ta.KnowsThrust(), p.Drag, p.FuelFlow, want.FuelFlow)
	}
}
