package perf

import (
	"math"
	"testing"
)

// brentMin and rootEdge against closed forms: the minimum of
// (x - c)² + k x⁴ style functions and the root of smooth monotone
// functions, to the asked tolerance, in far fewer evaluations than golden
// section and bisection (Brent 1973; Dowell and Jarratt 1971).
func TestBrentMin(t *testing.T) {
	for _, c := range []float64{0.31, 0.5, 0.7777, 0.899999} {
		n := 0
		f := func(x float64) float64 { n++; return math.Cosh(8*(x-c)) + 0.3*(x-c)*(x-c)*(x-c) }
		x, fx := brentMin(0.3, 0.9, 1e-7, f)
		// Minimum of cosh(8u) + 0.3u³: 8 sinh(8u) + 0.9u² = 0 at u = 0
		// exactly (both terms vanish, and the second derivative is 64 > 0).
		if math.Abs(x-c) > 1e-7 || fx != f(x) {
			t.Errorf("c=%v: x %v (err %.2g) after %d evaluations", c, x, x-c, n)
		}
		if n > 40 {
			t.Errorf("c=%v: %d evaluations", c, n)
		}
	}
	// A minimum at an end of the interval is approached to within tol.
	x, _ := brentMin(0, 1, 1e-7, func(x float64) float64 { return x })
	if x > 1e-7 {
		t.Errorf("monotone: x %v", x)
	}
}

func TestRootEdge(t *testing.T) {
	for _, r := range []float64{0.3000001, 0.42, 0.6180339887, 0.8999} {
		n := 0
		g := func(x float64) float64 { n++; return math.Exp(-5*x) - math.Exp(-5*r) } // >= 0 below r
		for _, ends := range [][2]float64{{0.3, 0.9}, {0.9, 0.3}} {
			good, bad := ends[0], ends[1]
			if g(good) < 0 {
				good, bad = bad, good
			}
			n = 0
			x := rootEdge(good, bad, g(good), g(bad), 1e-7, g)
			if g(x) < 0 || math.Abs(x-r) > 1e-7 {
				t.Errorf("root %v: got %v (err %.2g)", r, x, x-r)
			}
			if n > 30 {
				t.Errorf("root %v: %d evaluations", r, n)
			}
		}
	}
}
