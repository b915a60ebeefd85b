package optimizer

import (
	"math"

	"levelpath/perf"
)

// bestClimbSchedule chooses the climb CAS for the initial climb: among the
// aircraft's schedule CAS and 280 kt to VMO in 10 kt steps, the one that
// minimises fuel + CI x time from the start of the climb (endAlt, the
// problem's end altitude) to a common point
// at a reference cruise level (60 levels under the highest, at most
// FL350), in still air at ISA at the take-off mass. The climb stays at
// 250 kt below 10,000 ft and at the schedule's Mach above the crossover.
// One schedule serves the whole plan, so Assess prices a profile the same
// way.
func bestClimbSchedule(a *perf.Aircraft, tow, ci float64, maxFL int, sp Speed, floor, endAlt float64) perf.Schedule {
	base := perf.DefaultSchedule(a)
	ref := math.Min(350, float64(maxFL-60))
	pRef := perf.FLToPressure(ref)
	pStart := perf.PressureAt(endAlt) // where the plan's climb begins
	cands := []float64{base.CAS}
	for cas := 280 * perf.KtToMS; cas <= a.VMO+1e-9; cas += 10 * perf.KtToMS {
		cands = append(cands, cas)
	}
	type res struct {
		s  perf.Schedule
		tr perf.Transition
	}
	var rs []res
	far := 0.0
	for _, cas := range cands {
		s := perf.Schedule{CASLow: base.CASLow, CAS: cas, Mach: base.Mach}
		tr, err := a.Climb(tow, pStart, pRef, 0, s)
		if err != nil {
			continue
		}
		far = math.Max(far, tr.Distance)
		rs = append(rs, res{s: s, tr: tr})
	}
	best, bestCost := base, math.Inf(1)
	for _, r := range rs {
		c := cond{floor: floor}
		v := cruisePoint(a, sp, ci, tow-r.tr.Fuel, pRef, c)
		if !v.ok {
			continue
		}
		d := far + 10*nmToM - r.tr.Distance
		t := d / v.tas
		cost := r.tr.Fuel + v.ff*t + ci*(r.tr.Time+t)/60
		if cost < bestCost {
			best, bestCost = r.s, cost
		}
	}
	return best
}

// scheduleMach is the Mach a CAS/Mach schedule flies at pressure p above
// 10,000 ft: the lesser of the schedule's Mach and its CAS's Mach.
func scheduleMach(s perf.Schedule, p float64) float64 {
	m := s.Mach
	if s.CAS > 0 {
		if c := perf.CASToMach(s.CAS, p); c == c && (m == 0 || c < m) {
			m = c
		}
	}
	return m
}
