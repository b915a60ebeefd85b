package perf

import "testing"

// The econ Mach of a table aircraft, found by a discrete golden-section
// search over the band ends and the table Machs between them, is the least
// cost of all of those candidates (exhaustive comparison: the interpolated
// cost is monotone between table Machs, so the candidates hold the
// minimum), over masses, levels, temperatures, cost indices and winds.
func TestTableEconMachExhaustive(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	dir := t.TempDir()
	if err := a.ExportTables(dir, DefaultExportGrid(a)); err != nil {
		t.Fatal(err)
	}
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	ms := ta.Tables().CruiseFuelFlow.Axes[2].Values
	n := 0
	for _, mass := range []float64{50000, 62000, 74000} {
		for _, fl := range []float64{250, 310, 350, 390} {
			for _, dev := range []float64{-15, 0, 12} {
				for _, ci := range []float64{0, 30, 150} {
					for _, wind := range []float64{-60, 0, 80} {
						p := FLToPressure(fl)
						lo, hi, ok := ta.MachBand(mass, p, dev, 1.3)
						if !ok {
							continue
						}
						tisa := isaTemperatureAtPressure(p)
						got := ta.econMachIn(mass, p, tisa+dev, tisa, lo, hi, ci/60, wind)
						f := ta.tableEconCostFn(mass, p, tisa+dev, tisa, ci/60, wind)
						best, fb := lo, f(lo)
						for _, m := range append(ms, hi) {
							if m > lo && m <= hi {
								if fm := f(m); fm < fb {
									best, fb = m, fm
								}
							}
						}
						if f(got) > fb*(1+1e-12) {
							t.Errorf("%.0f kg FL%.0f ISA%+.0f CI %.0f wind %+.0f: Mach %.3f costs %.9g, Mach %.3f %.9g", mass, fl, dev, ci, wind, got, f(got), best, fb)
						}
						n++
					}
				}
			}
		}
	}
	if n < 100 {
		t.Errorf("only %d cases with a Mach band", n)
	}
}

// A Cruiser over a table aircraft answers as the aircraft itself, bit
// for bit (its caches hold the buffet Machs and ISA temperatures, the
// same for tables as for a model).
func TestCruiserTables(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	dir := t.TempDir()
	if err := a.ExportTables(dir, smallGrid()); err != nil {
		t.Fatal(err)
	}
	ta, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	c := NewCruiser(ta)
	same := func(x, y float64) bool { return x == y || x != x && y != y }
	for _, m := range []float64{26000, 33000, 39000} {
		for _, fl := range []float64{250, 310, 370, 400} {
			p := FLToPressure(fl)
			for range 2 { // the second round from the caches
				e1, ok1 := ta.EconMach(m, p, 5, 1.3, 30, -20)
				e2, ok2 := c.EconMach(m, p, 5, 1.3, 30, -20)
				l1, lok1 := ta.LRCMach(m, p, 5, 1.3)
				l2, lok2 := c.LRCMach(m, p, 5, 1.3)
				if ok1 != ok2 || !same(e1, e2) || lok1 != lok2 || !same(l1, l2) {
					t.Fatalf("%.0f kg FL%.0f: econ %v/%v %v/%v, LRC %v/%v %v/%v", m, fl, e1, e2, ok1, ok2, l1, l2, lok1, lok2)
				}
				if !ok1 {
					continue
				}
				st := State{Mass: m, Pressure: p, Mach: e1, ISADev: 5, LoadFactor: 1}
				p1, p2 := ta.Point(st), c.Point(st)
				if p1 != p2 && !(same(p1.FuelFlow, p2.FuelFlow) && same(p1.ResidualClimb, p2.ResidualClimb) && same(p1.Drag, p2.Drag) && p1.ThrustLimited == p2.ThrustLimited) {
					t.Fatalf("Point %+v\nCruiser %+v", p1, p2)
				}
			}
			c1, err1 := ta.Climb(m, FLToPressure(15), p, 5, DefaultSchedule(ta))
			c2, err2 := c.Climb(m, FLToPressure(15), p, 5, DefaultSchedule(ta))
			if c1 != c2 || (err1 == nil) != (err2 == nil) {
				t.Fatalf("climb to FL%.0f: %+v %v, Cruiser %+v %v", fl, c1, err1, c2, err2)
			}
		}
	}
}
