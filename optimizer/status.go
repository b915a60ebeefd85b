package optimizer

import (
	"fmt"
	"strings"
)

// Plan statuses (Plan.Status).
const (
	// StatusOK: the priced profile breaks no limit.
	StatusOK = "ok"
	// StatusViolations: the profile breaks limits of the aircraft or the
	// rules (buffet, thrust, ceiling, level rule, block, steps); it is
	// priced as far as physics allows.
	StatusViolations = "violations"
	// StatusImpossible: the loading makes the flight impossible as given
	// (trip fuel over the fuel on board or the tanks, landing below the
	// empty mass or over MLW, a take-off or zero-fuel mass over its
	// limit).
	StatusImpossible = "impossible"
)

// loadingLimits are the violations of the loading rather than of the
// profile.
var loadingLimits = map[Limit]bool{LimitLandingMass: true, LimitFuel: true, LimitFuelCap: true, LimitMTOW: true, LimitMZFW: true}

// IsLoadingLimit reports whether a violation's limit is one of the
// loading (masses and fuel) rather than of the profile.
func IsLoadingLimit(limit Limit) bool { return loadingLimits[limit] }

// Status classifies the plan by its violations: StatusImpossible when a
// loading limit is broken, else StatusViolations when any limit is, else
// StatusOK.
func (p *Plan) Status() string {
	st := StatusOK
	for _, v := range p.Violations {
		if loadingLimits[v.Limit] {
			return StatusImpossible
		}
		st = StatusViolations
	}
	return st
}

// LoadingError is returned by the CLI (and may be by callers) for a plan
// whose loading makes the flight impossible; Limits names the limits.
type LoadingError struct {
	Limits  []Limit
	Details []string
}

func (e *LoadingError) Error() string {
	names := make([]string, len(e.Limits))
	for i, l := range e.Limits {
		names[i] = string(l)
	}
	return fmt.Sprintf("the flight is impossible as loaded (%s): %s", strings.Join(names, ", "), strings.Join(e.Details, "; "))
}

// LoadingFailure returns a *LoadingError listing the loading violations
// of p, or nil when there is none.
func (p *Plan) LoadingFailure() error {
	var e LoadingError
	seen := map[Limit]bool{}
	for _, v := range p.Violations {
		if loadingLimits[v.Limit] {
			if !seen[v.Limit] {
				seen[v.Limit] = true
				e.Limits = append(e.Limits, v.Limit)
			}
			e.Details = append(e.Details, v.Detail)
		}
	}
	if len(e.Limits) == 0 {
		return nil
	}
	return &e
}

// checkLoading lists the loading limits the priced flight breaks: trip
// fuel over the fuel capacity or the fuel on board (when the zero-fuel
// mass is known), landing mass over MLW or under OEW.
func (s *sim) checkLoading() {
	q, a := s.q, s.a
	trip := q.TakeoffMass - s.m
	if trip > a.FuelCapacity {
		s.violate(LimitFuelCap, trip-a.FuelCapacity, "kg", fmt.Sprintf("trip fuel %.0f kg exceeds the fuel capacity %.0f kg of %s", trip, a.FuelCapacity, a.Name))
	}
	if s.m > a.MLW {
		s.violate(LimitLandingMass, s.m-a.MLW, "kg", fmt.Sprintf("landing mass %.0f kg over MLW %.0f kg", s.m, a.MLW))
	}
	if s.m < a.OEW {
		s.violate(LimitLandingMass, a.OEW-s.m, "kg", fmt.Sprintf("landing mass %.0f kg is under the operating empty mass %.0f kg: the trip burns more fuel than the take-off mass can hold", s.m, a.OEW))
	}
	if q.ZFW > 0 && s.m < q.ZFW {
		s.violate(LimitFuel, q.ZFW-s.m, "kg", fmt.Sprintf("trip fuel %.0f kg exceeds the fuel on board %.0f kg by %.0f kg", trip, q.TakeoffMass-q.ZFW, q.ZFW-s.m))
	}
}
