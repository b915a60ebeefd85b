package route

// Geodesics on the WGS-84 ellipsoid.
//
// Method: C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87, 43-55
// (2013), doi:10.1007/s00190-012-0578-z, with the series of Sec. 3 carried to
// sixth order in the third flattening n and in eps (as in GeographicLib, whose
// published algorithm this file follows; equation numbers refer to the paper).
// The inverse problem is solved by Newton's method on the longitude equation
// (Sec. 4) started from the astroid/short-line estimate, with bisection as a
// safeguard, so it converges for all point pairs including nearly antipodal
// ones. Deviations: area and the geodesic-scale outputs are not computed;
// only the flattening of WGS-84 (f = 1/298.257223563) is supported, so the
// branches for |f| > 0.01 and prolate ellipsoids are left out.

import "math"

// WGS-84 ellipsoid (NIMA TR8350.2).
const (
	wgsA   = 6378137.0         // semi-major axis, m
	wgsF   = 1 / 298.257223563 // flattening
	wgsB   = wgsA * (1 - wgsF) // semi-minor axis, m
	geoE2  = wgsF * (2 - wgsF) // first eccentricity squared
	geoEp2 = geoE2 / ((1 - wgsF) * (1 - wgsF))
	geoN   = wgsF / (2 - wgsF) // third flattening
	geoF1  = 1 - wgsF
)

const (
	nOrd   = 6 // order of the series expansions
	maxit1 = 20
	maxit2 = maxit1 + 53 + 10
)

var (
	tiny    = math.Sqrt(math.SmallestNonzeroFloat64 * (1 << 52)) // sqrt(min normal)
	tol0    = 0x1p-52
	tol1    = 200 * tol0
	tol2    = math.Sqrt(tol0)
	tolb    = tol0
	xthresh = 1000 * tol2
	etol2   = 0.1 * tol2 / math.Sqrt(math.Max(0.001, math.Abs(wgsF))*math.Min(1, 1-wgsF/2)/2)
	a3x     [nOrd]float64
	c3x     [15]float64
)

func init() {
	// Coefficients of A3 (eq. 24) and C3 (eq. 25) as polynomials in n.
	a3 := []float64{-3, 128, -2, -3, 64, -1, -3, -1, 16, 3, -1, -2, 8, 1, -1, 2, 1, 1}
	o, k := 0, 0
	for j := nOrd - 1; j >= 0; j-- {
		m := min(nOrd-j-1, j)
		a3x[k] = polyval(m, a3[o:], geoN) / a3[o+m+1]
		k++
		o += m + 2
	}
	c3 := []float64{
		3, 128, 2, 5, 128, -1, 3, 3, 64, -1, 0, 1, 8, -1, 1, 4,
		5, 256, 1, 3, 128, -3, -2, 3, 64, 1, -3, 2, 32,
		7, 512, -10, 9, 384, 5, -9, 5, 192,
		7, 512, -14, 7, 512,
		21, 2560,
	}
	o, k = 0, 0
	for l := 1; l < nOrd; l++ {
		for j := nOrd - 1; j >= l; j-- {
			m := min(nOrd-j-1, j)
			c3x[k] = polyval(m, c3[o:], geoN) / c3[o+m+1]
			k++
			o += m + 2
		}
	}
}

// polyval evaluates the polynomial p[0] x^n + ... + p[n] by Horner's rule.
func polyval(n int, p []float64, x float64) float64 {
	if n < 0 {
		return 0
	}
	y := p[0]
	for i := 1; i <= n; i++ {
		y = y*x + p[i]
	}
	return y
}

// twoSum returns u = a+b and the rounding error t (Knuth's error-free sum).
func twoSum(a, b float64) (u, t float64) {
	u = a + b
	up := u - b
	vpp := u - up
	up -= a
	vpp -= b
	return u, -(up + vpp)
}

// angNorm reduces x to (-180, 180] (the convention of Karney's code).
func angNorm(x float64) float64 {
	y := math.Remainder(x, 360)
	if y == -180 {
		y = 180
	}
	return y
}

// NormalizeLon reduces a longitude in degrees to [-180, 180).
func NormalizeLon(x float64) float64 {
	y := math.Remainder(x, 360)
	if y >= 180 {
		y -= 360
	}
	return y + 0
}

// angDiff returns y - x reduced to (-180, 180] and its rounding error.
func angDiff(x, y float64) (d, e float64) {
	d, e = twoSum(angNorm(-x), angNorm(y))
	d = angNorm(d)
	if d == 180 && e > 0 {
		d = -180
	}
	return twoSum(d, e)
}

// angRound rounds tiny angles so that they are exactly representable
// relative to 1/16, avoiding underflow (Karney 2013, Sec. 5).
func angRound(x float64) float64 {
	const z = 1.0 / 16
	y := math.Abs(x)
	if y < z {
		y = z - (z - y)
	}
	if x == 0 {
		return x
	}
	return math.Copysign(y, x)
}

// sincosd returns sin and cos of x degrees, exact at multiples of 90.
func sincosd(x float64) (s, c float64) {
	r := math.Mod(x, 360)
	q := math.Round(r / 90)
	r -= 90 * q
	s, c = math.Sincos(r * (math.Pi / 180))
	switch uint(int(q)) & 3 {
	case 1:
		s, c = c, -s
	case 2:
		s, c = -s, -c
	case 3:
		s, c = -c, s
	}
	return s + 0, c + 0
}

// atan2d returns atan2(y, x) in degrees, exact at multiples of 90.
func atan2d(y, x float64) float64 {
	q := 0
	if math.Abs(y) > math.Abs(x) {
		x, y = y, x
		q = 2
	}
	if x < 0 || (x == 0 && math.Signbit(x)) {
		x = -x
		q++
	}
	ang := math.Atan2(y, x) * (180 / math.Pi)
	switch q {
	case 1:
		ang = math.Copysign(180, y) - ang
	case 2:
		ang = 90 - ang
	case 3:
		ang = -90 + ang
	}
	return ang
}

func norm2(x, y float64) (float64, float64) {
	r := math.Hypot(x, y)
	return x / r, y / r
}

// sinSeries evaluates sum_{l>=1} c[l] sin(2 l x) from sin x and cos x by
// Clenshaw summation (Karney 2013, eq. 59); c[0] is unused. GeographicLib's
// SinCosSeries also sums the cosine series of the area term, which this
// file does not compute.
func sinSeries(sinx, cosx float64, c []float64) float64 {
	k := len(c)
	n := k - 1
	ar := 2 * (cosx - sinx) * (cosx + sinx)
	var y0, y1 float64
	if n&1 != 0 {
		k--
		y0 = c[k]
	}
	for n /= 2; n > 0; n-- {
		k--
		y1 = ar*y0 - y1 + c[k]
		k--
		y0 = ar*y1 - y0 + c[k]
	}
	return 2 * sinx * cosx * y0
}

// epsOf returns the expansion parameter eps = (sqrt(1+k2) - 1) /
// (sqrt(1+k2) + 1) for k2 = k^2 (Karney 2013, eq. 16), in a form without
// cancellation.
func epsOf(k2 float64) float64 { return k2 / (2*(1+math.Sqrt(1+k2)) + k2) }

// a1m1f is A1 - 1 (eq. 17).
func a1m1f(eps float64) float64 {
	t := polyval(3, []float64{1, 4, 64, 0}, eps*eps) / 256
	return (t + eps) / (1 - eps)
}

var c1coef = [...]float64{-1, 6, -16, 32, -9, 64, -128, 2048, 9, -16, 768, 3, -5, 512, -7, 1280, -7, 2048}
var c1pcoef = [...]float64{205, -432, 768, 1536, 4005, -4736, 3840, 12288, -225, 116, 384, -7173, 2695, 7680, 3467, 7680, 38081, 61440}
var c2coef = [...]float64{1, 2, 16, 32, 35, 64, 384, 2048, 15, 80, 768, 7, 35, 512, 63, 1280, 77, 2048}

// seriesEps fills c[1..6] with a series in eps whose l-th term is a
// polynomial in eps^2 (eqs. 18, 21, 43).
func seriesEps(eps float64, coef []float64, c *[nOrd + 1]float64) {
	eps2 := eps * eps
	d := eps
	o := 0
	for l := 1; l <= nOrd; l++ {
		m := (nOrd - l) / 2
		c[l] = d * polyval(m, coef[o:], eps2) / coef[o+m+1]
		o += m + 2
		d *= eps
	}
}

// a2m1f is A2 - 1 (eq. 42).
func a2m1f(eps float64) float64 {
	t := polyval(3, []float64{-11, -28, -192, 0}, eps*eps) / 256
	return (t - eps) / (1 + eps)
}

func a3f(eps float64) float64 { return polyval(nOrd-1, a3x[:], eps) }

func c3f(eps float64, c *[nOrd]float64) {
	mult := 1.0
	o := 0
	for l := 1; l < nOrd; l++ {
		m := nOrd - l - 1
		mult *= eps
		c[l] = mult * polyval(m, c3x[o:], eps)
		o += m + 1
	}
}

// lengths returns s12/b and m12/b (eqs. 7, 38-41).
func lengths(eps, sig12, ssig1, csig1, dn1, ssig2, csig2, dn2 float64, wantS bool) (s12b, m12b float64) {
	var c1a, c2a [nOrd + 1]float64
	a1 := a1m1f(eps)
	seriesEps(eps, c1coef[:], &c1a)
	a2 := a2m1f(eps)
	seriesEps(eps, c2coef[:], &c2a)
	m0x := a1 - a2
	a2 = 1 + a2
	a1 = 1 + a1
	b1 := sinSeries(ssig2, csig2, c1a[:]) - sinSeries(ssig1, csig1, c1a[:])
	if wantS {
		s12b = a1 * (sig12 + b1)
	}
	b2 := sinSeries(ssig2, csig2, c2a[:]) - sinSeries(ssig1, csig1, c2a[:])
	j12 := m0x*sig12 + (a1*b1 - a2*b2)
	m12b = dn2*(csig1*ssig2) - dn1*(ssig1*csig2) - csig1*csig2*j12
	return s12b, m12b
}

// astroid solves k^4+2k^3-(x^2+y^2-1)k^2-2y^2k-y^2 = 0 for the positive
// root (eq. 55).
func astroid(x, y float64) float64 {
	p := x * x
	q := y * y
	r := (p + q - 1) / 6
	if q == 0 && r <= 0 {
		return 0
	}
	s := p * q / 4
	r2 := r * r
	r3 := r * r2
	disc := s * (s + 2*r3)
	u := r
	if disc >= 0 {
		t3 := s + r3
		if t3 < 0 {
			t3 -= math.Sqrt(disc)
		} else {
			t3 += math.Sqrt(disc)
		}
		t := math.Cbrt(t3)
		u += t
		if t != 0 {
			u += r2 / t
		}
	} else {
		ang := math.Atan2(math.Sqrt(-disc), -(s + r3))
		u += 2 * r * math.Cos(ang/3)
	}
	v := math.Sqrt(u*u + q)
	var uv float64
	if u < 0 {
		uv = q / (v - u)
	} else {
		uv = u + v
	}
	w := (uv - q) / (2 * v)
	return uv / (math.Sqrt(uv+w*w) + w)
}

// inverseStart gives the starting azimuth for Newton's method (Sec. 5);
// sig12 >= 0 means the short-line solution is already accurate.
func inverseStart(sbet1, cbet1, dn1, sbet2, cbet2, dn2, lam12, slam12, clam12 float64) (sig12, salp1, calp1, salp2, calp2, dnm float64) {
	sig12 = -1
	sbet12 := sbet2*cbet1 - cbet2*sbet1
	cbet12 := cbet2*cbet1 + sbet2*sbet1
	sbet12a := sbet2*cbet1 + cbet2*sbet1
	shortline := cbet12 >= 0 && sbet12 < 0.5 && cbet2*lam12 < 0.5
	var somg12, comg12 float64
	if shortline {
		sbetm2 := (sbet1 + sbet2) * (sbet1 + sbet2)
		sbetm2 /= sbetm2 + (cbet1+cbet2)*(cbet1+cbet2)
		dnm = math.Sqrt(1 + geoEp2*sbetm2)
		omg12 := lam12 / (geoF1 * dnm)
		somg12, comg12 = math.Sincos(omg12)
	} else {
		somg12, comg12 = slam12, clam12
	}
	salp1 = cbet2 * somg12
	if comg12 >= 0 {
		calp1 = sbet12 + cbet2*sbet1*somg12*somg12/(1+comg12)
	} else {
		calp1 = sbet12a - cbet2*sbet1*somg12*somg12/(1-comg12)
	}
	ssig12 := math.Hypot(salp1, calp1)
	csig12 := sbet1*sbet2 + cbet1*cbet2*comg12
	switch {
	case shortline && ssig12 < etol2:
		salp2 = cbet1 * somg12
		if comg12 >= 0 {
			calp2 = sbet12 - cbet1*sbet2*(somg12*somg12/(1+comg12))
		} else {
			calp2 = sbet12 - cbet1*sbet2*(1-comg12)
		}
		salp2, calp2 = norm2(salp2, calp2)
		sig12 = math.Atan2(ssig12, csig12)
	case math.Abs(geoN) >= 0.1 || csig12 >= 0 || ssig12 >= 6*math.Abs(geoN)*math.Pi*cbet1*cbet1:
		// Zeroth-order spherical approximation is adequate.
	default:
		// Nearly antipodal: scale to the astroid problem (Sec. 5, eq. 53).
		lam12x := math.Atan2(-slam12, -clam12)
		eps := epsOf(sbet1 * sbet1 * geoEp2)
		lamscale := wgsF * cbet1 * a3f(eps) * math.Pi
		betscale := lamscale * cbet1
		x := lam12x / lamscale
		y := sbet12a / betscale
		if y > -tol1 && x > -1-xthresh {
			salp1 = math.Min(1, -x)
			calp1 = -math.Sqrt(1 - salp1*salp1)
		} else {
			k := astroid(x, y)
			omg12a := lamscale * (-x * k / (1 + k))
			somg12, comg12 = math.Sincos(omg12a)
			comg12 = -comg12
			salp1 = cbet2 * somg12
			calp1 = sbet12a - cbet2*sbet1*somg12*somg12/(1-comg12)
		}
	}
	if !(salp1 <= 0) { // not salp1 > 0: a NaN must propagate, as in GeographicLib
		salp1, calp1 = norm2(salp1, calp1)
	} else {
		salp1, calp1 = 1, 0
	}
	return
}

type lambdaOut struct {
	lam12, salp2, calp2, sig12, ssig1, csig1, ssig2, csig2, eps, dlam12 float64
}

// lambda12 evaluates the longitude difference for azimuth alp1 and its
// derivative (Sec. 4, eqs. 5-8, 46).
func lambda12(sbet1, cbet1, dn1, sbet2, cbet2, dn2, salp1, calp1, slam120, clam120 float64, diffp bool) (o lambdaOut) {
	if sbet1 == 0 && calp1 == 0 {
		calp1 = -tiny
	}
	salp0 := salp1 * cbet1
	calp0 := math.Hypot(calp1, salp1*sbet1)
	ssig1 := sbet1
	somg1 := salp0 * sbet1
	csig1 := calp1 * cbet1
	comg1 := csig1
	ssig1, csig1 = norm2(ssig1, csig1)
	if cbet2 != cbet1 {
		o.salp2 = salp0 / cbet2
	} else {
		o.salp2 = salp1
	}
	if cbet2 != cbet1 || math.Abs(sbet2) != -sbet1 {
		var t float64
		if cbet1 < -sbet1 {
			t = (cbet2 - cbet1) * (cbet1 + cbet2)
		} else {
			t = (sbet1 - sbet2) * (sbet1 + sbet2)
		}
		o.calp2 = math.Sqrt((calp1*cbet1)*(calp1*cbet1)+t) / cbet2
	} else {
		o.calp2 = math.Abs(calp1)
	}
	ssig2 := sbet2
	somg2 := salp0 * sbet2
	csig2 := o.calp2 * cbet2
	comg2 := csig2
	ssig2, csig2 = norm2(ssig2, csig2)
	o.sig12 = math.Atan2(math.Max(0, csig1*ssig2-ssig1*csig2), csig1*csig2+ssig1*ssig2)
	somg12 := math.Max(0, comg1*somg2-somg1*comg2)
	comg12 := comg1*comg2 + somg1*somg2
	eta := math.Atan2(somg12*clam120-comg12*slam120, comg12*clam120+somg12*slam120)
	o.eps = epsOf(calp0 * calp0 * geoEp2)
	var c3a [nOrd]float64
	c3f(o.eps, &c3a)
	b312 := sinSeries(ssig2, csig2, c3a[:]) - sinSeries(ssig1, csig1, c3a[:])
	o.lam12 = eta - wgsF*a3f(o.eps)*salp0*(o.sig12+b312)
	if diffp {
		if o.calp2 == 0 {
			o.dlam12 = -2 * geoF1 * dn1 / sbet1
		} else {
			_, m := lengths(o.eps, o.sig12, ssig1, csig1, dn1, ssig2, csig2, dn2, false)
			o.dlam12 = m * geoF1 / (o.calp2 * cbet2)
		}
	}
	o.ssig1, o.csig1, o.ssig2, o.csig2 = ssig1, csig1, ssig2, csig2
	return o
}

// Inverse solves the inverse geodesic problem on the WGS-84 ellipsoid: the
// length s12 (m) of the shortest path from (lat1, lon1) to (lat2, lon2)
// (degrees) and the forward azimuths azi1 at the start and azi2 at the end
// (degrees clockwise from true north, in [-180, 180]). It uses Karney's
// algorithm (J. Geodesy 87, 43-55, 2013), accurate to about 15 nm for any
// pair of points, nearly antipodal ones included. A latitude outside
// [-90, 90] or a non-finite input gives NaN results.
func Inverse(lat1, lon1, lat2, lon2 float64) (s12, azi1, azi2 float64) {
	if math.Abs(lat1) > 90 || math.Abs(lat2) > 90 {
		return math.NaN(), math.NaN(), math.NaN()
	}
	lon12, lon12s := angDiff(lon1, lon2)
	lonsign := math.Copysign(1, lon12)
	lon12 = lonsign * angRound(lon12)
	lon12s = angRound((180 - lon12) - lonsign*lon12s)
	lam12 := lon12 * (math.Pi / 180)
	var slam12, clam12 float64
	if lon12 > 90 {
		slam12, clam12 = sincosd(lon12s)
		clam12 = -clam12
	} else {
		slam12, clam12 = sincosd(lon12)
	}
	lat1 = angRound(lat1)
	lat2 = angRound(lat2)
	swapp := 1.0
	if math.Abs(lat1) < math.Abs(lat2) {
		swapp = -1
		lonsign = -lonsign
		lat1, lat2 = lat2, lat1
	}
	latsign := math.Copysign(1, -lat1)
	lat1 *= latsign
	lat2 *= latsign
	sbet1, cbet1 := sincosd(lat1)
	sbet1 *= geoF1
	sbet1, cbet1 = norm2(sbet1, cbet1)
	cbet1 = math.Max(tiny, cbet1)
	sbet2, cbet2 := sincosd(lat2)
	sbet2 *= geoF1
	sbet2, cbet2 = norm2(sbet2, cbet2)
	cbet2 = math.Max(tiny, cbet2)
	if cbet1 < -sbet1 {
		if cbet2 == cbet1 {
			sbet2 = math.Copysign(sbet1, sbet2)
		}
	} else if math.Abs(sbet2) == -sbet1 {
		cbet2 = cbet1
	}
	dn1 := math.Sqrt(1 + geoEp2*sbet1*sbet1)
	dn2 := math.Sqrt(1 + geoEp2*sbet2*sbet2)

	var salp1, calp1, salp2, calp2, sig12 float64
	meridian := lat1 == -90 || slam12 == 0
	if meridian {
		calp1, salp1 = clam12, slam12
		calp2, salp2 = 1, 0
		ssig1, csig1 := sbet1, calp1*cbet1
		ssig2, csig2 := sbet2, calp2*cbet2
		sig12 = math.Atan2(math.Max(0, csig1*ssig2-ssig1*csig2), csig1*csig2+ssig1*ssig2)
		s12x, m12x := lengths(geoN, sig12, ssig1, csig1, dn1, ssig2, csig2, dn2, true)
		if sig12 < 1 || m12x >= 0 {
			if sig12 < 3*tiny || (sig12 < tol0 && (s12x < 0 || m12x < 0)) {
				s12x = 0
			}
			s12 = s12x * wgsB
		} else {
			meridian = false
		}
	}
	switch {
	case meridian:
	case sbet1 == 0 && lon12s >= wgsF*180:
		// Equatorial geodesic.
		calp1, calp2 = 0, 0
		salp1, salp2 = 1, 1
		s12 = wgsA * lam12
	default:
		var dnm float64
		sig12, salp1, calp1, salp2, calp2, dnm = inverseStart(sbet1, cbet1, dn1, sbet2, cbet2, dn2, lam12, slam12, clam12)
		if sig12 >= 0 {
			s12 = sig12 * wgsB * dnm
		} else {
			var o lambdaOut
			tripn, tripb := false, false
			salp1a, calp1a := tiny, 1.0
			salp1b, calp1b := tiny, -1.0
			for numit := 0; numit < maxit2; {
				o = lambda12(sbet1, cbet1, dn1, sbet2, cbet2, dn2, salp1, calp1, slam12, clam12, numit < maxit1)
				v := o.lam12
				lim := 1.0
				if tripn {
					lim = 8
				}
				if tripb || !(math.Abs(v) >= lim*tol0) {
					break
				}
				if v > 0 && (numit > maxit1 || calp1/salp1 > calp1b/salp1b) {
					salp1b, calp1b = salp1, calp1
				} else if v < 0 && (numit > maxit1 || calp1/salp1 < calp1a/salp1a) {
					salp1a, calp1a = salp1, calp1
				}
				numit++
				if numit < maxit1 && o.dlam12 > 0 {
					dalp1 := -v / o.dlam12
					if math.Abs(dalp1) < math.Pi {
						sdalp1, cdalp1 := math.Sincos(dalp1)
						nsalp1 := salp1*cdalp1 + calp1*sdalp1
						if nsalp1 > 0 {
							calp1 = calp1*cdalp1 - salp1*sdalp1
							salp1 = nsalp1
							salp1, calp1 = norm2(salp1, calp1)
							tripn = math.Abs(v) <= 16*tol0
							continue
						}
					}
				}
				salp1 = (salp1a + salp1b) / 2
				calp1 = (calp1a + calp1b) / 2
				salp1, calp1 = norm2(salp1, calp1)
				tripn = false
				tripb = math.Abs(salp1a-salp1)+(calp1a-calp1) < tolb || math.Abs(salp1-salp1b)+(calp1-calp1b) < tolb
			}
			salp2, calp2 = o.salp2, o.calp2
			s12b, _ := lengths(o.eps, o.sig12, o.ssig1, o.csig1, dn1, o.ssig2, o.csig2, dn2, true)
			s12 = s12b * wgsB
		}
	}
	if swapp < 0 {
		salp1, salp2 = salp2, salp1
		calp1, calp2 = calp2, calp1
	}
	salp1 *= swapp * lonsign
	calp1 *= swapp * latsign
	salp2 *= swapp * lonsign
	calp2 *= swapp * latsign
	return s12 + 0, atan2d(salp1, calp1), atan2d(salp2, calp2)
}
