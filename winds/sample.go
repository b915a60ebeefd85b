package winds

import (
	"fmt"
	"math"
	"time"
)

// tol is the slack, in grid units, allowed at the edges of each axis.
const tol = 1e-9

// Sample interpolates the field at latitude lat and longitude lon
// (degrees; any longitude convention, -180..180 and 0..360 alike), pressure
// p (Pa) and time t, each variable on its own grid, levels and times:
// bilinear in latitude and longitude, linear in ln(p) between the two
// enclosing levels, linear in time between the two enclosing valid times.
// A pressure within LevelTolerance (0.5 %) beyond a variable's top or
// bottom level takes that level's value: producers round level pressures,
// and flight levels converted with the ICAO standard atmosphere fall just
// off the chart levels (FL340 is 249.99 hPa, 1 Pa above a 250 hPa top
// level). A variable with a single level or time answers only at that
// level or time. Points outside the grid area (a regional grid), the
// levels or the times of u, v or temperature (of EDR in a field holding
// nothing else) are a *RangeError; outside EDR's, EDR is NaN (see
// InLevels). Beyond that, the field never extrapolates. Global grids wrap
// across their last column to the first. Sample takes constant time
// (binary search over levels and times, once per distinct grid) and does
// not allocate unless it returns an error.
func (f *Field) Sample(lat, lon, p float64, t time.Time) (Sample, error) {
	return f.sample(lat, lon, p, t, true)
}

// SampleWind is Sample without the humidity: RH, RHi and Q are NaN, and
// neither interpolated nor converted (the conversion of relative humidity
// takes two saturation pressures), for callers that read only the wind,
// temperature and EDR. Those, and the errors, are Sample's bit for bit.
func (f *Field) SampleWind(lat, lon, p float64, t time.Time) (Sample, error) {
	return f.sample(lat, lon, p, t, false)
}

func (f *Field) sample(lat, lon, p float64, t time.Time, humidity bool) (Sample, error) {
	nan := math.NaN()
	res := [nslots]float64{nan, nan, nan, nan, nan, nan}
	lnp := math.Log(p)
	ts := float64(t.Unix()) + float64(t.Nanosecond())*1e-9
	for _, a := range f.uniq[:f.nuniq] {
		if !humidity && a != f.ax[slotU] && a != f.ax[slotV] && a != f.ax[slotT] && a != f.prim && a != f.ax[slotEDR] {
			continue // humidity's own grid, which gives no error either
		}
		var l loc
		if what := a.locate(lat, lon, lnp, ts, &l); what != "" {
			if a != f.ax[slotU] && a != f.ax[slotV] && a != f.ax[slotT] && a != f.prim {
				continue // EDR or humidity beside winds: NaN outside its grid, levels or times
			}
			return Sample{nan, nan, nan, nan, nan, nan, nan}, a.rangeErr(lat, lon, p, t, what)
		}
		for s := range f.vars {
			if f.ax[s] == a && (humidity || !isHumidity(s)) {
				res[s] = l.interp(f.vars[s], a.plane)
			}
		}
	}
	out := Sample{U: res[slotU], V: res[slotV], T: res[slotT], EDR: res[slotEDR], RH: nan, RHi: nan, Q: res[slotQ]}
	switch {
	case !humidity:
	case f.vars[slotRH] != nil:
		out.RH, out.RHi = f.rhRef.convert(res[slotRH], out.T)
	case f.vars[slotQ] != nil:
		out.RH, out.RHi = fromQ(out.Q, p, out.T)
	}
	return out, nil
}

// loc is a point's place on one axes: the four surrounding grid offsets
// in a plane with their bilinear weights, and the four planes (two
// levels at two times) with theirs.
type loc struct {
	o      [4]int
	w      [4]float64
	planes [4]int
	pw     [4]float64
}

func (l *loc) interp(v []float32, plane int) float64 {
	var acc float64
	for q := range 4 {
		pl := v[l.planes[q] : l.planes[q]+plane]
		c := l.w[0]*float64(pl[l.o[0]]) + l.w[1]*float64(pl[l.o[1]]) + l.w[2]*float64(pl[l.o[2]]) + l.w[3]*float64(pl[l.o[3]])
		acc += l.pw[q] * c
	}
	return acc
}

// locate places (lat, lon, ln p, Unix seconds ts) on the axes, returning
// the coordinate out of range ("latitude", "longitude", "pressure",
// "time") or "".
func (a *axes) locate(lat, lon, lnp, ts float64, l *loc) string {
	// Latitude: row y from the north.
	y := (a.north - lat) / a.dj
	if a.nj == 1 {
		y = 0
		if math.Abs(lat-a.north) > 1e-9 || math.IsNaN(lat) {
			return "latitude"
		}
	}
	if !(y >= -tol && y <= float64(a.nj-1)+tol) {
		return "latitude"
	}
	j0, fy := cell(y, a.nj)
	// Longitude: column x from the western edge, eastwards.
	d := math.Mod(lon-a.west, 360)
	if d < 0 {
		d += 360
	}
	x := d / a.di
	var i0, i1 int
	var fx float64
	if a.global {
		i0 = int(x)
		fx = x - float64(i0)
		if i0 >= a.ni {
			i0 -= a.ni
		}
		i1 = i0 + 1
		if i1 == a.ni {
			i1 = 0
		}
	} else {
		if x > float64(a.ni-1)+tol {
			if x-360/a.di >= -tol {
				x = 0 // just west of the edge, within rounding
			} else {
				return "longitude"
			}
		}
		if math.IsNaN(x) {
			return "longitude"
		}
		i0, fx = cell(x, a.ni)
		i1 = i0 + 1
		if a.ni == 1 {
			if fx > 1e-9 {
				return "longitude"
			}
			i1 = 0
		}
	}
	// Pressure: levels descend, so ln p descends.
	k0, k1, fp, ok := bracket(a.lnp, lnp, true, levelEps)
	if !ok {
		return "pressure"
	}
	t0, t1, ft, ok := bracket(a.secs, ts, false, 1e-9*math.Max(1, math.Abs(a.secs[0])))
	if !ok {
		return "time"
	}
	nl := len(a.levels)
	j1 := j0 + 1
	if a.nj == 1 {
		j1 = 0
	}
	r0, r1 := j0*a.ni, j1*a.ni
	l.o = [4]int{r0 + i0, r0 + i1, r1 + i0, r1 + i1}
	l.w = [4]float64{(1 - fy) * (1 - fx), (1 - fy) * fx, fy * (1 - fx), fy * fx}
	l.planes = [4]int{(t0*nl + k0) * a.plane, (t0*nl + k1) * a.plane, (t1*nl + k0) * a.plane, (t1*nl + k1) * a.plane}
	l.pw = [4]float64{(1 - ft) * (1 - fp), (1 - ft) * fp, ft * (1 - fp), ft * fp}
	return ""
}

// cell splits grid coordinate x in [0, n-1] into a lower index in
// [0, n-2] and a fraction in [0, 1].
func cell(x float64, n int) (int, float64) {
	if n == 1 {
		return 0, math.Max(0, x)
	}
	if x < 0 {
		x = 0
	}
	i := int(x)
	if i >= n-1 {
		i = n - 2
	}
	return i, math.Min(1, x-float64(i))
}

// bracket finds the interval of the sorted axis a (descending when desc)
// holding v, allowing eps beyond either end, and the fraction from a[k0]
// to a[k1], clamped to [0, 1]. A single-point axis matches only v within
// eps of it.
func bracket(a []float64, v float64, desc bool, eps float64) (k0, k1 int, frac float64, ok bool) {
	n := len(a)
	if n == 1 {
		return 0, 0, 0, math.Abs(v-a[0]) <= eps
	}
	lo, hi := a[0], a[n-1]
	if desc {
		lo, hi = hi, lo
	}
	if !(v >= lo-eps && v <= hi+eps) {
		return 0, 0, 0, false
	}
	// Binary search for the first index past v.
	i, j := 0, n-1
	for j-i > 1 {
		m := (i + j) / 2
		if (a[m] > v) == desc {
			i = m
		} else {
			j = m
		}
	}
	frac = (v - a[i]) / (a[j] - a[i])
	return i, j, math.Max(0, math.Min(1, frac)), true
}

func (a *axes) rangeErr(lat, lon, p float64, t time.Time, what string) error {
	s, n, w, e, _ := a.bounds()
	var msg string
	switch what {
	case "latitude":
		msg = fmt.Sprintf("latitude outside %g..%g", s, n)
	case "longitude":
		msg = fmt.Sprintf("longitude outside %g..%g (regional grid)", w, e)
	case "pressure":
		msg = fmt.Sprintf("pressure outside %g..%g Pa", a.levels[len(a.levels)-1], a.levels[0])
	default:
		msg = fmt.Sprintf("time outside %s..%s", a.times[0].Format(time.RFC3339), a.times[len(a.times)-1].Format(time.RFC3339))
	}
	return &RangeError{Lat: lat, Lon: lon, P: p, T: t, What: msg}
}
