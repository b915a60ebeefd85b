package perf

import (
	"math"
	"testing"
)

// M 0.80 at FL350 ISA is 271.9 kt CAS (NACA Report 1135, "Equations, tables, and charts for compressible flow", 1953);
// value computed from its isentropic relations.
func TestMachToCASReference(t *testing.T) {
	p := FLToPressure(350)
	if kt := MachToCAS(0.80, p) / KtToMS; math.Abs(kt-271.9) > 0.05 {
		t.Errorf("M0.80 FL350 = %.3f kt CAS, want 271.9", kt)
	}
}

// At sea level standard, CAS = EAS = TAS (definition of CAS and EAS,
// NACA Report 1135).
func TestSeaLevelSpeedsEqual(t *testing.T) {
	for _, m := range []float64{0.1, 0.3, 0.5, 0.7, 0.9} {
		tas := MachToTAS(m, T0)
		cas := MachToCAS(m, P0)
		eas := MachToEAS(m, P0)
		// EAS to 1e-8: the defined Rho0 = 1.225 rounds P0/(R T0) = 1.2249991.
		if relErr(cas, tas) > 1e-12 || relErr(eas, tas) > 1e-8 {
			t.Errorf("M%.1f sea level: TAS %.6f CAS %.6f EAS %.6f", m, tas, cas, eas)
		}
	}
}

// Every conversion inverts its partner (round trip to 1e-10).
func TestAirspeedRoundTrips(t *testing.T) {
	for _, fl := range []float64{0, 100, 250, 350, 410} {
		p := FLToPressure(fl)
		for _, dev := range []float64{-20, 0, 15} {
			tK := ISATemperature(fl*100*FtToM) + dev
			for m := 0.2; m < 0.95; m += 0.05 {
				if got := TASToMach(MachToTAS(m, tK), tK); math.Abs(got-m) > 1e-12 {
					t.Fatalf("TAS round trip M%.2f: %g", m, got)
				}
				if got := CASToMach(MachToCAS(m, p), p); math.Abs(got-m) > 1e-10 {
					t.Fatalf("CAS round trip FL%.0f M%.2f: %g", fl, m, got)
				}
				if got := EASToMach(MachToEAS(m, p), p); math.Abs(got-m) > 1e-12 {
					t.Fatalf("EAS round trip M%.2f: %g", m, got)
				}
				tas := MachToTAS(m, tK)
				if got := CASToTAS(TASToCAS(tas, p, tK), p, tK); math.Abs(got-tas) > 1e-8 {
					t.Fatalf("CAS/TAS round trip FL%.0f M%.2f: %g vs %g", fl, m, got, tas)
				}
			}
		}
	}
	if !math.IsNaN(MachToCAS(1.2, P0)) || !math.IsNaN(CASToMach(400, P0)) || !math.IsNaN(MachToEAS(-0.1, P0)) {
		t.Error("out-of-range airspeed inputs should give NaN")
	}
}

// n = 1/cos(bank): 1.3 g is 39.7°, 1.5 g is 48.2° (level-turn relation n = 1/cos(bank),
// e.g. Anderson, Introduction to Flight).
func TestLoadFactorBank(t *testing.T) {
	for _, tc := range []struct{ n, deg float64 }{{1.3, 39.7}, {1.5, 48.2}, {2, 60}} {
		if got := BankAngle(tc.n) * 180 / math.Pi; math.Abs(got-tc.deg) > 0.05 {
			t.Errorf("BankAngle(%.1f) = %.3f°, want %.1f°", tc.n, got, tc.deg)
		}
		if got := LoadFactor(tc.deg * math.Pi / 180); math.Abs(got-tc.n) > 0.005 {
			t.Errorf("LoadFactor(%.1f°) = %.4f, want %.1f", tc.deg, got, tc.n)
		}
	}
	if !math.IsNaN(BankAngle(0.9)) || !math.IsNaN(LoadFactor(math.Pi/2)) {
		t.Error("n < 1 or 90° bank should give NaN")
	}
}

// TestEASConversions: EAS = TAS sqrt(rho/rho0) (the definition of
// equivalent airspeed; NACA Report 1135 notation), EAS <= CAS above sea
// level (the compressibility correction is negative), and every pair of
// conversions round-trips.
func TestEASConversions(t *testing.T) {
	for _, fl := range []float64{0, 100, 250, 350, 410} {
		p := FLToPressure(fl)
		for _, dev := range []float64{-10, 0, 15} {
			tk := ISATemperature(AltitudeAt(p)) + dev
			for _, tas := range []float64{120, 200, 250} {
				eas := TASToEAS(tas, p, tk)
				if want := tas * math.Sqrt(Density(p, tk)/Rho0); math.Abs(eas-want) > 1e-9*want {
					t.Errorf("FL%.0f ISA%+.0f TAS %.0f: EAS %.6f, want TAS sqrt(rho/rho0) = %.6f", fl, dev, tas, eas, want)
				}
				if back := EASToTAS(eas, p, tk); math.Abs(back-tas) > 1e-9*tas {
					t.Errorf("EASToTAS(TASToEAS(%.0f)) = %.9f", tas, back)
				}
				cas := TASToCAS(tas, p, tk)
				if e := CASToEAS(cas, p); math.Abs(e-eas) > 1e-9*eas || (fl > 0 && e > cas) {
					t.Errorf("FL%.0f: CASToEAS(%.4f) = %.6f, want %.6f and at most CAS", fl, cas, e, eas)
				}
				if c := EASToCAS(eas, p); math.Abs(c-cas) > 1e-9*cas {
					t.Errorf("EASToCAS(%.4f) = %.6f, want %.6f", eas, c, cas)
				}
			}
		}
	}
}
