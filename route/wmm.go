package route

import (
	"fmt"
	"math"
	"time"
)

// World Magnetic Model 2025.
//
// Method: A. Chulliat et al., "The US/UK World Magnetic Model for
// 2025-2030: Technical Report", NOAA NCEI / BGS (2025), Sec. 1.2: the main
// field is the gradient of a spherical-harmonic potential of degree and
// order 12 (eq. 1) with linear secular variation (eq. 9); geodetic
// coordinates are converted to geocentric spherical ones on the WGS-84
// ellipsoid (eqs. 7, 8), the field components are computed in the
// geocentric frame (eqs. 10-12) and rotated into the geodetic frame
// (eq. 17); the declination is D = atan2(Y, X) (eq. 19). Associated
// Legendre functions are Schmidt semi-normalised and evaluated by the
// standard three-term recurrences in the colatitude.

const (
	wmmN     = 12
	wmmEpoch = 2025.0
	wmmEnd   = 2030.0
	wmmRef   = 6371200.0 // geomagnetic reference radius, m
)

// WMMValidity returns the dates the World Magnetic Model 2025 covers:
// from its epoch, 2025.0, up to but not including 2030.0.
// MagneticVariation refuses dates outside.
func WMMValidity() (from, until time.Time) {
	return time.Date(int(wmmEpoch), 1, 1, 0, 0, 0, 0, time.UTC), time.Date(int(wmmEnd), 1, 1, 0, 0, 0, 0, time.UTC)
}

var wmmRoots struct {
	nn [wmmN + 1]float64           // sqrt((2n-1)/(2n))
	a  [wmmN + 1][wmmN + 1]float64 // sqrt((n-1)^2 - m^2)
	b  [wmmN + 1][wmmN + 1]float64 // 1/sqrt(n^2 - m^2)
}

func init() {
	for n := 2; n <= wmmN; n++ {
		wmmRoots.nn[n] = math.Sqrt(float64(2*n-1) / float64(2*n))
	}
	for m := 0; m <= wmmN; m++ {
		for n := max(m+1, 2); n <= wmmN; n++ {
			wmmRoots.a[n][m] = math.Sqrt(float64((n-1)*(n-1) - m*m))
			wmmRoots.b[n][m] = 1 / math.Sqrt(float64(n*n-m*m))
		}
	}
}

// wmmModel holds the Gauss coefficients at one date.
type wmmModel struct {
	g, h [wmmN + 1][wmmN + 1]float64
}

// DecimalYear returns t (in UTC) as a decimal year: the year plus the
// fraction of that year elapsed, as the WMM software defines it.
func DecimalYear(t time.Time) float64 {
	t = t.UTC()
	y := t.Year()
	start := time.Date(y, 1, 1, 0, 0, 0, 0, time.UTC)
	next := time.Date(y+1, 1, 1, 0, 0, 0, 0, time.UTC)
	return float64(y) + float64(t.Sub(start))/float64(next.Sub(start))
}

func wmmAt(t time.Time) (*wmmModel, error) { return wmmAtYear(DecimalYear(t)) }

func wmmAtYear(year float64) (*wmmModel, error) {
	if !(year >= wmmEpoch && year < wmmEnd) {
		return nil, &UnsupportedError{Source: "WMM2025", Msg: fmt.Sprintf("date %.3f is outside the model's validity, %.1f to %.1f", year, wmmEpoch, wmmEnd)}
	}
	dt := year - wmmEpoch
	var w wmmModel
	for _, c := range wmm2025 {
		n, m := int(c[0]), int(c[1])
		w.g[n][m] = c[2] + dt*c[4]
		w.h[n][m] = c[3] + dt*c[5]
	}
	return &w, nil
}

// MagneticVariation returns the magnetic variation (declination) in
// degrees, east positive, at geodetic latitude lat and longitude lon
// (degrees) and altM metres above the WGS-84 ellipsoid, on date t, from the
// World Magnetic Model 2025 (see the method note in wmm.go). It returns an
// *UnsupportedError for dates outside 2025.0-2030.0 and a *FormatError for
// a latitude outside [-90, 90] or non-finite input. At the geographic
// poles the variation is that of the limit along meridian lon. Cost: about
// 200 multiply-adds; no allocation beyond the coefficient set.
func MagneticVariation(lat, lon, altM float64, t time.Time) (float64, error) {
	if !(lat >= -90 && lat <= 90) || math.IsNaN(lon) || math.IsInf(lon, 0) || math.IsNaN(altM) || math.IsInf(altM, 0) {
		return 0, &FormatError{Source: "WMM2025", Msg: fmt.Sprintf("position (%v, %v, %v m) is not a valid latitude, longitude and height", lat, lon, altM)}
	}
	w, err := wmmAt(t)
	if err != nil {
		return 0, err
	}
	return w.declination(lat, lon, altM), nil
}

// declination evaluates D in degrees; see MagneticVariation.
func (w *wmmModel) declination(lat, lon, altM float64) float64 {
	x, y, _ := w.field(lat, lon, altM)
	return math.Atan2(y, x) * (180 / math.Pi)
}

// field returns the northward, eastward and downward components (nT) in the
// geodetic frame.
func (w *wmmModel) field(lat, lon, altM float64) (x, y, z float64) {
	// Geodetic to geocentric (WMM report eqs. 7-8).
	phi := lat * (math.Pi / 180)
	sphi, cphi := math.Sincos(phi)
	rc := wgsA / math.Sqrt(1-geoE2*sphi*sphi)
	pp := (rc + altM) * cphi
	zz := (rc*(1-geoE2) + altM) * sphi
	r := math.Hypot(pp, zz)
	phic := math.Asin(zz / r)
	// Colatitude theta: c = cos(theta) = sin(phic), s = sin(theta).
	c, s := math.Sincos(phic)
	if s < 1e-12 {
		s = 1e-12 // pole: the limit along the meridian
	}

	var p, dp [wmmN + 1][wmmN + 1]float64
	p[0][0] = 1
	p[1][0], dp[1][0] = c, -s
	p[1][1], dp[1][1] = s, c
	for n := 2; n <= wmmN; n++ {
		k := wmmRoots.nn[n]
		p[n][n] = p[n-1][n-1] * s * k
		dp[n][n] = (dp[n-1][n-1]*s + p[n-1][n-1]*c) * k
	}
	for m := range wmmN {
		for n := max(m+1, 2); n <= wmmN; n++ {
			a, b := wmmRoots.a[n][m], wmmRoots.b[n][m]
			f := float64(2*n - 1)
			p[n][m] = (f*c*p[n-1][m] - a*p[n-2][m]) * b
			dp[n][m] = (f*(c*dp[n-1][m]-s*p[n-1][m]) - a*dp[n-2][m]) * b
		}
	}

	// cos(m lon), sin(m lon) by the angle-addition recurrence.
	var cm, sm [wmmN + 1]float64
	sl, cl := math.Sincos(lon * (math.Pi / 180))
	cm[0], sm[0] = 1, 0
	for m := 1; m <= wmmN; m++ {
		cm[m] = cm[m-1]*cl - sm[m-1]*sl
		sm[m] = sm[m-1]*cl + cm[m-1]*sl
	}

	// Geocentric components (WMM report eqs. 10-12).
	ratio := wmmRef / r
	fn := ratio * ratio
	var xc, yc, zc float64
	for n := 1; n <= wmmN; n++ {
		fn *= ratio // (a/r)^(n+2)
		var sx, sy, sz float64
		for m := 0; m <= n; m++ {
			gc := w.g[n][m]*cm[m] + w.h[n][m]*sm[m]
			sx += gc * dp[n][m]
			sy += float64(m) * (w.g[n][m]*sm[m] - w.h[n][m]*cm[m]) * p[n][m]
			sz += gc * p[n][m]
		}
		xc += fn * sx
		yc += fn * sy
		zc -= float64(n+1) * fn * sz
	}
	yc /= s
	// Rotate to the geodetic frame (eq. 17).
	sd, cd := math.Sincos(phic - phi)
	x = xc*cd - zc*sd
	z = xc*sd + zc*cd
	return x, yc, z
}

// ClampDate moves a date outside WMM2025's validity (a replay of an older
// reanalysis day, say) to the nearest valid date and returns a warning
// saying so, or "" when d is valid: the variation drifts by a fraction of
// a degree a year, which moves the semicircular level rule only on tracks
// within that of north or south.
func ClampDate(d time.Time) (time.Time, string) {
	from, until := WMMValidity()
	last := until.AddDate(0, 0, -1)
	const day = "2006-01-02"
	switch {
	case d.Before(from):
		return from, fmt.Sprintf("magnetic variation: %s is before WMM2025 (%s to %s); using %s", d.Format(day), from.Format(day), last.Format(day), from.Format(day))
	case d.After(last):
		return last, fmt.Sprintf("magnetic variation: %s is after WMM2025 (%s to %s); using %s", d.Format(day), from.Format(day), last.Format(day), last.Format(day))
	}
	return d, ""
}

// Open loads the route at arg (see Load) and builds its track with opt
// (see Build), returning the warnings of both, the route's first.
func Open(arg string, opt Options) (*Track, []string, error) {
	r, err := Load(arg)
	if err != nil {
		return nil, nil, err
	}
	tr, err := Build(r, opt)
	if err != nil {
		return nil, nil, err
	}
	return tr, append(append([]string(nil), r.Warnings...), tr.Warnings...), nil
}
