package perf

import (
	"math"
	"testing"
)

// same reports whether x and y are the same float64 (bit for bit; every
// NaN equals every NaN).
func same(x, y float64) bool {
	return math.Float64bits(x) == math.Float64bits(y) || math.IsNaN(x) && math.IsNaN(y)
}

// TestCruiserMatchesAircraft checks that a Cruiser returns what the
// Aircraft's own methods return, bit for bit, on a grid of masses,
// levels, floors, temperatures, cost indices and winds that covers empty,
// thrust-limited and buffet-limited bands, asked twice (the second answer
// comes from the caches) and in an order that makes different keys share
// slots. The reference is the Aircraft's methods themselves: the Cruiser
// claims to be the same computation, only not repeated.
func TestCruiserMatchesAircraft(t *testing.T) {
	for _, name := range BuiltinNames() {
		a := mustBuiltin(t, name)
		c := NewCruiser(a)
		if c.Aircraft() != a {
			t.Fatalf("%s: Aircraft() is not the aircraft given", name)
		}
		n, empty := 0, 0
		for pass := range 2 {
			for _, fl := range []float64{100, 250, 310, 350, 390, 410, 430, 450} {
				p := FLToPressure(fl)
				for i := range 9 {
					m := a.OEW + float64(i)/8*(a.MTOW-a.OEW)
					for _, floor := range []float64{1, 1.3, 1.5} {
						for _, dev := range []float64{-10, 0, 15, 30} {
							n++
							lo, hi, ok := a.MachBand(m, p, dev, floor)
							clo, chi, cok := c.MachBand(m, p, dev, floor)
							if !ok {
								empty++
							}
							if ok != cok || !same(lo, clo) || !same(hi, chi) {
								t.Fatalf("%s pass %d FL%.0f %.0f kg %.1f g %+.0f K: MachBand %v %v %v, Cruiser %v %v %v", name, pass, fl, m, floor, dev, lo, hi, ok, clo, chi, cok)
							}
							b, ok := a.SpeedBand(m, p, dev, floor)
							cb, cok := c.SpeedBand(m, p, dev, floor)
							if ok != cok || !same(b.Lo, cb.Lo) || !same(b.Hi, cb.Hi) || !same(b.VMOMach, cb.VMOMach) || b.LoLimit != cb.LoLimit || b.HiLimit != cb.HiLimit {
								t.Fatalf("%s FL%.0f %.0f kg: SpeedBand %+v, Cruiser %+v", name, fl, m, b, cb)
							}
							blo, bhi, bok := a.BuffetMachs(m, p, floor)
							cblo, cbhi, cbok := c.BuffetMachs(m, p, floor)
							if bok != cbok || !same(blo, cblo) || !same(bhi, cbhi) {
								t.Fatalf("%s FL%.0f %.0f kg: BuffetMachs %v %v, Cruiser %v %v", name, fl, m, blo, bhi, cblo, cbhi)
							}
							for _, ci := range []float64{0, 40, 150} {
								for _, w := range []float64{-60, 0, 80} {
									e, ok := a.EconMach(m, p, dev, floor, ci, w)
									ce, cok := c.EconMach(m, p, dev, floor, ci, w)
									if ok != cok || !same(e, ce) {
										t.Fatalf("%s FL%.0f %.0f kg CI %.0f wind %.0f: EconMach %v %v, Cruiser %v %v", name, fl, m, ci, w, e, ok, ce, cok)
									}
								}
							}
							l, ok := a.LRCMach(m, p, dev, floor)
							cl, cok := c.LRCMach(m, p, dev, floor)
							if ok != cok || !same(l, cl) {
								t.Fatalf("%s FL%.0f %.0f kg: LRCMach %v, Cruiser %v", name, fl, m, l, cl)
							}
							s := State{Mass: m, Pressure: p, Mach: 0.78, ISADev: dev, LoadFactor: floor}
							pt, cpt := a.Point(s), c.Point(s)
							if pt != cpt {
								t.Fatalf("%s %+v: Point %+v, Cruiser %+v", name, s, pt, cpt)
							}
							npt := c.PointNoCAS(s)
							if !math.IsNaN(npt.CAS) {
								t.Fatalf("%s %+v: PointNoCAS gives CAS %v", name, s, npt.CAS)
							}
							if npt.CAS = pt.CAS; npt != pt {
								t.Fatalf("%s %+v: PointNoCAS %+v, Point %+v", name, s, npt, pt)
							}
						}
					}
				}
			}
		}
		if empty == 0 || empty == n {
			t.Errorf("%s: %d of %d bands empty; the grid should cover both cases", name, empty, n)
		}
	}
}

// TestCruiserBadInputs checks that inputs the caches do not keep (zero,
// negative and NaN masses and pressures) get the Aircraft's answers.
func TestCruiserBadInputs(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	c := NewCruiser(a)
	p := FLToPressure(350)
	for _, in := range [][2]float64{{0, p}, {-1, p}, {math.NaN(), p}, {60000, 0}, {60000, math.NaN()}, {60000, -p}} {
		for range 2 {
			lo, hi, ok := a.MachBand(in[0], in[1], 0, 1.3)
			clo, chi, cok := c.MachBand(in[0], in[1], 0, 1.3)
			if ok != cok || !same(lo, clo) || !same(hi, chi) {
				t.Errorf("mass %v pressure %v: MachBand %v %v %v, Cruiser %v %v %v", in[0], in[1], lo, hi, ok, clo, chi, cok)
			}
		}
	}
}

// BenchmarkCruiserEconMach is BenchmarkEconMach through a Cruiser that
// has seen the mass and level before (the buffet Machs and the pressure's
// values come from its caches).
func BenchmarkCruiserEconMach(b *testing.B) {
	a := mustBuiltin(b, "demo-narrowbody")
	c := NewCruiser(a)
	p := FLToPressure(350)
	b.ReportAllocs()
	for b.Loop() {
		if _, ok := c.EconMach(60000, p, 0, 1.3, 30, -20); !ok {
			b.Fatal("no Mach")
		}
	}
}

// TestCruiserTransitions checks that a Cruiser's Climb and Descent return
// what the Aircraft's return, bit for bit and with the same errors, for
// climbs and descents across 10,000 ft and within cruise levels, on CAS,
// Mach and mixed schedules, at several masses and temperatures, each
// asked twice (the second time from the kept profile), and for a climb
// that fails part way (the profile is then kept only as far as it went).
func TestCruiserTransitions(t *testing.T) {
	for _, name := range BuiltinNames() {
		a := mustBuiltin(t, name)
		c := NewCruiser(a)
		def := DefaultSchedule(a)
		scheds := []Schedule{def, {Mach: def.Mach}, {CAS: 140, Mach: def.Mach}, {CASLow: 128, CAS: 150}}
		pairs := [][2]float64{{1500 * FtToM, 35000 * FtToM}, {31000 * FtToM, 33000 * FtToM}, {8000 * FtToM, 12000 * FtToM}, {20000 * FtToM, 45000 * FtToM}}
		for pass := range 2 {
			for _, pr := range pairs {
				lo, hi := PressureAt(pr[0]), PressureAt(pr[1])
				for _, s := range scheds {
					for _, m := range []float64{a.OEW, (a.OEW + a.MTOW) / 2, a.MTOW} {
						for _, dev := range []float64{-5, 0, 20} {
							tr, err := a.Climb(m, lo, hi, dev, s)
							ctr, cerr := c.Climb(m, lo, hi, dev, s)
							if tr != ctr || (err == nil) != (cerr == nil) || err != nil && err.Error() != cerr.Error() {
								t.Fatalf("%s pass %d climb %v %+v %.0f kg %+.0f K: %+v %v, Cruiser %+v %v", name, pass, pr, s, m, dev, tr, err, ctr, cerr)
							}
							tr, err = a.Descent(m, hi, lo, dev, s)
							ctr, cerr = c.Descent(m, hi, lo, dev, s)
							if tr != ctr || (err == nil) != (cerr == nil) || err != nil && err.Error() != cerr.Error() {
								t.Fatalf("%s pass %d descent %v %+v %.0f kg: %+v %v, Cruiser %+v %v", name, pass, pr, s, m, tr, err, ctr, cerr)
							}
						}
					}
				}
			}
		}
		// A climb past the ceiling fails part way; the same climb at a
		// lighter mass then reuses the heights kept and goes further.
		lo, hi := PressureAt(30000*FtToM), PressureAt(55000*FtToM)
		for _, m := range []float64{a.MTOW, a.OEW, a.MTOW} {
			tr, err := a.Climb(m, lo, hi, 15, def)
			ctr, cerr := c.Climb(m, lo, hi, 15, def)
			if err == nil && m == a.MTOW {
				t.Fatalf("%s: a climb to FL550 at MTOW succeeded; the check needs one that fails", name)
			}
			if tr != ctr || (err == nil) != (cerr == nil) || err != nil && err.Error() != cerr.Error() {
				t.Fatalf("%s climb to FL550 %.0f kg: %+v %v, Cruiser %+v %v", name, m, tr, err, ctr, cerr)
			}
		}
	}
}
