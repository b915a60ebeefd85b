package contrail

import (
	"math"
	"time"
)

// SunElevation returns the elevation of the sun's centre above the
// horizon, degrees, at latitude lat and longitude lon (degrees, east
// positive) at time t, without refraction. Declination and the equation
// of time are the Fourier series of Spencer, "Fourier series
// representation of the position of the sun", Search 2 (1971) 172, as
// used by NOAA's general solar position calculations; their error is
// about 0.05° in declination and 0.5 min in the equation of time, ample
// for telling day from night.
func SunElevation(lat, lon float64, t time.Time) float64 {
	t = t.UTC()
	hours := float64(t.Hour()) + float64(t.Minute())/60 + (float64(t.Second())+float64(t.Nanosecond())/1e9)/3600
	days := 365.0
	if y := t.Year(); y%4 == 0 && (y%100 != 0 || y%400 == 0) {
		days = 366
	}
	g := 2 * math.Pi / days * (float64(t.YearDay()-1) + (hours-12)/24)
	eqt := 229.18 * (0.000075 + 0.001868*math.Cos(g) - 0.032077*math.Sin(g) - 0.014615*math.Cos(2*g) - 0.040849*math.Sin(2*g))
	decl := 0.006918 - 0.399912*math.Cos(g) + 0.070257*math.Sin(g) - 0.006758*math.Cos(2*g) +
		0.000907*math.Sin(2*g) - 0.002697*math.Cos(3*g) + 0.00148*math.Sin(3*g)
	solarMin := hours*60 + eqt + 4*lon // true solar time, minutes
	ha := (solarMin/4 - 180) * math.Pi / 180
	phi := lat * math.Pi / 180
	cz := math.Sin(phi)*math.Sin(decl) + math.Cos(phi)*math.Cos(decl)*math.Cos(ha)
	return 90 - math.Acos(math.Max(-1, math.Min(1, cz)))*180/math.Pi
}

// IsDay reports whether the sun is above the horizon (elevation > 0).
func IsDay(lat, lon float64, t time.Time) bool { return SunElevation(lat, lon, t) > 0 }
