// Package synthetic makes invented weather for demonstrations, tests and
// benchmarks: a reproducible global field of wind, temperature and
// turbulence written as GRIB messages. It is not a forecast and never a
// check value.
package synthetic

import (
	"math"
	"time"

	"levelpath/perf/contrail"
	"levelpath/winds"
)

// Grid of the synthetic weather: global, 2 degrees, north to south.
const (
	synStep = 2.0
	synNi   = 180
	synNj   = 91
)

var (
	levels = [...]float64{85000, 70000, 50000, 40000, 30000, 25000, 20000, 15000, 10000}
	hours  = [...]int{0, 6, 12, 18, 24, 30, 36}
)

// Levels returns the pressure levels of the invented weather, Pa (a copy).
func Levels() []float64 { return append([]float64(nil), levels[:]...) }

// Hours returns the valid times of the invented weather, hours after the
// reference time (a copy).
func Hours() []int { return append([]int(nil), hours[:]...) }

// Weather returns invented weather for demonstrations and benchmarks, as
// GRIB messages valid at ref plus Hours on a global 2-degree grid at
// Levels: a meandering westerly jet stream near 250 hPa in each
// hemisphere, a temperature deviation from ISA that is warm in the tropics
// and cold towards the poles, and a patch of turbulence (EDR) over the
// northern ocean, and relative humidity (over liquid water, as most
// producers encode it; see Humidity) with a few invented layers of
// ice-supersaturated air near the cruise levels. Reproducible: no
// randomness.
func Weather(ref time.Time) []winds.Message {
	var msgs []winds.Message
	n := synNi * synNj
	for _, h := range hours {
		vt := ref.Add(time.Duration(h) * time.Hour)
		for _, p := range levels {
			u := make([]float32, n)
			v := make([]float32, n)
			t := make([]float32, n)
			e := make([]float32, n)
			rh := make([]float32, n)
			for j := range synNj {
				lat := 90 - float64(j)*synStep
				for i := range synNi {
					lon := float64(i) * synStep
					uu, vv, tt, ee := Point(lat, lon, p, float64(h))
					k := j*synNi + i
					u[k], v[k], t[k], e[k] = float32(uu), float32(vv), float32(tt), float32(ee)
					rh[k] = float32(Humidity(lat, lon, p, float64(h)) * contrail.SatIce(tt) / contrail.SatWater(tt))
				}
			}
			base := winds.Message{LevelType: 100, Level: p, RefTime: ref, ValidTime: vt, Ni: synNi, Nj: synNj,
				Lat1: 90, Lon1: 0, Lat2: -90, Lon2: 360 - synStep, Di: synStep, Dj: synStep, ScanMode: 0, Ensemble: -1}
			for _, f := range []struct {
				cat, num int
				par      winds.Param
				vals     []float32
			}{{2, 2, "u", u}, {2, 3, "v", v}, {0, 0, "t", t}, {19, 30, "edr", e}, {1, 1, "rh", rh}} {
				m := base
				m.Discipline, m.Category, m.Number, m.Param, m.Values = 0, f.cat, f.num, f.par, f.vals
				msgs = append(msgs, m)
			}
		}
	}
	return msgs
}

// Point is the invented weather at a point: u, v (m/s), T (K) and EDR
// (m^(2/3)/s) at latitude, longitude (degrees), pressure p (Pa) and hours
// after the reference time.
func Point(lat, lon, p, hours float64) (u, v, t, edr float64) {
	rad := math.Pi / 180
	// Jet axes meander with longitude and drift eastward with time.
	phase := (lon - 8*hours) * rad
	jetN := 42 + 7*math.Sin(3*phase)
	jetS := -45 + 5*math.Sin(2*phase+1)
	vert := math.Exp(-sq(math.Log(p/25000) / 0.45))
	u = 8*math.Cos(lat*rad) + vert*(62*math.Exp(-sq((lat-jetN)/7))+45*math.Exp(-sq((lat-jetS)/7)))
	// Meridional wind follows the meander: the slope of the jet axis.
	slopeN := 21 * math.Cos(3*phase)
	v = vert * 62 * math.Exp(-sq((lat-jetN)/7)) * slopeN / 57.3 * 0.9
	// Temperature: ISA at the pressure level plus a latitude-dependent
	// deviation, smaller above the tropopause.
	dev := 9*math.Cos(2*lat*rad) - 2
	if p < synTropopause {
		dev *= 0.5
	}
	t = synISA(p) + dev
	// Turbulence: a patch over the northern ocean near the jet level.
	edr = 0.04 + 0.36*vert*math.Exp(-sq((lat-59)/3))*math.Exp(-sq(angDiff(lon, 340)/8))
	return u, v, t, edr
}

// issLayer is an invented layer of ice-supersaturated air: a patch
// centred at (lat, lon) at pressure p (Pa) at the reference time, moving
// east at drift degrees an hour, with half-widths in degrees and in
// ln(p), and its peak relative humidity over ice (%).
type issLayer struct {
	lat, lon, p, drift float64
	dlat, dlon, dlnp   float64
	peak               float64
}

// issLayers cross the demo routes (cmd/levelpath/internal/demo): over
// the North Atlantic and off the North American east coast at 250 hPa
// (about FL340), over eastern Europe at 200 hPa (about FL390). Each is
// centred on a level of the invented weather, so that between levels,
// where Sample interpolates, it thins out within about 1,500 ft.
var issLayers = [...]issLayer{
	{lat: 57, lon: -48, p: 25000, drift: 0.5, dlat: 6, dlon: 14, dlnp: 0.1, peak: 130},
	{lat: 36, lon: -78, p: 22700, drift: 0.3, dlat: 5, dlon: 6, dlnp: 0.2, peak: 140},
	{lat: 50, lon: 22, p: 20000, drift: 0.4, dlat: 6, dlon: 10, dlnp: 0.1, peak: 125},
}

// Humidity is the invented relative humidity over ice (%) at latitude,
// longitude (degrees), pressure p (Pa) and hours after the reference
// time: moist (55 %) in the upper troposphere, dry (25 %) above the ISA
// tropopause, and the ice-supersaturated layers of issLayers. Weather
// stores it over liquid water (RHi e_i/e_w, Murphy and Koop's saturation
// pressures at the invented temperature).
func Humidity(lat, lon, p, hours float64) float64 {
	rhi := 25 + 30/(1+math.Exp(-(p-synTropopause)/2500))
	for _, l := range issLayers {
		w := math.Exp(-sq((lat-l.lat)/l.dlat) - sq(angDiff(lon, l.lon+l.drift*hours)/l.dlon) - sq(math.Log(p/l.p)/l.dlnp))
		rhi += (l.peak - rhi) * w
	}
	return rhi
}

func sq(x float64) float64 { return x * x }

// synTropopause is the ISA pressure at 11 km, Pa.
const synTropopause = 22632.06

// synISA is the ICAO standard-atmosphere temperature at pressure p below
// 20 km (Doc 7488: 288.15 K, lapse 6.5 K/km to 11 km, then 216.65 K).
// The optimizer and the CLI use package perf's atmosphere; this copy keeps
// the invented weather free of imports from perf (perf/contrail, a leaf
// package, gives the saturation pressures).
func synISA(p float64) float64 {
	if p <= synTropopause {
		return 216.65
	}
	return 288.15 * math.Pow(p/101325, 0.0065*287.05287/9.80665)
}

// angDiff returns a-b in degrees wrapped to [-180, 180).
func angDiff(a, b float64) float64 {
	d := math.Mod(a-b+540, 360) - 180
	return d
}
