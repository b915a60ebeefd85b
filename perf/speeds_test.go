package perf

import "testing"

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
