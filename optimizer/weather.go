package optimizer

import (
	"fmt"
	"math"
	"strings"
	"time"

	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
)

// cond is the weather and the limits on one segment at one level.
type cond struct {
	wind   float64 // along-track wind, m/s, tailwind positive
	isaDev float64 // K
	edr    float64 // NaN where the weather holds none
	floor  float64 // protection floor after the turbulence rule, g
	why    string  // reason for the floor
	closed bool    // level unavailable here (turbulence, weather top)
	// closedWhy tells why a level is closed; closedLim is the limit's
	// name ("turbulence", or "weather" outside the weather's levels).
	closedWhy string
	closedLim Limit
	// con is the contrail condition (contrail.go); nil where no contrail
	// cost applies.
	con *contrailCond
}

// weatherAt samples the weather at a point and returns the along-track wind
// for the true course, the temperature deviation from ISA and the EDR.
// Without weather it returns still air at ISA. tisa is the ISA
// temperature at p (perf.ISATemperatureAtPressure), given by the caller
// because it is the same at every point of a level.
func weatherAt(f *winds.Field, lat, lon, p, tisa float64, t time.Time, course float64) (wind, isaDev, edr float64, err error) {
	if f == nil {
		return 0, 0, nan, nil
	}
	s, err := f.SampleWind(lat, lon, p, t) // no humidity wanted here
	if err != nil {
		return 0, 0, nan, err
	}
	// Missing values (a bitmap's holes) next to the point are an error,
	// not still air or ISA: the field says nothing there.
	if math.IsNaN(s.U) || math.IsNaN(s.V) {
		return 0, 0, nan, fmt.Errorf("no wind at %.3f, %.3f, %.0f hPa (missing values in the weather)", lat, lon, p/100)
	}
	dev := 0.0
	if f.Has(winds.ParamT) {
		if math.IsNaN(s.T) {
			return 0, 0, nan, fmt.Errorf("no temperature at %.3f, %.3f, %.0f hPa (missing values in the weather)", lat, lon, p/100)
		}
		dev = s.T - tisa // perf.ISADeviation(p, s.T), bit for bit
	}
	along, _ := winds.AlongAcross(s.U, s.V, course)
	return along, dev, s.EDR, nil
}

// isaDevOr returns the weather's ISA deviation d, or the problem's ISADev
// where the weather gives no temperature (or there is no weather).
func (p *Problem) isaDevOr(d float64) float64 {
	if p.Weather == nil || !p.Weather.Has(winds.ParamT) {
		return p.ISADev
	}
	return d
}

// segWeather averages the weather over a segment's sample points.
func segWeather(f *winds.Field, seg *route.Segment, p float64, t time.Time) (wind, isaDev, edr float64, err error) {
	pts := seg.Samples
	if len(pts) == 0 {
		pts = []route.Point{seg.Mid}
	}
	edr = nan
	tisa := perf.ISATemperatureAtPressure(p)
	for _, q := range pts {
		w, d, e, err := weatherAt(f, q.Lat, q.Lon, p, tisa, t, seg.TrueCourse)
		if err != nil {
			return 0, 0, nan, err
		}
		wind += w
		isaDev += d
		if !math.IsNaN(e) && (math.IsNaN(edr) || e > edr) {
			edr = e
		}
	}
	n := float64(len(pts))
	return wind / n, isaDev / n, edr, nil
}

// floorFor applies the turbulence table to an EDR value.
func floorFor(base float64, edr float64, rules []TurbulenceRule) (floor float64, why string, closed bool) {
	floor, why = base, "protection floor"
	if math.IsNaN(edr) {
		return floor, why, false
	}
	for _, r := range rules {
		if edr > r.EDR {
			if r.Closed {
				return floor, fmt.Sprintf("EDR %.3f over %.2f: level closed", edr, r.EDR), true
			}
			if r.Floor > floor {
				floor, why = r.Floor, fmt.Sprintf("EDR %.3f over %.2f: floor %.2f g", edr, r.EDR, r.Floor)
			}
		}
	}
	return floor, why, false
}

// buildConds samples the weather for every segment and level at an
// estimated time of passage. The estimate flies the aircraft's schedule
// Mach at FL350 ISA (speed of sound 295.07 m/s) with the along-track wind
// at the candidate level nearest FL350, segment by segment, so that a
// strong tail- or headwind moves the later segments' times as it would in
// flight. Levels above or below the weather's pressure levels are closed
// with a reason; a segment outside the weather's area or times is an
// error.
func buildConds(p *Problem, levels []int) ([][]cond, error) {
	tas := perf.DefaultSchedule(p.Aircraft).Mach * 295.07 // m/s
	if !(tas > 100) {
		tas = 0.8 * 295.07
	}
	ref := 0
	for i, fl := range levels {
		if abs(fl-350) < abs(levels[ref]-350) {
			ref = i
		}
	}
	segs := p.Track.Segments
	out := make([][]cond, len(segs))
	press := make([]float64, len(levels)) // the same on every segment
	for li, fl := range levels {
		press[li] = perf.FLToPressure(float64(fl))
	}
	clock := p.Depart
	for k := range segs {
		seg := &segs[k]
		t := clock.Add(time.Duration(seg.Length / 2 / tas * float64(time.Second)))
		row := make([]cond, len(levels))
		for li, fl := range levels {
			pr := press[li]
			w, d, e, err := segWeather(p.Weather, seg, pr, t)
			c := cond{wind: w, isaDev: p.isaDevOr(d), edr: e}
			if err != nil {
				if isLevelRange(p.Weather, pr) {
					c.closed, c.closedLim, c.closedWhy = true, "weather", fmt.Sprintf("FL%d outside the weather's pressure levels", fl)
					row[li] = c
					continue
				}
				return nil, &InputError{Field: "Weather", Msg: fmt.Sprintf("segment %d (%.0f-%.0f NM) at FL%d, %s: %v",
					k, seg.FromDist/nmToM, seg.ToDist/nmToM, fl, t.Format(time.RFC3339), err), Err: err}
			}
			if err := p.Aircraft.CheckTableDomain(float64(fl), c.isaDev); err != nil {
				// Operator tables only: never extrapolated.
				return nil, &InputError{Field: "Aircraft", Msg: fmt.Sprintf("segment %d (%.0f-%.0f NM) at FL%d, ISA%+.1f: %v",
					k, seg.FromDist/nmToM, seg.ToDist/nmToM, fl, c.isaDev, err), Err: err}
			}
			c.floor, c.why, c.closed = floorFor(p.Floor, e, p.Turbulence)
			if c.closed {
				c.closedLim, c.closedWhy = LimitTurbulence, c.why
			}
			c.con = contrailCondAt(p, seg, pr, t)
			row[li] = c
		}
		out[k] = row
		gs := math.Max(tas+row[ref].wind, 0.5*tas)
		clock = clock.Add(time.Duration(seg.Length / gs * float64(time.Second)))
	}
	return out, nil
}

// isLevelRange reports whether pressure p lies outside the levels of the
// field's winds (widened by winds.LevelTolerance, as Sample samples them).
func isLevelRange(f *winds.Field, p float64) bool {
	return f != nil && !f.InLevels(winds.ParamU, p)
}

// edrLevelWarnings returns one warning listing the cruise levels of prof
// (initial level and every change, each once, in flight order) that lie
// outside the weather's EDR levels when the weather holds EDR: there
// Sample gives no EDR, so no turbulence rule applies, and the plan says
// so rather than staying silent. Nil when the weather holds no EDR or
// every level lies inside.
func edrLevelWarnings(f *winds.Field, prof Profile) []string {
	if f == nil || !f.Has(winds.ParamEDR) {
		return nil
	}
	seen := map[int]bool{}
	var out []string
	for _, fl := range append([]int{prof.Initial}, changeLevels(prof)...) {
		if seen[fl] {
			continue
		}
		seen[fl] = true
		if !f.InLevels(winds.ParamEDR, perf.FLToPressure(float64(fl))) {
			out = append(out, fmt.Sprintf("FL%03d", fl))
		}
	}
	if len(out) == 0 {
		return nil
	}
	lv := f.ParamLevels(winds.ParamEDR) // descending pressure
	return []string{fmt.Sprintf("no turbulence rule at %s: outside the weather's EDR levels (%.0f..%.0f hPa, about FL%03.0f..FL%03.0f), so no EDR there",
		strings.Join(out, ", "), lv[0]/100, lv[len(lv)-1]/100, perf.PressureToFL(lv[0]), perf.PressureToFL(lv[len(lv)-1]))}
}

func changeLevels(prof Profile) []int {
	out := make([]int, len(prof.Changes))
	for i, c := range prof.Changes {
		out[i] = c.FL
	}
	return out
}
