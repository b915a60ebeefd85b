package perf

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"
)

// Multilinear interpolation reproduces any function that is linear in each
// coordinate separately (here f = 1 + 2x + 3y - 0.5xy + 0.25xyz) exactly
// inside the grid (definition of multilinear interpolation), and a query
// outside the grid is an error naming the axis and value.
func TestGridMultilinear(t *testing.T) {
	f := func(x, y, z float64) float64 { return 1 + 2*x + 3*y - 0.5*x*y + 0.25*x*y*z }
	xs, ys, zs := []float64{0, 1, 3}, []float64{-2, 0.5, 1, 4}, []float64{10, 20}
	g := &Grid{Name: "t.csv", Axes: []Axis{{"x", xs}, {"y", ys}, {"z", zs}}}
	for _, x := range xs {
		for _, y := range ys {
			for _, z := range zs {
				g.Values = append(g.Values, f(x, y, z))
			}
		}
	}
	for _, q := range [][3]float64{{0, -2, 10}, {3, 4, 20}, {0.3, 0.7, 12}, {2.9, -1.5, 19.9}, {1, 1, 15}} {
		got, err := g.At(q[0], q[1], q[2])
		if err != nil || math.Abs(got-f(q[0], q[1], q[2])) > 1e-12 {
			t.Errorf("At%v = %v, %v; want %v", q, got, err, f(q[0], q[1], q[2]))
		}
	}
	for _, q := range [][3]float64{{-0.1, 0, 15}, {1, 4.5, 15}, {1, 0, math.NaN()}} {
		_, err := g.At(q[0], q[1], q[2])
		var oe *OutOfTableError
		if !errors.As(err, &oe) || !strings.Contains(err.Error(), "t.csv") {
			t.Errorf("At%v: %v, want *OutOfTableError", q, err)
		}
	}
	if _, err := g.At(1, 2); err == nil {
		t.Error("two coordinates for three axes accepted")
	}
}

// The model's cruise fuel flow written as a table and read back is the
// model at every grid point (to the 10 digits written), in lb and ft too.
func TestCruiseFuelFlowRoundTrip(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	g, err := a.CruiseFuelFlowGrid([]float64{50000, 60000, 70000}, []float64{310, 350}, []float64{0.74, 0.78}, []float64{0, 15})
	if err != nil {
		t.Fatal(err)
	}
	axes := []ColumnSpec{ColMass, ColLevel, ColMach, ColISADev}
	for _, units := range []struct {
		header  []string
		factors []float64
	}{
		{[]string{"mass_kg", "fl", "mach", "isa_dev_c", "fuel_flow_kg_h"}, []float64{1, 1, 1, 1, 1.0 / 3600}},
		{[]string{"mass_lb", "altitude_ft", "mach", "isa_dev_c", "fuel_flow_lb_h"}, []float64{0.45359237, 0.01, 1, 1, 0.45359237 / 3600}},
	} {
		var buf bytes.Buffer
		if err := WriteGridCSV(&buf, g, units.header, units.factors); err != nil {
			t.Fatal(err)
		}
		r, err := ReadGridCSV(&buf, "ff.csv", axes, ColFuelFF)
		if err != nil {
			t.Fatalf("%v: %v", units.header, err)
		}
		for _, q := range [][4]float64{{50000, 310, 0.74, 0}, {70000, 350, 0.78, 15}, {60000, 350, 0.74, 15}} {
			got, err := r.At(q[0], q[1], q[2], q[3])
			want := a.Point(State{Mass: q[0], Pressure: FLToPressure(q[1]), Mach: q[2], ISADev: q[3]}).FuelFlow
			if err != nil || relErr(got, want) > 1e-8 {
				t.Errorf("%v at %v: %v (%v), model %v", units.header[0], q, got, err, want)
			}
		}
	}
}

// Bad tables are refused naming the file, line and column.
func TestReadGridCSVErrors(t *testing.T) {
	axes := []ColumnSpec{ColMass, ColLevel}
	const head = "mass_kg,fl,fuel_flow_kg_h\n"
	tests := []struct{ name, data, want string }{
		{"unit", "mass_t,fl,fuel_flow_kg_h\n1,2,3\n", `t.csv:1: column "mass_t": unrecognised column or unit; want mass_kg or mass_lb`},
		{"number", head + "60000,350,abc\n", `t.csv:2: column fuel_flow_kg_h: "abc" is not a finite number`},
		{"nan", head + "60000,NaN,2000\n", `t.csv:2: column fl: "NaN" is not a finite number`},
		{"negative", head + "60000,350,-1\n", "t.csv:2: column fuel_flow_kg_h: -1 is negative"},
		{"duplicate", head + "60000,350,1\n70000,350,2\n60000,350,3\n", "t.csv:4: duplicates the grid point of line 2"},
		{"hole", head + "60000,350,1\n70000,350,2\n60000,370,3\n", "t.csv: hole in the grid: no row for mass_kg=70000, fl=370"},
		{"width", head + "60000,350\n", "t.csv:2: wrong number of fields"},
		{"empty", head, "t.csv: no rows"},
	}
	for _, tc := range tests {
		_, err := ReadGridCSV(strings.NewReader(tc.data), "t.csv", axes, ColFuelFF)
		var te *TableError
		if !errors.As(err, &te) || err.Error() != tc.want {
			t.Errorf("%s: %v, want %q", tc.name, err, tc.want)
		}
	}
}

// The climb table's other units read back to the same SI values: pounds
// (0.45359237 kg exactly, International Yard and Pound Agreement, 1959),
// feet of pressure altitude (FL = ft/100), seconds and kilometres against
// minutes and nautical miles (1,852 m exactly, ICAO Annex 5, table 3-3);
// a blank entry stays blank (NaN) and a blank in a column that may not be
// blank is refused.
func TestTransitionTableUnits(t *testing.T) {
	a := mustBuiltin(t, "demo-regional")
	gs, err := a.TransitionGrids(true, []float64{24000, 40000}, []float64{15, 200, 450}, []float64{0, 20})
	if err != nil {
		t.Fatal(err)
	}
	var si, other bytes.Buffer
	if err := WriteGridsCSV(&si, gs[:], []string{"mass_kg", "fl", "isa_dev_c", "time_min", "fuel_kg", "distance_nm"}, []float64{1, 1, 1, 60, 1, 1852}); err != nil {
		t.Fatal(err)
	}
	if err := WriteGridsCSV(&other, gs[:], []string{"mass_lb", "altitude_ft", "isa_dev_k", "time_s", "fuel_lb", "distance_km"}, []float64{0.45359237, 0.01, 1, 1, 0.45359237, 1000}); err != nil {
		t.Fatal(err)
	}
	r1, err1 := ReadGridsCSV(&si, "si.csv", transitionAxes, transitionValues)
	r2, err2 := ReadGridsCSV(&other, "other.csv", transitionAxes, transitionValues)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	blanks := 0
	for j := range gs {
		for off, want := range gs[j].Values {
			for _, r := range [][]*Grid{r1, r2} {
				got := r[j].Values[off]
				if math.IsNaN(want) != math.IsNaN(got) || !math.IsNaN(want) && math.Abs(got-want) > 1e-9*(1+math.Abs(want)) {
					t.Errorf("%s %s at %s: %v, want %v", r[j].Name, r[j].Value, gs[j].pointName(off), got, want)
				}
			}
			if math.IsNaN(want) {
				blanks++
			}
		}
	}
	if blanks == 0 {
		t.Error("no blank entry (MTOW to FL450 at ISA+20 was expected unreachable for demo-regional)")
	}
	_, err = ReadGridCSV(strings.NewReader("mass_kg,fl,fuel_flow_kg_h\n60000,350,\n"), "t.csv", []ColumnSpec{ColMass, ColLevel}, ColFuelFF)
	if err == nil || !strings.Contains(err.Error(), `t.csv:2: column fuel_flow_kg_h: "" is not a finite number`) {
		t.Errorf("blank fuel flow: %v", err)
	}
}

// The 4-axis fast path (locate4, eval4: successive linear interpolation)
// is At's multilinear interpolation up to rounding, reproduces a function
// linear in each axis exactly (definition of multilinear interpolation),
// ignores a blank corner of zero weight and refuses what At refuses.
func TestGridEval4(t *testing.T) {
	f := func(x [4]float64) float64 { return 1 + 2*x[0] - x[1] + 0.5*x[0]*x[2] + 0.1*x[1]*x[2]*x[3] }
	ax := [][]float64{{0, 1, 4}, {-1, 2}, {10}, {0, 0.5, 1, 3}}
	g := &Grid{Name: "t.csv"}
	for _, v := range ax {
		g.Axes = append(g.Axes, Axis{Values: v})
	}
	for _, a := range ax[0] {
		for _, b := range ax[1] {
			for _, c := range ax[2] {
				for _, d := range ax[3] {
					g.Values = append(g.Values, f([4]float64{a, b, c, d}))
				}
			}
		}
	}
	for _, q := range [][4]float64{{0, -1, 10, 0}, {4, 2, 10, 3}, {0.3, 0.7, 10, 0.2}, {3.9, -0.5, 10, 2.9}, {1, 2, 10, 0.5}} {
		c, ok := g.locate4(q)
		at, err := g.At(q[0], q[1], q[2], q[3])
		if got := g.eval4(&c); !ok || err != nil || math.Abs(got-f(q)) > 1e-12 || math.Abs(got-at) > 1e-12 {
			t.Errorf("eval4%v = %v (%v), At %v (%v), want %v", q, got, ok, at, err, f(q))
		}
	}
	for _, q := range [][4]float64{{-0.1, 0, 10, 0}, {1, 0, 11, 0}, {1, 0, 10, math.NaN()}} {
		if _, ok := g.locate4(q); ok {
			t.Errorf("locate4%v accepted outside the grid", q)
		}
	}
	g.Values[len(g.Values)-1] = math.NaN() // the corner (4, 2, 10, 3)
	if c, _ := g.locate4([4]float64{4, 2, 10, 1}); math.IsNaN(g.eval4(&c)) {
		t.Error("a blank corner of zero weight spoiled the value")
	}
	if c, _ := g.locate4([4]float64{4, 2, 10, 2}); !math.IsNaN(g.eval4(&c)) {
		t.Error("a blank corner of non-zero weight gave a value")
	}
}
