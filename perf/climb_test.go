package perf

import (
	"errors"
	"math"
	"testing"
)

// Total-energy equation at constant TAS (constant Mach in the isothermal
// layer): dh/dt = (T - D) V/(m g), so a short climb takes Δh/ResidualClimb
// (energy method: Rutowski, J. Aeronautical Sciences 21, 1954; textbook form
// in Anderson, Aircraft Performance and Design, 1999), with the hydrostatic
// T_ISA/T factor for pressure altitude.
func TestClimbMatchesEnergyEquation(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	for _, dev := range []float64{0, 15} {
		m, h1, h2 := 180000.0, 11500.0, 11530.0
		s := Schedule{CAS: 1000, Mach: 0.84}
		tr, err := a.Climb(m, PressureAt(h1), PressureAt(h2), dev, s)
		if err != nil {
			t.Fatal(err)
		}
		pt := a.Point(State{Mass: m, Pressure: PressureAt(0.5 * (h1 + h2)), Mach: 0.84, ISADev: dev})
		want := (h2 - h1) / pt.ResidualClimb
		if relErr(tr.Time, want) > 1e-3 {
			t.Errorf("ISA%+g: climb time %.3f s, energy equation %.3f s", dev, tr.Time, want)
		}
		// Climb fuel is TSFC at the max climb setting (τ = 1) times thrust:
		// the cruise TSFC FuelFlow/Drag rescaled by the part-power factor.
		e := &a.Engines
		bucket := func(tau float64) float64 { u := tau/e.PartPowerBucket - 1; return 1 + e.PartPower*u*u }
		tsfc := pt.FuelFlow / pt.Drag * bucket(1) / bucket(pt.Drag/pt.MaxClimbThrust)
		if relErr(tr.Distance, pt.TAS*tr.Time) > 1e-9 || relErr(tr.Fuel, pt.MaxClimbThrust*tsfc*tr.Time) > 1e-3 {
			t.Errorf("distance %g or fuel %g inconsistent", tr.Distance, tr.Fuel)
		}
	}
}

// Plausibility (from memory, common practice): a full climb to the mid-30s
// takes 15-35 minutes and 120-250 NM; an idle descent covers about 3 NM per
// 1,000 ft (2.5-4 accepted), and burns far less than the climb.
func TestClimbDescentPlausible(t *testing.T) {
	for _, name := range BuiltinNames() {
		a := mustBuiltin(t, name)
		m := a.OEW + 0.8*(a.MTOW-a.OEW)
		s := DefaultSchedule(a)
		c, err := a.Climb(m, FLToPressure(15), FLToPressure(350), 0, s)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if min, nm := c.Time/60, c.Distance/NMToM; min < 15 || min > 35 || nm < 80 || nm > 250 {
			t.Errorf("%s climb: %.1f min, %.0f NM, %.0f kg", name, min, nm, c.Fuel)
		}
		d, err := a.Descent(a.OEW+0.3*(a.MTOW-a.OEW), FLToPressure(370), FLToPressure(15), 0, s)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		t.Logf("%s: climb FL15-FL350 %.1f min %.0f NM %.0f kg; descent FL370-FL15 %.1f NM/1,000 ft %.0f kg", name, c.Time/60, c.Distance/NMToM, c.Fuel, d.Distance/NMToM/35.5, d.Fuel)
		if perK := d.Distance / NMToM / 35.5; perK < 2.5 || perK > 4 || d.Fuel > 0.3*c.Fuel {
			t.Errorf("%s descent: %.2f NM per 1,000 ft, %.0f kg (climb %.0f kg)", name, perK, d.Fuel, c.Fuel)
		}
	}
}

// A climb beyond the thrust-limited ceiling fails with the level and reason.
func TestClimbLimit(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	_, err := a.Climb(a.MTOW, FLToPressure(300), FLToPressure(450), 0, Schedule{CAS: 1000, Mach: 0.84})
	var le *LimitError
	if !errors.As(err, &le) || le.FL < 340 || le.FL > 450 || le.Phase != "climb" {
		t.Fatalf("err = %v", err)
	}
	e := mustEnvelope(t, a, a.MTOW, 0, 1)
	// The 100 ft/min failure lies above the 300 ft/min thrust ceiling.
	if le.FL < e.MaxFLThrust-5 {
		t.Errorf("climb failed at FL%.1f, thrust ceiling FL%.1f", le.FL, e.MaxFLThrust)
	}
	for _, bad := range []struct {
		name           string
		m, p1, p2, dev float64
		s              Schedule
	}{
		{"mass", a.MTOW * 2, 30000, 20000, 0, Schedule{Mach: 0.8}},
		{"pressure", a.MTOW, -1, 20000, 0, Schedule{Mach: 0.8}},
		{"nan dev", a.MTOW, 30000, 20000, math.NaN(), Schedule{Mach: 0.8}},
		{"no speed", a.MTOW, 30000, 20000, 0, Schedule{}},
		{"downhill", a.MTOW, 20000, 30000, 0, Schedule{Mach: 0.8}},
	} {
		if _, err := a.Climb(bad.m, bad.p1, bad.p2, bad.dev, bad.s); err == nil {
			t.Errorf("%s: no error", bad.name)
		}
	}
	if _, err := a.Descent(a.OEW, 30000, 20000, 0, Schedule{Mach: 0.8}); err == nil {
		t.Error("descent going up: no error")
	}
}

// 6,000 NM at MTOW with full tanks must be feasible for the widebody (the
// class's mission, from memory): climb, cruise at LRC at the optimum level
// (capped at MaxFL) in 100 NM legs, idle descent.
func TestWidebodyLongFlight(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	m := a.MTOW
	if a.MTOW-a.FuelCapacity < a.OEW {
		t.Fatalf("full tanks at MTOW leave ZFW below OEW")
	}
	fl := mustEnvelope(t, a, m, 0, 1.3).OptimumFL
	c, err := a.Climb(m, FLToPressure(15), FLToPressure(fl), 0, DefaultSchedule(a))
	if err != nil {
		t.Fatal(err)
	}
	burn, dist := c.Fuel, c.Distance
	m -= c.Fuel
	for dist < 6000*NMToM {
		e := mustEnvelope(t, a, m, 0, 1.3)
		p := FLToPressure(e.OptimumFL)
		lrc, ok := a.LRCMach(m, p, 0, 1.3)
		if !ok {
			t.Fatalf("no LRC at FL%.1f, %.0f kg", e.OptimumFL, m)
		}
		leg := 100 * NMToM
		f := leg / a.Point(State{Mass: m, Pressure: p, Mach: lrc}).SpecificRange
		burn, dist, m = burn+f, dist+leg, m-f
		fl = e.OptimumFL
	}
	t.Logf("end of cruise: %.0f kg at FL%.2f", m, fl)
	d, err := a.Descent(m, FLToPressure(fl), FLToPressure(15), 0, DefaultSchedule(a))
	if err != nil {
		t.Fatal(err)
	}
	burn += d.Fuel
	if burn > a.FuelCapacity {
		t.Errorf("6,000 NM burns %.0f kg, capacity %.0f kg", burn, a.FuelCapacity)
	}
	t.Logf("6,000 NM: %.0f kg of %.0f kg capacity", burn, a.FuelCapacity)
}

func BenchmarkClimbStep(b *testing.B) {
	a := mustBuiltin(b, "demo-widebody")
	p1, p2 := FLToPressure(350), FLToPressure(370)
	s := Schedule{CAS: 1000, Mach: 0.84}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := a.Climb(200000, p1, p2, 0, s); err != nil {
			b.Fatal(err)
		}
	}
}

// Idle is not a flat-rated setting: a hot-day descent does not depend on
// the flat-rating coefficients, while the hot-day climb thrust falls by the
// BADA 3 correction 1 - C_Tc5 (ΔT - C_Tc4) where Mattingly's θ0 break is
// not reached (θ0 < TR; here θ0 = 0.94 at FL370, M0.78, ISA+25).
func TestFlatRatingClimbOnly(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	b := *a
	b.Engines.FlatRatingLapse = 0
	s := DefaultSchedule(a)
	da, errA := a.Descent(55000, FLToPressure(370), FLToPressure(15), 25, s)
	db, errB := b.Descent(55000, FLToPressure(370), FLToPressure(15), 25, s)
	if errA != nil || errB != nil || da != db {
		t.Errorf("hot descent depends on the flat rating: %+v vs %+v (%v, %v)", da, db, errA, errB)
	}
	p, dev := FLToPressure(370), 25.0
	pa := a.Point(State{Mass: 60000, Pressure: p, Mach: 0.78, ISADev: dev})
	pb := b.Point(State{Mass: 60000, Pressure: p, Mach: 0.78, ISADev: dev})
	want := 1 - a.Engines.FlatRatingLapse*(dev-a.Engines.FlatRatingISADev)
	if relErr(pa.MaxClimbThrust/pb.MaxClimbThrust, want) > 1e-12 {
		t.Errorf("hot climb thrust ratio %v, BADA correction %v", pa.MaxClimbThrust/pb.MaxClimbThrust, want)
	}
}
