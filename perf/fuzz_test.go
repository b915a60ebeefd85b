package perf

import (
	"bytes"
	"math"
	"testing"
)

// FuzzParse: any input gives an aircraft or an error, never a panic; an
// accepted aircraft satisfies the documented rules (masses ordered, counts
// whole, every limit finite) and its point performance does not panic.
func FuzzParse(f *testing.F) {
	for _, n := range builtinNames {
		data, err := builtinFS.ReadFile("aircraft/" + n + ".yaml")
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte("name: x\nengines:\n  count: 2.5\n"))
	f.Add([]byte("name: x\nengines:\n  static_thrust_kn: 1e308\n"))
	f.Add([]byte("buffet: [[0.5, .nan], [0.6, 1]]\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		a, err := Parse(data, "fuzz.yaml")
		if err != nil {
			if a != nil {
				t.Fatal("aircraft and error")
			}
			return
		}
		if !(a.OEW <= a.MZFW && a.MZFW <= a.MTOW && a.MLW <= a.MTOW && a.Engines.Count >= 1) {
			t.Fatalf("accepted inconsistent aircraft %+v", a)
		}
		for _, v := range []float64{a.Engines.StaticThrust, a.VMO, a.MMO, a.CD0, a.K, a.K6, a.WingArea, a.CertifiedCeiling} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("accepted non-finite value in %+v", a)
			}
		}
		a.Point(State{Mass: a.MTOW, Pressure: FLToPressure(350), Mach: a.MMO})
		a.MachBand(a.MTOW, FLToPressure(350), 0, 1.3)
	})
}

// FuzzReadGridCSV: any table text gives a grid or an error, never a panic;
// an accepted grid returns its own values at its grid points.
func FuzzReadGridCSV(f *testing.F) {
	f.Add([]byte("mass_kg,fl,fuel_flow_kg_h\n60000,350,2400\n70000,350,2600\n60000,370,2300\n70000,370,2500\n"))
	f.Add([]byte("mass_lb,altitude_ft,fuel_flow_lb_h\n# comment\n1,2,3\n"))
	f.Add([]byte("mass_kg,fl,fuel_flow_kg_h\n1,2,3\n1,2,4\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ReadGridCSV(bytes.NewReader(data), "fuzz.csv", []ColumnSpec{ColMass, ColLevel}, ColFuelFF)
		if err != nil {
			return
		}
		m, fl := g.Axes[0].Values, g.Axes[1].Values
		v, err := g.At(m[len(m)-1], fl[0])
		if want := g.Values[(len(m)-1)*len(fl)]; err != nil || v != want {
			t.Fatalf("At grid point = %v, %v; want %v", v, err, want)
		}
	})
}
