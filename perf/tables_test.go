package perf

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// smallGrid is a coarse export grid for demo-regional (OEW 24 t, MTOW
// 40 t, MMO 0.82, ceiling FL410) that still meets the coverage rules.
func smallGrid() ExportGrid {
	return ExportGrid{
		Masses: []float64{24000, 32000, 40000}, Levels: []float64{250, 330, 370, 410},
		Machs: []float64{0.70, 0.76, 0.82}, ISADevs: []float64{-10, 0, 20},
		TransitionMasses: []float64{24000, 32000, 40000}, TransitionLevels: []float64{15, 200, 330, 410},
	}
}

// Self-consistency check (no outside source): an exported table set reads
// back with the model's values at the grid points (10 digits written), and
// the aircraft Load builds from it answers with those values.
func TestExportTablesRoundTrip(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	dir := t.TempDir()
	if err := a.ExportTables(dir, smallGrid()); err != nil {
		t.Fatal(err)
	}
	tb, err := LoadTables(dir)
	if err != nil {
		t.Fatal(err)
	}
	if tb.Version != 2 || tb.Name != a.Name || tb.MTOW != a.MTOW || relErr(tb.VMO, a.VMO) > 1e-12 || relErr(tb.CertifiedCeiling, a.CertifiedCeiling) > 1e-12 ||
		!strings.Contains(tb.Source, "exported") || tb.WingArea != a.WingArea || tb.EngineCount != a.Engines.Count || len(tb.Buffet) != len(a.Buffet) {
		t.Errorf("manifest read back as %+v", tb)
	}
	st := State{Mass: 32000, Pressure: FLToPressure(330), Mach: 0.76, ISADev: 20}
	want := a.Point(st)
	got, err := tb.CruiseFuelFlow.At(32000, 330, 0.76, 20)
	if err != nil || relErr(got, want.FuelFlow) > 1e-8 {
		t.Errorf("fuel flow %v (%v), model %v", got, err, want.FuelFlow)
	}
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	if ta.Tables() == nil || a.Tables() != nil {
		t.Fatal("Tables() does not tell the table aircraft from the model")
	}
	p := ta.Point(st)
	if relErr(p.FuelFlow, want.FuelFlow) > 1e-8 || relErr(p.ResidualClimb, want.ResidualClimb) > 1e-8 ||
		relErr(p.BuffetMargin, want.BuffetMargin) > 1e-12 || p.ThrustLimited != want.ThrustLimited ||
		relErr(p.Drag, want.Drag) > 1e-8 || relErr(p.CD, want.CD) > 1e-8 || !math.IsNaN(p.MaxClimbThrust) || !ta.KnowsThrust() {
		t.Errorf("table Point %+v\nmodel Point %+v", p, want)
	}
	s := DefaultSchedule(a)
	for _, fl := range []float64{200, 330} {
		c0, err0 := a.Climb(32000, FLToPressure(15), FLToPressure(fl), 0, s)
		c1, err1 := ta.Climb(32000, FLToPressure(15), FLToPressure(fl), 0, s)
		if err0 != nil || err1 != nil || relErr(c1.Fuel, c0.Fuel) > 1e-8 || relErr(c1.Time, c0.Time) > 1e-8 || relErr(c1.Distance, c0.Distance) > 1e-8 {
			t.Errorf("climb to FL%.0f: tables %+v (%v), model %+v (%v)", fl, c1, err1, c0, err0)
		}
		d0, err0 := a.Descent(32000, FLToPressure(fl), FLToPressure(15), 0, s)
		d1, err1 := ta.Descent(32000, FLToPressure(fl), FLToPressure(15), 0, s)
		if err0 != nil || err1 != nil || relErr(d1.Fuel, d0.Fuel) > 1e-8 || relErr(d1.Time, d0.Time) > 1e-8 {
			t.Errorf("descent from FL%.0f: tables %+v (%v), model %+v (%v)", fl, d1, err1, d0, err0)
		}
	}
	// A climb between two table levels is the difference of two entries
	// from the 1,500-ft mass that reaches the lower one with this mass.
	c200, _ := ta.Climb(32000, FLToPressure(15), FLToPressure(200), 0, s)
	step, err := ta.Climb(32000-c200.Fuel, FLToPressure(200), FLToPressure(330), 0, s)
	c330, _ := ta.Climb(32000, FLToPressure(15), FLToPressure(330), 0, s)
	if err != nil || math.Abs(step.Fuel-(c330.Fuel-c200.Fuel)) > 1e-6*c330.Fuel || math.Abs(step.Time-(c330.Time-c200.Time)) > 1e-6*c330.Time {
		t.Errorf("FL200-FL330 step %+v (%v), entries differ by %.3f kg %.3f s", step, err, c330.Fuel-c200.Fuel, c330.Time-c200.Time)
	}
	// The performance factor scales the tables' fuel flows too.
	tf, err := ta.WithPerfFactor(3)
	if err != nil || relErr(tf.Point(st).FuelFlow, 1.03*p.FuelFlow) > 1e-12 {
		t.Errorf("perf factor: %v (%v), want %v", tf.Point(st).FuelFlow, err, 1.03*p.FuelFlow)
	}
	if err := ta.ExportTables(t.TempDir(), smallGrid()); err == nil {
		t.Error("exporting a table aircraft again accepted")
	}
}

// Outside a table nothing is extrapolated: the queries are errors or
// infeasible, naming the axis, value and range.
func TestTablesOutOfRange(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	dir := t.TempDir()
	if err := a.ExportTables(dir, smallGrid()); err != nil {
		t.Fatal(err)
	}
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	p := ta.Point(State{Mass: 32000, Pressure: FLToPressure(200), Mach: 0.76})
	if !math.IsNaN(p.FuelFlow) || !p.ThrustLimited {
		t.Errorf("FL200 below the cruise table: %+v, want NaN fuel flow and thrust-limited", p)
	}
	_, err = ta.Climb(32000, FLToPressure(15), FLToPressure(430), 0, DefaultSchedule(a))
	var oe *OutOfTableError
	if !errors.As(err, &oe) || oe.Axis != "fl" || !strings.Contains(err.Error(), "fl 430 outside the table's 15..410") {
		t.Errorf("climb above the table: %v", err)
	}
	err = ta.CheckTableDomain(350, 25)
	if !errors.As(err, &oe) || oe.Axis != "isa_dev_k" || oe.Value != 25 || oe.Max != 20 {
		t.Errorf("ISA+25 against a table to ISA+20: %v", err)
	}
	if err := ta.CheckTableDomain(350, 5); err != nil {
		t.Errorf("FL350 ISA+5 inside the tables: %v", err)
	}
	if err := a.CheckTableDomain(999, 999); err != nil {
		t.Errorf("a model has no table domain: %v", err)
	}
	if _, _, ok := ta.MachBand(32000, FLToPressure(350), 0, 1.3); !ok {
		t.Error("no Mach band at FL350 inside the tables")
	}
	if b, ok := ta.SpeedBand(32000, FLToPressure(200), 0, 1.3); ok {
		t.Errorf("a band at FL200, below the thrust table: %+v", b)
	}
	if _, err := ta.Holding(30000, FLToPressure(15), 0, 0, 0); err == nil || !strings.Contains(err.Error(), "outside the table") {
		t.Errorf("holding at 1,500 ft below the cruise table: %v", err)
	}
}

// Where the model cannot climb (too heavy, too hot, too high), the export
// leaves the entry blank and the table aircraft reports a *LimitError.
func TestTablesUnreachableLevel(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	g := smallGrid()
	g.TransitionLevels = []float64{15, 200, 330, 410, 450}
	g.Levels = append(g.Levels, 450)
	dir := t.TempDir()
	if err := a.ExportTables(dir, g); err != nil {
		t.Fatal(err)
	}
	_, errModel := a.Climb(40000, FLToPressure(15), FLToPressure(450), 20, DefaultSchedule(a))
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	_, err = ta.Climb(40000, FLToPressure(15), FLToPressure(450), 20, DefaultSchedule(a))
	var le *LimitError
	if !errors.As(errModel, &le) {
		t.Skipf("the model climbs to FL450 at MTOW, ISA+20 (%v); no blank entry to test", errModel)
	}
	if !errors.As(err, &le) || !strings.Contains(err.Error(), "not reached") {
		t.Errorf("table climb to a blank entry: %v (model: %v)", err, errModel)
	}
	data, _ := os.ReadFile(filepath.Join(dir, ClimbFile))
	if !strings.Contains(string(data), "40000,450,20,,,") {
		t.Errorf("no blank entry at 40000 kg, FL450, ISA+20 in %s", ClimbFile)
	}
}

// A thrust ceiling above the top of the tables is reported as reached at
// their top, and flagged: never extrapolated, never silent.
func TestTablesEnvelopeTop(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	dir := t.TempDir()
	if err := a.ExportTables(dir, smallGrid()); err != nil {
		t.Fatal(err)
	}
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	em, err := a.Envelope(a.OEW, 0, 1.3)
	if err != nil {
		t.Fatal(err)
	}
	if !(em.MaxFLThrust > 410) {
		t.Skipf("the model's thrust ceiling at OEW is FL%.0f, not above the table's FL410", em.MaxFLThrust)
	}
	et, err := ta.Envelope(a.OEW, 0, 1.3)
	if err != nil || et.MaxFLThrust != 410 || !et.MaxFLThrustAtTableTop || em.MaxFLThrustAtTableTop {
		t.Errorf("tables: thrust ceiling FL%v at top %v (%v); model FL%.1f at top %v", et.MaxFLThrust, et.MaxFLThrustAtTableTop, err, em.MaxFLThrust, em.MaxFLThrustAtTableTop)
	}
	if et.MaxFLBuffet != em.MaxFLBuffet {
		t.Errorf("buffet ceiling from tables FL%.3f, model FL%.3f (the same buffet table)", et.MaxFLBuffet, em.MaxFLBuffet)
	}
}

// A step from the top of a climb at MTOW starts from the table's heaviest
// 1,500-ft mass (rounding of the fixed point must not leave the table).
func TestTablesStepAtMTOW(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	dir := t.TempDir()
	if err := a.ExportTables(dir, smallGrid()); err != nil {
		t.Fatal(err)
	}
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	s := DefaultSchedule(ta)
	c1, err := ta.Climb(a.MTOW, FLToPressure(15), FLToPressure(200), 0, s)
	if err != nil {
		t.Fatal(err)
	}
	step, err := ta.Climb(a.MTOW-c1.Fuel, FLToPressure(200), FLToPressure(330), 0, s)
	c2, _ := ta.Climb(a.MTOW, FLToPressure(15), FLToPressure(330), 0, s)
	if err != nil || math.Abs(step.Fuel-(c2.Fuel-c1.Fuel)) > 1e-6*c2.Fuel {
		t.Errorf("step at MTOW: %+v (%v), want fuel %.3f", step, err, c2.Fuel-c1.Fuel)
	}
}
