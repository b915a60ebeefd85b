package perf

import (
	"errors"
	"math"
	"testing"
)

func mustBuiltin(tb testing.TB, name string) *Aircraft {
	tb.Helper()
	a, err := Builtin(name)
	if err != nil {
		tb.Fatal(err)
	}
	return a
}

// Breguet range equation for jets, R = (V/(g TSFC)) (L/D) ln(m1/m2), is exact
// for a cruise-climb at constant CL and Mach in the isothermal stratosphere
// (constant TAS, TSFC and L/D; Breguet range equation, e.g. Anderson, Aircraft Performance and Design, 1999). Integrating the specific
// range of Point over small mass steps, with pressure proportional to mass
// so CL stays constant, must match it to 0.1 %.
func TestBreguetCruiseClimb(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	const m1, m2, mach = 200000.0, 160000.0, 0.83
	p1 := FLToPressure(380)
	s1 := State{Mass: m1, Pressure: p1, Mach: mach}
	pt1 := a.Point(s1)
	if h2 := AltitudeAt(p1 * m2 / m1); !(AltitudeAt(p1) > 11000 && h2 < 20000) {
		t.Fatalf("cruise-climb leaves the isothermal layer: %g m", h2)
	}
	const steps = 4000
	dm := (m1 - m2) / steps
	var r float64
	for i := range steps {
		m := m1 - (float64(i)+0.5)*dm
		pt := a.Point(State{Mass: m, Pressure: p1 * m / m1, Mach: mach})
		if math.Abs(pt.CL-pt1.CL) > 1e-12 {
			t.Fatalf("CL drifted: %g vs %g", pt.CL, pt1.CL)
		}
		r += pt.SpecificRange * dm
	}
	tsfc := pt1.FuelFlow / pt1.Drag
	breguet := pt1.TAS / (G0 * tsfc) * (pt1.CL / pt1.CD) * math.Log(m1/m2)
	if relErr(r, breguet) > 1e-3 {
		t.Errorf("integrated range %.0f m, Breguet %.0f m", r, breguet)
	}
	// Lift equals weight: CL q S = m g (definition of CL), drag = CD q S.
	qs := 0.5 * Gamma * p1 * mach * mach * a.WingArea
	if relErr(pt1.CL*qs, m1*G0) > 1e-12 || relErr(pt1.CD*qs, pt1.Drag) > 1e-12 {
		t.Errorf("lift %g vs weight %g; drag %g vs CD q S %g", pt1.CL*qs, m1*G0, pt1.Drag, pt1.CD*qs)
	}
}

// CL = 2 n m g/(γ p M² S) (the lift equation with load factor n = 1/cos(bank)): the reported CL scales with n while
// drag and fuel stay at n = 1, and the buffet margin is BuffetCL/CL(n=1).
func TestPointLoadFactor(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	s := State{Mass: 60000, Pressure: FLToPressure(350), Mach: 0.78}
	p1 := a.Point(s)
	s.LoadFactor = 1.3
	p13 := a.Point(s)
	if relErr(p13.CL, 1.3*p1.CL) > 1e-12 || p13.Drag != p1.Drag || p13.FuelFlow != p1.FuelFlow {
		t.Errorf("n=1.3: CL %g (1 g %g), drag %g vs %g", p13.CL, p1.CL, p13.Drag, p1.Drag)
	}
	if relErr(p1.BuffetMargin, p1.BuffetCL/p1.CL) > 1e-12 || !(p1.BuffetMargin > 1) {
		t.Errorf("buffet margin %g, BuffetCL %g, CL %g", p1.BuffetMargin, p1.BuffetCL, p1.CL)
	}
	// A 1.3 g band at mass m is the 1 g band at 1.3 m (same CL).
	p := FLToPressure(370)
	lo1, hi1, ok1 := a.BuffetMachs(1.3*55000, p, 1)
	lo2, hi2, ok2 := a.BuffetMachs(55000, p, 1.3)
	if !ok1 || !ok2 || math.Abs(lo1-lo2) > 1e-9 || math.Abs(hi1-hi2) > 1e-9 {
		t.Errorf("1g at 1.3m: %v %g-%g; 1.3g at m: %v %g-%g", ok1, lo1, hi1, ok2, lo2, hi2)
	}
	// At the buffet Machs, CL(n) equals the table's buffet CL.
	for _, m := range []float64{lo2, hi2} {
		pt := a.Point(State{Mass: 55000, Pressure: p, Mach: m, LoadFactor: 1.3})
		if relErr(pt.CL, pt.BuffetCL) > 1e-9 {
			t.Errorf("at buffet Mach %g: CL %g, buffet CL %g", m, pt.CL, pt.BuffetCL)
		}
	}
	// The true airspeed is M a(T) with ISA deviation on temperature.
	hot := a.Point(State{Mass: 60000, Pressure: FLToPressure(350), Mach: 0.78, ISADev: 15})
	if math.Abs(hot.Temperature-(218.81+15)) > 0.01 || relErr(hot.TAS, 0.78*math.Sqrt(Gamma*RAir*hot.Temperature)) > 1e-12 {
		t.Errorf("hot day: T %g, TAS %g", hot.Temperature, hot.TAS)
	}
}

// Speed optima: the specific range at LRC is 99 % of the maximum (common
// practice); EconMach with zero cost index and no wind is MaxRangeMach;
// a cost index or a headwind speeds the aircraft up (cost-index theory).
func TestSpeedOptima(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	m, p := 190000.0, FLToPressure(370)
	mr, ok1 := a.MaxRangeMach(m, p, 0, 1.3)
	lrc, ok2 := a.LRCMach(m, p, 0, 1.3)
	econ, ok3 := a.EconMach(m, p, 0, 1.3, 0, 0)
	if !ok1 || !ok2 || !ok3 || econ != mr || !(lrc > mr) {
		t.Fatalf("MR %g LRC %g econ %g", mr, lrc, econ)
	}
	sr := func(mach float64) float64 { return a.Point(State{Mass: m, Pressure: p, Mach: mach}).SpecificRange }
	if r := sr(lrc) / sr(mr); math.Abs(r-0.99) > 1e-6 {
		t.Errorf("SR(LRC)/SR(MR) = %g, want 0.99", r)
	}
	if sr(mr) < sr(mr-0.005) || sr(mr) < sr(mr+0.005) {
		t.Errorf("MR %g is not a maximum of specific range", mr)
	}
	ci, _ := a.EconMach(m, p, 0, 1.3, 50, 0)
	head, _ := a.EconMach(m, p, 0, 1.3, 0, -50)
	lo, hi, _ := a.MachBand(m, p, 0, 1.3)
	if !(ci > mr && head > mr && ci <= hi && lo <= mr) {
		t.Errorf("MR %g, CI 50 %g, headwind %g, band %g-%g", mr, ci, head, lo, hi)
	}
}

func BenchmarkPoint(b *testing.B) {
	a := mustBuiltin(b, "demo-widebody")
	s := State{Mass: 200000, Pressure: FLToPressure(370), Mach: 0.84, ISADev: 5}
	var sink float64
	b.ReportAllocs()
	for b.Loop() {
		sink += a.Point(s).SpecificRange
		s.Mach += 1e-9
	}
	_ = sink
}

// A performance factor scales every fuel flow by 1 + pct/100 and nothing
// else: cruise fuel flow, climb fuel and idle descent fuel (definition of
// the factor), with time and distance unchanged.
func TestPerfFactor(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	b, err := a.WithPerfFactor(3.5)
	if err != nil {
		t.Fatal(err)
	}
	if a.PerfFactorPct != 0 {
		t.Fatal("WithPerfFactor changed its receiver")
	}
	s := State{Mass: 65000, Pressure: FLToPressure(350), Mach: 0.78}
	pa, pb := a.Point(s), b.Point(s)
	if relErr(pb.FuelFlow, 1.035*pa.FuelFlow) > 1e-12 || pb.Drag != pa.Drag || pb.ResidualClimb != pa.ResidualClimb {
		t.Errorf("fuel flow %g vs %g x 1.035; drag %g vs %g", pb.FuelFlow, pa.FuelFlow, pb.Drag, pa.Drag)
	}
	sch := DefaultSchedule(a)
	ca, _ := a.Climb(70000, FLToPressure(15), FLToPressure(350), 0, sch)
	cb, _ := b.Climb(70000, FLToPressure(15), FLToPressure(350), 0, sch)
	// Fuel is 3.5 % more; the lighter mass along the climb changes time by
	// far less than that.
	if r := cb.Fuel / ca.Fuel; r < 1.034 || r > 1.036 || relErr(cb.Time, ca.Time) > 1e-3 {
		t.Errorf("climb fuel ratio %v, time %v vs %v", r, cb.Time, ca.Time)
	}
	da, _ := a.Descent(55000, FLToPressure(370), FLToPressure(15), 0, sch)
	db, _ := b.Descent(55000, FLToPressure(370), FLToPressure(15), 0, sch)
	if r := db.Fuel / da.Fuel; r < 1.034 || r > 1.036 {
		t.Errorf("descent fuel ratio %v", r)
	}
	if c, _ := b.WithPerfFactor(-2); c.PerfFactorPct != -2 {
		t.Errorf("factor compounds: %v", c.PerfFactorPct)
	}
	for _, bad := range []float64{-25, 31, math.NaN(), math.Inf(1)} {
		var re *RangeError
		if _, err := a.WithPerfFactor(bad); !errors.As(err, &re) {
			t.Errorf("WithPerfFactor(%v) = %v, want *RangeError", bad, err)
		}
	}
}
