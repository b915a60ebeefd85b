package optimizer

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
)

// DelayCost is a piecewise-linear cost of lateness: Points are (minutes
// late, cost) pairs with minutes increasing and cost non-decreasing, for
// example (0, 0), (15, 0), (60, 5000), (180, 40000). The cost is in kg of
// fuel-equivalent, the unit of a plan's cost (fuel_kg + CI x time_min,
// CI in kg/min), so that it adds to it. It is the first point's cost
// before the first point, interpolated linearly between points, and
// continues at the last segment's slope after the last point (a single
// point is a constant).
type DelayCost struct {
	Minutes []float64
	Cost    []float64
}

// MaxDelayPoints bounds the points of a delay cost.
const MaxDelayPoints = 1000

// Check returns an error naming the first point that breaks the rules.
func (d DelayCost) Check() error {
	if len(d.Minutes) == 0 || len(d.Minutes) != len(d.Cost) {
		return inputErrorf("DelayCost", "needs one or more (minutes, cost) points")
	}
	if len(d.Minutes) > MaxDelayPoints {
		return inputErrorf("DelayCost", "%d points, more than %d", len(d.Minutes), MaxDelayPoints)
	}
	for i := range d.Minutes {
		if !finite(d.Minutes[i]) || !finite(d.Cost[i]) || d.Cost[i] < 0 || math.Abs(d.Minutes[i]) > MaxArrivalWindow.Minutes() {
			return inputErrorf("DelayCost", "point %d (%v min, %v kg): want finite minutes within %g of the schedule and a finite, non-negative cost", i+1, d.Minutes[i], d.Cost[i], MaxArrivalWindow.Minutes())
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
// (negative: early). Complexity O(len(points)).
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

// DelayCostError reports a delay-cost file that cannot be used; Line is
// 1-based (0 when not tied to a line), Value the text at fault.
type DelayCostError struct {
	Source string
	Line   int
	Column string
	Value  string
	Msg    string
}

func (e *DelayCostError) Error() string {
	var b strings.Builder
	b.WriteString("delay cost " + e.Source)
	if e.Line > 0 {
		fmt.Fprintf(&b, " line %d", e.Line)
	}
	if e.Column != "" {
		b.WriteString(", column " + e.Column)
	}
	if e.Value != "" {
		fmt.Fprintf(&b, ", value %q", e.Value)
	}
	return b.String() + ": " + e.Msg
}

// DelayCostHeader is the header line of a delay-cost file.
const DelayCostHeader = "minutes_late,cost_kg"

// maxDelayFile bounds a delay-cost file read into memory.
const maxDelayFile = 1 << 16

// ParseDelayCost reads a delay-cost file (source names it in errors): a
// CSV whose first line other than comments ('#') is the header
// "minutes_late,cost_kg", then one point a line: minutes after the
// scheduled arrival (negative: early), strictly increasing, and the cost
// in kg of fuel-equivalent, finite, non-negative and non-decreasing with
// lateness. For example:
//
//	# no cost in the first 15 minutes, then 100 kg a minute
//	minutes_late,cost_kg
//	0,0
//	15,0
//	60,4500
//
// An error is a *DelayCostError naming the line, column and value.
// Complexity O(len(data)).
func ParseDelayCost(data []byte, source string) (DelayCost, error) {
	var d DelayCost
	fail := func(line int, col, val, format string, args ...any) (DelayCost, error) {
		if len(val) > 40 {
			val = val[:40] + "..."
		}
		return DelayCost{}, &DelayCostError{Source: source, Line: line, Column: col, Value: val, Msg: fmt.Sprintf(format, args...)}
	}
	if len(data) > maxDelayFile {
		return fail(0, "", "", "%d bytes, more than the %d allowed", len(data), maxDelayFile)
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	r.FieldsPerRecord = -1
	r.TrimLeadingSpace = true
	header := true
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return fail(pe.Line, "", "", "malformed CSV: %v", pe.Err)
			}
			return fail(0, "", "", "%v", err)
		}
		line, _ := r.FieldPos(0)
		if header {
			h := strings.ToLower(strings.TrimSpace(strings.TrimPrefix(strings.Join(rec, ","), "\ufeff")))
			if strings.ReplaceAll(h, " ", "") != DelayCostHeader {
				return fail(line, "", strings.Join(rec, ","), "want the header %s", DelayCostHeader)
			}
			header = false
			continue
		}
		if len(rec) != 2 {
			return fail(line, "", strings.Join(rec, ","), "%d fields, want 2 (%s)", len(rec), DelayCostHeader)
		}
		var v [2]float64
		for i, col := range []string{"minutes_late", "cost_kg"} {
			s := strings.TrimSpace(rec[i])
			x, err := strconv.ParseFloat(s, 64)
			if err != nil || !finite(x) {
				return fail(line, col, s, "not a finite number")
			}
			v[i] = x
		}
		n := len(d.Minutes)
		switch {
		case n >= MaxDelayPoints:
			return fail(line, "", "", "more than %d points", MaxDelayPoints)
		case math.Abs(v[0]) > MaxArrivalWindow.Minutes():
			return fail(line, "minutes_late", strings.TrimSpace(rec[0]), "want minutes within %g of the scheduled arrival", MaxArrivalWindow.Minutes())
		case v[1] < 0:
			return fail(line, "cost_kg", strings.TrimSpace(rec[1]), "a cost must not be negative")
		case n > 0 && !(v[0] > d.Minutes[n-1]):
			return fail(line, "minutes_late", strings.TrimSpace(rec[0]), "minutes must increase line by line (the line before has %g)", d.Minutes[n-1])
		case n > 0 && v[1] < d.Cost[n-1]:
			return fail(line, "cost_kg", strings.TrimSpace(rec[1]), "the cost must not fall with lateness (the line before has %g at %g min)", d.Cost[n-1], d.Minutes[n-1])
		}
		d.Minutes, d.Cost = append(d.Minutes, v[0]), append(d.Cost, v[1])
	}
	if header {
		return fail(0, "", "", "empty file: want the header %s and one or more points", DelayCostHeader)
	}
	if len(d.Minutes) == 0 {
		return fail(0, "", "", "no points after the header")
	}
	return d, nil
}

// DelayChoice is the plan chosen against a delay cost. It is also the
// plan's Plan.Delay.
type DelayChoice struct {
	Scheduled   time.Time // the scheduled arrival; lateness counts from it
	ValueOfTime float64   // the problem's own CI, kg/min: prices time in the objective
	CI          float64   // the cost index flown, kg/min
	Arrival     time.Time // departure plus trip time
	LateMin     float64   // minutes after the scheduled arrival (negative: early)
	DelayCost   float64   // kg fuel-equivalent
	Fuel        float64   // trip fuel, kg
	TimeMin     float64   // trip time, min
	// Total is the objective: Fuel + ValueOfTime x TimeMin + DelayCost.
	Total float64
	// MaxCI, Step and Tolerance are the search's (SearchDelayCost, with
	// defaults applied; 0 for SolveDelayCost's list).
	MaxCI, Step, Tolerance float64
	Tries                  int // plans made
}

// delayEval plans cost indices for a delay-cost objective, once each.
type delayEval struct {
	p     *Problem
	sched time.Time
	cost  DelayCost
	price func(*Problem) (*Plan, error)
	seen  map[float64]delayPoint
	tries int
}

type delayPoint struct {
	plan *Plan
	c    DelayChoice
}

func (e *delayEval) at(ci float64) (delayPoint, error) {
	if pt, ok := e.seen[ci]; ok {
		return pt, nil
	}
	if err := CheckCI(ci); err != nil {
		return delayPoint{}, &InputError{Field: "CI", Msg: err.Error()}
	}
	q := *e.p
	q.CI = ci
	e.tries++
	pl, err := e.price(&q)
	if err != nil {
		return delayPoint{}, err
	}
	if !e.sched.After(pl.Depart) { // the departure was taken from the weather
		return delayPoint{}, inputErrorf("DelaySearch.Scheduled", "scheduled arrival %s is not after the departure %s", e.sched.UTC().Format(time.RFC3339), pl.Depart.UTC().Format(time.RFC3339))
	}
	a := arrivalOf(pl)
	late := a.Sub(e.sched).Minutes()
	dc := e.cost.At(late)
	tmin := pl.Totals.Time / 60
	c := DelayChoice{Scheduled: e.sched, ValueOfTime: e.p.CI, CI: ci, Arrival: a, LateMin: late, DelayCost: dc,
		Fuel: pl.Totals.Fuel, TimeMin: tmin, Total: pl.Totals.Fuel + e.p.CI*tmin + dc}
	pt := delayPoint{plan: pl, c: c}
	e.seen[ci] = pt
	return pt, nil
}

// better reports whether a is a better choice than b: a lower total, or
// an equal one at a lower cost index.
func better(a, b delayPoint) bool {
	return a.c.Total < b.c.Total || a.c.Total == b.c.Total && a.c.CI < b.c.CI
}

func newDelayEval(p *Problem, sched time.Time, cost DelayCost, price func(*Problem) (*Plan, error)) (*delayEval, error) {
	if err := cost.Check(); err != nil {
		return nil, err
	}
	if sched.IsZero() {
		return nil, inputErrorf("DelaySearch.Scheduled", "no scheduled arrival given")
	}
	if !p.Depart.IsZero() && !sched.After(p.Depart) {
		return nil, inputErrorf("DelaySearch.Scheduled", "scheduled arrival %s is not after the departure %s", sched.UTC().Format(time.RFC3339), p.Depart.UTC().Format(time.RFC3339))
	}
	if p.Speed.Kind != SpeedEcon {
		return nil, inputErrorf("Speed", "a delay cost needs the econ speed policy: with %s the cost index does not set the speed", p.Speed)
	}
	if err := CheckCI(p.CI); err != nil {
		return nil, &InputError{Field: "CI", Msg: err.Error()}
	}
	if price == nil {
		price = Solve
	}
	return &delayEval{p: p, sched: sched, cost: cost, price: price, seen: map[float64]delayPoint{}}, nil
}

func (e *delayEval) finish(best delayPoint) (*Plan, DelayChoice) {
	best.c.Tries = e.tries
	c := best.c
	best.plan.Delay = &c
	return best.plan, c
}

// SolveDelayCost plans the flight at each cost index in cis and returns
// the plan whose objective, fuel_kg + p.CI x time_min + the delay cost
// of its arrival against sched, is least (Cook, Tanner, Williams and
// Meise, "Dynamic cost indexing", J. Air Transport Management 15 (2009):
// delay costs are non-linear, so the cost index that serves best depends
// on how late the flight is). The plan's own CI prices time in its
// search; p.CI, the operator's value of time, prices it in the
// objective. Every candidate is planned (a brute force over the list);
// cis must be non-empty. Ties go to the lower CI, whatever the order of
// cis. Arrival is departure plus trip time.
//
// Complexity: len(cis) plans.
func SolveDelayCost(p *Problem, sched time.Time, cost DelayCost, cis []float64) (*Plan, DelayChoice, error) {
	e, err := newDelayEval(p, sched, cost, nil)
	if err != nil {
		return nil, DelayChoice{}, err
	}
	if len(cis) == 0 {
		return nil, DelayChoice{}, inputErrorf("DelayCost", "no cost indices to try")
	}
	var best delayPoint
	for i, ci := range cis {
		pt, err := e.at(ci)
		if err != nil {
			return nil, DelayChoice{}, err
		}
		if i == 0 || better(pt, best) {
			best = pt
		}
	}
	pl, c := e.finish(best)
	return pl, c, nil
}

// DelaySearch asks SearchDelayCost to choose the cost index against a
// delay cost.
type DelaySearch struct {
	Scheduled time.Time // the scheduled arrival; minutes late count from it
	Cost      DelayCost
	// MaxCI is the highest cost index tried, kg/min (0:
	// DefaultArrivalMaxCI).
	MaxCI float64
	// Step is the spacing of the first grid, kg/min (0: DefaultDelayStep).
	Step float64
	// Tolerance is the resolution of the refinement, kg/min (0:
	// DefaultArrivalTolerance).
	Tolerance float64
	// Price plans the problem at one cost index (nil: Solve).
	Price func(*Problem) (*Plan, error)
}

// DefaultDelayStep is the default grid spacing of SearchDelayCost, kg/min.
const DefaultDelayStep = 16.0

// SearchDelayCost chooses the cost index whose plan has the least
// objective fuel_kg + p.CI x time_min + delay cost (see SolveDelayCost)
// without planning every cost index: it plans a grid 0, Step, 2 Step, ...
// and MaxCI, takes the best point, and refines it by compass search
// (Kolda, Lewis and Torczon, "Optimization by direct search", SIAM Review
// 45 (2003), section 3: poll the two neighbours at distance h, move to a
// better one, else halve h), with h = Step/2, Step/4, ... down to
// Tolerance, starting again from h = Step/2 after each move. The
// objective is not unimodal in CI (profiles are discrete and a delay
// cost can have kinks), so the result is a local minimum: its total is
// no greater than that of every grid point and of its neighbours at
// distances Step/2, Step/4, ..., Tolerance inside [0, MaxCI]. Ties go to
// the lower CI.
//
// Complexity: MaxCI/Step + 2 plans for the grid and about
// 2 log2(Step/Tolerance) for each move of the refinement.
func SearchDelayCost(p *Problem, s DelaySearch) (*Plan, DelayChoice, error) {
	e, err := newDelayEval(p, s.Scheduled, s.Cost, s.Price)
	if err != nil {
		return nil, DelayChoice{}, err
	}
	maxCI, step, tol := s.MaxCI, s.Step, s.Tolerance
	if maxCI == 0 {
		maxCI = DefaultArrivalMaxCI
	}
	if step == 0 {
		step = DefaultDelayStep
	}
	if tol == 0 {
		tol = DefaultArrivalTolerance
	}
	if err := CheckCI(maxCI); err != nil || maxCI == 0 {
		return nil, DelayChoice{}, inputErrorf("DelaySearch.MaxCI", "%v kg/min: want a positive cost index up to %g", maxCI, MaxCI)
	}
	if !(step > 0 && step <= maxCI) || maxCI/step > 10000 {
		return nil, DelayChoice{}, inputErrorf("DelaySearch.Step", "%v kg/min: want a spacing in (0, MaxCI] giving at most 10,000 grid points", step)
	}
	if !(tol > 0 && tol <= step) {
		return nil, DelayChoice{}, inputErrorf("DelaySearch.Tolerance", "%v kg/min: want a resolution in (0, Step]", tol)
	}
	grid := []float64{}
	for i := 0; float64(i)*step < maxCI; i++ {
		grid = append(grid, float64(i)*step)
	}
	grid = append(grid, maxCI)
	var best delayPoint
	for i, ci := range grid {
		pt, err := e.at(ci)
		if err != nil {
			return nil, DelayChoice{}, err
		}
		if i == 0 || better(pt, best) {
			best = pt
		}
	}
	for h := step / 2; ; {
		if h < tol {
			h = tol
		}
		moved := false
		for _, ci := range []float64{best.c.CI - h, best.c.CI + h} {
			if ci < 0 || ci > maxCI {
				continue
			}
			pt, err := e.at(ci)
			if err != nil {
				return nil, DelayChoice{}, err
			}
			if better(pt, best) {
				best, moved = pt, true
			}
		}
		switch {
		case moved:
			h = step / 2
		case h == tol:
			pl, c := e.finish(best)
			c.MaxCI, c.Step, c.Tolerance = maxCI, step, tol
			pl.Delay = &c
			return pl, c, nil
		default:
			h /= 2
		}
	}
}
