package optimizer

import (
	"errors"
	"math"
	"testing"
)

// TestFixedTOW checks the take-off mass iteration on fuel laws with known
// answers: a linear law F(T) = a + s T has the fixed point T* = (z + a) /
// (1 - s) (algebra), which the secant step reaches in a few evaluations;
// a law asking for more than MTOW is reported as clamped; a law with no
// fixed point (fuel jumping as a profile would between two levels) stops
// with errNoConvergence after the bounded number of tries.
func TestFixedTOW(t *testing.T) {
	const z, mtow = 170000.0, 250000.0
	for _, s := range []float64{0, 0.1, 0.3, 0.6} {
		calls, last := 0, 0.0
		need := func(tow float64) (float64, error) { calls++; last = tow; return 20000 + s*tow, nil }
		clamped, err := fixedTOW(z, mtow, z, need)
		want := (z + 20000) / (1 - s)
		if want > mtow {
			if !clamped || err != nil {
				t.Errorf("slope %g: clamped %v, %v; want clamped (T* = %.0f)", s, clamped, err, want)
			}
			continue
		}
		if err != nil || clamped || math.Abs(last-want) > fuelTolerance || calls > 5 {
			t.Errorf("slope %g: %v, clamped %v, last %.3f after %d calls; want %.3f", s, err, clamped, last, calls, want)
		}
	}
	jump := func(tow float64) (float64, error) {
		if tow < 245000 {
			return 80000, nil // T -> 250000
		}
		return 70000, nil // T -> 240000
	}
	if _, err := fixedTOW(z, mtow, z, jump); !errors.Is(err, errNoConvergence) {
		t.Errorf("jumping law: %v, want errNoConvergence", err)
	}
	boom := errors.New("boom")
	if _, err := fixedTOW(z, mtow, z, func(float64) (float64, error) { return 0, boom }); !errors.Is(err, boom) {
		t.Errorf("error not passed on: %v", err)
	}
}
