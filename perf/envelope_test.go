package perf

import (
	"errors"
	"math"
	"testing"
)

func mustEnvelope(tb testing.TB, a *Aircraft, mass, dev, floor float64) Envelope {
	tb.Helper()
	e, err := a.Envelope(mass, dev, floor)
	if err != nil {
		tb.Fatal(err)
	}
	return e
}

// Isothermal-layer hydrostatics: at constant CL and Mach the cruise
// pressure is proportional to mass, so the optimum level rises by
// H ln(m1/m2), H = R T11/g = 6341.6 m (20,806 ft) (isothermal hydrostatics; U.S. Standard Atmosphere 1976 T11 = 216.65 K).
func TestOptimumLevelVsMass(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	const m1, m2 = 200000.0, 175000.0
	if h := RAir * 216.65 / G0; math.Abs(h-6341.6) > 0.1 {
		t.Fatalf("H = %g m", h)
	}
	e1 := mustEnvelope(t, a, m1, 0, 1.3)
	e2 := mustEnvelope(t, a, m2, 0, 1.3)
	for _, e := range []Envelope{e1, e2} {
		if !(e.OptimumFL*100*FtToM > 11000 && e.OptimumFL < e.MaxFL-2) {
			t.Fatalf("optimum FL%.1f not above 11 km and clear of MaxFL %.1f", e.OptimumFL, e.MaxFL)
		}
	}
	want := 6341.6 * math.Log(m1/m2) / FtToM / 100
	// The lighter aircraft flies higher.
	if got := e2.OptimumFL - e1.OptimumFL; math.Abs(got-want) > 1 {
		t.Errorf("optimum rise %.2f FL, want %.2f FL (within 100 ft)", got, want)
	}
}

// Envelope shape: physical consequences of CL = 2 n m g/(γ p M² S) and the
// buffet boundary (lift equation; see perf/point.go): the buffet band narrows with altitude, the
// floor band lies inside the 1 g band, more mass or a higher floor lowers
// the buffet-limited level, and a hotter day does not raise the
// thrust-limited level (thrust lapse and the hydrostatic T_ISA/T factor).
func TestEnvelopeShape(t *testing.T) {
	for _, name := range BuiltinNames() {
		a := mustBuiltin(t, name)
		mid := (a.OEW + a.MTOW) / 2
		e := mustEnvelope(t, a, mid, 0, 1.3)
		if want := int((math.Floor(a.CertifiedCeiling/(100*FtToM)/10+1e-9)*10+20-100)/10) + 1; len(e.Rows) != want || e.Rows[0].FL != 100 {
			t.Fatalf("%s: %d rows from FL%g, want %d from FL100", name, len(e.Rows), e.Rows[0].FL, want)
		}
		prevW, prevW1 := math.Inf(1), math.Inf(1)
		narrowed := false
		for _, r := range e.Rows {
			if relErr(r.Pressure, FLToPressure(r.FL)) > 1e-12 || relErr(r.SoundSpeed, SpeedOfSound(r.OAT)) > 1e-12 {
				t.Fatalf("%s FL%g: pressure/OAT columns inconsistent", name, r.FL)
			}
			if math.IsNaN(r.LowBuffetFloor) {
				prevW = 0
				continue
			}
			w, w1 := r.HighBuffetFloor-r.LowBuffetFloor, r.HighBuffet1g-r.LowBuffet1g
			if w > prevW+1e-12 || w1 > prevW1+1e-12 {
				t.Errorf("%s FL%g: band widened (%.4f after %.4f)", name, r.FL, w, prevW)
			}
			if w < prevW-1e-3 {
				narrowed = true
			}
			if r.LowBuffetFloor < r.LowBuffet1g || r.HighBuffetFloor > r.HighBuffet1g {
				t.Errorf("%s FL%g: floor band %.4f-%.4f outside 1 g band %.4f-%.4f", name, r.FL, r.LowBuffetFloor, r.HighBuffetFloor, r.LowBuffet1g, r.HighBuffet1g)
			}
			if !math.IsNaN(r.LRCMach) && (r.LRCMach < r.LowBuffetFloor || r.LRCMach > math.Min(r.HighBuffetFloor, r.MMO)) {
				t.Errorf("%s FL%g: LRC %.4f outside the band", name, r.FL, r.LRCMach)
			}
			prevW, prevW1 = w, w1
		}
		if !narrowed {
			t.Errorf("%s: the band never narrows", name)
		}
		heavy := mustEnvelope(t, a, math.Min(a.MTOW, mid*1.1), 0, 1.3)
		floor15 := mustEnvelope(t, a, mid, 0, 1.5)
		hot := mustEnvelope(t, a, mid, 15, 1.3)
		if !(heavy.MaxFLBuffet < e.MaxFLBuffet && floor15.MaxFLBuffet < e.MaxFLBuffet) {
			t.Errorf("%s: buffet level %.1f, heavier %.1f, 1.5 g %.1f", name, e.MaxFLBuffet, heavy.MaxFLBuffet, floor15.MaxFLBuffet)
		}
		if hot.MaxFLThrust > e.MaxFLThrust {
			t.Errorf("%s: hot day raised the thrust-limited level %.1f -> %.1f", name, e.MaxFLThrust, hot.MaxFLThrust)
		}
		if e.MaxFL != math.Min(e.MaxFLCertified, math.Min(e.MaxFLBuffet, e.MaxFLThrust)) || e.OptimumFL > e.MaxFL {
			t.Errorf("%s: MaxFL %.1f from %.1f/%.1f/%.1f, optimum %.1f", name, e.MaxFL, e.MaxFLBuffet, e.MaxFLThrust, e.MaxFLCertified, e.OptimumFL)
		}
		// The bisected ceilings are where their criteria change (to 0.1 ft).
		p := FLToPressure(e.MaxFLBuffet)
		if lo, _, ok := a.BuffetMachs(mid, p, 1.3); !ok || lo >= a.MMO {
			t.Errorf("%s: no buffet band just below MaxFLBuffet", name)
		}
		if _, _, ok := a.BuffetMachs(mid, FLToPressure(e.MaxFLBuffet+0.01), 1.3); ok {
			if lo, _, _ := a.BuffetMachs(mid, FLToPressure(e.MaxFLBuffet+0.01), 1.3); lo < a.MMO {
				t.Errorf("%s: buffet band still open above MaxFLBuffet", name)
			}
		}
		pt := FLToPressure(e.MaxFLThrust)
		lrc, _ := a.LRCMach(mid, pt, 0, 1)
		if rc := a.Point(State{Mass: mid, Pressure: pt, Mach: lrc}).ResidualClimb; math.Abs(rc/FtToM*60-300) > 1 {
			t.Errorf("%s: residual climb at MaxFLThrust %.1f ft/min, want 300 (common practice)", name, rc/FtToM*60)
		}
	}
}

// Demo trade facts (common practice, from memory): a heavy widebody has a
// wide buffet-free band at FL350 and a slim one at FL400; its buffet-limited
// level at MTOW with 1.3 g protection lies between FL310 and FL370.
func TestWidebodyCoffinCorner(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	lo35, hi35, ok35 := a.BuffetMachs(a.MTOW, FLToPressure(350), 1)
	lo40, hi40, ok40 := a.BuffetMachs(a.MTOW, FLToPressure(400), 1)
	if !ok35 || !ok40 || !(hi35-lo35 > 0.2) || !(hi40-lo40 < 0.5*(hi35-lo35)) {
		t.Errorf("MTOW 1 g band FL350 %.3f-%.3f, FL400 %.3f-%.3f", lo35, hi35, lo40, hi40)
	}
	e := mustEnvelope(t, a, a.MTOW, 0, 1.3)
	if !(e.MaxFLBuffet > 310 && e.MaxFLBuffet < 370) {
		t.Errorf("buffet-limited level at MTOW, 1.3 g: FL%.1f, want FL310-FL370", e.MaxFLBuffet)
	}
}

// Demo plausibility (common practice, from memory): cruise fuel flow at mid
// mass and LRC near FL350 ISA, LRC Mach, optimum level and ceiling ranges.
func TestDemoPlausibility(t *testing.T) {
	tests := []struct {
		name         string
		ffLo, ffHi   float64 // t/h
		lrcLo, lrcHi float64
	}{
		{"demo-regional", 1.2, 2.2, 0.74, 0.78},
		{"demo-narrowbody", 2.0, 3.0, 0.76, 0.80},
		{"demo-widebody", 5.0, 8.0, 0.82, 0.86},
	}
	for _, tc := range tests {
		a := mustBuiltin(t, tc.name)
		mid := (a.OEW + a.MTOW) / 2
		p := FLToPressure(350)
		lrc, ok := a.LRCMach(mid, p, 0, 1.3)
		if !ok || lrc < tc.lrcLo || lrc > tc.lrcHi {
			t.Errorf("%s: LRC at FL350 M%.4f, want %.2f-%.2f", tc.name, lrc, tc.lrcLo, tc.lrcHi)
		}
		ff := a.Point(State{Mass: mid, Pressure: p, Mach: lrc}).FuelFlow * 3.6
		if ff < tc.ffLo || ff > tc.ffHi {
			t.Errorf("%s: fuel flow %.2f t/h, want %.1f-%.1f", tc.name, ff, tc.ffLo, tc.ffHi)
		}
		e := mustEnvelope(t, a, mid, 0, 1.3)
		if e.OptimumFL < 330 || e.OptimumFL > 410 {
			t.Errorf("%s: optimum FL%.1f at mid mass, want FL330-FL410", tc.name, e.OptimumFL)
		}
		if e.MaxFLCertified < 410 || e.MaxFLCertified > 430 {
			t.Errorf("%s: ceiling FL%.0f", tc.name, e.MaxFLCertified)
		}
	}
}

func TestEnvelopeBadInput(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	mid := (a.OEW + a.MTOW) / 2
	for _, tc := range []struct {
		name             string
		mass, dev, floor float64
	}{
		{"light", a.OEW - 1, 0, 1.3},
		{"heavy", a.MTOW + 1, 0, 1.3},
		{"floor", mid, 0, 0.9},
		{"nan mass", math.NaN(), 0, 1.3},
		{"nan dev", mid, math.NaN(), 1.3},
		{"nan floor", mid, 0, math.NaN()},
	} {
		_, err := a.Envelope(tc.mass, tc.dev, tc.floor)
		var re *RangeError
		if !errors.As(err, &re) {
			t.Errorf("%s: err = %v, want *RangeError", tc.name, err)
		}
	}
}

func BenchmarkEnvelope(b *testing.B) {
	a := mustBuiltin(b, "demo-widebody")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := a.Envelope(200000, 5, 1.3); err != nil {
			b.Fatal(err)
		}
	}
}
