package optimizer

import (
	"fmt"
	"math"
	"sort"

	"levelpath/route"
)

// Waypoint kinds.
const (
	WaypointRoute = "waypoint" // a named point of the route
	WaypointTOC   = "toc"      // top of climb
	WaypointStep  = "step"     // start of a level change
	WaypointTOD   = "tod"      // top of descent
	WaypointStart = "start"    // the in-flight state a re-plan starts from
)

// Waypoint is the flight's state over one point: distance m from
// departure, time s since departure (ETO = Plan.Depart + Time), level,
// fuel used since take-off and, when the fuel on board is known, fuel
// remaining and the least fuel required there (the remaining trip plus
// the reserves); NaN when unknown.
type Waypoint struct {
	Name          string
	Kind          string
	Dist          float64
	Time          float64
	FL            float64
	FuelUsed      float64
	FuelRemaining float64
	MinRequired   float64
}

// waypoints lists the route's named points (departure and destination
// included), the top of climb, each step and the top of descent, in
// order of distance, with time, level and fuel interpolated linearly
// within the priced legs (on a climb or descent the level is interpolated
// by distance, an approximation). fob is the fuel on board at take-off
// (NaN when unknown); the least fuel required is then the remaining trip
// (the reserves are added by PlanFuel).
//
// Complexity: O((points + legs) log legs).
func waypoints(p *Plan, tr *route.Track, fob float64) []Waypoint {
	if len(p.Legs) == 0 || tr == nil {
		return nil
	}
	var out []Waypoint
	add := func(name, kind string, d float64) {
		out = append(out, Waypoint{Name: name, Kind: kind, Dist: d})
	}
	start := p.Legs[0].FromDist // > 0 for a re-plan from a state in flight
	if start > 0 {
		add("present position", WaypointStart, start)
	}
	for i, l := range tr.Legs {
		if l.StartDist >= start+1 || start == 0 {
			add(pointName(l.From, i), WaypointRoute, l.StartDist)
		}
	}
	if n := len(tr.Legs); n > 0 {
		add(pointName(tr.Legs[n-1].To, n), WaypointRoute, p.Distance)
	}
	if p.Legs[0].Phase == PhaseClimb {
		add("TOC", WaypointTOC, p.Legs[0].ToDist)
	}
	for _, s := range p.Steps {
		add(fmt.Sprintf("FL%03d -> FL%03d", s.FromFL, s.ToFL), WaypointStep, s.AtDist)
	}
	add("TOD", WaypointTOD, p.Legs[len(p.Legs)-1].FromDist)
	sort.SliceStable(out, func(i, j int) bool { return out[i].Dist < out[j].Dist })
	// Cumulative time and fuel at each leg's start.
	ct := make([]float64, len(p.Legs)+1)
	cf := make([]float64, len(p.Legs)+1)
	for i, l := range p.Legs {
		ct[i+1], cf[i+1] = ct[i]+l.Time, cf[i]+l.Fuel
	}
	last, lastDist := "", 0.0
	for i := range out {
		w := &out[i]
		k := sort.Search(len(p.Legs), func(j int) bool { return p.Legs[j].ToDist > w.Dist })
		if k == len(p.Legs) {
			k = len(p.Legs) - 1
		}
		l := p.Legs[k]
		u := 0.0
		if l.ToDist > l.FromDist {
			u = math.Max(0, math.Min(1, (w.Dist-l.FromDist)/(l.ToDist-l.FromDist)))
		}
		w.Time = ct[k] + u*l.Time
		w.FuelUsed = cf[k] + u*l.Fuel
		w.FL = l.FromFL + u*(l.FL-l.FromFL)
		if w.Kind == WaypointStep {
			w.FL = l.FromFL
			w.Name += fmt.Sprintf(" at %.0f NM", w.Dist/nmToM)
			if last != "" {
				w.Name += fmt.Sprintf(", %.0f NM after %s", (w.Dist-lastDist)/nmToM, last)
			}
		}
		if w.Kind == WaypointRoute {
			last, lastDist = w.Name, w.Dist
		}
		w.FuelRemaining = fob - w.FuelUsed
		w.MinRequired = math.Max(0, p.Totals.Fuel-w.FuelUsed)
		if math.IsNaN(fob) {
			w.MinRequired = nan
		}
	}
	return out
}

// pointName is a route point's name, or its number when it has none.
func pointName(pt route.Point, i int) string {
	if pt.Name != "" {
		return pt.Name
	}
	return fmt.Sprintf("P%d (%.3f,%.3f)", i+1, pt.Lat, pt.Lon)
}

// lowFuelWarning returns a warning for the first waypoint where the fuel
// remaining falls below the least required, or "".
func lowFuelWarning(ws []Waypoint) string {
	for _, w := range ws {
		if w.FuelRemaining < w.MinRequired-0.5 {
			return fmt.Sprintf("fuel remaining %.0f kg at %s (%.0f NM) is under the %.0f kg required there", w.FuelRemaining, w.Name, w.Dist/nmToM, w.MinRequired)
		}
	}
	return ""
}
