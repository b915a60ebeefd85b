package winds

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"time"
)

// Variable slots of a Field.
const (
	slotU = iota
	slotV
	slotT
	slotEDR
	slotRH
	slotQ
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
	case ParamRH:
		return slotRH
	case ParamQ:
		return slotQ
	}
	return -1
}

var slotParams = [nslots]Param{ParamU, ParamV, ParamT, ParamEDR, ParamRH, ParamQ}

// isHumidity reports whether slot s holds a humidity variable.
func isHumidity(s int) bool { return s == slotRH || s == slotQ }

// LevelTolerance is the relative pressure difference within which two
// isobaric levels are the same level, and within which Sample answers
// beyond a variable's top or bottom level with that level's value: 0.5 %.
// Producers round flight-level pressures: GRIB1 stores isobaric levels in
// whole hPa (up to 50 Pa off, 0.34 % at FL450's 147.48 hPa) and GRIB2
// hazard files give them to 10 Pa (FL450 as 14750 Pa for 14747.7 Pa in the
// ICAO standard atmosphere). 0.5 % of pressure is about 40 m of altitude
// (dz = H dp/p with a scale height H of 6.3 to 8.4 km), an eighth of the
// 1000 ft between flight levels, while the closest distinct levels in use
// (FL spacing, 975/1000 hPa) differ by 2.5 % or more. Flight levels
// converted to pressure with the ICAO standard atmosphere fall just off
// the chart levels too: FL340 is 249.99 hPa, 1 Pa above a 250 hPa top
// level that every chart calls FL340. Using the edge level's values across
// 40 m changes them by far less than the forecast's own error (common
// practice: winds aloft change by a few m/s per 1000 ft at most outside
// jet cores). Beyond it, Sample does not extrapolate. This is the only
// level tolerance of the package.
const LevelTolerance = 0.005

// axes is the grid, pressure levels and valid times of one variable of a
// Field; variables on equal axes share one axes value.
type axes struct {
	ni, nj      int
	north, west float64 // degrees; west in [0, 360)
	di, dj      float64
	global      bool
	times       []time.Time
	secs        []float64 // Unix seconds of times
	levels      []float64 // Pa, descending
	lnp         []float64 // ln(levels)
	plane       int       // ni*nj
}

// A Field holds u, v, temperature, EDR and humidity (relative, specific),
// each on its own regular
// lat/lon grid, pressure levels and valid times (variables may come from
// different files: winds from one forecast, EDR from a hazard file), as
// float32 arrays indexed [time][level][row][column] with rows from north
// to south and columns from the western edge eastwards. Memory is 4 bytes
// per value: a 0.25-degree global grid (1440 x 721) with 12 levels, 3
// variables and 5 times takes 747.5 MB. A Field is immutable after
// construction and safe for concurrent use.
type Field struct {
	ax       [nslots]*axes // nil for a variable the field lacks
	uniq     [nslots]*axes // the distinct axes, nuniq of them
	nuniq    int
	prim     *axes // the axes of u (else v, T, EDR): Grid, Bounds, Levels, Times
	vars     [nslots][]float32
	rhRef    RHReference // RHWater or RHMixed when the field holds RH
	warnings []Warning
	member   int // ensemble member (perturbation number), -1 for none
}

// A Sample is the field interpolated at one point: wind components (m/s,
// u eastward, v northward), temperature (K), eddy dissipation rate
// (m^(2/3)/s), relative humidity over liquid water RH and over ice RHi
// (%, 100 = saturated) and specific humidity Q (kg/kg). A variable the
// field does not hold is NaN, and so is one whose surrounding grid values
// include a missing (bitmap) point, and EDR and humidity at a point
// outside their own grid, levels or times. RH and RHi come from the
// field's relative humidity, converted from the reference its source
// uses (see RHReference) with the saturation vapour pressures of Murphy
// and Koop (2005, package perf/contrail) at the sampled temperature; when
// the field holds specific humidity only, from Q, the pressure and the
// temperature. They are NaN when the field holds neither or the
// temperature is NaN. Q is NaN when the field holds no specific humidity
// (it is not derived from RH).
type Sample struct{ U, V, T, EDR, RH, RHi, Q float64 }

// DefaultEDRParam is the EDR used when Options.EDRParam is 0 and the files
// hold it: 0.19.30, the eddy dissipation parameter, which hazard forecasts
// give as the turbulence of all sources (clear air, mountain wave,
// convection) combined.
const DefaultEDRParam = 30

// Open decodes the GRIB files at paths and builds one Field from their kept
// messages (see NewField). Each file is read twice: once for the headers,
// to lay out the field, and once to decode each message into one reused
// buffer and copy it into the field, so that peak memory is the field plus
// one message. Errors name the file.
func Open(paths ...string) (*Field, error) {
	return Options{}.Open(paths...)
}

// OpenBetween is Open keeping only the isobaric levels from pLow to pHigh
// (Pa), and the nearest level beyond each bound where the files hold one,
// so that interpolation inside the band is the same as with every level.
// The band is applied to each variable's own levels. A caller that needs
// only cruise levels saves the memory of the rest: a 0.25-degree global
// forecast on 41 levels needs about 16 between 850 and 70 hPa.
func OpenBetween(pLow, pHigh float64, paths ...string) (*Field, error) {
	return Options{}.OpenBetween(pLow, pHigh, paths...)
}

// OpenWith is o.Open: files may hold different variables on different
// grids, levels and times (say winds from a forecast and EDR from a
// hazard file); each variable is sampled on its own.
func OpenWith(o Options, paths ...string) (*Field, error) { return o.Open(paths...) }

// Open is the package function Open with these options.
func (o Options) Open(paths ...string) (*Field, error) {
	return o.OpenBetween(0, math.Inf(1), paths...)
}

// OpenBetween is the package function OpenBetween with these options: the
// EDR parameter is o.EDRParam (see selectEDR); with o.Member set, only
// that ensemble member (and fields that belong to no member) is kept;
// the Field's size is checked against o's budget from the headers, before
// anything is allocated; files that are not regular files are refused
// before they are opened; warnings go to o.Warn and Field.Warnings.
func (o Options) OpenBetween(pLow, pHigh float64, paths ...string) (*Field, error) {
	r, err := o.prepare(pLow, pHigh, paths)
	if err != nil {
		return nil, err
	}
	if err := checkFieldBudget(r.kept, o.budget(), paths); err != nil {
		return nil, err
	}
	fl, err := layout(r.kept)
	if err != nil {
		return nil, err
	}
	if fl.rhRef, err = rhReference(o.RHReference, r.kept); err != nil {
		return nil, err
	}
	if err := r.fill(o, paths, func(m *Message) error {
		if r.want(m) {
			return fl.put(m)
		}
		return nil
	}); err != nil {
		return nil, err
	}
	fl.member = memberOf(r.kept)
	fl.warnings = append(r.warns, fl.windSanity(r.kept)...)
	if o.Warn != nil {
		for _, w := range fl.warnings {
			o.Warn(w)
		}
	}
	return fl, nil
}

// aread is a read in progress: the headers of every file, the messages
// kept (kept parameters on the pressure band, the chosen EDR) and the
// warnings so far.
type aread struct {
	kept  []Message
	warns []Warning
	edr   int
	keep  map[bandKey]bool
	// member, when not nil, keeps only fields of that ensemble member
	// and those of no member.
	member *int
}

// want reports whether the read keeps message m.
func (r *aread) want(m *Message) bool {
	s := slotOf(m.Param)
	if s < 0 || (s == slotEDR && m.Number != r.edr) || !r.keep[bandKey{s, m.Level}] {
		return false
	}
	return r.member == nil || m.Ensemble < 0 || m.Ensemble == *r.member
}

// prepare scans the headers of paths and selects the messages kept
// (with o.Member, that member's and those of no member).
func (o Options) prepare(pLow, pHigh float64, paths []string) (*aread, error) {
	if len(paths) == 0 {
		return nil, fmt.Errorf("winds: Open: no files")
	}
	if !(pLow <= pHigh) {
		return nil, fmt.Errorf("winds: Open: pressure band %g..%g Pa is empty", pLow, pHigh)
	}
	r := &aread{}
	var heads []Message
	scanOpts := Options{Budget: o.Budget, Warn: func(w Warning) { r.warns = append(r.warns, w) }}
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
	edr, edrWarns, err := selectEDR(heads, o.EDRParam)
	if err != nil {
		return nil, err
	}
	if err := humidityLevels(heads); err != nil {
		return nil, err
	}
	r.edr = edr
	r.warns = append(r.warns, edrWarns...)
	r.keep = levelBand(heads, edr, pLow, pHigh)
	for i := range heads {
		if r.want(&heads[i]) {
			r.kept = append(r.kept, heads[i])
		}
	}
	if err := unreadableGrid(r.kept); err != nil {
		return nil, err
	}
	if o.Member != nil {
		if err := r.selectMember(*o.Member); err != nil {
			return nil, err
		}
	}
	return r, nil
}

// fill reads every file again, decoding each message into one reused
// buffer, and gives it to put (which copies what it keeps).
func (r *aread) fill(o Options, paths []string, put func(*Message) error) error {
	// Every message is decoded into the same scratch buffers and copied
	// into the field, so filling it makes no garbage.
	scratch := &decodeScratch{reuse: true, budget: o.budget(), warn: func(w Warning) {
		if w.Message == 0 {
			return // padding: already warned by the header pass
		}
		r.warns = append(r.warns, w)
	}}
	for _, p := range paths {
		f, err := openRegular(p)
		if err != nil {
			return err
		}
		err = readMessages(f, p, true, scratch, put)
		f.Close()
		if err != nil {
			return err
		}
	}
	return nil
}

// NewField builds a Field from decoded messages with the default Options.
func NewField(msgs []Message) (*Field, error) { return NewFieldWith(Options{}, msgs) }

// NewFieldWith builds a Field from decoded messages. Messages with Param
// other are ignored, and EDR messages other than the chosen parameter (see
// Options.EDRParam). All messages of one variable must share one grid;
// u, v and temperature must be present at every combination of their
// valid times and levels, once (of several ensemble members, choose one
// with Options.Member, or use NewEnsemble); EDR may lack some (NaN there). Missing or repeated
// combinations are an error naming them. Levels within LevelTolerance of
// each other are one level.
func NewFieldWith(o Options, msgs []Message) (*Field, error) {
	edr, warnings, err := selectEDR(msgs, o.EDRParam)
	if err != nil {
		return nil, err
	}
	var kept []Message
	for _, m := range msgs {
		if s := slotOf(m.Param); s >= 0 && (s != slotEDR || m.Number == edr) {
			kept = append(kept, m)
		}
	}
	if o.Member != nil {
		if err := checkMember(*o.Member, kept); err != nil {
			return nil, err
		}
		kept = slices.DeleteFunc(kept, func(m Message) bool { return m.Ensemble >= 0 && m.Ensemble != *o.Member })
	}
	if err := humidityLevels(kept); err != nil {
		return nil, err
	}
	f, err := layout(kept)
	if err != nil {
		return nil, err
	}
	if f.rhRef, err = rhReference(o.RHReference, kept); err != nil {
		return nil, err
	}
	f.warnings = warnings
	f.member = memberOf(kept)
	for i := range kept {
		if err := f.put(&kept[i]); err != nil {
			return nil, err
		}
	}
	return f, nil
}

func where(m *Message) string {
	return fmt.Sprintf("%s message %d (%s at %g Pa, %s)", m.Source, m.Index, m.Param, m.Level, m.ValidTime.UTC().Format(time.RFC3339))
}

// put copies a message's values into its plane.
func (f *Field) put(m *Message) error {
	s := slotOf(m.Param)
	a := f.ax[s]
	if a == nil || len(m.Values) != a.plane {
		return fmt.Errorf("winds: %s: %d values do not fit the field's layout", where(m), len(m.Values))
	}
	it := sort.Search(len(a.times), func(i int) bool { return !a.times[i].Before(m.ValidTime) })
	il := levelIndex(a.levels, m.Level)
	if it == len(a.times) || !a.times[it].Equal(m.ValidTime) || il < 0 {
		return fmt.Errorf("winds: %s not in the field's layout (file changed between reads?)", where(m))
	}
	if s == slotRH {
		if err := rhRange(m); err != nil {
			return err
		}
	}
	copy(f.vars[s][(it*len(a.levels)+il)*a.plane:], m.Values)
	return nil
}

// Has reports whether the field holds parameter p.
func (f *Field) Has(p Param) bool {
	s := slotOf(p)
	return s >= 0 && f.vars[s] != nil
}

// Times returns the valid times of u (else of the first variable held),
// ascending.
func (f *Field) Times() []time.Time { return append([]time.Time(nil), f.prim.times...) }

// Levels returns the pressure levels of u (else of the first variable
// held) in Pa, descending (from the lowest altitude up). ParamLevels gives
// another variable's.
func (f *Field) Levels() []float64 { return append([]float64(nil), f.prim.levels...) }

// ParamLevels returns the pressure levels of parameter p in Pa,
// descending, or nil when the field does not hold p.
func (f *Field) ParamLevels(p Param) []float64 {
	if s := slotOf(p); s >= 0 && f.ax[s] != nil {
		return append([]float64(nil), f.ax[s].levels...)
	}
	return nil
}

// InLevels reports whether pressure p (Pa) lies within the levels of
// parameter p, widened by LevelTolerance, so that Sample can give a value
// of it there. A planner uses it to warn of legs outside the EDR levels.
func (f *Field) InLevels(param Param, p float64) bool {
	s := slotOf(param)
	if s < 0 || f.ax[s] == nil {
		return false
	}
	_, _, _, ok := bracket(f.ax[s].lnp, math.Log(p), true, levelEps)
	return ok
}

// Grid returns the number of columns and rows and the increments in
// degrees of u's grid (else of the first variable held).
func (f *Field) Grid() (ni, nj int, di, dj float64) {
	return f.prim.ni, f.prim.nj, f.prim.di, f.prim.dj
}

// Bounds returns the southern and northern latitudes, the western and
// eastern longitudes of the grid points of u (else of the first variable
// held; lon1 in [0, 360), lon2 = lon1 + (ni-1) di, possibly above 360),
// and whether the grid wraps around the globe in longitude (ni di = 360),
// in which case every longitude is inside.
func (f *Field) Bounds() (lat1, lat2, lon1, lon2 float64, global bool) { return f.prim.bounds() }

func (a *axes) bounds() (lat1, lat2, lon1, lon2 float64, global bool) {
	return a.north - float64(a.nj-1)*a.dj, a.north, a.west, a.west + float64(a.ni-1)*a.di, a.global
}
