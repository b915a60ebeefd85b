package winds

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"time"
)

// Variable slots of a Field.
const (
	slotU = iota
	slotV
	slotT
	slotEDR
	nslots
)

func slotOf(p Param) int {
	switch p {
	case ParamU:
		return slotU
	case ParamV:
		return slotV
	case ParamT:
		return slotT
	case ParamEDR:
		return slotEDR
	}
	return -1
}

var slotParams = [nslots]Param{ParamU, ParamV, ParamT, ParamEDR}

// A Field holds u, v, temperature and EDR on one regular lat/lon grid at a
// set of pressure levels and valid times, as float32 arrays indexed
// [time][level][row][column] with rows from north to south and columns
// from the western edge eastwards. Memory is 4 bytes per value: a
// 0.25-degree global grid (1440 x 721) with 12 levels, 3 variables and 5
// times takes 747.5 MB. A Field is immutable after construction and safe
// for concurrent use.
type Field struct {
	ni, nj      int
	north, west float64 // degrees; west in [0, 360)
	di, dj      float64
	global      bool
	times       []time.Time
	secs        []float64 // Unix seconds of times
	levels      []float64 // Pa, descending
	lnp         []float64 // ln(levels)
	vars        [nslots][]float32
	plane       int // ni*nj
	warnings    []Warning
}

// A Sample is the field interpolated at one point: wind components (m/s,
// u eastward, v northward), temperature (K) and eddy dissipation rate
// (m^(2/3)/s). A variable the field does not hold is NaN, and so is one
// whose surrounding grid values include a missing (bitmap) point.
type Sample struct{ U, V, T, EDR float64 }

// Open decodes the GRIB files at paths and builds one Field from their kept
// messages (see NewField). Each file is read twice: once for the headers,
// to lay out the field, and once to decode each message into one reused
// buffer and copy it into the field, so that peak memory is the field plus
// one message. Errors name the file.
func Open(paths ...string) (*Field, error) {
	return OpenBetween(0, math.Inf(1), paths...)
}

// OpenBetween is Open keeping only the isobaric levels from pLow to pHigh
// (Pa), and the nearest level beyond each bound where the files hold one,
// so that interpolation inside the band is the same as with every level.
// A caller that needs only cruise levels saves the memory of the rest:
// a 0.25-degree global forecast on 41 levels needs about 16 between 850
// and 70 hPa.
func OpenBetween(pLow, pHigh float64, paths ...string) (*Field, error) {
	return Options{}.OpenBetween(pLow, pHigh, paths...)
}

// Open is the package function Open with these options.
func (o Options) Open(paths ...string) (*Field, error) {
	return o.OpenBetween(0, math.Inf(1), paths...)
}

// OpenBetween is the package function OpenBetween with these options: the
// Field's size is checked against o's budget from the headers, before
// anything is allocated; files that are not regular files are refused
// before they are opened; warnings go to o.Warn and Field.Warnings.
func (o Options) OpenBetween(pLow, pHigh float64, paths ...string) (*Field, error) {
	if len(paths) == 0 {
		return nil, fmt.Errorf("winds: Open: no files")
	}
	if !(pLow <= pHigh) {
		return nil, fmt.Errorf("winds: Open: pressure band %g..%g Pa is empty", pLow, pHigh)
	}
	var heads []Message
	var warns []Warning
	scanOpts := Options{Budget: o.Budget, Warn: func(w Warning) { warns = append(warns, w) }}
	for _, p := range paths {
		f, err := openRegular(p)
		if err != nil {
			return nil, err
		}
		ms, err := scanOpts.Scan(f, p)
		f.Close()
		if err != nil {
			return nil, err
		}
		heads = append(heads, ms...)
	}
	keep := levelBand(heads, pLow, pHigh)
	kept := heads[:0:0]
	for _, m := range heads {
		if m.Param == ParamOther || keep[m.Level] {
			kept = append(kept, m)
		}
	}
	if err := unreadableGrid(kept); err != nil {
		return nil, err
	}
	if err := checkFieldBudget(kept, o.budget(), paths); err != nil {
		return nil, err
	}
	fl, err := layout(kept)
	if err != nil {
		return nil, err
	}
	// Every message is decoded into the same scratch buffers and copied
	// into the field, so filling it makes no garbage.
	scratch := &decodeScratch{reuse: true, budget: o.budget(), warn: func(w Warning) {
		if w.Message == 0 {
			return // padding: already warned by the header pass
		}
		warns = append(warns, w)
	}}
	for _, p := range paths {
		f, err := openRegular(p)
		if err != nil {
			return nil, err
		}
		err = readMessages(f, p, true, scratch, func(m *Message) error {
			if m.Param != ParamOther && keep[m.Level] {
				return fl.put(m)
			}
			return nil
		})
		f.Close()
		if err != nil {
			return nil, err
		}
	}
	fl.warnings = append(warns, fl.windSanity(kept)...)
	if o.Warn != nil {
		for _, w := range fl.warnings {
			o.Warn(w)
		}
	}
	return fl, nil
}

// NewField builds a Field from decoded messages. Messages with Param other
// are ignored. All kept messages must share one grid; every kept parameter
// must be present at every combination of valid time and level that occurs
// in the messages, once (select a single ensemble member beforehand).
// Missing or repeated combinations are an error naming them.
func NewField(msgs []Message) (*Field, error) {
	f, err := layout(msgs)
	if err != nil {
		return nil, err
	}
	for i := range msgs {
		if msgs[i].Param == ParamOther {
			continue
		}
		if err := f.put(&msgs[i]); err != nil {
			return nil, err
		}
	}
	return f, nil
}

type fieldKey struct {
	slot  int
	t     int64
	level float64
}

func where(m *Message) string {
	return fmt.Sprintf("%s message %d (%s at %g Pa, %s)", m.Source, m.Index, m.Param, m.Level, m.ValidTime.UTC().Format(time.RFC3339))
}

// layout checks grids and completeness and allocates the arrays.
func layout(msgs []Message) (*Field, error) {
	var first *Message
	seen := map[fieldKey]*Message{}
	tset := map[int64]time.Time{}
	lset := map[float64]bool{}
	var have [nslots]bool
	for i := range msgs {
		m := &msgs[i]
		s := slotOf(m.Param)
		if s < 0 {
			continue
		}
		if first == nil {
			first = m
		} else if !sameGrid(first, m) {
			return nil, fmt.Errorf("winds: %s: grid %dx%d from (%g, %g) step (%g, %g) differs from %s: %dx%d from (%g, %g) step (%g, %g)",
				where(m), m.Ni, m.Nj, m.Lat1, m.Lon1, m.Di, m.Dj, where(first), first.Ni, first.Nj, first.Lat1, first.Lon1, first.Di, first.Dj)
		}
		k := fieldKey{s, m.ValidTime.Unix(), m.Level}
		if prev, dup := seen[k]; dup {
			return nil, fmt.Errorf("winds: %s repeats %s (ensemble members %d and %d; select one member)", where(m), where(prev), m.Ensemble, prev.Ensemble)
		}
		seen[k] = m
		tset[k.t] = m.ValidTime.UTC()
		lset[m.Level] = true
		have[s] = true
	}
	if first == nil {
		return nil, fmt.Errorf("winds: no u, v, temperature or EDR fields on isobaric levels")
	}
	if first.Ni*first.Nj > maxPoints {
		return nil, fmt.Errorf("winds: %s: grid of %d points exceeds %d", where(first), first.Ni*first.Nj, maxPoints)
	}
	f := &Field{ni: first.Ni, nj: first.Nj, di: first.Di, dj: first.Dj, plane: first.Ni * first.Nj}
	f.north, f.west = first.Origin()
	f.west = math.Mod(math.Mod(f.west, 360)+360, 360)
	f.global = f.ni > 1 && math.Abs(float64(f.ni)*f.di-360) < 1e-6*360
	if f.ni > 1 && float64(f.ni-1)*f.di > 360+1e-9 {
		return nil, fmt.Errorf("winds: %s: grid of %d columns at %g degrees spans more than 360 degrees", where(first), f.ni, f.di)
	}
	for _, t := range tset {
		f.times = append(f.times, t)
	}
	sort.Slice(f.times, func(i, j int) bool { return f.times[i].Before(f.times[j]) })
	for _, t := range f.times {
		f.secs = append(f.secs, float64(t.Unix()))
	}
	for l := range lset {
		f.levels = append(f.levels, l)
	}
	sort.Sort(sort.Reverse(sort.Float64Slice(f.levels)))
	for _, l := range f.levels {
		f.lnp = append(f.lnp, math.Log(l))
	}
	// Winds and temperature must cover every level and time; EDR is
	// often forecast on fewer levels, so its missing planes are NaN (no
	// turbulence information there) rather than an error.
	var missing []string
	edrGaps := false
	for s := 0; s < nslots; s++ {
		if !have[s] {
			continue
		}
		for _, t := range f.times {
			for _, l := range f.levels {
				if seen[fieldKey{s, t.Unix(), l}] == nil {
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
	size := len(f.times) * len(f.levels) * f.plane
	for s := 0; s < nslots; s++ {
		if have[s] {
			f.vars[s] = make([]float32, size)
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

func sameGrid(a, b *Message) bool {
	an, aw := a.Origin()
	bn, bw := b.Origin()
	dw := math.Mod(math.Abs(aw-bw), 360)
	return a.Ni == b.Ni && a.Nj == b.Nj && math.Abs(an-bn) < 1e-6 && (dw < 1e-6 || dw > 360-1e-6) &&
		math.Abs(a.Di-b.Di) < 1e-9 && math.Abs(a.Dj-b.Dj) < 1e-9
}

// put copies a message's values into its plane.
func (f *Field) put(m *Message) error {
	s := slotOf(m.Param)
	if len(m.Values) != f.plane {
		return fmt.Errorf("winds: %s: %d values, grid has %d", where(m), len(m.Values), f.plane)
	}
	it := sort.Search(len(f.times), func(i int) bool { return !f.times[i].Before(m.ValidTime) })
	il := sort.Search(len(f.levels), func(i int) bool { return f.levels[i] <= m.Level })
	if it == len(f.times) || !f.times[it].Equal(m.ValidTime) || il == len(f.levels) || f.levels[il] != m.Level {
		return fmt.Errorf("winds: %s not in the field's layout (file changed between reads?)", where(m))
	}
	copy(f.vars[s][(it*len(f.levels)+il)*f.plane:], m.Values)
	return nil
}

// Has reports whether the field holds parameter p.
func (f *Field) Has(p Param) bool {
	s := slotOf(p)
	return s >= 0 && f.vars[s] != nil
}

// Times returns the valid times, ascending.
func (f *Field) Times() []time.Time { return append([]time.Time(nil), f.times...) }

// Levels returns the pressure levels in Pa, descending (from the lowest
// altitude up).
func (f *Field) Levels() []float64 { return append([]float64(nil), f.levels...) }

// Grid returns the number of columns and rows and the increments in
// degrees.
func (f *Field) Grid() (ni, nj int, di, dj float64) { return f.ni, f.nj, f.di, f.dj }

// Bounds returns the southern and northern latitudes, the western and
// eastern longitudes of the grid points (lon1 in [0, 360), lon2 = lon1 +
// (ni-1) di, possibly above 360), and whether the grid wraps around the
// globe in longitude (ni di = 360), in which case every longitude is
// inside.
func (f *Field) Bounds() (lat1, lat2, lon1, lon2 float64, global bool) {
	return f.north - float64(f.nj-1)*f.dj, f.north, f.west, f.west + float64(f.ni-1)*f.di, f.global
}

// levelBand returns the isobaric levels of the kept parameters in msgs that
// lie from pLow to pHigh, with the nearest level outside each bound.
func levelBand(msgs []Message, pLow, pHigh float64) map[float64]bool {
	keep := map[float64]bool{}
	below, above := math.Inf(-1), math.Inf(1) // nearest level under pLow, over pHigh
	for _, m := range msgs {
		if m.Param == ParamOther {
			continue
		}
		switch l := m.Level; {
		case l >= pLow && l <= pHigh:
			keep[l] = true
		case l < pLow && l > below:
			below = l
		case l > pHigh && l < above:
			above = l
		}
	}
	if !math.IsInf(below, -1) {
		keep[below] = true
	}
	if !math.IsInf(above, 1) {
		keep[above] = true
	}
	return keep
}
