package perf

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// Operator tables, format version 2 (documented in aircraft/TABLES.md): a
// directory holding tables.yaml (format name and version, aircraft name,
// source of the data, mass and speed limits, ceiling, the buffet reference
// area, engine count and idle fuel flow, the climb and descent schedule)
// and five tables: cruise fuel flow and residual rates of climb by mass,
// level, Mach and ISA deviation; climb and descent time, fuel and distance
// between 1,500 ft and a level by mass, level and ISA deviation; and buffet
// onset CL by Mach. Version 1 sets (manifest and cruise fuel flow only)
// are still read and validated, but cannot be planned with.

const (
	// TablesFormat and TablesVersion identify the format in tables.yaml.
	TablesFormat  = "levelpath-tables"
	TablesVersion = 2
	// File names in a table directory.
	TablesManifest     = "tables.yaml"
	CruiseFuelFlowFile = "cruise_fuel_flow.csv"
	ThrustLimitsFile   = "thrust_limits.csv"
	ClimbFile          = "climb.csv"
	DescentFile        = "descent.csv"
	BuffetFile         = "buffet.csv"
)

// TransitionBaseFL is the level where every climb-table entry starts and
// every descent-table entry ends: 1,500 ft.
const TransitionBaseFL = 15

// Tables is a validated set of operator tables. Grids are in SI (levels
// in FL): masses kg, Mach, ISA deviation K.
type Tables struct {
	Dir                        string
	Version                    int
	Name, Description, Source  string
	OEW, MZFW, MTOW, MLW       float64 // kg
	FuelCapacity               float64 // kg
	VMO, MMO, CertifiedCeiling float64 // CAS m/s, Mach, pressure altitude m

	// Version 2 only (zero or nil in a version 1 set).
	WingArea     float64  // reference area of the buffet CL, m²
	EngineCount  int      // engines (taxi fuel is count × idle fuel flow)
	IdleFuelFlow float64  // per engine, sea-level static idle, kg/s
	Schedule     Schedule // the climb and descent schedule of the tables

	// CruiseFuelFlow is fuel flow (kg/s, all engines) by mass (kg), FL,
	// Mach and ISA deviation (K).
	CruiseFuelFlow *Grid
	// CruiseThrust is the level-flight thrust (N, all engines; thrust =
	// drag) on the same grid, from the cruise table's optional sixth
	// column; nil when not given. With it a table aircraft has a drag and
	// a propulsion efficiency (contrails); without it those are unknown.
	CruiseThrust *Grid
	// ROCClimb and ROCCruise are residual rates of climb (m/s of pressure
	// altitude, holding Mach) at max climb and max cruise thrust, on the
	// axes of CruiseFuelFlow's kind (their own values).
	ROCClimb, ROCCruise *Grid
	// Climb* are from 1,500 ft to a level by mass at 1,500 ft, FL and ISA
	// deviation; Descent* from a level to 1,500 ft by mass at the start of
	// the descent. Time s, fuel kg, air distance m; NaN where the table
	// says the level cannot be reached.
	ClimbTime, ClimbFuel, ClimbDistance       *Grid
	DescentTime, DescentFuel, DescentDistance *Grid
	// Buffet is the buffet-onset boundary at 1 g (as Aircraft.Buffet).
	Buffet []BuffetPoint
}

// UnsupportedError reports valid input that levelpath cannot use.
type UnsupportedError struct {
	Source, Reason string
}

func (e *UnsupportedError) Error() string { return e.Source + ": unsupported: " + e.Reason }

type yamlTables struct {
	Format      *string            `yaml:"format"`
	Version     *int               `yaml:"version"`
	Name        *string            `yaml:"name"`
	Description string             `yaml:"description"`
	Source      *string            `yaml:"source"`
	Mass        *yamlMass          `yaml:"mass"`
	Limits      *yamlLimits        `yaml:"limits"`
	Wing        *yamlTablesWing    `yaml:"wing"`
	Engines     *yamlTablesEngines `yaml:"engines"`
	Schedule    *yamlSchedule      `yaml:"schedule"`
}

type yamlTablesWing struct {
	Area *float64 `yaml:"area_m2"`
}

type yamlTablesEngines struct {
	Count        *float64 `yaml:"count"`
	IdleFuelFlow *float64 `yaml:"idle_fuel_flow_kg_h"`
}

func init() {
	sectionOf["perf.yamlTablesWing"] = "wing."
	sectionOf["perf.yamlTablesEngines"] = "engines."
}

// maxTableFile bounds each table file (checked from its size before it is
// read).
const maxTableFile = 16 * maxFileSize

// LoadTables reads and validates the table directory dir: the manifest's
// format, version and fields (errors name the field), then each table's
// header, numbers, axes, duplicates and holes (errors name file, line and
// column), that every mass axis covers OEW..MTOW, level axes reach the
// certified ceiling and Mach axes MMO, and the physical orderings listed
// in aircraft/TABLES.md. Files over the size limit are refused before they
// are read. A version 1 set is read as far as version 1 goes (manifest and
// cruise fuel flow); Load refuses to plan with it.
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
	case *y.Version != 1 && *y.Version != TablesVersion:
		return nil, &UnsupportedError{Source: man, Reason: fmt.Sprintf("table format version %d; this levelpath reads versions 1 and %d", *y.Version, TablesVersion)}
	}
	if r.err != nil {
		return nil, r.err
	}
	t := &Tables{Dir: dir, Version: *y.Version, Description: y.Description}
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
	if t.Version == 1 {
		for _, k := range []struct {
			present bool
			name    string
		}{{y.Wing != nil, "wing"}, {y.Engines != nil, "engines"}, {y.Schedule != nil, "schedule"}} {
			if k.present {
				r.fail(k.name, "not part of format version 1 (set version: 2)")
			}
		}
	} else {
		t.readV2Manifest(r, &y)
	}
	if r.err != nil {
		return nil, r.err
	}
	if err := t.readCruise(); err != nil {
		return nil, err
	}
	if t.Version == 1 {
		return t, nil
	}
	for _, f := range []func() error{t.readThrust, t.readTransitions, t.readBuffet} {
		if err := f(); err != nil {
			return nil, err
		}
	}
	return t, nil
}

// readV2Manifest reads the manifest fields version 2 adds.
func (t *Tables) readV2Manifest(r *fieldReader, y *yamlTables) {
	if y.Wing == nil {
		r.fail("wing", "missing (wing.area_m2, the reference area of the buffet CL)")
	} else {
		t.WingArea = r.num("wing.area_m2", y.Wing.Area, 0, 1500, true)
	}
	if y.Engines == nil {
		r.fail("engines", "missing (engines.count and engines.idle_fuel_flow_kg_h)")
	} else {
		c := r.num("engines.count", y.Engines.Count, 1, 8, false)
		if r.err == nil && c != math.Trunc(c) {
			r.fail("engines.count", "%g is not a whole number", c)
		}
		t.EngineCount = int(c)
		t.IdleFuelFlow = r.num("engines.idle_fuel_flow_kg_h", y.Engines.IdleFuelFlow, 0, 5000, true) / 3600
	}
	if s := y.Schedule; s == nil {
		r.fail("schedule", "missing (the climb and descent schedule the tables were made for)")
	} else {
		casLow := r.num("schedule.cas_low_kt", s.CASLow, 0, 600, true)
		cas := r.num("schedule.cas_kt", s.CAS, 0, 600, true)
		mach := r.num("schedule.mach", s.Mach, 0, 0.99, true)
		if r.err == nil {
			switch {
			case casLow*KtToMS > t.VMO+1e-9:
				r.fail("schedule.cas_low_kt", "%g kt is above limits.vmo_kt", casLow)
			case cas*KtToMS > t.VMO+1e-9:
				r.fail("schedule.cas_kt", "%g kt is above limits.vmo_kt", cas)
			case mach > t.MMO:
				r.fail("schedule.mach", "%g is above limits.mmo %g", mach, t.MMO)
			}
		}
		t.Schedule = Schedule{CASLow: KtToMS * casLow, CAS: KtToMS * cas, Mach: mach}
	}
}

// readTable reads one table file of the set.
func (t *Tables) readTable(name string, axes, values []ColumnSpec) ([]*Grid, error) {
	path := filepath.Join(t.Dir, name)
	data, err := readLimited(path, maxTableFile)
	if err != nil {
		return nil, err
	}
	return ReadGridsCSV(bytes.NewReader(data), path, axes, values)
}

var cruiseAxes = []ColumnSpec{ColMass, ColLevel, ColMach, ColISADev}

func (t *Tables) readCruise() error {
	path := filepath.Join(t.Dir, CruiseFuelFlowFile)
	data, err := readLimited(path, maxTableFile)
	if err != nil {
		return err
	}
	values := []ColumnSpec{ColFuelFF}
	if t.Version >= 2 && headerFields(data) == len(cruiseAxes)+2 {
		values = append(values, ColThrust) // the optional thrust column
	}
	gs, err := ReadGridsCSV(bytes.NewReader(data), path, cruiseAxes, values)
	if err != nil {
		return err
	}
	g := gs[0]
	if err := t.checkCover(g, "fuel_flow"); err != nil {
		return err
	}
	if err := g.checkMonotone(0, 1, "fuel flow", false); err != nil {
		return err
	}
	if len(gs) > 1 {
		// Drag rises with mass at a given level, Mach and temperature.
		if err := gs[1].checkMonotone(0, 1, "thrust", false); err != nil {
			return err
		}
		t.CruiseThrust = gs[1]
	}
	t.CruiseFuelFlow = g
	return nil
}

func (t *Tables) readThrust() error {
	gs, err := t.readTable(ThrustLimitsFile, cruiseAxes, []ColumnSpec{ColROCClimb, ColROCCruise})
	if err != nil {
		return err
	}
	if err := t.checkCover(gs[0], "roc_climb"); err != nil {
		return err
	}
	for off, c := range gs[0].Values {
		if gs[1].Values[off] > c {
			return &TableError{File: gs[1].Name, Line: gs[1].Lines[off], Column: "roc_cruise", Reason: fmt.Sprintf("%.4g m/s is above roc_climb %.4g m/s (max cruise thrust cannot exceed max climb thrust)", gs[1].Values[off], c)}
		}
	}
	// Where thrust exceeds drag, a heavier aircraft climbs no faster
	// (where drag exceeds thrust the rate's division by mass reverses it).
	if err := gs[0].checkMonotone(0, -1, "roc_climb", true); err != nil {
		return err
	}
	if err := gs[1].checkMonotone(0, -1, "roc_cruise", true); err != nil {
		return err
	}
	t.ROCClimb, t.ROCCruise = gs[0], gs[1]
	return nil
}

var transitionAxes = []ColumnSpec{ColMass, ColLevel, ColISADev}
var transitionValues = []ColumnSpec{ColTime, ColFuel, ColDistance}

func (t *Tables) readTransitions() error {
	for _, f := range []struct {
		name     string
		dst      []**Grid
		massNote string
	}{
		{ClimbFile, []**Grid{&t.ClimbTime, &t.ClimbFuel, &t.ClimbDistance}, "mass at 1,500 ft"},
		{DescentFile, []**Grid{&t.DescentTime, &t.DescentFuel, &t.DescentDistance}, "mass at the start of the descent"},
	} {
		gs, err := t.readTable(f.name, transitionAxes, transitionValues)
		if err != nil {
			return err
		}
		if err := t.checkCover(gs[0], "time"); err != nil {
			return err
		}
		fls := gs[0].Axes[1].Values
		if fls[0] != TransitionBaseFL {
			return &TableError{File: gs[0].Name, Column: "fl", Reason: fmt.Sprintf("lowest level FL%g; the table must start at 1,500 ft (FL%d) with zero time, fuel and distance", fls[0], TransitionBaseFL)}
		}
		for j, g := range gs {
			if err := g.checkMonotone(1, 1, transitionValues[j].SI, false); err != nil {
				return err
			}
			if err := g.checkBase(); err != nil {
				return err
			}
			*f.dst[j] = g
		}
		// Defined together: a level reachable for one quantity is for all.
		for off := range gs[0].Values {
			if n0, n1, n2 := math.IsNaN(gs[0].Values[off]), math.IsNaN(gs[1].Values[off]), math.IsNaN(gs[2].Values[off]); n0 != n1 || n0 != n2 {
				return &TableError{File: gs[0].Name, Line: gs[0].Lines[off], Reason: "time, fuel and distance must be all given or all blank (blank: the level cannot be reached)"}
			}
		}
		if f.name == ClimbFile {
			// A heavier aircraft burns no less to climb to a level.
			if err := gs[1].checkMonotone(0, 1, "fuel", false); err != nil {
				return err
			}
		}
	}
	return nil
}

// headerFields returns the number of fields of the first line of a CSV
// table that is not a comment (0 if none): it tells which optional
// columns the header names.
func headerFields(data []byte) int {
	for len(data) > 0 {
		line := data
		if i := bytes.IndexByte(data, '\n'); i >= 0 {
			line, data = data[:i], data[i+1:]
		} else {
			data = nil
		}
		if len(bytes.TrimSpace(line)) == 0 || line[0] == '#' {
			continue
		}
		return bytes.Count(line, []byte{','}) + 1
	}
	return 0
}

// checkBase requires zero at the lowest level (axis 1, FL15) everywhere.
func (g *Grid) checkBase() error {
	nfl, ndev := len(g.Axes[1].Values), len(g.Axes[2].Values)
	for off, v := range g.Values {
		if (off/ndev)%nfl == 0 && v != 0 {
			return &TableError{File: g.Name, Line: g.Lines[off], Column: g.Value, Reason: "not zero at 1,500 ft (the table is measured from 1,500 ft)"}
		}
	}
	return nil
}

func (t *Tables) readBuffet() error {
	gs, err := t.readTable(BuffetFile, []ColumnSpec{ColMach}, []ColumnSpec{ColBuffetCL})
	if err != nil {
		return err
	}
	g := gs[0]
	rows := make([][]float64, len(g.Values))
	for i, cl := range g.Values {
		rows[i] = []float64{g.Axes[0].Values[i], cl}
	}
	r := &fieldReader{source: g.Name}
	t.Buffet = r.buffet(rows, t.MMO)
	if r.err != nil {
		fe := r.err.(*FieldError)
		line := 0
		if i, err := strconv.Atoi(strings.TrimSuffix(strings.TrimPrefix(fe.Field, "buffet["), "]")); err == nil && i < len(g.Lines) {
			line = g.Lines[i]
		}
		reason := strings.ReplaceAll(fe.Reason, "limits.mmo", "tables.yaml limits.mmo")
		return &TableError{File: g.Name, Line: line, Reason: reason}
	}
	return nil
}

// checkCover checks a 4-axis or 3-axis table's mass axis covers OEW..MTOW,
// its level axis the certified ceiling and, with a Mach axis, MMO.
func (t *Tables) checkCover(g *Grid, column string) error {
	ms := g.Axes[0].Values
	if ms[0] > t.OEW || ms[len(ms)-1] < t.MTOW {
		return &TableError{File: g.Name, Column: "mass", Reason: fmt.Sprintf("mass axis %g..%g kg does not cover OEW..MTOW %g..%g kg", ms[0], ms[len(ms)-1], t.OEW, t.MTOW)}
	}
	if t.Version == 1 {
		return nil
	}
	fls := g.Axes[1].Values
	if ceil := math.Round(t.CertifiedCeiling/(100*FtToM)*1e6) / 1e6; fls[len(fls)-1] < ceil-1e-6 {
		return &TableError{File: g.Name, Column: "fl", Reason: fmt.Sprintf("level axis ends at FL%g, below the certified ceiling FL%g", fls[len(fls)-1], ceil)}
	}
	if len(g.Axes) == 4 {
		if mv := g.Axes[2].Values; mv[len(mv)-1] < t.MMO-1e-9 {
			return &TableError{File: g.Name, Column: "mach", Reason: fmt.Sprintf("Mach axis ends at %g, below MMO %g", mv[len(mv)-1], t.MMO)}
		}
	}
	return nil
}

// CheckDomain returns an *OutOfTableError when a cruise at level fl and
// ISA deviation isaDev (K) lies outside the level or temperature axis of
// any table a plan queries there (cruise, thrust, climb, descent); nil for
// a version 1 set's missing tables.
func (t *Tables) CheckDomain(fl, isaDev float64) error {
	for _, g := range []*Grid{t.CruiseFuelFlow, t.ROCClimb, t.ClimbTime, t.DescentTime} {
		if g == nil {
			continue
		}
		for _, q := range [2]struct {
			axis int
			v    float64
		}{{1, fl}, {len(g.Axes) - 1, isaDev}} {
			ax := g.Axes[q.axis]
			if lo, hi := ax.Values[0], ax.Values[len(ax.Values)-1]; !(q.v >= lo && q.v <= hi) {
				return &OutOfTableError{Table: g.Name, Axis: ax.Name, Value: q.v, Min: lo, Max: hi}
			}
		}
	}
	return nil
}

// missingForPlanning names what a version 1 set lacks for planning.
func (t *Tables) missingForPlanning() string {
	return fmt.Sprintf("format version 1 holds the cruise fuel flow only; planning needs version 2, which adds %s, %s, %s and %s and the manifest's wing, engines and schedule (perf/aircraft/TABLES.md): re-export with `levelpath aircraft export` or add them and set version: 2",
		ThrustLimitsFile, ClimbFile, DescentFile, BuffetFile)
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

// TablesDigest returns the hex SHA-256 of the table set in dir, for
// resume keys and caches: the name, length and contents of each file of
// the format in a fixed order (an absent file hashed as absent). Files
// are read with the size limits of LoadTables.
func TablesDigest(dir string) (string, error) {
	h := sha256.New()
	for _, name := range []string{TablesManifest, CruiseFuelFlowFile, ThrustLimitsFile, ClimbFile, DescentFile, BuffetFile} {
		path := filepath.Join(dir, name)
		if _, err := os.Stat(path); errors.Is(err, os.ErrNotExist) {
			fmt.Fprintf(h, "%s:absent\n", name)
			continue
		}
		data, err := readLimited(path, maxTableFile)
		if err != nil {
			return "", err
		}
		fmt.Fprintf(h, "%s:%d\n", name, len(data))
		h.Write(data)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}
