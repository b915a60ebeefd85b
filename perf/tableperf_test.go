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
