package optimizer

import (
	"fmt"
	"math"
	"time"

	"levelpath/perf"
	"levelpath/perf/contrail"
	"levelpath/route"
	"levelpath/winds"
)

// ContrailClass is a cruise leg's contrail prediction.
type ContrailClass string

// Contrail classes. The empty class means not classified: the weather
// holds no humidity there, or the leg is a climb, step or descent.
const (
	ContrailUnknown    ContrailClass = ""
	ContrailNone       ContrailClass = "none"        // the Schmidt-Appleman criterion is not met
	ContrailShortLived ContrailClass = "short-lived" // met, but the air is subsaturated over ice
	ContrailPersistent ContrailClass = "persistent"  // met in air at or above the persistence threshold over ice
)

// ContrailCaution goes with every contrail figure a plan output shows.
const ContrailCaution = "Contrail prediction from forecast humidity is uncertain (ice supersaturation is poorly forecast): contrail figures are for planning studies, not a guarantee of avoidance."

// DefaultContrailRHi is the relative humidity over ice (%) at or above
// which a contrail persists when Problem.ContrailRHiPct is 0: ice
// saturation, the usual threshold (Schumann 1996, section 2; Teoh et al.,
// Environ. Sci. Technol. 54 (2020) 2941-2950, use the same criterion).
const DefaultContrailRHi = 100.0

// ContrailTotals sums a plan's cruise legs by contrail class. The
// prediction rests on forecast humidity, which is uncertain (ice
// supersaturation is poorly forecast): it is for planning studies, not a
// guarantee of avoidance.
type ContrailTotals struct {
	// PersistentNM is the cruise distance in persistent-contrail
	// conditions, NM, split into DayNM and NightNM by the sun's elevation
	// at each leg's midpoint (above the horizon: day; Spencer's 1971
	// series, package perf/contrail).
	PersistentNM, DayNM, NightNM float64
	ShortLivedNM                 float64
	// UnknownNM is cruise distance not classified (no humidity at that
	// level or point).
	UnknownNM float64
	// CostPerNM is Problem.ContrailCost, kg of fuel equivalent per NM, and
	// Cost = CostPerNM x PersistentNM, kg (not part of Totals.Cost).
	CostPerNM, Cost float64
	// RHiPct is the persistence threshold used, % over ice.
	RHiPct float64
}

// contrailCond is what the search knows of contrails on one segment at
// one level: the air there is at or above the persistence threshold over
// ice, and the least propulsion efficiency at which a contrail forms.
type contrailCond struct {
	etaCrit float64
}

// checkContrail validates the contrail fields of a normalised problem:
// ContrailCost finite and not negative, and only with weather that holds
// humidity; ContrailRHiPct 0 (the default) or within 50..200 %.
func (p *Problem) checkContrail() error {
	c := p.ContrailCost
	if math.IsNaN(c) || math.IsInf(c, 0) || c < 0 {
		return inputErrorf("ContrailCost", "contrail cost %v kg/NM must be a finite number, 0 or more", c)
	}
	if r := p.ContrailRHiPct; r != 0 && !(r >= 50 && r <= 200) {
		return inputErrorf("ContrailRHiPct", "persistence threshold %v %% over ice must lie in 50..200", r)
	}
	if c > 0 && p.Aircraft != nil && !p.Aircraft.KnowsThrust() {
		return inputErrorf("ContrailCost", "a contrail cost needs the engines' propulsion efficiency (thrust x TAS / fuel energy), and the operator tables of %s hold no thrust (the cruise table's optional thrust column): add it or use a performance model", p.Aircraft.Name)
	}
	if c > 0 && !hasHumidity(p.Weather) {
		return inputErrorf("ContrailCost", "a contrail cost needs weather with humidity (relative or specific, on isobaric levels); this weather has none")
	}
	return nil
}

func hasHumidity(f *winds.Field) bool {
	return f != nil && (f.Has(winds.ParamRH) || f.Has(winds.ParamQ))
}

func (p *Problem) contrailRHi() float64 {
	if p.ContrailRHiPct == 0 {
		return DefaultContrailRHi
	}
	return p.ContrailRHiPct
}

// segHumidity averages temperature and relative humidity over water and
// ice over a segment's sample points at pressure pr and time t, as
// segWeather averages the wind; ok is false where any point has none.
func segHumidity(f *winds.Field, seg *route.Segment, pr float64, t time.Time) (tk, rhw, rhi float64, ok bool) {
	pts := seg.Samples
	if len(pts) == 0 {
		pts = []route.Point{seg.Mid}
	}
	for _, q := range pts {
		s, err := f.Sample(q.Lat, q.Lon, pr, t)
		if err != nil || math.IsNaN(s.T) || math.IsNaN(s.RH) || math.IsNaN(s.RHi) {
			return 0, 0, 0, false
		}
		tk += s.T
		rhw += s.RH
		rhi += s.RHi
	}
	n := float64(len(pts))
	return tk / n, rhw / n, rhi / n, true
}

// contrailCondAt is the search's contrail condition on seg at pressure pr
// and the nominal time t: nil unless the problem prices contrails and the
// air there is at or above the persistence threshold over ice. Only then
// is the critical efficiency worked out (about 60 evaluations of the
// saturation curve).
func contrailCondAt(p *Problem, seg *route.Segment, pr float64, t time.Time) *contrailCond {
	if p.ContrailCost == 0 {
		return nil
	}
	tk, rhw, rhi, ok := segHumidity(p.Weather, seg, pr, t)
	if !ok || rhi < p.contrailRHi() {
		return nil
	}
	return &contrailCond{etaCrit: contrail.CriticalEfficiency(tk, pr, rhw/100)}
}

// efficiency returns the overall propulsion efficiency η = thrust x TAS /
// (fuel flow x fuel heat) of level cruise at mass m, pressure pr, Mach and
// ISA deviation: thrust equals drag (Schumann 1996, eq. (3)'s η; fuel heat
// 43.2 MJ/kg, package perf/contrail).
func efficiency(a *perf.Aircraft, m, pr, mach, isaDev float64) float64 {
	pt := a.Point(perf.State{Mass: m, Pressure: pr, Mach: mach, ISADev: isaDev, LoadFactor: 1})
	if !(pt.FuelFlow > 0) {
		return nan
	}
	return pt.Drag * pt.TAS / (pt.FuelFlow * contrail.FuelHeat)
}

// contrailCost is the search's contrail charge for d metres of level
// cruise on segment k at level li from mass m with cruise value v:
// Problem.ContrailCost per NM where the air is at or above the
// persistence threshold and the engine's efficiency there exceeds the
// critical one. Exactly 0 when ContrailCost is 0, so that the search's
// costs, and so its plan, are unchanged bit for bit.
func (s *solver) contrailCost(k, li int, m float64, v cruiseVal, d float64) float64 {
	if s.p.ContrailCost == 0 || d <= 0 || !v.ok {
		return 0
	}
	c := s.conds[k][li].con
	if c == nil {
		return 0
	}
	if !(efficiency(s.a, m, s.press[li], v.mach, s.conds[k][li].isaDev) > c.etaCrit) {
		return 0
	}
	return s.p.ContrailCost * d / nmToM
}

// classifyContrails gives each cruise leg of plan its contrail class and
// sums them into plan.Contrail, when the weather holds humidity (else it
// leaves the plan alone). A leg is judged on its segment's sample points
// at the leg's start time (as exact pricing samples the weather), with
// the propulsion efficiency of its start mass, Mach and level; day or
// night by the sun's elevation at the leg's midpoint (distance and time).
// Legs without humidity stay unclassified and are named in a warning.
func classifyContrails(q *Problem, plan *Plan) {
	if !hasHumidity(q.Weather) {
		return
	}
	tot := &ContrailTotals{CostPerNM: q.ContrailCost, RHiPct: q.contrailRHi()}
	segs := q.Track.Segments
	elapsed := 0.0
	unknown, noEta := 0, 0.0 // legs without humidity; NM without an efficiency
	for i := range plan.Legs {
		l := &plan.Legs[i]
		start := elapsed
		elapsed += l.Time
		l.RHi = nan
		if l.Phase != PhaseCruise || l.Segment < 0 || l.Segment >= len(segs) {
			continue
		}
		pr := perf.FLToPressure(l.FL)
		t0 := plan.Depart.Add(time.Duration(start * float64(time.Second)))
		nm := (l.ToDist - l.FromDist) / nmToM
		tk, rhw, rhi, ok := segHumidity(q.Weather, &segs[l.Segment], pr, t0)
		if !ok {
			unknown++
			tot.UnknownNM += nm
			continue
		}
		l.RHi = rhi
		eta := efficiency(q.Aircraft, l.MassStart, pr, l.Mach, l.ISADev)
		if math.IsNaN(eta) {
			// Operator tables hold no thrust: no efficiency, no class.
			noEta += nm
			tot.UnknownNM += nm
			continue
		}
		switch {
		case !contrail.ExceedsCritical(eta, tk, pr, rhw/100): // eta > CriticalEfficiency, settled early
			l.Contrail = ContrailNone
		case rhi >= tot.RHiPct:
			l.Contrail = ContrailPersistent
			tot.PersistentNM += nm
			mid, _ := q.Track.PointAt((l.FromDist + l.ToDist) / 2)
			tm := plan.Depart.Add(time.Duration((start + l.Time/2) * float64(time.Second)))
			if contrail.IsDay(mid.Lat, mid.Lon, tm) {
				tot.DayNM += nm
			} else {
				tot.NightNM += nm
			}
		default:
			l.Contrail = ContrailShortLived
			tot.ShortLivedNM += nm
		}
	}
	tot.Cost = tot.CostPerNM * tot.PersistentNM
	plan.Contrail = tot
	if noEta > 0 {
		plan.Warnings = append(plan.Warnings, fmt.Sprintf("contrails: %.0f NM of cruise not classified: the propulsion efficiency is unknown (the operator tables hold no thrust column)", noEta))
	}
	if unknown > 0 {
		plan.Warnings = append(plan.Warnings, fmt.Sprintf("contrails: %d cruise legs (%.0f NM) not classified: no humidity in the weather there", unknown, tot.UnknownNM))
	}
}
