package optimizer

import (
	"time"

	"levelpath/perf"
	"levelpath/perf/contrail"
)

// ContrailCell is a stretch of route at one flight level where persistent
// contrails are predicted: from FromDist to ToDist metres from departure
// (one route segment) at FL, standing for the band FL-5..FL+5.
type ContrailCell struct {
	FromDist, ToDist float64
	FL               int
}

// ContrailSection returns the persistent-contrail conditions around a
// planned flight as a distance-level cross-section, for charts: every
// route segment at every flight level from FL200 (or p.MinFL, if higher)
// to p.MaxFL, 1,000 ft apart, judged as classifyContrails judges a leg
// (segment average of temperature and humidity, Schmidt-Appleman at the
// propulsion efficiency, relative humidity over ice against the
// threshold) at the time and mass the plan passes the segment's start,
// with the plan's Mach there (an approximation: another level would fly
// its own Mach). Nil when the weather holds no humidity or the aircraft
// is operator tables without thrust (so no efficiency). Time
// O(segments x levels).
func ContrailSection(p *Problem, plan *Plan) ([]ContrailCell, error) {
	q := *p
	if _, err := q.normalise(); err != nil {
		return nil, err
	}
	if !hasHumidity(q.Weather) || plan == nil || len(plan.Legs) == 0 || !q.Aircraft.KnowsThrust() {
		// Operator tables without thrust give no efficiency: the plan's
		// warning says its legs are not classified.
		return nil, nil
	}
	lo := max(200, q.MinFL)
	lo = (lo + 9) / 10 * 10
	var out []ContrailCell
	li, elapsed := 0, 0.0 // the leg holding the segment's start and the time at its start
	mach := plan.Legs[0].Mach
	for k := range q.Track.Segments {
		seg := &q.Track.Segments[k]
		for li+1 < len(plan.Legs) && plan.Legs[li].ToDist <= seg.FromDist {
			elapsed += plan.Legs[li].Time
			li++
		}
		l := plan.Legs[li]
		f := 0.0
		if l.ToDist > l.FromDist {
			f = min(1, max(0, (seg.FromDist-l.FromDist)/(l.ToDist-l.FromDist)))
		}
		if l.Phase == PhaseCruise {
			mach = l.Mach
		}
		t := plan.Depart.Add(time.Duration((elapsed + f*l.Time) * float64(time.Second)))
		m := l.MassStart - f*l.Fuel
		for fl := lo; fl <= q.MaxFL; fl += 10 {
			pr := perf.FLToPressure(float64(fl))
			tk, rhw, rhi, ok := segHumidity(q.Weather, seg, pr, t)
			if !ok || rhi < q.contrailRHi() {
				continue
			}
			eta := efficiency(q.Aircraft, m, pr, mach, perf.ISADeviation(pr, tk))
			if eta > contrail.CriticalEfficiency(tk, pr, rhw/100) {
				out = append(out, ContrailCell{FromDist: seg.FromDist, ToDist: seg.ToDist, FL: fl})
			}
		}
	}
	return out, nil
}
