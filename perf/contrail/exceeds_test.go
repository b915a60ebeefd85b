package contrail

import (
	"math"
	"testing"
)

// TestExceedsCritical checks ExceedsCritical against its definition, eta >
// CriticalEfficiency(t, p, rh), on a grid of temperatures (including
// outside Murphy and Koop's 123..332 K), pressures (including zero),
// humidities and efficiencies, and at efficiencies within 1e-15..1e-6 of
// η* on either side, where the bisection must run to its end.
func TestExceedsCritical(t *testing.T) {
	n, near := 0, 0
	for _, tk := range []float64{100, 200, 210, 215, 220, 225, 230, 240, 250, 275, 300, 340} {
		for _, p := range []float64{0, 15000, 20000, 25000, 30000, 50000} {
			for _, rh := range []float64{-0.1, 0, 0.3, 0.6, 0.9, 1, 1.2, math.NaN()} {
				crit := CriticalEfficiency(tk, p, rh)
				etas := []float64{-1, 0, 0.1, 0.2, 0.25, 0.3, 0.35, 0.4, 0.5, 1, 1.5, math.NaN()}
				if !math.IsNaN(crit) {
					for _, d := range []float64{1e-15, 1e-13, 1e-11, 1e-9, 1e-6} {
						etas = append(etas, crit-d, crit+d)
					}
					etas = append(etas, crit)
					near++
				}
				for _, eta := range etas {
					n++
					if got, want := ExceedsCritical(eta, tk, p, rh), eta > crit; got != want {
						t.Fatalf("t %g K, p %g Pa, rh %g, eta %.17g: %v, eta > CriticalEfficiency (%.17g) is %v", tk, p, rh, eta, got, crit, want)
					}
				}
			}
		}
	}
	if near < 100 {
		t.Errorf("only %d cases with a critical efficiency", near)
	}
}

func BenchmarkExceedsCritical(b *testing.B) {
	for b.Loop() {
		ExceedsCritical(0.33, 220, 24000, 0.7)
	}
}

func BenchmarkCriticalEfficiency(b *testing.B) {
	for b.Loop() {
		_ = 0.33 > CriticalEfficiency(220, 24000, 0.7)
	}
}
