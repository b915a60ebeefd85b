package optimizer

import (
	"fmt"
	"time"
)

// ArrivalTarget asks for an arrival inside a window around a time: from
// At+Early to At+Late (Early is usually negative: "-5m,+10m").
type ArrivalTarget struct {
	At          time.Time
	Early, Late time.Duration
	// MaxCI is the highest cost index tried, kg/min (0: 500).
	MaxCI float64
	// Tolerance is the cost-index resolution of the search, kg/min (0: 1).
	Tolerance float64
}

// ArrivalResult says how a target was met.
type ArrivalResult struct {
	CI      float64   // the cost index chosen, kg/min
	Arrival time.Time // of the plan returned
	Met     bool      // the arrival lies in the window
	// Miss is how far the arrival lies outside the window when it cannot
	// be met: positive when even the fastest plan (MaxCI) is late,
	// negative when even the slowest (CI 0) is early.
	Miss  time.Duration
	Tries int // plans made
}

// arrivalOf is the plan's arrival time: departure plus trip time.
func arrivalOf(pl *Plan) time.Time {
	return pl.Depart.Add(time.Duration(pl.Totals.Time * float64(time.Second)))
}

// SolveArriveBy finds the least cost index whose plan arrives inside the
// target window, and returns that plan. The fuel burnt rises and the trip
// time falls as the cost index rises (the cost index prices time against
// fuel), so the least-fuel plan in the window is the one with the lowest
// cost index that is not late; arrival is monotone non-increasing in CI
// (a step function, since profiles are discrete), which makes the search
// a bracket-and-bisect on CI (the bisection method, e.g. Press et al.,
// Numerical Recipes, 3rd ed., section 9.1): the bracket is [0, MaxCI],
// halved until it is narrower than Tolerance, keeping the upper end on
// time. When CI 0 is already not late it is the answer (if it is early
// the window cannot be met: nothing in the speed policy flies slower);
// when MaxCI is still late the window cannot be met either. Both are
// reported in the result (Met false, Miss the amount), not as errors.
//
// Complexity: O(log2(MaxCI/Tolerance)) plans, each a full Solve.
func SolveArriveBy(p *Problem, target ArrivalTarget) (*Plan, ArrivalResult, error) {
	var res ArrivalResult
	if target.At.IsZero() {
		return nil, res, inputErrorf("ArrivalTarget.At", "no arrival time given")
	}
	if target.Early > target.Late {
		return nil, res, inputErrorf("ArrivalTarget", "window %v,%v has its ends reversed", target.Early, target.Late)
	}
	if !p.Depart.IsZero() && !target.At.Add(target.Late).After(p.Depart) {
		return nil, res, inputErrorf("ArrivalTarget.At", "arrival %s is not after the departure %s", target.At.UTC().Format(time.RFC3339), p.Depart.UTC().Format(time.RFC3339))
	}
	maxCI := target.MaxCI
	if maxCI == 0 {
		maxCI = 500
	}
	if err := CheckCI(maxCI); err != nil {
		return nil, res, &InputError{Field: "ArrivalTarget.MaxCI", Msg: err.Error()}
	}
	tol := target.Tolerance
	if tol == 0 {
		tol = 1
	}
	if !(tol > 0) {
		return nil, res, inputErrorf("ArrivalTarget.Tolerance", "%v kg/min must be positive", tol)
	}
	early, late := target.At.Add(target.Early), target.At.Add(target.Late)
	solveAt := func(ci float64) (*Plan, error) {
		q := *p
		q.CI = ci
		res.Tries++
		return Solve(&q)
	}
	lo, err := solveAt(0)
	if err != nil {
		return nil, res, err
	}
	if a := arrivalOf(lo); !a.After(late) {
		res.CI, res.Arrival, res.Met = 0, a, !a.Before(early)
		if !res.Met {
			res.Miss = a.Sub(early)
			lo.Warnings = append(lo.Warnings, fmt.Sprintf("arrival window cannot be met: at cost index 0 the flight arrives %s, %.0f min before the window opens", a.UTC().Format(time.RFC3339), -res.Miss.Minutes()))
		}
		return lo, res, nil
	}
	hi, err := solveAt(maxCI)
	if err != nil {
		return nil, res, err
	}
	if a := arrivalOf(hi); a.After(late) {
		res.CI, res.Arrival, res.Miss = maxCI, a, a.Sub(late)
		hi.Warnings = append(hi.Warnings, fmt.Sprintf("arrival window cannot be met: at cost index %g the flight arrives %s, %.0f min after the window closes", maxCI, a.UTC().Format(time.RFC3339), res.Miss.Minutes()))
		return hi, res, nil
	}
	// Invariant: plan at ciLo is late, plan at ciHi (best) is not.
	ciLo, ciHi, best := 0.0, maxCI, hi
	for ciHi-ciLo > tol {
		mid := (ciLo + ciHi) / 2
		pl, err := solveAt(mid)
		if err != nil {
			return nil, res, err
		}
		if arrivalOf(pl).After(late) {
			ciLo = mid
		} else {
			ciHi, best = mid, pl
		}
	}
	a := arrivalOf(best)
	res.CI, res.Arrival, res.Met = ciHi, a, !a.Before(early)
	if !res.Met {
		// A step between profiles jumps over the whole window.
		res.Miss = a.Sub(early)
		best.Warnings = append(best.Warnings, fmt.Sprintf("arrival window cannot be met exactly: the least cost index not late, %g, arrives %.0f min before the window opens", ciHi, -res.Miss.Minutes()))
	}
	return best, res, nil
}

// DelayCost is a piecewise-linear cost of lateness: Points are (minutes
// late, cost) pairs with minutes increasing and cost non-decreasing, for
// example (0, 0), (15, 0), (60, 5000), (180, 40000). The cost is the first
// point's before it, interpolated linearly between points, and continues
// at the last segment's slope after the last point (a single point is a
// constant).
type DelayCost struct {
	Minutes []float64
	Cost    []float64
}

// Check returns an error naming the first point that breaks the rules.
func (d DelayCost) Check() error {
	if len(d.Minutes) == 0 || len(d.Minutes) != len(d.Cost) {
		return inputErrorf("DelayCost", "needs one or more (minutes, cost) points")
	}
	for i := range d.Minutes {
		if !finite(d.Minutes[i]) || !finite(d.Cost[i]) || d.Cost[i] < 0 {
			return inputErrorf("DelayCost", "point %d (%v min, %v): not a finite, non-negative cost", i+1, d.Minutes[i], d.Cost[i])
		}
		if i > 0 && !(d.Minutes[i] > d.Minutes[i-1]) {
			return inputErrorf("DelayCost", "point %d: minutes %v do not increase", i+1, d.Minutes[i])
		}
		if i > 0 && d.Cost[i] < d.Cost[i-1] {
			return inputErrorf("DelayCost", "point %d: cost %v falls with lateness (the cost of being late is non-decreasing)", i+1, d.Cost[i])
		}
	}
	return nil
}

// At returns the delay cost of arriving late minutes after schedule
// (negative: early).
func (d DelayCost) At(late float64) float64 {
	n := len(d.Minutes)
	switch {
	case n == 0:
		return 0
	case n == 1 || late <= d.Minutes[0]:
		return d.Cost[0]
	}
	i := 1
	for i < n-1 && late > d.Minutes[i] {
		i++
	}
	f := (late - d.Minutes[i-1]) / (d.Minutes[i] - d.Minutes[i-1])
	return d.Cost[i-1] + f*(d.Cost[i]-d.Cost[i-1])
}

func finite(x float64) bool { return x == x && x-x == 0 }

// DelayChoice is the plan chosen against a delay cost.
type DelayChoice struct {
	CI        float64 // kg/min
	LateMin   float64 // minutes after the scheduled arrival (negative: early)
	DelayCost float64
	Total     float64 // the plan's cost (fuel + CI x time at the problem's CI) plus the delay cost
}

// SolveDelayCost plans the flight at each cost index in cis and returns
// the plan whose objective, fuel_kg + p.CI x time_min + delay cost of its
// arrival against sched, is least (Cook, Tanner, Williams and Meise,
// "Dynamic cost indexing", J. Air Transport Management 2009: delay costs
// are non-linear, so the cost index that serves best depends on how late
// the flight is). The plan's own CI prices time in its search; p.CI, the
// operator's value of time, prices it in the objective. The objective is
// not unimodal in CI in general, so every candidate is planned; cis must
// be non-empty. Ties go to the lower CI.
//
// Complexity: len(cis) plans.
func SolveDelayCost(p *Problem, sched time.Time, cost DelayCost, cis []float64) (*Plan, DelayChoice, error) {
	var best DelayChoice
	if err := cost.Check(); err != nil {
		return nil, best, err
	}
	if len(cis) == 0 {
		return nil, best, inputErrorf("DelayCost", "no cost indices to try")
	}
	var bestPlan *Plan
	for _, ci := range cis {
		if err := CheckCI(ci); err != nil {
			return nil, best, &InputError{Field: "CI", Msg: err.Error()}
		}
		q := *p
		q.CI = ci
		pl, err := Solve(&q)
		if err != nil {
			return nil, best, err
		}
		late := arrivalOf(pl).Sub(sched).Minutes()
		dc := cost.At(late)
		total := pl.Totals.Fuel + p.CI*pl.Totals.Time/60 + dc
		if bestPlan == nil || total < best.Total {
			bestPlan, best = pl, DelayChoice{CI: ci, LateMin: late, DelayCost: dc, Total: total}
		}
	}
	return bestPlan, best, nil
}
