package winds

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"levelpath/perf/contrail"
)

// RHReference is the saturation vapour pressure that a source's relative
// humidity is relative to. The WMO code tables (GRIB2 table 4.2.0.1
// parameter 1, GRIB1 table 2 parameter 52) say only "relative humidity";
// producers differ below freezing.
type RHReference int

const (
	// RHAuto takes RHMixed for fields from ECMWF (originating centre 98)
	// and RHWater for every other centre.
	RHAuto RHReference = iota
	// RHWater is relative humidity over liquid (below 0 °C supercooled)
	// water at every temperature, e = RH e_w(T): the WMO definition
	// (Guide to Instruments and Methods of Observation, WMO-No. 8, from
	// memory) and what most producers encode.
	RHWater
	// RHMixed is the mixed-phase definition of the ECMWF IFS (from
	// memory: IFS documentation, Part IV, physical processes, the
	// saturation over a water/ice mixture): e = RH e_s(T) with e_s = α
	// e_w + (1 - α) e_i, α = 0 at or below 250.16 K (-23 °C), 1 at or
	// above 273.16 K and ((T - 250.16)/(273.16 - 250.16))² between. At
	// cruise temperatures (below -23 °C) it is relative humidity over
	// ice. Deviation: e_w and e_i are Murphy and Koop's (2005) here, not
	// the Tetens-type formulas of the IFS, which differ by well under 1 %
	// of e_s in this range (from memory).
	RHMixed
)

func (r RHReference) String() string {
	switch r {
	case RHWater:
		return "over liquid water"
	case RHMixed:
		return "over a water/ice mixture (ECMWF IFS; over ice below -23 °C)"
	}
	return "by originating centre"
}

// ecmwfCentre is ECMWF's number in WMO common code table C-11.
const ecmwfCentre = 98

// Humidity limits. Relative humidity outside 0..MaxRH is an error: air in
// the free troposphere is rarely more than about 50 % supersaturated over
// ice (common practice: homogeneous freezing of aerosol caps it near 145
// to 170 % over ice at cruise temperatures, from memory), so such a value
// means a wrong parameter or scale factor. Specific humidity outside
// 0..MaxQ is kept and warned about (0.04 kg/kg is saturation at about
// 35 °C at sea level, from memory).
const (
	MaxRH = 150.0 // %
	MaxQ  = 0.04  // kg/kg
)

// rhReference resolves r for the RH messages in msgs: RHAuto becomes the
// reference of their centre. RH messages from centres with different
// references are an error naming two of them. Time O(len(msgs)).
func rhReference(r RHReference, msgs []Message) (RHReference, error) {
	if r != RHAuto {
		return r, nil
	}
	var first *Message
	ref := RHAuto
	for i := range msgs {
		m := &msgs[i]
		if m.Param != ParamRH {
			continue
		}
		mr := RHWater
		if m.Centre == ecmwfCentre {
			mr = RHMixed
		}
		if first == nil {
			first, ref = m, mr
		} else if mr != ref {
			return 0, fmt.Errorf("winds: relative humidity of %s (centre %d, %s) and %s (centre %d, %s) use different references; choose one (Options.RHReference)",
				where(first), first.Centre, ref, where(m), m.Centre, mr)
		}
	}
	return ref, nil
}

// convert returns relative humidity over liquid water and over ice (%)
// from the field's relative humidity rh (%) at temperature t (K).
func (r RHReference) convert(rh, t float64) (rhw, rhi float64) {
	if math.IsNaN(rh) || !(t > 0) {
		return math.NaN(), math.NaN()
	}
	ew, ei := contrail.SatWater(t), contrail.SatIce(t)
	es := ew
	if r == RHMixed {
		es = mixedSat(t, ew, ei)
	}
	e := rh * es
	return e / ew, e / ei
}

// mixedSat is the saturation vapour pressure of RHMixed at t given the
// saturation pressures over water ew and ice ei.
func mixedSat(t, ew, ei float64) float64 {
	const tIce, t0 = 250.16, 273.16
	switch {
	case t <= tIce:
		return ei
	case t >= t0:
		return ew
	}
	a := (t - tIce) / (t0 - tIce)
	a *= a
	return a*ew + (1-a)*ei
}

// fromQ returns relative humidity over liquid water and over ice (%)
// from specific humidity q (kg/kg) at pressure p (Pa) and temperature t
// (K): the vapour pressure is e = q p / (ε + (1 - ε) q) (package
// perf/contrail, RHIceFromQ).
func fromQ(q, p, t float64) (rhw, rhi float64) {
	if math.IsNaN(q) || !(t > 0) {
		return math.NaN(), math.NaN()
	}
	e := q * p / (contrail.Epsilon + (1-contrail.Epsilon)*q)
	return 100 * e / contrail.SatWater(t), 100 * e / contrail.SatIce(t)
}

// rhRange refuses a relative-humidity field with a value below 0 or above
// MaxRH, naming the message, the number of such points and the first.
func rhRange(m *Message) error {
	count, first := 0, -1
	for k, v := range m.Values {
		if x := float64(v); x < 0 || x > MaxRH {
			if first < 0 {
				first = k
			}
			count++
		}
	}
	if count == 0 {
		return nil
	}
	lat, lon := pointOf(m, first)
	return &FormatError{Source: m.Source, Message: m.Index, Offset: m.Offset,
		What: fmt.Sprintf("relative humidity at %g Pa, %s: %d points outside 0..%g %%, the first %.6g %% at (%.4f, %.4f) (a wrong parameter or scale factor?)",
			m.Level, m.ValidTime.UTC().Format("2006-01-02T15:04:05Z"), count, MaxRH, m.Values[first], lat, lon)}
}

// humidityLevels refuses humidity messages on an isobaric level that is
// none of the levels (within LevelTolerance) of u, v or temperature in
// msgs: humidity is read on the winds' levels. Without winds or
// temperature any levels are accepted. Time O(n log n).
func humidityLevels(msgs []Message) error {
	var wl []float64
	for i := range msgs {
		if s := slotOf(msgs[i].Param); s >= slotU && s <= slotT {
			wl = append(wl, msgs[i].Level)
		}
	}
	if len(wl) == 0 {
		return nil
	}
	sort.Sort(sort.Reverse(sort.Float64Slice(wl)))
	var levels []float64
	for _, l := range wl {
		if n := len(levels); n == 0 || !sameLevel(levels[n-1], l) {
			levels = append(levels, l)
		}
	}
	for i := range msgs {
		m := &msgs[i]
		if !isHumidity(slotOf(m.Param)) || levelIndex(levels, m.Level) >= 0 {
			continue
		}
		names := make([]string, len(levels))
		for k, l := range levels {
			names[k] = fmt.Sprintf("%g", l)
		}
		return &FormatError{Source: m.Source, Message: m.Index, Offset: m.Offset,
			What: fmt.Sprintf("%s at %g Pa is on none of the levels of the winds and temperature (%s Pa); humidity must be on the winds' levels",
				m.Param, m.Level, strings.Join(names, ", "))}
	}
	return nil
}

// RHReference returns the reference of the field's relative humidity
// (RHWater or RHMixed), or RHAuto when the field holds none.
func (f *Field) RHReference() RHReference {
	if f.vars[slotRH] == nil {
		return RHAuto
	}
	return f.rhRef
}
