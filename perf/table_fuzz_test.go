package perf

import (
	"bytes"
	"math"
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

// FuzzReadGridsCSV: a climb-like table (three value columns, blanks
// allowed) gives grids or an error, never a panic; accepted grids share
// their axes and return their own values (NaN for a blank) at a corner.
func FuzzReadGridsCSV(f *testing.F) {
	f.Add([]byte("mass_kg,fl,isa_dev_c,time_min,fuel_kg,distance_nm\n60000,15,0,0,0,0\n60000,350,0,20,2000,120\n70000,15,0,0,0,0\n70000,350,0,,,\n"))
	f.Add([]byte("mass_lb,altitude_ft,isa_dev_k,time_s,fuel_lb,distance_km\n1,1500,0,0,0,0\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		gs, err := ReadGridsCSV(bytes.NewReader(data), "fuzz.csv", transitionAxes, transitionValues)
		if err != nil {
			return
		}
		if len(gs) != 3 || &gs[0].Axes[0] != &gs[2].Axes[0] {
			t.Fatalf("%d grids, axes shared: %v", len(gs), len(gs) == 3 && &gs[0].Axes[0] == &gs[2].Axes[0])
		}
		for _, g := range gs {
			m, fl, d := g.Axes[0].Values, g.Axes[1].Values, g.Axes[2].Values
			v, err := g.At(m[0], fl[len(fl)-1], d[0])
			want := g.Values[(len(fl)-1)*len(d)]
			if err != nil || !(v == want || math.IsNaN(v) && math.IsNaN(want)) {
				t.Fatalf("At corner = %v, %v; want %v", v, err, want)
			}
		}
	})
}
