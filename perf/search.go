package perf

import "math"

// cGold is (3 - √5)/2, the golden-section fraction of Brent's method.
var cGold = (3 - math.Sqrt(5)) / 2

// brentMin returns the x in [a, b] that minimises f, assumed unimodal there,
// and f(x), by Brent's method: parabolic interpolation through the three
// best points, with a golden-section step whenever the parabola's step is
// unsafe (R. P. Brent, Algorithms for Minimization without Derivatives,
// Prentice-Hall 1973, ch. 5, procedure localmin; the same algorithm as
// Numerical Recipes' brent). It stops when x lies within tol of the
// minimum's bracket, that is when the bracket is at most about tol wide.
// On smooth functions it needs 8-15 evaluations where golden section alone
// needs 2 + log(tol/(b-a))/log(0.618), about 37 for tol = 1e-7 on a band of
// 0.3 Mach. Deviation from Brent: the tolerance is absolute only.
func brentMin(a, b, tol float64, f func(float64) float64) (xmin, fmin float64) {
	tol1 := tol / 4
	tol2 := 2 * tol1
	x := a + cGold*(b-a)
	w, v := x, x
	fx := f(x)
	fw, fv := fx, fx
	var d, e float64
	for range 200 {
		xm := 0.5 * (a + b)
		if math.Abs(x-xm) <= tol2-0.5*(b-a) {
			break
		}
		golden := true
		if math.Abs(e) > tol1 {
			// Parabola through x, w, v.
			r := (x - w) * (fx - fv)
			q := (x - v) * (fx - fw)
			p := (x-v)*q - (x-w)*r
			q = 2 * (q - r)
			if q > 0 {
				p = -p
			}
			q = math.Abs(q)
			etemp := e
			e = d
			if !(math.Abs(p) >= math.Abs(0.5*q*etemp) || p <= q*(a-x) || p >= q*(b-x)) {
				d = p / q
				golden = false
				if u := x + d; u-a < tol2 || b-u < tol2 {
					d = math.Copysign(tol1, xm-x)
				}
			}
		}
		if golden {
			if x >= xm {
				e = a - x
			} else {
				e = b - x
			}
			d = cGold * e
		}
		u := x + d
		if math.Abs(d) < tol1 {
			u = x + math.Copysign(tol1, d)
		}
		fu := f(u)
		if fu <= fx {
			if u >= x {
				a = x
			} else {
				b = x
			}
			v, w, x = w, x, u
			fv, fw, fx = fw, fx, fu
		} else {
			if u < x {
				a = u
			} else {
				b = u
			}
			if fu <= fw || w == x {
				v, w = w, u
				fv, fw = fw, fu
			} else if fu <= fv || v == x || v == w {
				v, fv = u, fu
			}
		}
	}
	return x, fx
}

// rootEdge returns the edge between good, where g >= 0, and bad, where
// g < 0 (fg = g(good), fb = g(bad)), to within tol: the last point found
// with g >= 0. Method: the Illinois variant of regula falsi (Dowell and
// Jarratt, "A modified regula falsi method for computing the root of an
// equation", BIT 11, 1971): the false-position point, halving the function
// value kept at an end that survives twice in a row, which gives
// superlinear convergence (order about 1.44) on smooth g while keeping the
// bracket. Deviation: each new point is kept at least tol/4 inside the
// bracket, so the bracket always shrinks to tol; after 100 steps it falls
// back to bisection. Typically 6-10 evaluations where bisection needs 27
// for 1e-7 on 0.3.
func rootEdge(good, bad, fg, fb, tol float64, g func(float64) float64) float64 {
	side := 0
	for i := 0; math.Abs(bad-good) > tol; i++ {
		x := 0.5 * (good + bad)
		if i < 100 && fg != fb {
			x = (good*fb - bad*fg) / (fb - fg)
			lo, hi := math.Min(good, bad)+tol/4, math.Max(good, bad)-tol/4
			if !(x >= lo) {
				x = lo
			} else if !(x <= hi) {
				x = hi
			}
		}
		fx := g(x)
		if fx >= 0 {
			good, fg = x, fx
			if side > 0 {
				fb /= 2
			}
			side = 1
		} else {
			bad, fb = x, fx
			if side < 0 {
				fg /= 2
			}
			side = -1
		}
	}
	return good
}
