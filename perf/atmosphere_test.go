package perf

import (
	"math"
	"testing"
)

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// Check values: U.S. Standard Atmosphere 1976 (NOAA/NASA/USAF, 1976),
// from U.S. Standard Atmosphere 1976 (NOAA/NASA/USAF) tables; tolerance 0.01 %.
func TestISAReferenceValues(t *testing.T) {
	tests := []struct {
		name    string
		h       float64 // m
		tK, pPa float64
		rho     float64 // 0: not checked
		soundMS float64 // 0: not checked
	}{
		{"sea level", 0, 288.15, 101325, 1.225, 340.294},
		{"11 km", 11000, 216.65, 22632.06, 0.36392, 0},
		{"20 km", 20000, 216.65, 5474.89, 0, 0},
		{"FL350", 35000 * FtToM, 218.81, 23842, 0, 0},
		{"FL390", 39000 * FtToM, 216.65, 19677, 0, 0},
		// From memory (USSA 1976 table): 32 km 868.02 Pa, 228.65 K; -2 km 301.15 K, 127774 Pa.
		{"32 km (from memory)", 32000, 228.65, 868.02, 0, 0},
		{"-2 km (from memory)", -2000, 301.15, 127774, 0, 0},
	}
	for _, tc := range tests {
		tK := ISATemperature(tc.h)
		p := PressureAt(tc.h)
		if relErr(tK, tc.tK) > 1e-4 {
			t.Errorf("%s: T = %.4f K, want %.2f", tc.name, tK, tc.tK)
		}
		if relErr(p, tc.pPa) > 1e-4 {
			t.Errorf("%s: p = %.3f Pa, want %.2f", tc.name, p, tc.pPa)
		}
		if tc.rho != 0 && relErr(Density(p, tK), tc.rho) > 1e-4 {
			t.Errorf("%s: rho = %.6f, want %.5f", tc.name, Density(p, tK), tc.rho)
		}
		if tc.soundMS != 0 && relErr(SpeedOfSound(tK), tc.soundMS) > 1e-4 {
			t.Errorf("%s: a = %.4f, want %.3f", tc.name, SpeedOfSound(tK), tc.soundMS)
		}
	}
	// Sea-level speed of sound 661.48 kt (U.S. Standard Atmosphere 1976).
	if kt := SpeedOfSound(T0) / KtToMS; math.Abs(kt-661.48) > 0.01 {
		t.Errorf("a0 = %.3f kt, want 661.48", kt)
	}
}

// FL350 238.42 hPa, FL390 196.77 hPa (ICAO Doc 7488 / U.S. Standard Atmosphere 1976).
func TestFlightLevelPressures(t *testing.T) {
	for _, tc := range []struct{ fl, hPa float64 }{{350, 238.42}, {390, 196.77}} {
		if got := FLToPressure(tc.fl) / 100; relErr(got, tc.hPa) > 1e-4 {
			t.Errorf("FL%.0f: %.3f hPa, want %.2f", tc.fl, got, tc.hPa)
		}
		if got := PressureToFL(tc.hPa * 100); math.Abs(got-tc.fl) > 0.05 {
			t.Errorf("%.2f hPa: FL%.3f, want FL%.0f", tc.hPa, got, tc.fl)
		}
	}
}

// The inverse must be exact per layer: round trips across all layers.
func TestAltitudeRoundTrip(t *testing.T) {
	for h := -2000.0; h <= 47000; h += 137.5 {
		p := PressureAt(h)
		if got := AltitudeAt(p); math.Abs(got-h) > 1e-6 {
			t.Fatalf("AltitudeAt(PressureAt(%g)) = %.9f", h, got)
		}
		if got := isaTemperatureAtPressure(p); math.Abs(got-ISATemperature(h)) > 1e-9 {
			t.Fatalf("temperature at pressure of %g m: %.9f, want %.9f", h, got, ISATemperature(h))
		}
		if d := ISADeviation(p, ISATemperature(h)+7); math.Abs(d-7) > 1e-9 {
			t.Fatalf("ISADeviation at %g m = %g, want 7", h, d)
		}
	}
	for fl := 0.0; fl <= 600; fl += 7 {
		if got := PressureToFL(FLToPressure(fl)); math.Abs(got-fl) > 1e-9 {
			t.Fatalf("PressureToFL(FLToPressure(%g)) = %.12f", fl, got)
		}
	}
	if !math.IsNaN(AltitudeAt(0)) || !math.IsNaN(AltitudeAt(-5)) {
		t.Error("AltitudeAt of non-positive pressure should be NaN")
	}
}

// TestISATemperatureAtPressure checks the standard temperature at a static
// pressure against U.S. Standard Atmosphere 1976 (NOAA/NASA/USAF) table
// values (the pressures and temperatures of TestISAReferenceValues), and
// that ISADeviation subtracts exactly it.
func TestISATemperatureAtPressure(t *testing.T) {
	for _, tc := range []struct{ pPa, tK float64 }{{101325, 288.15}, {22632.06, 216.65}, {23842, 218.81}, {19677, 216.65}, {5474.89, 216.65}} {
		got := ISATemperatureAtPressure(tc.pPa)
		if relErr(got, tc.tK) > 1e-4 {
			t.Errorf("%.2f Pa: %.4f K, want %.2f", tc.pPa, got, tc.tK)
		}
		if d := ISADeviation(tc.pPa, 230); d != 230-got {
			t.Errorf("%.2f Pa: ISADeviation %v, 230 - ISATemperatureAtPressure %v", tc.pPa, d, 230-got)
		}
	}
}
