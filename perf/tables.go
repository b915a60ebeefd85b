package perf

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"gopkg.in/yaml.v3"
)

// Operator tables, format version 1 (documented in aircraft/TABLES.md): a
// directory holding tables.yaml (format name and version, aircraft name,
// source of the data, mass limits, speed limits and ceiling) and
// cruise_fuel_flow.csv (fuel flow by mass, level, Mach and ISA deviation).

const (
	// TablesFormat and TablesVersion identify the format in tables.yaml.
	TablesFormat  = "levelpath-tables"
	TablesVersion = 1
	// TablesManifest and CruiseFuelFlowFile are the file names in a table
	// directory.
	TablesManifest     = "tables.yaml"
	CruiseFuelFlowFile = "cruise_fuel_flow.csv"
)

// Tables is a validated set of operator tables.
type Tables struct {
	Name, Description, Source  string
	OEW, MZFW, MTOW, MLW       float64 // kg
	FuelCapacity               float64 // kg
	VMO, MMO, CertifiedCeiling float64 // CAS m/s, Mach, pressure altitude m

	// CruiseFuelFlow is fuel flow (kg/s, all engines) by mass (kg), FL,
	// Mach and ISA deviation (K).
	CruiseFuelFlow *Grid
}

// UnsupportedError reports valid input that levelpath cannot use yet.
type UnsupportedError struct {
	Source, Reason string
}

func (e *UnsupportedError) Error() string { return e.Source + ": unsupported: " + e.Reason }

type yamlTables struct {
	Format      *string     `yaml:"format"`
	Version     *int        `yaml:"version"`
	Name        *string     `yaml:"name"`
	Description string      `yaml:"description"`
	Source      *string     `yaml:"source"`
	Mass        *yamlMass   `yaml:"mass"`
	Limits      *yamlLimits `yaml:"limits"`
}

// LoadTables reads and validates the table directory dir: the manifest's
// format, version and fields (errors name the field), each table's header,
// numbers, axes, duplicates and holes (errors name file, line and column),
// that the cruise table's mass axis covers OEW..MTOW and that fuel flow
// does not fall as mass rises. Files over the
// size limit are refused before they are read.
func LoadTables(dir string) (*Tables, error) {
	man := filepath.Join(dir, TablesManifest)
	data, err := readLimited(man, maxFileSize)
	if err != nil {
		return nil, err
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	var y yamlTables
	if err := dec.Decode(&y); err != nil {
		return nil, yamlError(err, man)
	}
	r := &fieldReader{source: man}
	switch {
	case y.Format == nil || *y.Format != TablesFormat:
		r.fail("format", "want %q", TablesFormat)
	case y.Version == nil:
		r.fail("version", "missing")
	case *y.Version != TablesVersion:
		return nil, &UnsupportedError{Source: man, Reason: fmt.Sprintf("table format version %d; this levelpath reads version %d", *y.Version, TablesVersion)}
	}
	t := &Tables{Description: y.Description}
	if y.Name == nil || *y.Name == "" {
		r.fail("name", "missing")
	} else {
		t.Name = *y.Name
	}
	if y.Source == nil || *y.Source == "" {
		r.fail("source", "missing (say where the data come from)")
	} else {
		t.Source = *y.Source
	}
	if y.Mass == nil {
		r.fail("mass", "missing")
	} else {
		m := y.Mass
		t.OEW = r.num("mass.oew_kg", m.OEW, 0, 1e6, true)
		t.MZFW = r.num("mass.mzfw_kg", m.MZFW, t.OEW, 1e6, false)
		t.MTOW = r.num("mass.mtow_kg", m.MTOW, t.MZFW, 1e6, false)
		t.MLW = r.num("mass.mlw_kg", m.MLW, t.OEW, t.MTOW, false)
		t.FuelCapacity = r.num("mass.fuel_capacity_kg", m.FuelCapacity, 0, 1e6, true)
	}
	if y.Limits == nil {
		r.fail("limits", "missing")
	} else {
		t.VMO = KtToMS * r.num("limits.vmo_kt", y.Limits.VMO, 0, 600, true)
		t.MMO = r.num("limits.mmo", y.Limits.MMO, 0, 0.99, true)
		t.CertifiedCeiling = 100 * FtToM * r.num("limits.ceiling_fl", y.Limits.Ceiling, 100, 600, false)
	}
	if r.err != nil {
		return nil, r.err
	}
	ffPath := filepath.Join(dir, CruiseFuelFlowFile)
	ff, err := readLimited(ffPath, 16*maxFileSize)
	if err != nil {
		return nil, err
	}
	g, err := ReadGridCSV(bytes.NewReader(ff), ffPath, []ColumnSpec{ColMass, ColLevel, ColMach, ColISADev}, ColFuelFF)
	if err != nil {
		return nil, err
	}
	if ms := g.Axes[0].Values; ms[0] > t.OEW || ms[len(ms)-1] < t.MTOW {
		return nil, &TableError{File: ffPath, Column: "mass", Reason: fmt.Sprintf("mass axis %g..%g kg does not cover OEW..MTOW %g..%g kg", ms[0], ms[len(ms)-1], t.OEW, t.MTOW)}
	}
	if err := g.checkRising("fuel flow"); err != nil {
		return nil, err
	}
	t.CruiseFuelFlow = g
	return t, nil
}

// readLimited reads path, refusing a file larger than limit bytes (checked
// from its size before reading) and anything that is not a regular file.
func readLimited(path string, limit int64) ([]byte, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, &TableError{File: path, Reason: err.Error()}
	}
	if !fi.Mode().IsRegular() {
		return nil, &TableError{File: path, Reason: "not a regular file"}
	}
	if fi.Size() > limit {
		return nil, &TableError{File: path, Reason: fmt.Sprintf("%d bytes, more than the %d allowed", fi.Size(), limit)}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, &TableError{File: path, Reason: err.Error()}
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, limit+1))
	if err != nil {
		return nil, &TableError{File: path, Reason: err.Error()}
	}
	if int64(len(data)) > limit {
		return nil, &TableError{File: path, Reason: fmt.Sprintf("more than the %d bytes allowed", limit)}
	}
	return data, nil
}

// ExportTables writes a's tables in format version 1 to dir (created if
// needed): the manifest and the cruise fuel flow on the grid given (masses
// kg, FL, Mach, ISA deviation K; see CruiseFuelFlowGrid). The manifest names
// the model as the source.
func (a *Aircraft) ExportTables(dir string, masses, fls, machs, devs []float64) error {
	g, err := a.CruiseFuelFlowGrid(masses, fls, machs, devs)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	man := map[string]any{
		"format": TablesFormat, "version": TablesVersion, "name": a.Name, "description": a.Description,
		"source": fmt.Sprintf("exported by levelpath from the %s performance model (performance factor %+g %%)", a.Name, a.PerfFactorPct),
		"mass":   map[string]float64{"oew_kg": a.OEW, "mzfw_kg": a.MZFW, "mtow_kg": a.MTOW, "mlw_kg": a.MLW, "fuel_capacity_kg": a.FuelCapacity},
		"limits": map[string]float64{"vmo_kt": a.VMO / KtToMS, "mmo": a.MMO, "ceiling_fl": a.CertifiedCeiling / (100 * FtToM)},
	}
	out, err := yaml.Marshal(man)
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(dir, TablesManifest), out, 0o644); err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := WriteGridCSV(&buf, g, []string{"mass_kg", "fl", "mach", "isa_dev_c", "fuel_flow_kg_h"}, []float64{1, 1, 1, 1, 1.0 / 3600}); err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, CruiseFuelFlowFile), buf.Bytes(), 0o644)
}
