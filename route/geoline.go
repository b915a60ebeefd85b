package route

import "math"

// geoLine is a geodesic from a given point and azimuth, set up once so that
// points at many distances along it cost one series evaluation each
// (Karney 2013, Sec. 3 and the "direct problem", eqs. 18-23, 25-28).
type geoLine struct {
	lon1                              float64
	salp0, calp0                      float64
	ssig1, csig1, somg1, comg1        float64
	a1m1, b11, stau1, ctau1, a3c, b31 float64
	c1pa                              [nOrd + 1]float64
	c3a                               [nOrd]float64
}

// init sets l to the geodesic from (lat1, lon1) with azimuth azi1 (degrees).
func (l *geoLine) init(lat1, lon1, azi1 float64) {
	l.lon1 = lon1
	salp1, calp1 := sincosd(angRound(angNorm(azi1)))
	sbet1, cbet1 := sincosd(angRound(lat1))
	sbet1 *= geoF1
	sbet1, cbet1 = norm2(sbet1, cbet1)
	cbet1 = math.Max(tiny, cbet1)
	l.salp0 = salp1 * cbet1
	l.calp0 = math.Hypot(calp1, salp1*sbet1)
	l.ssig1 = sbet1
	l.somg1 = l.salp0 * sbet1
	if sbet1 != 0 || calp1 != 0 {
		l.csig1 = cbet1 * calp1
	} else {
		l.csig1 = 1
	}
	l.comg1 = l.csig1
	l.ssig1, l.csig1 = norm2(l.ssig1, l.csig1)
	eps := epsOf(l.calp0 * l.calp0 * geoEp2)
	l.a1m1 = a1m1f(eps)
	var c1a [nOrd + 1]float64
	seriesEps(eps, c1coef[:], &c1a)
	l.b11 = sinSeries(l.ssig1, l.csig1, c1a[:])
	s, c := math.Sincos(l.b11)
	l.stau1 = l.ssig1*c + l.csig1*s
	l.ctau1 = l.csig1*c - l.ssig1*s
	seriesEps(eps, c1pcoef[:], &l.c1pa)
	c3f(eps, &l.c3a)
	l.a3c = -wgsF * l.salp0 * a3f(eps)
	l.b31 = sinSeries(l.ssig1, l.csig1, l.c3a[:])
}

// position returns the point at distance s12 metres along the line, with
// the forward azimuth there; lon2 is reduced to [-180, 180).
func (l *geoLine) position(s12 float64) (lat2, lon2, azi2 float64) {
	tau12 := s12 / (wgsB * (1 + l.a1m1))
	s, c := math.Sincos(tau12)
	b12 := -sinSeries(l.stau1*c+l.ctau1*s, l.ctau1*c-l.stau1*s, l.c1pa[:])
	sig12 := tau12 - (b12 - l.b11)
	ssig12, csig12 := math.Sincos(sig12)
	ssig2 := l.ssig1*csig12 + l.csig1*ssig12
	csig2 := l.csig1*csig12 - l.ssig1*ssig12
	sbet2 := l.calp0 * ssig2
	cbet2 := math.Hypot(l.salp0, l.calp0*csig2)
	if cbet2 == 0 {
		cbet2, csig2 = tiny, tiny
	}
	salp2, calp2 := l.salp0, l.calp0*csig2
	somg2, comg2 := l.salp0*ssig2, csig2
	omg12 := math.Atan2(somg2*l.comg1-comg2*l.somg1, comg2*l.comg1+somg2*l.somg1)
	lam12 := omg12 + l.a3c*(sig12+(sinSeries(ssig2, csig2, l.c3a[:])-l.b31))
	lon12 := lam12 * (180 / math.Pi)
	lon2 = NormalizeLon(angNorm(l.lon1) + angNorm(lon12))
	lat2 = atan2d(sbet2, geoF1*cbet2)
	azi2 = atan2d(salp2, calp2)
	return lat2, lon2, azi2
}

// Direct solves the direct geodesic problem on the WGS-84 ellipsoid: the
// point (lat2, lon2) reached by travelling s12 metres from (lat1, lon1)
// along the geodesic with initial azimuth azi1 (degrees clockwise from true
// north), and the forward azimuth azi2 there. Method: Karney (J. Geodesy 87,
// 43-55, 2013), eqs. 18-28, accurate to about 15 nm; lon2 is reduced to
// [-180, 180). A latitude outside [-90, 90] gives NaN results.
func Direct(lat1, lon1, azi1, s12 float64) (lat2, lon2, azi2 float64) {
	if math.Abs(lat1) > 90 {
		return math.NaN(), math.NaN(), math.NaN()
	}
	var l geoLine
	l.init(lat1, lon1, azi1)
	return l.position(s12)
}
