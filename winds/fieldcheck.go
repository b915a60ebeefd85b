package winds

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"time"
)

// Warnings returns the warnings of the read that built the field (zero
// padding skipped, values outside the sanity ranges), in the order found.
// A caller showing a plan should print each one (Warning.String) in its
// human output and list them in its machine output.
func (f *Field) Warnings() []Warning { return append([]Warning(nil), f.warnings...) }

// checkFieldBudget refuses, before anything is allocated, a Field whose
// arrays would pass budget: for each variable, 4 bytes a point of its grid
// at each of its levels (merged within LevelTolerance) and times present
// in the headers; u, v and temperature are counted on the union of their
// levels and times, as layout lays them out when they share a grid (an
// upper bound when they do not). The count is done in float64 so that no
// product of header numbers can wrap. Time O(n log n) in len(heads).
func checkFieldBudget(heads []Message, budget int64, paths []string) error {
	need, what := fieldNeed(heads)
	if need <= float64(budget) {
		return nil
	}
	n := uint64(math.MaxUint64)
	if need < 1<<63 {
		n = uint64(need)
	}
	return &BudgetError{Source: strings.Join(paths, ", "), Need: n, Budget: uint64(budget), What: what}
}

// fieldNeed returns the bytes of the Field that heads lay out (see
// checkFieldBudget) and a description of them.
func fieldNeed(heads []Message) (float64, string) {
	var times [2]map[int64]bool // winds and temperature; EDR
	var levels [2][]float64
	for g := range times {
		times[g] = map[int64]bool{}
	}
	var points [nslots]float64
	for i := range heads {
		m := &heads[i]
		s := slotOf(m.Param)
		if s < 0 {
			continue
		}
		g := 0
		if s == slotEDR {
			g = 1
		}
		times[g][m.ValidTime.Unix()] = true
		levels[g] = append(levels[g], m.Level)
		points[s] = math.Max(points[s], float64(m.Ni)*float64(m.Nj))
	}
	var nlev [2]int
	for g := range levels {
		sort.Sort(sort.Reverse(sort.Float64Slice(levels[g])))
		for i, l := range levels[g] {
			if i == 0 || !sameLevel(levels[g][i-1], l) {
				nlev[g]++
			}
		}
	}
	var need, nvars, maxPts float64
	maxLev, maxTimes := 0, 0
	for s, p := range points {
		g := 0
		if s == slotEDR {
			g = 1
		}
		need += p * float64(nlev[g]) * float64(len(times[g])) * 4
		if p > 0 {
			nvars++
			maxLev, maxTimes = max(maxLev, nlev[g]), max(maxTimes, len(times[g]))
		}
		maxPts = math.Max(maxPts, p)
	}
	return need, fmt.Sprintf("a field of %.0f variables x up to %d levels x up to %d valid times x up to %.0f grid points x 4 bytes", nvars, maxLev, maxTimes, maxPts)
}

// windSanity warns, once for each pair of u and v fields, about points
// where the wind speed from both components passes MaxWindSpeed although
// neither component does (a component beyond it is warned about when its
// message is decoded). It names both messages, the number of points and
// the fastest. u and v on different axes (different grids) are not
// combined. Time O(field size).
func (f *Field) windSanity(heads []Message) []Warning {
	a := f.ax[slotU]
	if f.vars[slotU] == nil || f.vars[slotV] == nil || a != f.ax[slotV] {
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
			il := levelIndex(a.levels, m.Level)
			if il < 0 {
				continue
			}
			k := key{m.ValidTime.Unix(), a.levels[il]}
			n := names[k]
			n[s] = m
			names[k] = n
		}
	}
	var out []Warning
	max2 := MaxWindSpeed * MaxWindSpeed
	nl := len(a.levels)
	for it, t := range a.times {
		for il, l := range a.levels {
			base := (it*nl + il) * a.plane
			u, v := f.vars[slotU][base:base+a.plane], f.vars[slotV][base:base+a.plane]
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
			lat := a.north - float64(worst/a.ni)*a.dj
			lon := a.west + float64(worst%a.ni)*a.di
			mu, mv := n[slotU], n[slotV]
			if mu == nil || mv == nil {
				continue // cannot happen: layout requires both at every level and time
			}
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
