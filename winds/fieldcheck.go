package winds

import (
	"fmt"
	"math"
	"strings"
	"time"
)

// Warnings returns the warnings of the read that built the field (zero
// padding skipped, values outside the sanity ranges), in the order found.
// A caller showing a plan should print each one (Warning.String) in its
// human output and list them in its machine output.
func (f *Field) Warnings() []Warning { return append([]Warning(nil), f.warnings...) }

// checkFieldBudget refuses, before anything is allocated, a Field whose
// arrays (4 bytes a point of each variable at each level and time present
// in the headers) would pass budget. The count is done in float64 so that
// no product of header numbers can wrap. Time O(len(heads)).
func checkFieldBudget(heads []Message, budget int64, paths []string) error {
	times := map[int64]bool{}
	levels := map[float64]bool{}
	var points [nslots]float64
	for i := range heads {
		m := &heads[i]
		s := slotOf(m.Param)
		if s < 0 {
			continue
		}
		times[m.ValidTime.Unix()] = true
		levels[m.Level] = true
		points[s] = math.Max(points[s], float64(m.Ni)*float64(m.Nj))
	}
	var need, nvars, maxPts float64
	for _, p := range points {
		need += p
		if p > 0 {
			nvars++
		}
		maxPts = math.Max(maxPts, p)
	}
	need *= float64(len(times)) * float64(len(levels)) * 4
	if need <= float64(budget) {
		return nil
	}
	n := uint64(math.MaxUint64)
	if need < 1<<63 {
		n = uint64(need)
	}
	return &BudgetError{Source: strings.Join(paths, ", "), Need: n, Budget: uint64(budget),
		What: fmt.Sprintf("a field of %.0f variables x %d levels x %d valid times x %.0f grid points x 4 bytes", nvars, len(levels), len(times), maxPts)}
}

// levelSlack is how far, in ln p, a pressure may lie outside the field's
// top or bottom level and still be sampled, at that level: 0.002, that is
// 0.2 % of the pressure, 50 Pa at 250 hPa or about 13 m (40 ft) of
// altitude there. Flight levels are converted to pressure with the ICAO
// standard atmosphere, so FL340 is 249.99 hPa, 1 Pa above a 250 hPa top
// level although every chart calls it 250 hPa; without a slack, such a
// cruise level would be out of range. Using the edge level's values across
// 40 ft changes them by far less than the forecast's own error (common
// practice: winds aloft change by a few m/s per 1000 ft at most outside
// jet cores). Beyond the slack, Sample still refuses to extrapolate.
const levelSlack = 0.002

// clampLevel moves ln p onto the nearest edge of the field's levels when
// it lies outside them by at most levelSlack.
func (f *Field) clampLevel(lnp float64) float64 {
	top, bottom := f.lnp[len(f.lnp)-1], f.lnp[0] // lowest and highest pressure
	switch {
	case lnp < top && lnp >= top-levelSlack:
		return top
	case lnp > bottom && lnp <= bottom+levelSlack:
		return bottom
	}
	return lnp
}

// windSanity warns, once for each pair of u and v fields, about points
// where the wind speed from both components passes MaxWindSpeed although
// neither component does (a component beyond it is warned about when its
// message is decoded). It names both messages, the number of points and
// the fastest. Time O(field size).
func (f *Field) windSanity(heads []Message) []Warning {
	if f.vars[slotU] == nil || f.vars[slotV] == nil {
		return nil
	}
	type key struct {
		t int64
		l float64
	}
	names := map[key][nslots]*Message{}
	for i := range heads {
		m := &heads[i]
		if s := slotOf(m.Param); s == slotU || s == slotV {
			k := key{m.ValidTime.Unix(), m.Level}
			n := names[k]
			n[s] = m
			names[k] = n
		}
	}
	var out []Warning
	max2 := MaxWindSpeed * MaxWindSpeed
	nl := len(f.levels)
	for it, t := range f.times {
		for il, l := range f.levels {
			base := (it*nl + il) * f.plane
			u, v := f.vars[slotU][base:base+f.plane], f.vars[slotV][base:base+f.plane]
			count, worst, fast := 0, 0, 0.0
			for k := range u {
				a, b := float64(u[k]), float64(v[k])
				if math.Abs(a) > MaxWindSpeed || math.Abs(b) > MaxWindSpeed {
					continue
				}
				if s := a*a + b*b; s > max2 {
					count++
					if s > fast {
						fast, worst = s, k
					}
				}
			}
			if count == 0 {
				continue
			}
			n := names[key{t.Unix(), l}]
			lat := f.north - float64(worst/f.ni)*f.dj
			lon := f.west + float64(worst%f.ni)*f.di
			mu, mv := n[slotU], n[slotV]
			out = append(out, Warning{Source: mu.Source, Message: mu.Index, What: fmt.Sprintf("wind from u (this message) and v (%s message %d) at %g Pa, %s: %d points over the sanity limit of 300 kt, the fastest %.1f m/s (%.0f kt) at (%.4f, %.4f)",
				mv.Source, mv.Index, l, t.Format(time.RFC3339), count, math.Sqrt(fast), math.Sqrt(fast)*3600/1852, lat, lon)})
		}
	}
	return out
}

// unreadableGrid returns the error Decode would give for the first kept
// field on a grid the decoders do not read (a grid other than regular
// latitude/longitude), so that Open names it rather than a grid mismatch
// with the other fields.
func unreadableGrid(heads []Message) error {
	for i := range heads {
		m := &heads[i]
		if m.Param == ParamOther || m.Grid == 0 && m.Ni > 0 {
			continue
		}
		what := fmt.Sprintf("grid definition template 3.%d (only 3.0 regular lat/lon)", m.Grid)
		switch {
		case m.Edition == 1 && m.Grid < 0:
			what = "GRIB1 predefined grid (no grid description section)"
		case m.Edition == 1:
			what = fmt.Sprintf("GRIB1 grid (data representation type %d, GRIB1 table 6; only 0 regular lat/lon)", m.Grid)
		case m.Grid == 0:
			what = "grid definition with a list of numbers of points (quasi-regular grid)"
		}
		return &UnsupportedError{m.Source, m.Index, m.Offset, what, remedyRegrid}
	}
	return nil
}
