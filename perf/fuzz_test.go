package perf

import (
	"math"
	"testing"
)

// FuzzParse feeds arbitrary bytes to the aircraft YAML parser: it must
// return an aircraft or an error, never panic, and an accepted aircraft
// must have finite, positive masses in the order OEW <= MZFW <= MTOW and a
// buffet boundary with Mach ascending. Seeds in testdata/fuzz/FuzzParse
// (the built-in files and mutations of them).
func FuzzParse(f *testing.F) {
	for _, name := range BuiltinNames() {
		b, err := builtinFS.ReadFile("aircraft/" + name + ".yaml")
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		a, err := Parse(data, "fuzz.yaml")
		if err != nil {
			return
		}
		for _, m := range []float64{a.OEW, a.MZFW, a.MTOW, a.MLW, a.FuelCapacity, a.WingArea, a.MMO, a.VMO} {
			if !(m > 0) || math.IsInf(m, 0) {
				t.Fatalf("accepted aircraft with value %v: %+v", m, a)
			}
		}
		if !(a.OEW <= a.MZFW && a.MZFW <= a.MTOW) {
			t.Fatalf("masses OEW %v MZFW %v MTOW %v", a.OEW, a.MZFW, a.MTOW)
		}
		for i := 1; i < len(a.Buffet); i++ {
			if !(a.Buffet[i].Mach > a.Buffet[i-1].Mach) {
				t.Fatalf("buffet Mach not ascending: %+v", a.Buffet)
			}
		}
	})
}
