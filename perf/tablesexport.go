package perf

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"

	"gopkg.in/yaml.v3"
)

// ExportGrid is the grid a model is tabulated on by ExportTables: Masses
// (kg), Levels (FL), Machs and ISADevs (K) for the cruise fuel flow and
// the thrust limits; TransitionMasses (within OEW..MTOW), TransitionLevels
// (FL, starting at FL15) and ISADevs for the climb and descent tables. Each
// axis strictly ascending.
type ExportGrid struct {
	Masses, Levels, Machs, ISADevs     []float64
	TransitionMasses, TransitionLevels []float64
}

// DefaultExportGrid returns the grid `levelpath aircraft export` uses for
// a: 17 masses evenly from OEW - 5 % of MTOW to MTOW + 5 % of MTOW for
// cruise (the planner's interpolation memo looks a little beyond the mass
// limits) and 13 from OEW to MTOW for climb and descent;
// levels FL0 to FL100 every 2,000 ft (holding heights) and then every
// 1,000 ft to 2,000 ft above the certified ceiling; Mach 0.20 to 0.60
// every 0.05 and then every 0.01 to MMO (and MMO itself: the econ Mach of
// a table lies on a table Mach or a band end, so cruise Machs are dense);
// ISA deviations
// -30..+30 K every 10 K; climb and descent levels FL15, FL20 and every
// 1,000 ft from FL30 to the top level.
func DefaultExportGrid(a *Aircraft) ExportGrid {
	var g ExportGrid
	lo, hi := a.OEW-0.05*a.MTOW, 1.05*a.MTOW
	for i := range 17 {
		g.Masses = append(g.Masses, math.Round(lo+float64(i)/16*(hi-lo)))
	}
	for i := range 13 {
		g.TransitionMasses = append(g.TransitionMasses, math.Round(a.OEW+float64(i)/12*(a.MTOW-a.OEW)))
	}
	top := ReportFL(a.CertifiedCeiling/(100*FtToM)) + 20
	for fl := 0.0; fl < 100; fl += 20 {
		g.Levels = append(g.Levels, fl)
	}
	for fl := 100.0; fl < top; fl += 10 {
		g.Levels = append(g.Levels, fl)
	}
	g.Levels = append(g.Levels, top)
	for i := 0; i < 8; i++ {
		g.Machs = append(g.Machs, float64(20+5*i)/100)
	}
	for i := 0; float64(60+i)/100 < a.MMO-1e-9; i++ {
		g.Machs = append(g.Machs, float64(60+i)/100)
	}
	g.Machs = append(g.Machs, a.MMO)
	for d := -30.0; d <= 30; d += 10 {
		g.ISADevs = append(g.ISADevs, d)
	}
	g.TransitionLevels = []float64{TransitionBaseFL, 20}
	for fl := 30.0; fl < top; fl += 10 {
		g.TransitionLevels = append(g.TransitionLevels, fl)
	}
	g.TransitionLevels = append(g.TransitionLevels, top)
	return g
}

func checkAxes(axes ...[]float64) (int, error) {
	size := 1
	for _, v := range axes {
		if len(v) == 0 || !slices.IsSorted(v) || len(slices.Compact(slices.Clone(v))) != len(v) {
			return 0, fmt.Errorf("perf: grid axis %v is empty or not strictly ascending", v)
		}
		size *= len(v)
	}
	if size > maxTableRows {
		return 0, fmt.Errorf("perf: grid of %d points, more than %d", size, maxTableRows)
	}
	return size, nil
}

// CruiseFuelFlowGrid tabulates the model's level-flight fuel flow (Point,
// thrust = drag, including the performance factor) on the grid of masses
// (kg), flight levels, Mach numbers and ISA deviations (K), each ascending.
// Points where the model is thrust- or buffet-limited are tabulated too:
// the table holds fuel flow, not limits. Cost: one Point per grid point.
func (a *Aircraft) CruiseFuelFlowGrid(masses, fls, machs, devs []float64) (*Grid, error) {
	gs, err := a.pointGrids(CruiseFuelFlowFile, masses, fls, machs, devs, []ColumnSpec{ColFuelFF}, func(_ State, p Point) []float64 { return []float64{p.FuelFlow} })
	if err != nil {
		return nil, err
	}
	return gs[0], nil
}

// ThrustLimitGrids tabulates the model's residual rates of climb (m/s,
// holding Mach) at max climb and max cruise thrust on the grid, as
// CruiseFuelFlowGrid does fuel flow: Point.ResidualClimb, and the same
// relation with max cruise thrust.
func (a *Aircraft) ThrustLimitGrids(masses, fls, machs, devs []float64) (climb, cruise *Grid, err error) {
	gs, err := a.pointGrids(ThrustLimitsFile, masses, fls, machs, devs, []ColumnSpec{ColROCClimb, ColROCCruise}, func(s State, p Point) []float64 {
		tisa := p.Temperature - s.ISADev
		return []float64{p.ResidualClimb, climbRate(p.MaxCruiseThrust, p.Drag, p.TAS, s.Mass, tisa, p.Temperature)}
	})
	if err != nil {
		return nil, nil, err
	}
	return gs[0], gs[1], nil
}

func (a *Aircraft) pointGrids(name string, masses, fls, machs, devs []float64, cols []ColumnSpec, f func(State, Point) []float64) ([]*Grid, error) {
	size, err := checkAxes(masses, fls, machs, devs)
	if err != nil {
		return nil, err
	}
	axes := []Axis{{ColMass.SI, slices.Clone(masses)}, {ColLevel.SI, slices.Clone(fls)}, {ColMach.SI, slices.Clone(machs)}, {ColISADev.SI, slices.Clone(devs)}}
	gs := make([]*Grid, len(cols))
	for j, c := range cols {
		gs[j] = &Grid{Name: name, Value: c.SI, Axes: axes, Values: make([]float64, 0, size)}
	}
	for _, m := range masses {
		for _, fl := range fls {
			p := FLToPressure(fl)
			for _, mach := range machs {
				for _, dev := range devs {
					st := State{Mass: m, Pressure: p, Mach: mach, ISADev: dev}
					for j, v := range f(st, a.Point(st)) {
						gs[j].Values = append(gs[j].Values, v)
					}
				}
			}
		}
	}
	return gs, nil
}

// TransitionGrids tabulates the model's climbs from 1,500 ft (climb true)
// or descents to 1,500 ft at each level of fls (FL15 first) on the
// aircraft's DefaultSchedule, by mass at the start (kg), level and ISA
// deviation (K): time (s), fuel (kg) and air distance (m), NaN where the
// model cannot fly it (a *LimitError). Cost: one Climb or Descent per grid
// point.
func (a *Aircraft) TransitionGrids(climb bool, masses, fls, devs []float64) ([3]*Grid, error) {
	var gs [3]*Grid
	size, err := checkAxes(masses, fls, devs)
	if err != nil {
		return gs, err
	}
	if fls[0] != TransitionBaseFL {
		return gs, fmt.Errorf("perf: transition levels start at FL%g, want FL%d", fls[0], TransitionBaseFL)
	}
	name := DescentFile
	if climb {
		name = ClimbFile
	}
	axes := []Axis{{ColMass.SI, slices.Clone(masses)}, {ColLevel.SI, slices.Clone(fls)}, {ColISADev.SI, slices.Clone(devs)}}
	for j, c := range transitionValues {
		gs[j] = &Grid{Name: name, Value: c.SI, Axes: axes, Values: make([]float64, 0, size)}
	}
	s := DefaultSchedule(a)
	base := FLToPressure(TransitionBaseFL)
	for _, m := range masses {
		for _, fl := range fls {
			for _, dev := range devs {
				var tr Transition
				var err error
				switch {
				case fl == TransitionBaseFL:
				case climb:
					tr, err = a.Climb(m, base, FLToPressure(fl), dev, s)
				default:
					tr, err = a.Descent(m, FLToPressure(fl), base, dev, s)
				}
				if err != nil {
					if _, ok := err.(*LimitError); !ok {
						return gs, err
					}
					nan := math.NaN()
					tr = Transition{Time: nan, Fuel: nan, Distance: nan}
				}
				gs[0].Values = append(gs[0].Values, tr.Time)
				gs[1].Values = append(gs[1].Values, tr.Fuel)
				gs[2].Values = append(gs[2].Values, tr.Distance)
			}
		}
	}
	return gs, nil
}

// ExportTables writes a's tables in format version 2 to dir (created if
// needed) on grid g: the manifest (naming the model and its performance
// factor as the source) and the five tables, the cruise table with its
// optional thrust column (level-flight drag). Fuel flows and climb fuel
// include a's performance factor. It returns an *UnsupportedError for a
// table aircraft (copy its directory instead). Cost: one Point per cruise
// grid point (twice) and one Climb and one Descent per transition point.
func (a *Aircraft) ExportTables(dir string, g ExportGrid) error {
	if a.tab != nil {
		return &UnsupportedError{Source: a.Name, Reason: "already operator tables (" + a.tab.Dir + "); copy that directory"}
	}
	cruise, err := a.pointGrids(CruiseFuelFlowFile, g.Masses, g.Levels, g.Machs, g.ISADevs, []ColumnSpec{ColFuelFF, ColThrust},
		func(_ State, p Point) []float64 { return []float64{p.FuelFlow, p.Drag} })
	if err != nil {
		return err
	}
	rc, rcr, err := a.ThrustLimitGrids(g.Masses, g.Levels, g.Machs, g.ISADevs)
	if err != nil {
		return err
	}
	cl, err := a.TransitionGrids(true, g.TransitionMasses, g.TransitionLevels, g.ISADevs)
	if err != nil {
		return err
	}
	de, err := a.TransitionGrids(false, g.TransitionMasses, g.TransitionLevels, g.ISADevs)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	s := DefaultSchedule(a)
	man := map[string]any{
		"format": TablesFormat, "version": TablesVersion, "name": a.Name, "description": a.Description,
		"source":   fmt.Sprintf("exported by levelpath from the %s performance model (performance factor %+g %%)", a.Name, a.PerfFactorPct),
		"mass":     map[string]float64{"oew_kg": a.OEW, "mzfw_kg": a.MZFW, "mtow_kg": a.MTOW, "mlw_kg": a.MLW, "fuel_capacity_kg": a.FuelCapacity},
		"limits":   map[string]float64{"vmo_kt": a.VMO / KtToMS, "mmo": a.MMO, "ceiling_fl": a.CertifiedCeiling / (100 * FtToM)},
		"wing":     map[string]float64{"area_m2": a.WingArea},
		"engines":  map[string]float64{"count": float64(a.Engines.Count), "idle_fuel_flow_kg_h": a.Engines.IdleFuelFlow * 3600},
		"schedule": map[string]float64{"cas_low_kt": s.CASLow / KtToMS, "cas_kt": s.CAS / KtToMS, "mach": s.Mach},
	}
	out, err := yaml.Marshal(man)
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(dir, TablesManifest), out, 0o644); err != nil {
		return err
	}
	bg := &Grid{Name: BuffetFile, Axes: []Axis{{ColMach.SI, nil}}}
	for _, b := range a.Buffet {
		bg.Axes[0].Values = append(bg.Axes[0].Values, b.Mach)
		bg.Values = append(bg.Values, b.CL)
	}
	fpm := FtToM / 60
	for _, f := range []struct {
		name    string
		gs      []*Grid
		header  []string
		factors []float64
	}{
		{CruiseFuelFlowFile, cruise, []string{"mass_kg", "fl", "mach", "isa_dev_c", "fuel_flow_kg_h", "thrust_kn"}, []float64{1, 1, 1, 1, 1.0 / 3600, 1000}},
		{ThrustLimitsFile, []*Grid{rc, rcr}, []string{"mass_kg", "fl", "mach", "isa_dev_c", "roc_climb_ft_min", "roc_cruise_ft_min"}, []float64{1, 1, 1, 1, fpm, fpm}},
		{ClimbFile, cl[:], []string{"mass_kg", "fl", "isa_dev_c", "time_min", "fuel_kg", "distance_nm"}, []float64{1, 1, 1, 60, 1, NMToM}},
		{DescentFile, de[:], []string{"mass_kg", "fl", "isa_dev_c", "time_min", "fuel_kg", "distance_nm"}, []float64{1, 1, 1, 60, 1, NMToM}},
		{BuffetFile, []*Grid{bg}, []string{"mach", "cl"}, []float64{1, 1}},
	} {
		var buf bytes.Buffer
		if err := WriteGridsCSV(&buf, f.gs, f.header, f.factors); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, f.name), buf.Bytes(), 0o644); err != nil {
			return err
		}
	}
	return nil
}
