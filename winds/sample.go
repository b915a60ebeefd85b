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
// p (Pa) and time t: bilinear in latitude and longitude, linear in ln(p)
// between the two enclosing levels, linear in time between the two
// enclosing valid times. A field with a single level or time answers only
// at that level or time. Points outside the grid area (a regional grid),
// the levels or the times are a *RangeError; the field never
// extrapolates, except that a pressure within 0.2 % outside the top or
// bottom level is sampled at that level (levelSlack: FL340 is 1 Pa above
// 250 hPa). Global grids wrap across their last column to the first.
// Sample takes constant time (binary search over levels and times) and
// does not allocate unless it returns an error.
func (f *Field) Sample(lat, lon, p float64, t time.Time) (Sample, error) {
	nan := math.NaN()
	out := Sample{nan, nan, nan, nan}
	// Latitude: row y from the north.
	y := (f.north - lat) / f.dj
	if f.nj == 1 {
		y = 0
		if math.Abs(lat-f.north) > 1e-9 || math.IsNaN(lat) {
			return out, f.rangeErr(lat, lon, p, t, "latitude")
		}
	}
	if !(y >= -tol && y <= float64(f.nj-1)+tol) {
		return out, f.rangeErr(lat, lon, p, t, "latitude")
	}
	j0, fy := cell(y, f.nj)
	// Longitude: column x from the western edge, eastwards.
	d := math.Mod(lon-f.west, 360)
	if d < 0 {
		d += 360
	}
	x := d / f.di
	var i0, i1 int
	var fx float64
	if f.global {
		i0 = int(x)
		fx = x - float64(i0)
		if i0 >= f.ni {
			i0 -= f.ni
		}
		i1 = i0 + 1
		if i1 == f.ni {
			i1 = 0
		}
	} else {
		if x > float64(f.ni-1)+tol {
			if x-360/f.di >= -tol {
				x = 0 // just west of the edge, within rounding
			} else {
				return out, f.rangeErr(lat, lon, p, t, "longitude")
			}
		}
		if math.IsNaN(x) {
			return out, f.rangeErr(lat, lon, p, t, "longitude")
		}
		i0, fx = cell(x, f.ni)
		i1 = i0 + 1
		if f.ni == 1 {
			if fx > 1e-9 {
				return out, f.rangeErr(lat, lon, p, t, "longitude")
			}
			i1 = 0
		}
	}
	// Pressure: levels descend, so ln p descends.
	k0, k1, fp, ok := bracket(f.lnp, f.clampLevel(math.Log(p)), true)
	if !ok {
		return out, f.rangeErr(lat, lon, p, t, "pressure")
	}
	// Time.
	ts := float64(t.Unix()) + float64(t.Nanosecond())*1e-9
	t0, t1, ft, ok := bracket(f.secs, ts, false)
	if !ok {
		return out, f.rangeErr(lat, lon, p, t, "time")
	}
	nl := len(f.levels)
	j1 := j0 + 1
	if f.nj == 1 {
		j1 = 0
	}
	r0, r1 := j0*f.ni, j1*f.ni
	o := [4]int{r0 + i0, r0 + i1, r1 + i0, r1 + i1}
	w := [4]float64{(1 - fy) * (1 - fx), (1 - fy) * fx, fy * (1 - fx), fy * fx}
	planes := [4]int{(t0*nl + k0) * f.plane, (t0*nl + k1) * f.plane, (t1*nl + k0) * f.plane, (t1*nl + k1) * f.plane}
	pw := [4]float64{(1 - ft) * (1 - fp), (1 - ft) * fp, ft * (1 - fp), ft * fp}
	res := [nslots]float64{nan, nan, nan, nan}
	for s := range f.vars {
		v := f.vars[s]
		if v == nil {
			continue
		}
		var acc float64
		for q := 0; q < 4; q++ {
			pl := v[planes[q] : planes[q]+f.plane]
			c := w[0]*float64(pl[o[0]]) + w[1]*float64(pl[o[1]]) + w[2]*float64(pl[o[2]]) + w[3]*float64(pl[o[3]])
			acc += pw[q] * c
		}
		res[s] = acc
	}
	return Sample{res[slotU], res[slotV], res[slotT], res[slotEDR]}, nil
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
// holding v and the fraction from a[k0] to a[k1]. A single-point axis
// matches only v equal to it within rounding.
func bracket(a []float64, v float64, desc bool) (k0, k1 int, frac float64, ok bool) {
	n := len(a)
	eps := 1e-9 * math.Max(1, math.Abs(a[0]))
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

func (f *Field) rangeErr(lat, lon, p float64, t time.Time, what string) error {
	s, n, w, e, _ := f.Bounds()
	var msg string
	switch what {
	case "latitude":
		msg = fmt.Sprintf("latitude outside %g..%g", s, n)
	case "longitude":
		msg = fmt.Sprintf("longitude outside %g..%g (regional grid)", w, e)
	case "pressure":
		msg = fmt.Sprintf("pressure outside %g..%g Pa", f.levels[len(f.levels)-1], f.levels[0])
	default:
		msg = fmt.Sprintf("time outside %s..%s", f.times[0].Format(time.RFC3339), f.times[len(f.times)-1].Format(time.RFC3339))
	}
	return &RangeError{Lat: lat, Lon: lon, P: p, T: t, What: msg}
}
