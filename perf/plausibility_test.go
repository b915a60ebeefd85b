package perf

import (
	"math"
	"testing"
)

// The targets of the built-in (invented) aircraft. These are plausibility
// checks of invented models against class figures, not validation; the
// source of each range is named beside it.

// typicalMass is the mid-cruise mass the checks use: 85 % of MTOW (our
// choice, a long sector's mid-cruise mass).
func typicalMass(a *Aircraft) float64 { return 0.85 * a.MTOW }

// fuelPerNM returns the fuel per NM of still-air distance (kg) at level fl.
func fuelPerNM(a *Aircraft, mass, fl, mach, dev float64) float64 {
	return NMToM / a.Point(State{Mass: mass, Pressure: FLToPressure(fl), Mach: mach, ISADev: dev}).SpecificRange
}

// builtinMetrics gathers the figures the targets check.
type builtinMetrics struct {
	thrustISA, thrustHot   float64 // thrust-limited level at 90 % MTOW, ISA and ISA+20
	optFL, optMach         float64 // optimum level and max-range Mach at typicalMass
	pen2000, pen4000       float64 // fuel per NM 2,000 and 4,000 ft below optimum, % over optimum
	margin                 float64 // 1 g buffet margin at optFL, optMach, typicalMass
	thrustWeight           float64 // static thrust / MTOW weight
	climbMin               float64 // min from 1,500 ft to FL350 at 97 % MTOW, ISA
	resid350               float64 // ft/min residual climb at FL350, 95 % MTOW, schedule Mach
	opt90                  float64 // optimum level at 90 % MTOW
	descentNMPer1000       float64 // idle descent FL370 to 1,500 ft at 90 % MLW
	climbErr, descentError error
}

func metricsOf(t *testing.T, a *Aircraft) builtinMetrics {
	t.Helper()
	var b builtinMetrics
	b.thrustISA = mustEnvelope(t, a, 0.9*a.MTOW, 0, 1.3).MaxFLThrust
	b.thrustHot = mustEnvelope(t, a, 0.9*a.MTOW, 20, 1.3).MaxFLThrust
	m := typicalMass(a)
	e := mustEnvelope(t, a, m, 0, 1.3)
	b.optFL = e.OptimumFL
	b.optMach, _ = a.MaxRangeMach(m, FLToPressure(b.optFL), 0, 1.3)
	f0 := fuelPerNM(a, m, b.optFL, b.optMach, 0)
	b.pen2000 = 100 * (fuelPerNM(a, m, b.optFL-20, b.optMach, 0)/f0 - 1)
	b.pen4000 = 100 * (fuelPerNM(a, m, b.optFL-40, b.optMach, 0)/f0 - 1)
	b.margin = a.Point(State{Mass: m, Pressure: FLToPressure(b.optFL), Mach: b.optMach}).BuffetMargin
	b.thrustWeight = float64(a.Engines.Count) * a.Engines.StaticThrust / (a.MTOW * G0)
	s := DefaultSchedule(a)
	c, err := a.Climb(0.97*a.MTOW, FLToPressure(15), FLToPressure(350), 0, s)
	b.climbMin, b.climbErr = c.Time/60, err
	p350 := FLToPressure(350)
	b.resid350 = a.Point(State{Mass: 0.95 * a.MTOW, Pressure: p350, Mach: s.mach(AltitudeAt(p350), p350)}).ResidualClimb / FtToM * 60
	b.opt90 = mustEnvelope(t, a, 0.9*a.MTOW, 0, 1.3).OptimumFL
	d, err := a.Descent(0.9*a.MLW, FLToPressure(370), FLToPressure(15), 0, s)
	b.descentNMPer1000, b.descentError = d.Distance/NMToM/35.5, err
	return b
}

func TestBuiltinTargets(t *testing.T) {
	for _, name := range BuiltinNames() {
		a := mustBuiltin(t, name)
		b := metricsOf(t, a)
		t.Logf("%s: thrust level FL%.1f ISA, FL%.1f ISA+20; optimum FL%.1f M%.3f; +%.2f %% at -2,000 ft, +%.2f %% at -4,000 ft; margin %.2f g; T/W %.3f; climb %.1f min; FL350 residual %.0f ft/min; optimum at 90 %% MTOW FL%.1f; descent %.2f NM/1,000 ft",
			name, b.thrustISA, b.thrustHot, b.optFL, b.optMach, b.pen2000, b.pen4000, b.margin, b.thrustWeight, b.climbMin, b.resid350, b.opt90, b.descentNMPer1000)
		// Flight-manual maximum levels are 1,000-3,000 ft lower at ISA+15
		// to ISA+20 for flat-rated engines (from memory).
		if d := b.thrustISA - b.thrustHot; !(d >= 10) {
			t.Errorf("%s: ISA+20 lowers the thrust-limited level by %.0f ft, want >= 1,000 ft", name, 100*d)
		}
		// Cruising 2,000 ft below optimum costs about 1-2 % and 4,000 ft
		// about 3-5 % (from memory; accepted 0.8-2.5 % and 2.5-6 %).
		if !(b.pen2000 >= 0.8 && b.pen2000 <= 2.5) {
			t.Errorf("%s: 2,000 ft below optimum costs %.2f %%, want 0.8-2.5 %%", name, b.pen2000)
		}
		if !(b.pen4000 >= 2.5 && b.pen4000 <= 6) {
			t.Errorf("%s: 4,000 ft below optimum costs %.2f %%, want 2.5-6 %%", name, b.pen4000)
		}
		// Optimum levels give about 1.5 g to buffet onset (common
		// practice, ~48 degrees of bank).
		if !(b.margin >= 1.4 && b.margin <= 1.6) {
			t.Errorf("%s: 1 g buffet margin at optimum %.3f g, want 1.4-1.6", name, b.margin)
		}
		// Idle descent about 3 NM per 1,000 ft (common practice).
		if b.descentError != nil || !(b.descentNMPer1000 >= 2.7 && b.descentNMPer1000 <= 3.5) {
			t.Errorf("%s: idle descent %.2f NM per 1,000 ft (%v), want 2.7-3.5", name, b.descentNMPer1000, b.descentError)
		}
		switch name {
		case "demo-widebody":
			// Large twins: static thrust/weight about 0.26-0.29 and a climb
			// to FL350 at high mass of about 25 min (from memory).
			if !(b.thrustWeight >= 0.25 && b.thrustWeight <= 0.30) {
				t.Errorf("%s: T/W %.3f, want 0.25-0.30", name, b.thrustWeight)
			}
			if b.climbErr != nil || !(b.climbMin >= 20 && b.climbMin <= 30) {
				t.Errorf("%s: climb to FL350 at 97 %% MTOW %.1f min (%v), want 20-30", name, b.climbMin, b.climbErr)
			}
		default:
			// Narrowbody and regional twins reach FL350 near MTOW and have
			// optimum levels in the mid-30s at 90 % MTOW (from memory).
			if !(b.resid350 >= 300) {
				t.Errorf("%s: residual climb at FL350, 95 %% MTOW %.0f ft/min, want >= 300", name, b.resid350)
			}
			if !(b.opt90 >= 330 && b.opt90 <= 370) {
				t.Errorf("%s: optimum at 90 %% MTOW FL%.1f, want FL330-370", name, b.opt90)
			}
		}
		if math.IsNaN(b.optFL) {
			t.Errorf("%s: no optimum level", name)
		}
	}
}
