package perf

import (
	"bytes"
	"testing"
)

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
