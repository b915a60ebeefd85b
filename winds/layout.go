package winds

import (
	"fmt"
	"maps"
	"math"
	"sort"
	"strings"
	"time"
)

// levelEps is LevelTolerance on the ln(p) axis of Sample.
var levelEps = math.Log1p(LevelTolerance)

// sameLevel reports whether pressures a and b (Pa) are one level.
func sameLevel(a, b float64) bool {
	return math.Abs(a-b) <= LevelTolerance*math.Max(math.Abs(a), math.Abs(b))
}

// levelIndex returns the index of the level of the descending levels
// within LevelTolerance of p, or -1.
func levelIndex(levels []float64, p float64) int {
	i := sort.Search(len(levels), func(i int) bool { return levels[i] <= p })
	for _, k := range []int{i, i - 1} {
		if k >= 0 && k < len(levels) && sameLevel(levels[k], p) {
			return k
		}
	}
	return -1
}

type fieldKey struct {
	slot  int
	t     int64
	level int // index in the slot's levels
}

// layout checks each variable's grid and completeness, builds its axes
// (equal axes shared) and allocates the arrays. Every message in msgs is
// kept (slotOf >= 0).
func layout(msgs []Message) (*Field, error) {
	f := &Field{}
	var first [nslots]*Message
	var rawLevels [nslots][]float64
	tset := [nslots]map[int64]time.Time{}
	for i := range msgs {
		m := &msgs[i]
		s := slotOf(m.Param)
		if first[s] == nil {
			first[s] = m
			tset[s] = map[int64]time.Time{}
		} else if !sameGrid(first[s], m) {
			return nil, fmt.Errorf("winds: %s: grid %dx%d from (%g, %g) step (%g, %g) differs from %s: %dx%d from (%g, %g) step (%g, %g) (each variable needs one grid)",
				where(m), m.Ni, m.Nj, m.Lat1, m.Lon1, m.Di, m.Dj, where(first[s]), first[s].Ni, first[s].Nj, first[s].Lat1, first[s].Lon1, first[s].Di, first[s].Dj)
		}
		rawLevels[s] = append(rawLevels[s], m.Level)
		tset[s][m.ValidTime.Unix()] = m.ValidTime.UTC()
	}
	// u, v and temperature on one grid (from one forecast) share the
	// union of their levels and times, so that a plane missing from one
	// of them is an error below; EDR and variables on other grids keep
	// their own.
	var leader [nslots]int
	for s := range leader {
		leader[s] = s
		for r := slotU; r < s && s <= slotT; r++ {
			if first[r] != nil && first[s] != nil && sameGrid(first[r], first[s]) {
				leader[s] = r
				break
			}
		}
	}
	for s := slotT; s > slotU; s-- {
		if r := leader[s]; r != s {
			rawLevels[r] = append(rawLevels[r], rawLevels[s]...)
			maps.Copy(tset[r], tset[s])
		}
	}
	for s := slotU; s <= slotT; s++ {
		rawLevels[s], tset[s] = rawLevels[leader[s]], tset[leader[s]]
	}
	for s := range nslots {
		if first[s] == nil {
			continue
		}
		a, err := newAxes(first[s], rawLevels[s], tset[s])
		if err != nil {
			return nil, err
		}
		shared := false
		for _, b := range f.uniq[:f.nuniq] {
			if a.equal(b) {
				a, shared = b, true
				break
			}
		}
		if !shared {
			f.uniq[f.nuniq] = a
			f.nuniq++
		}
		f.ax[s] = a
		if f.prim == nil {
			f.prim = a
		}
	}
	if f.prim == nil {
		return nil, fmt.Errorf("winds: no u, v, temperature or EDR fields on isobaric levels")
	}
	seen := map[fieldKey]*Message{}
	for i := range msgs {
		m := &msgs[i]
		s := slotOf(m.Param)
		k := fieldKey{s, m.ValidTime.Unix(), levelIndex(f.ax[s].levels, m.Level)}
		if prev, dup := seen[k]; dup {
			if m.Ensemble != prev.Ensemble {
				return nil, &MemberError{Source: m.Source, Member: m.Ensemble, What: fmt.Sprintf("%s repeats %s as another ensemble member (members %d and %d): choose one member (Options.Member) or open them all as an ensemble (OpenEnsemble)",
					strings.TrimPrefix(where(m), m.Source+" "), where(prev), m.Ensemble, prev.Ensemble)}
			}
			return nil, fmt.Errorf("winds: %s repeats %s (the same field twice)", where(m), where(prev))
		}
		seen[k] = m
	}
	// Winds and temperature must cover every level and time of their own
	// axes; EDR is often forecast on fewer levels at some times, so its
	// missing planes are NaN (no turbulence information there).
	var missing []string
	edrGaps := false
	for s := range nslots {
		a := f.ax[s]
		if a == nil {
			continue
		}
		for _, t := range a.times {
			for il, l := range a.levels {
				if seen[fieldKey{s, t.Unix(), il}] == nil {
					if s == slotEDR {
						edrGaps = true
						continue
					}
					missing = append(missing, fmt.Sprintf("%s at %g Pa, %s", slotParams[s], l, t.Format(time.RFC3339)))
				}
			}
		}
	}
	if len(missing) > 0 {
		more := ""
		if len(missing) > 10 {
			more = fmt.Sprintf(" and %d more", len(missing)-10)
			missing = missing[:10]
		}
		return nil, fmt.Errorf("winds: missing fields: %s%s", strings.Join(missing, "; "), more)
	}
	for s := range nslots {
		if a := f.ax[s]; a != nil {
			f.vars[s] = make([]float32, len(a.times)*len(a.levels)*a.plane)
		}
	}
	if edrGaps {
		nan := float32(math.NaN())
		for i := range f.vars[slotEDR] {
			f.vars[slotEDR][i] = nan
		}
	}
	return f, nil
}

// newAxes builds the axes of a variable whose first message is m, from its
// levels (merged within LevelTolerance) and times.
func newAxes(m *Message, levels []float64, times map[int64]time.Time) (*axes, error) {
	if m.Ni*m.Nj > maxPoints {
		return nil, fmt.Errorf("winds: %s: grid of %d points exceeds %d", where(m), m.Ni*m.Nj, maxPoints)
	}
	a := &axes{ni: m.Ni, nj: m.Nj, di: m.Di, dj: m.Dj, plane: m.Ni * m.Nj}
	a.north, a.west = m.Origin()
	a.west = math.Mod(math.Mod(a.west, 360)+360, 360)
	a.global = a.ni > 1 && math.Abs(float64(a.ni)*a.di-360) < 1e-6*360
	if a.ni > 1 && float64(a.ni-1)*a.di > 360+1e-9 {
		return nil, fmt.Errorf("winds: %s: grid of %d columns at %g degrees spans more than 360 degrees", where(m), a.ni, a.di)
	}
	for _, t := range times {
		a.times = append(a.times, t)
	}
	sort.Slice(a.times, func(i, j int) bool { return a.times[i].Before(a.times[j]) })
	for _, t := range a.times {
		a.secs = append(a.secs, float64(t.Unix()))
	}
	sort.Sort(sort.Reverse(sort.Float64Slice(levels)))
	for _, l := range levels {
		if n := len(a.levels); n == 0 || !sameLevel(a.levels[n-1], l) {
			a.levels = append(a.levels, l)
			a.lnp = append(a.lnp, math.Log(l))
		}
	}
	return a, nil
}

// equal reports whether a and b are the same grid, levels and times.
func (a *axes) equal(b *axes) bool {
	if a.ni != b.ni || a.nj != b.nj || a.north != b.north || a.west != b.west || a.di != b.di || a.dj != b.dj ||
		len(a.levels) != len(b.levels) || len(a.times) != len(b.times) {
		return false
	}
	for i := range a.levels {
		if a.levels[i] != b.levels[i] {
			return false
		}
	}
	for i := range a.secs {
		if a.secs[i] != b.secs[i] {
			return false
		}
	}
	return true
}

// sameGrid reports whether two messages lie on one grid; longitudes are
// compared modulo 360, so a global grid from -180 and one from 180 agree.
func sameGrid(a, b *Message) bool {
	an, aw := a.Origin()
	bn, bw := b.Origin()
	dw := math.Mod(math.Abs(aw-bw), 360)
	return a.Ni == b.Ni && a.Nj == b.Nj && math.Abs(an-bn) < 1e-6 && (dw < 1e-6 || dw > 360-1e-6) &&
		math.Abs(a.Di-b.Di) < 1e-9 && math.Abs(a.Dj-b.Dj) < 1e-9
}

type bandKey struct {
	slot  int
	level float64
}

// levelBand returns, for each variable (EDR: only parameter number edr),
// the isobaric levels of msgs from pLow to pHigh with the nearest level
// outside each bound.
func levelBand(msgs []Message, edr int, pLow, pHigh float64) map[bandKey]bool {
	keep := map[bandKey]bool{}
	var below, above [nslots]float64 // nearest level under pLow, over pHigh
	for s := range below {
		below[s], above[s] = math.Inf(-1), math.Inf(1)
	}
	for _, m := range msgs {
		s := slotOf(m.Param)
		if s < 0 || (s == slotEDR && m.Number != edr) {
			continue
		}
		switch l := m.Level; {
		case l >= pLow && l <= pHigh:
			keep[bandKey{s, l}] = true
		case l < pLow && l > below[s]:
			below[s] = l
		case l > pHigh && l < above[s]:
			above[s] = l
		}
	}
	for s := range below {
		if !math.IsInf(below[s], -1) {
			keep[bandKey{s, below[s]}] = true
		}
		if !math.IsInf(above[s], 1) {
			keep[bandKey{s, above[s]}] = true
		}
	}
	return keep
}
