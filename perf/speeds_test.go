package perf

import (
	"math"
	"testing"
)

// Benchmarks of the speed searches the optimizer calls for every cruise
// evaluation.

func BenchmarkEconMach(b *testing.B) {
	a := mustBuiltin(b, "demo-narrowbody")
	p := FLToPressure(350)
	b.ReportAllocs()
	for b.Loop() {
		if _, ok := a.EconMach(60000, p, 0, 1.3, 30, -20); !ok {
			b.Fatal("no Mach")
		}
	}
}

func BenchmarkLRCMach(b *testing.B) {
	a := mustBuiltin(b, "demo-narrowbody")
	p := FLToPressure(350)
	b.ReportAllocs()
	for b.Loop() {
		if _, ok := a.LRCMach(60000, p, 0, 1.3); !ok {
			b.Fatal("no Mach")
		}
	}
}

// BenchmarkMachBandThrustLimited takes the golden-section and bisection
// path: both band ends fail the thrust test.
func BenchmarkMachBandThrustLimited(b *testing.B) {
	a := mustBuiltin(b, "demo-narrowbody")
	p := FLToPressure(350)
	m := 0.9 * a.MTOW
	blo, bhi, _ := a.BuffetMachs(m, p, 1)
	if lo, hi, ok := a.MachBand(m, p, 30, 1); !ok || lo <= blo || hi >= bhi {
		b.Fatalf("band %g-%g (%v) not thrust-limited at both ends (buffet %g-%g)", lo, hi, ok, blo, bhi)
	}
	b.ReportAllocs()
	for b.Loop() {
		a.MachBand(m, p, 30, 1)
	}
}

// The band's high end is the least of buffet onset, MMO and the Mach of
// VMO, and the limit is named: low down VMO binds (a 340 kt CAS is below
// MMO under the crossover), high up MMO or buffet. The CAS at the vmo end
// equals VMO by the subsonic CAS formula (NACA Report 1135, tested in
// airspeed_test.go).
func TestSpeedBandLimits(t *testing.T) {
	a := mustBuiltin(t, "demo-narrowbody")
	m := 0.8 * a.MTOW
	p := FLToPressure(250)
	b, ok := a.SpeedBand(m, p, 0, 1.3)
	if !ok || b.HiLimit != LimitVMO || relErr(MachToCAS(b.Hi, p), a.VMO) > 1e-9 || b.LoLimit != LimitBuffet {
		t.Fatalf("FL250: band %+v ok %v, want high end at VMO %.1f kt", b, ok, a.VMO/KtToMS)
	}
	if lo, hi, _ := a.MachBand(m, p, 0, 1.3); lo != b.Lo || hi != b.Hi {
		t.Errorf("MachBand %v-%v differs from SpeedBand %v-%v", lo, hi, b.Lo, b.Hi)
	}
	if 0.86 <= b.Hi {
		t.Errorf("M0.86 at FL250 inside the band %+v", b)
	}
	p = FLToPressure(370)
	b, ok = a.SpeedBand(m, p, 0, 1.0)
	if !ok || b.VMOMach <= a.MMO {
		t.Fatalf("FL370: %+v ok %v", b, ok)
	}
	switch b.HiLimit {
	case LimitMMO:
		if b.Hi != a.MMO {
			t.Errorf("mmo end %v, MMO %v", b.Hi, a.MMO)
		}
	case LimitBuffet:
		if _, hi, _ := a.BuffetMachs(m, p, 1); b.Hi != hi || hi > a.MMO {
			t.Errorf("buffet end %v, buffet %v", b.Hi, hi)
		}
	default:
		t.Errorf("FL370 high limit %q", b.HiLimit)
	}
	// Thrust closes the band above the thrust ceiling.
	e := mustEnvelope(t, a, a.MTOW, 20, 1.0)
	b, ok = a.SpeedBand(a.MTOW, FLToPressure(e.MaxFLThrust+15), 20, 1.0)
	if ok && b.HiLimit != LimitThrust && b.LoLimit != LimitThrust {
		t.Errorf("above the thrust ceiling: %+v", b)
	}
}

// Beyond the last row of the buffet table the boundary is unknown: a
// light aircraft low down has no high-speed onset within the data, and the
// value returned is then flagged, not a physical limit.
func TestHighBuffetBeyondData(t *testing.T) {
	a := mustBuiltin(t, "demo-widebody")
	last := a.Buffet[len(a.Buffet)-1].Mach
	lowP, highP := FLToPressure(200), FLToPressure(410)
	if _, hi, ok := a.BuffetMachs(a.OEW, lowP, 1); !ok || hi != last || !a.HighBuffetBeyondData(a.OEW, lowP, 1) {
		t.Errorf("OEW FL200: hi %v (table ends %v), beyond %v", hi, last, a.HighBuffetBeyondData(a.OEW, lowP, 1))
	}
	if _, hi, ok := a.BuffetMachs(a.MTOW, highP, 1); !ok || hi >= last || a.HighBuffetBeyondData(a.MTOW, highP, 1) {
		t.Errorf("MTOW FL410: hi %v should be an onset inside the table", hi)
	}
	e := mustEnvelope(t, a, a.OEW, 0, 1.3)
	if r := e.Rows[0]; !r.HighBuffet1gBeyondData || r.HighBuffet1g != last || r.VMOMach != CASToMach(a.VMO, r.Pressure) {
		t.Errorf("FL%.0f row: %+v", r.FL, r)
	}
}

// ReportFL rounds down (a ceiling is never overstated), the same for every
// level.
func TestReportFL(t *testing.T) {
	for _, tc := range []struct{ in, want float64 }{{371.99, 371}, {372, 372}, {349.5, 349}, {371.9999999999, 372}} {
		if got := ReportFL(tc.in); got != tc.want {
			t.Errorf("ReportFL(%v) = %v, want %v", tc.in, got, tc.want)
		}
	}
	if !math.IsNaN(ReportFL(math.NaN())) {
		t.Error("ReportFL(NaN) not NaN")
	}
}
