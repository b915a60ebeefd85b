package perf

import (
	"fmt"
	"math"
	"slices"
)

// Planning from operator tables. An *Aircraft built by Tables.Aircraft
// carries its tables; every method the planner calls then answers from
// them instead of the drag polar and engine model:
//
//   - level-flight fuel flow: CruiseFuelFlow (times the performance factor);
//   - residual climb (Point.ResidualClimb, the thrust-limited ceiling) and
//     the thrust ends of the Mach band: ROCClimb and ROCCruise (drag over
//     max cruise thrust is ROCCruise < 0);
//   - buffet onset: the buffet table with the manifest's reference area,
//     by the same code as a model;
//   - climbs and descents: the climb and descent tables, as differences of
//     two entries (see Climb).
//
// All tables are interpolated multilinearly (Grid.At) and never
// extrapolated. Fields of Point that tables do not hold (the max thrusts;
// drag and CD unless the cruise table has its optional thrust column) are
// NaN.

// Tables returns the operator tables a plans from, nil for a performance
// model.
func (a *Aircraft) Tables() *Tables { return a.tab }

// Aircraft returns the plannable aircraft of a version 2 table set, or an
// *UnsupportedError naming what a version 1 set lacks.
func (t *Tables) Aircraft() (*Aircraft, error) {
	if t.Version < 2 {
		return nil, &UnsupportedError{Source: t.Dir, Reason: t.missingForPlanning()}
	}
	// LoadTables guarantees these; a hand-built Tables must too.
	if t.CruiseFuelFlow == nil || t.ROCClimb == nil || t.ROCCruise == nil || t.ClimbTime == nil || t.ClimbFuel == nil ||
		t.ClimbDistance == nil || t.DescentTime == nil || t.DescentFuel == nil || t.DescentDistance == nil || len(t.Buffet) < 2 {
		return nil, fmt.Errorf("perf: tables of %s are incomplete (use LoadTables)", t.Name)
	}
	if len(t.CruiseFuelFlow.Axes) != 4 || !sameAxes(t.CruiseFuelFlow, t.CruiseThrust) || !sameAxes(t.ROCClimb, t.ROCCruise) || len(t.ROCClimb.Axes) != 4 {
		return nil, fmt.Errorf("perf: tables of %s: fuel flow and thrust, and the two rates of climb, must each share one 4-axis grid (use LoadTables)", t.Name)
	}
	return &Aircraft{
		Name: t.Name, Description: t.Description,
		OEW: t.OEW, MZFW: t.MZFW, MTOW: t.MTOW, MLW: t.MLW, FuelCapacity: t.FuelCapacity,
		WingArea: t.WingArea,
		Engines:  Engines{Count: t.EngineCount, IdleFuelFlow: t.IdleFuelFlow},
		VMO:      t.VMO, MMO: t.MMO, CertifiedCeiling: t.CertifiedCeiling,
		Buffet:   append([]BuffetPoint(nil), t.Buffet...),
		Schedule: t.Schedule,
		tab:      t,
	}, nil
}

// KnowsThrust reports whether Point gives the level-flight drag (thrust)
// and so a propulsion efficiency: always for a model, for a table
// aircraft when its cruise table has the optional thrust column.
func (a *Aircraft) KnowsThrust() bool { return a.tab == nil || a.tab.CruiseThrust != nil }

// CheckTableDomain returns nil for a model, and for a table aircraft an
// *OutOfTableError when cruise at level fl with ISA deviation isaDev (K)
// lies outside a table's level or temperature range (Tables.CheckDomain).
func (a *Aircraft) CheckTableDomain(fl, isaDev float64) error {
	if a.tab == nil {
		return nil
	}
	return a.tab.CheckDomain(fl, isaDev)
}

// CheckTransitionLevel returns nil for a model, and for a table aircraft
// an *OutOfTableError when level fl (a climb's start or a descent's end)
// lies outside the climb or descent table's levels.
func (a *Aircraft) CheckTransitionLevel(fl float64) error {
	if a.tab == nil {
		return nil
	}
	for _, g := range []*Grid{a.tab.ClimbTime, a.tab.DescentTime} {
		v := g.Axes[1].Values
		if !(fl >= v[0]-1e-9 && fl <= v[len(v)-1]) {
			return &OutOfTableError{Table: g.Name, Axis: "fl", Value: fl, Min: v[0], Max: v[len(v)-1]}
		}
	}
	return nil
}

// at4 looks g up at (mass, fl, mach, isaDev); NaN outside the table.
func at4(g *Grid, mass, fl, mach, isaDev float64) float64 {
	c, ok := g.locate4([4]float64{mass, fl, mach, isaDev})
	if !ok {
		return math.NaN()
	}
	return g.eval4(&c)
}

// sameAxes reports whether b is nil or has a's axes.
func sameAxes(a, b *Grid) bool {
	if b == nil {
		return true
	}
	if len(a.Axes) != len(b.Axes) || len(a.Values) != len(b.Values) {
		return false
	}
	for i := range a.Axes {
		if !slices.Equal(a.Axes[i].Values, b.Axes[i].Values) {
			return false
		}
	}
	return true
}

// tableFF is the table's level-flight fuel flow (kg/s) at level fl with
// the performance factor.
func (a *Aircraft) tableFF(mass, fl, mach, isaDev float64) float64 {
	return at4(a.tab.CruiseFuelFlow, mass, fl, mach, isaDev) * a.fuelFactor()
}

// The searches over Mach at one level (SpeedBand, EconMach, LRCMach) ask
// for many Machs at one pressure; for a table aircraft these return the
// function of Mach they search, converting the pressure to a level once.

// tableExcessFn is excessThrust of a table aircraft as a function of Mach.
func (a *Aircraft) tableExcessFn(mass, p, t, tisa float64) func(float64) float64 {
	fl, dev := PressureToFL(p), t-tisa
	return func(m float64) float64 { return at4(a.tab.ROCCruise, mass, fl, m, dev) }
}

// tableEconCostFn is econCost of a table aircraft as a function of Mach.
func (a *Aircraft) tableEconCostFn(mass, p, t, tisa, ciPerS, wind float64) func(float64) float64 {
	fl, dev, snd := PressureToFL(p), t-tisa, SpeedOfSound(t)
	return func(m float64) float64 {
		gs := m*snd + wind
		if !(gs > 0) {
			return math.Inf(1)
		}
		return (a.tableFF(mass, fl, m, dev) + ciPerS) / gs
	}
}

// tableEconMach is econMachIn for a table aircraft. Between two Machs of
// the cruise table the interpolated fuel flow is linear in Mach, α + βM,
// so the cost (α + βM + c)/(sM + w) is monotone there (its derivative has
// the constant sign of βw - s(α + c)): the least cost over [lo, hi] lies
// at lo, hi or a Mach of the table between them. Assuming, as econMachIn
// does for a model, that the cost is unimodal over the band, the least of
// those candidates is found by a discrete golden-section search over their
// indices (Kiefer 1953 on integers), then compared with its neighbours.
// Cost: about 2 + 1.44 log2(n) look-ups for n candidates, no allocation
// beyond the look-up closure.
func (a *Aircraft) tableEconMach(mass, p, t, tisa, lo, hi, ciPerS, wind float64) float64 {
	f := a.tableEconCostFn(mass, p, t, tisa, ciPerS, wind)
	ms := a.tab.CruiseFuelFlow.Axes[2].Values
	i0, _ := slices.BinarySearch(ms, lo) // first table Mach >= lo
	if i0 < len(ms) && ms[i0] == lo {
		i0++ // strictly inside
	}
	i1, _ := slices.BinarySearch(ms, hi) // first table Mach >= hi
	// Candidates: lo, ms[i0:i1], hi, as indices 0..n-1.
	n := i1 - i0 + 2
	at := func(k int) float64 {
		switch {
		case k <= 0:
			return lo
		case k >= n-1:
			return hi
		}
		return ms[i0+k-1]
	}
	a0, b0 := 0, n-1 // bracket of the least candidate
	for b0-a0 > 3 {
		x1 := a0 + int(math.Round(float64(b0-a0)*(1-invPhi)))
		x2 := a0 + int(math.Round(float64(b0-a0)*invPhi))
		if x1 == x2 {
			x2++
		}
		if f(at(x1)) <= f(at(x2)) {
			b0 = x2
		} else {
			a0 = x1
		}
	}
	best, fb := at(a0), f(at(a0))
	for k := a0 + 1; k <= b0; k++ {
		if fk := f(at(k)); fk < fb {
			best, fb = at(k), fk
		}
	}
	return best
}

// tableSRFn is specificRange of a table aircraft as a function of Mach.
func (a *Aircraft) tableSRFn(mass, p, t, tisa float64) func(float64) float64 {
	fl, dev, snd := PressureToFL(p), t-tisa, SpeedOfSound(t)
	return func(m float64) float64 { return m * snd / a.tableFF(mass, fl, m, dev) }
}

// tablePoint is point from the tables (tisa the ISA temperature at
// s.Pressure; CAS left NaN unless cas).
func (a *Aircraft) tablePoint(s State, tisa float64, cas bool) Point {
	n := s.LoadFactor
	if n == 0 {
		n = 1
	}
	nan := math.NaN()
	var pt Point
	t := tisa + s.ISADev
	pt.Temperature = t
	pt.TAS = s.Mach * SpeedOfSound(t)
	pt.CAS = nan
	if cas {
		pt.CAS = MachToCAS(s.Mach, s.Pressure)
	}
	cl1 := s.Mass * G0 / (0.5 * Gamma * s.Pressure * s.Mach * s.Mach * a.WingArea)
	pt.CL = cl1 * n
	pt.CD, pt.Drag, pt.MaxClimbThrust, pt.MaxCruiseThrust = nan, nan, nan, nan
	fl := PressureToFL(s.Pressure)
	x := [4]float64{s.Mass, fl, s.Mach, s.ISADev}
	// Fuel flow and thrust share the cruise table's grid, the two rates
	// of climb the thrust table's: one cell each.
	pt.FuelFlow = nan
	if c, ok := a.tab.CruiseFuelFlow.locate4(x); ok {
		pt.FuelFlow = a.tab.CruiseFuelFlow.eval4(&c) * a.fuelFactor()
		if g := a.tab.CruiseThrust; g != nil {
			pt.Drag = g.eval4(&c)
			pt.CD = pt.Drag / (0.5 * Gamma * s.Pressure * s.Mach * s.Mach * a.WingArea)
		}
	}
	pt.SpecificRange = pt.TAS / pt.FuelFlow
	pt.BuffetCL = a.buffetCL(s.Mach)
	pt.BuffetMargin = pt.BuffetCL / cl1
	pt.ResidualClimb, pt.ThrustLimited = nan, true
	if c, ok := a.tab.ROCClimb.locate4(x); ok {
		pt.ResidualClimb = a.tab.ROCClimb.eval4(&c)
		// NaN counts as limited: never feasible by default.
		pt.ThrustLimited = !(a.tab.ROCCruise.eval4(&c) >= 0)
	}
	return pt
}

// tableEntry is one interpolated row of a climb or descent table.
func tableEntry(gs [3]*Grid, mass, fl, isaDev float64) (Transition, error) {
	var v [3]float64
	for i, g := range gs {
		x, err := g.At(mass, fl, isaDev)
		if err != nil {
			return Transition{}, err
		}
		v[i] = x
	}
	return Transition{Time: v[0], Fuel: v[1], Distance: v[2]}, nil
}

// tableTransition prices a climb (fromP > toP) or descent from the tables
// as the difference of two entries, the way climb tables are read for a
// climb that does not start at their base level. A climb from level A to
// B at mass m: the mass m0 at 1,500 ft that arrives at A with m (m0 -
// fuel(m0, A) = m, by fixed-point iteration, 5 rounds), then entry(m0, B)
// - entry(m0, A), m0 held at most at the table's heaviest mass. A
// descent from A to B at mass m: entry(m, A) - entry(m', B) with m' the
// mass on passing B (2 rounds). The schedule
// argument is not used: the tables hold their own schedule
// (Tables.Schedule), as does a step at cruise Mach priced from them
// (deviation from a model, which integrates the schedule given). Cost: a
// dozen table look-ups.
func (a *Aircraft) tableTransition(mass, fromP, toP, isaDev float64, climb bool) (Transition, error) {
	t := a.tab
	gs, phase := [3]*Grid{t.DescentTime, t.DescentFuel, t.DescentDistance}, "descent"
	if climb {
		gs, phase = [3]*Grid{t.ClimbTime, t.ClimbFuel, t.ClimbDistance}, "climb"
	}
	flA, flB := PressureToFL(fromP), PressureToFL(toP)
	if math.Abs(flA-flB) < 1e-9 {
		return Transition{}, nil
	}
	ff := a.fuelFactor()
	var ea, eb Transition
	var err error
	if climb {
		// The heaviest 1,500-ft mass of the table bounds m0: an aircraft
		// that reaches A at m from a heavier start (possible only within
		// the iteration's rounding, or above the table's heaviest mass
		// less its climb fuel) is priced from that mass.
		mv := gs[0].Axes[0].Values
		top := mv[len(mv)-1]
		m0 := mass
		for range 5 {
			if ea, err = tableEntry(gs, m0, flA, isaDev); err != nil {
				return Transition{}, err
			}
			m0 = math.Min(mass+ea.Fuel*ff, math.Max(top, mass))
		}
		if ea, err = tableEntry(gs, m0, flA, isaDev); err != nil {
			return Transition{}, err
		}
		if eb, err = tableEntry(gs, m0, flB, isaDev); err != nil {
			return Transition{}, err
		}
	} else {
		if ea, err = tableEntry(gs, mass, flA, isaDev); err != nil {
			return Transition{}, err
		}
		mb := mass
		for range 2 {
			if eb, err = tableEntry(gs, mb, flB, isaDev); err != nil {
				return Transition{}, err
			}
			mb = mass - (ea.Fuel-eb.Fuel)*ff
		}
		if eb, err = tableEntry(gs, mb, flB, isaDev); err != nil {
			return Transition{}, err
		}
	}
	hi := math.Max(flA, flB)
	if math.IsNaN(ea.Time) || math.IsNaN(eb.Time) {
		return Transition{}, &LimitError{Aircraft: a.Name, Phase: phase, FL: hi, Reason: fmt.Sprintf("the %s table marks the level as not reached at %.0f kg, ISA%+.0f (a blank entry next to the query)", phase, mass, isaDev)}
	}
	d := Transition{Time: eb.Time - ea.Time, Fuel: (eb.Fuel - ea.Fuel) * ff, Distance: eb.Distance - ea.Distance}
	if !climb {
		d = Transition{Time: -d.Time, Fuel: -d.Fuel, Distance: -d.Distance}
	}
	if !(d.Time > 0 && d.Fuel >= 0 && d.Distance >= 0) {
		return Transition{}, &LimitError{Aircraft: a.Name, Phase: phase, FL: hi, Reason: fmt.Sprintf("the %s table gives %.0f s, %.1f kg, %.0f m between FL%.0f and FL%.0f (not increasing with level here)", phase, d.Time, d.Fuel, d.Distance, flA, flB)}
	}
	return d, nil
}
