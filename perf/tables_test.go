package perf

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// An exported table set reads back: limits as in the model and the cruise
// fuel flow equal to the model's at the grid points (10 digits written).
// Load on the directory validates it and says tables cannot be planned
// with yet.
func TestExportTablesRoundTrip(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	dir := t.TempDir()
	ms := []float64{a.OEW, 32000, a.MTOW}
	if err := a.ExportTables(dir, ms, []float64{250, 330, 370}, []float64{0.70, 0.76}, []float64{-10, 0, 20}); err != nil {
		t.Fatal(err)
	}
	tb, err := LoadTables(dir)
	if err != nil {
		t.Fatal(err)
	}
	if tb.Name != a.Name || tb.MTOW != a.MTOW || relErr(tb.VMO, a.VMO) > 1e-12 || relErr(tb.CertifiedCeiling, a.CertifiedCeiling) > 1e-12 || !strings.Contains(tb.Source, "exported") {
		t.Errorf("manifest read back as %+v", tb)
	}
	got, err := tb.CruiseFuelFlow.At(32000, 330, 0.76, 20)
	want := a.Point(State{Mass: 32000, Pressure: FLToPressure(330), Mach: 0.76, ISADev: 20}).FuelFlow
	if err != nil || relErr(got, want) > 1e-8 {
		t.Errorf("fuel flow %v (%v), model %v", got, err, want)
	}
	if _, err := tb.CruiseFuelFlow.At(32000, 390, 0.76, 0); !strings.Contains(err.Error(), "fl 390 outside the table's 250..370") {
		t.Errorf("query above the table: %v", err)
	}
	_, err = Load(dir)
	var ue *UnsupportedError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), "not supported yet") {
		t.Errorf("Load(dir) = %v, want *UnsupportedError", err)
	}
}

// Bad table sets are refused naming the file and field, row or column.
func TestLoadTablesErrors(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	src := t.TempDir()
	if err := a.ExportTables(src, []float64{a.OEW, a.MTOW}, []float64{300, 350}, []float64{0.7, 0.76}, []float64{0}); err != nil {
		t.Fatal(err)
	}
	man, _ := os.ReadFile(filepath.Join(src, TablesManifest))
	ff, _ := os.ReadFile(filepath.Join(src, CruiseFuelFlowFile))
	tests := []struct {
		name, file, old, new, want string
		typ                        any
	}{
		{"version", TablesManifest, "version: 1", "version: 2", "unsupported: table format version 2", &UnsupportedError{}},
		{"format", TablesManifest, "format: levelpath-tables", "format: other", "field format", &FieldError{}},
		{"mtow", TablesManifest, "mtow_kg: 40000", "mtow_kg: .inf", "field mass.mtow_kg", &FieldError{}},
		{"unknown key", TablesManifest, "name: demo-regional", "name: demo-regional\ncolour: red", "field colour", &FieldError{}},
		{"mass cover", CruiseFuelFlowFile, "40000,", "39000,", "does not cover OEW..MTOW", &TableError{}},
		{"unit", CruiseFuelFlowFile, "mass_kg", "mass_t", `column "mass_t"`, &TableError{}},
		{"falling", CruiseFuelFlowFile, "24000,350,0.76,0,", "24000,350,0.76,0,9", "column fuel flow: falls as mass_kg rises (mass_kg=40000, fl=350, mach=0.76, isa_dev_k=0)", &TableError{}},
	}
	for _, tc := range tests {
		dir := t.TempDir()
		m, f := string(man), string(ff)
		if tc.file == TablesManifest {
			m = strings.Replace(m, tc.old, tc.new, 1)
		} else {
			f = strings.ReplaceAll(f, tc.old, tc.new)
		}
		os.WriteFile(filepath.Join(dir, TablesManifest), []byte(m), 0o644)
		os.WriteFile(filepath.Join(dir, CruiseFuelFlowFile), []byte(f), 0o644)
		_, err := LoadTables(dir)
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
}
