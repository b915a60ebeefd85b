package optimizer

import (
	"fmt"
	"math"
	"strings"
	"time"
)

// LimitArrival is the violation of a plan that cannot arrive inside the
// arrival window it was asked for (SolveArriveBy); By is in minutes.
const LimitArrival Limit = "arrival-window"

// Defaults of the arrival and delay-cost searches.
const (
	// DefaultArrivalMaxCI is the highest cost index the searches try,
	// kg/min: the "fastest allowed speed" of their reports.
	DefaultArrivalMaxCI = 500.0
	// DefaultArrivalTolerance is their cost-index resolution, kg/min.
	DefaultArrivalTolerance = 1.0
	// MaxArrivalWindow bounds each end of an arrival window.
	MaxArrivalWindow = 24 * time.Hour
)

// ArrivalTarget asks for an arrival inside a window around a time: from
// At+Early to At+Late (Early is usually negative or zero: "-5m,+10m").
type ArrivalTarget struct {
	At          time.Time
	Early, Late time.Duration
	// MaxCI is the highest cost index tried, kg/min (0:
	// DefaultArrivalMaxCI).
	MaxCI float64
	// Tolerance is the cost-index resolution of the search, kg/min (0:
	// DefaultArrivalTolerance).
	Tolerance float64
	// Price plans the problem at one cost index (nil: Solve). A caller
	// passes PlanFuel for a fuel plan, or SolveContext with its context.
	Price func(*Problem) (*Plan, error)
}

// ArrivalBound is the arrival of the plan at one end of the cost-index
// range: CI 0 (the slowest the speed policy flies) or MaxCI (the fastest
// tried).
type ArrivalBound struct {
	CI      float64
	Arrival time.Time
	// Miss is how far the arrival lies outside the window: positive
	// after it closes, negative before it opens, 0 inside.
	Miss time.Duration
}

// ArrivalResult says how a target was met. It is also the plan's
// Plan.Arrival.
type ArrivalResult struct {
	At          time.Time     // the target
	Early, Late time.Duration // the window, relative to At
	BaseCI      float64       // the problem's own cost index, kg/min: the operator's value of time
	MaxCI       float64       // the highest cost index tried, kg/min (default applied)
	Tolerance   float64       // the resolution, kg/min (default applied)
	CI          float64       // the cost index chosen, kg/min
	Arrival     time.Time     // of the plan returned: departure plus trip time
	Met         bool          // the arrival lies in the window
	// Miss is how far the arrival lies outside the window (0 when met):
	// positive when late, negative when early.
	Miss time.Duration
	// Slowest and Fastest are the arrivals at CI 0 and at MaxCI, filled
	// when the window cannot be met (nil otherwise).
	Slowest, Fastest *ArrivalBound
	Tries            int // plans made
}

// Opens and Closes return the ends of the window.
func (r *ArrivalResult) Opens() time.Time  { return r.At.Add(r.Early) }
func (r *ArrivalResult) Closes() time.Time { return r.At.Add(r.Late) }

// Margins return how long after the window opens and before it closes
// the plan arrives (both non-negative when the target is met).
func (r *ArrivalResult) Margins() (afterOpen, beforeClose time.Duration) {
	return r.Arrival.Sub(r.Opens()), r.Closes().Sub(r.Arrival)
}

// miss returns how far a lies outside [open, close]: positive late,
// negative early, 0 inside.
func miss(a, open, close time.Time) time.Duration {
	switch {
	case a.After(close):
		return a.Sub(close)
	case a.Before(open):
		return a.Sub(open)
	}
	return 0
}

// arrivalOf is the plan's arrival time: departure plus trip time (from
// the start of the climb to the end of the final descent; taxi is not
// modelled).
func arrivalOf(pl *Plan) time.Time {
	return pl.Depart.Add(time.Duration(math.Round(pl.Totals.Time * float64(time.Second))))
}

// ParseArrivalWindow reads an arrival window "EARLY,LATE" of two Go
// durations relative to the target, such as "-5m,+10m" or "-1h,0m"
// (';' may stand for ',' so that a schedule cell needs no quotes). EARLY
// must not be after LATE, and each must lie within MaxArrivalWindow.
func ParseArrivalWindow(s string) (early, late time.Duration, err error) {
	a, b, ok := strings.Cut(strings.ReplaceAll(s, ";", ","), ",")
	if !ok || strings.Contains(b, ",") {
		return 0, 0, fmt.Errorf("arrival window %q: want EARLY,LATE such as -5m,+10m", s)
	}
	if early, err = time.ParseDuration(strings.TrimSpace(a)); err != nil {
		return 0, 0, fmt.Errorf("arrival window %q: early end %q is not a duration such as -5m", s, strings.TrimSpace(a))
	}
	if late, err = time.ParseDuration(strings.TrimSpace(b)); err != nil {
		return 0, 0, fmt.Errorf("arrival window %q: late end %q is not a duration such as +10m", s, strings.TrimSpace(b))
	}
	if err := checkWindow(early, late); err != nil {
		return 0, 0, fmt.Errorf("arrival window %q: %v", s, err)
	}
	return early, late, nil
}

func checkWindow(early, late time.Duration) error {
	if early > late {
		return fmt.Errorf("its ends are reversed: the early end %v is after the late end %v", early, late)
	}
	if early < -MaxArrivalWindow || late > MaxArrivalWindow {
		return fmt.Errorf("each end must lie within %v of the target", MaxArrivalWindow)
	}
	return nil
}

// resolve checks the target against p and fills the defaults.
func (t ArrivalTarget) resolve(p *Problem) (ArrivalTarget, error) {
	if t.At.IsZero() {
		return t, inputErrorf("ArrivalTarget.At", "no arrival time given")
	}
	if err := checkWindow(t.Early, t.Late); err != nil {
		return t, inputErrorf("ArrivalTarget", "window %v,%v: %v", t.Early, t.Late, err)
	}
	if !p.Depart.IsZero() && !t.At.After(p.Depart) {
		return t, inputErrorf("ArrivalTarget.At", "arrival %s is not after the departure %s", t.At.UTC().Format(time.RFC3339), p.Depart.UTC().Format(time.RFC3339))
	}
	if p.Speed.Kind != SpeedEcon {
		return t, inputErrorf("Speed", "an arrival target needs the econ speed policy: with %s the cost index does not set the speed", p.Speed)
	}
	if t.MaxCI == 0 {
		t.MaxCI = DefaultArrivalMaxCI
	}
	if err := CheckCI(t.MaxCI); err != nil || t.MaxCI == 0 {
		return t, inputErrorf("ArrivalTarget.MaxCI", "%v kg/min: want a positive cost index up to %g", t.MaxCI, MaxCI)
	}
	if t.Tolerance == 0 {
		t.Tolerance = DefaultArrivalTolerance
	}
	if !(t.Tolerance > 0 && t.Tolerance <= t.MaxCI) {
		return t, inputErrorf("ArrivalTarget.Tolerance", "%v kg/min must be positive and at most MaxCI", t.Tolerance)
	}
	if t.Price == nil {
		t.Price = Solve
	}
	return t, nil
}

// SolveArriveBy finds the least-cost cost index whose plan arrives inside
// the target window and returns that plan, with the result in
// Plan.Arrival.
//
// The fuel burnt rises and the trip time falls as the cost index rises
// (the cost index prices time against fuel), so arrival is a
// non-increasing function of CI: a step function, since profiles are
// discrete, but monotone, which makes the search a bracket-and-bisect on
// CI (the bisection method: Press, Teukolsky, Vetterling and Flannery,
// Numerical Recipes, 3rd ed., 2007, section 9.1, applied to the sign of
// "late" rather than of a continuous function). The CIs whose arrival
// lies in the window form an interval [cLate, cEarly]; the plan at the
// problem's own CI p.CI is the least-cost plan at that value of time, so
// the least-cost plan in the window is the one at p.CI clamped to that
// interval:
//
//   - p.CI in the window: that plan (one plan made);
//   - p.CI late: bisection on [p.CI, MaxCI] for the least CI not late,
//     keeping the upper end on time;
//   - p.CI early: bisection on [0, p.CI] for the greatest CI not early,
//     keeping the lower end not early.
//
// The bracket is halved, on the grid of multiples of Tolerance from its
// start, until it is no wider than Tolerance. When even
// MaxCI is late, or even CI 0 is early (nothing in the speed policy flies
// slower), or one step between profiles jumps over the whole window, the
// window cannot be met: the plan returned is the one closest to the
// window on the early side (or at MaxCI when all are late), the result
// says Met false and by how much it misses, with the arrivals at CI 0 and
// at MaxCI, and the plan carries a LimitArrival violation, so that its
// status is "violations". Those are results, not errors; errors are an
// input that cannot be planned (no target, reversed window, a target not
// after the departure, a speed policy other than econ) and the planner's
// own.
//
// Arrival is departure plus trip time (Totals.Time: from the start of the
// climb to the end of the final descent; taxi is not modelled).
//
// Complexity: 1 + ceil(log2(MaxCI/Tolerance)) + 2 plans at most, each a
// full call of the target's Price (Solve by default).
func SolveArriveBy(p *Problem, target ArrivalTarget) (*Plan, ArrivalResult, error) {
	t, err := target.resolve(p)
	res := ArrivalResult{At: t.At, Early: t.Early, Late: t.Late, BaseCI: p.CI, MaxCI: t.MaxCI, Tolerance: t.Tolerance}
	if err != nil {
		return nil, res, err
	}
	if err := CheckCI(p.CI); err != nil {
		return nil, res, &InputError{Field: "CI", Msg: err.Error()}
	}
	open, close := res.Opens(), res.Closes()
	plans := map[float64]*Plan{}
	solveAt := func(ci float64) (*Plan, error) {
		if pl, ok := plans[ci]; ok {
			return pl, nil
		}
		q := *p
		q.CI = ci
		res.Tries++
		pl, err := t.Price(&q)
		if err != nil {
			return nil, err
		}
		if !t.At.After(pl.Depart) { // the departure was taken from the weather
			return nil, inputErrorf("ArrivalTarget.At", "arrival %s is not after the departure %s", t.At.UTC().Format(time.RFC3339), pl.Depart.UTC().Format(time.RFC3339))
		}
		plans[ci] = pl
		return pl, nil
	}
	late := func(pl *Plan) bool { return arrivalOf(pl).After(close) }
	early := func(pl *Plan) bool { return arrivalOf(pl).Before(open) }

	base := p.CI
	if base > t.MaxCI {
		res.MaxCI = base // the problem's own CI is tried whatever the bound
	}
	pl, err := solveAt(base)
	if err != nil {
		return nil, res, err
	}
	ci := base
	switch {
	case late(pl) && base < res.MaxCI:
		hi, err := solveAt(res.MaxCI)
		if err != nil {
			return nil, res, err
		}
		if late(hi) {
			pl, ci = hi, res.MaxCI
			break
		}
		// Invariant: the plan at lo is late, the plan at ci (pl) is not.
		lo := base
		pl, ci = hi, res.MaxCI
		for ci-lo > t.Tolerance {
			mid := midCI(lo, ci, t.Tolerance)
			m, err := solveAt(mid)
			if err != nil {
				return nil, res, err
			}
			if late(m) {
				lo = mid
			} else {
				pl, ci = m, mid
			}
		}
	case early(pl) && base > 0:
		lo, err := solveAt(0)
		if err != nil {
			return nil, res, err
		}
		if early(lo) {
			pl, ci = lo, 0
			break
		}
		// Invariant: the plan at ci (pl) is not early, the plan at hi is;
		// hiPlan is kept in case pl is late (a step jumped the window).
		hi, hiPlan := base, pl
		pl, ci = lo, 0
		for hi-ci > t.Tolerance {
			mid := midCI(ci, hi, t.Tolerance)
			m, err := solveAt(mid)
			if err != nil {
				return nil, res, err
			}
			if early(m) {
				hi, hiPlan = mid, m
			} else {
				pl, ci = m, mid
			}
		}
		if late(pl) { // no CI lands inside: prefer the early side
			pl, ci = hiPlan, hi
		}
	}
	a := arrivalOf(pl)
	res.CI, res.Arrival, res.Miss = ci, a, miss(a, open, close)
	res.Met = res.Miss == 0
	if !res.Met {
		for _, b := range []struct {
			dst **ArrivalBound
			ci  float64
		}{{&res.Slowest, 0}, {&res.Fastest, res.MaxCI}} {
			bp, err := solveAt(b.ci)
			if err != nil {
				return nil, res, err
			}
			ba := arrivalOf(bp)
			*b.dst = &ArrivalBound{CI: b.ci, Arrival: ba, Miss: miss(ba, open, close)}
		}
	}
	pl.Arrival = &res
	if !res.Met {
		pl.Violations = append(pl.Violations, Violation{Leg: max(len(pl.Legs)-1, 0), Limit: LimitArrival,
			By: math.Abs(res.Miss.Minutes()), Unit: "min", Detail: res.missText()})
	}
	return pl, res, nil
}

// midCI halves the bracket [lo, hi] (hi-lo > tol) on the grid lo + k
// tol, so that the cost indices tried and chosen are whole multiples of
// the tolerance from the bracket's start (whole numbers from an integer
// CI by default).
func midCI(lo, hi, tol float64) float64 {
	return lo + max(math.Floor((hi-lo)/(2*tol)), 1)*tol
}

// missText says why the window cannot be met, with the arrivals at the
// slowest and fastest cost indices.
func (r *ArrivalResult) missText() string {
	side := "after the window closes"
	if r.Miss < 0 {
		side = "before the window opens"
	}
	s := fmt.Sprintf("arrival window %s-%s cannot be met: at cost index %g the flight arrives %s, %.1f min %s",
		r.Opens().UTC().Format("15:04Z"), r.Closes().UTC().Format("15:04Z"), r.CI, r.Arrival.UTC().Format(time.RFC3339), math.Abs(r.Miss.Minutes()), side)
	if r.Slowest != nil && r.Fastest != nil {
		s += fmt.Sprintf(" (slowest, CI %g: %s, %+.1f min; fastest, CI %g: %s, %+.1f min; + late, - early)",
			r.Slowest.CI, r.Slowest.Arrival.UTC().Format("15:04:05Z"), r.Slowest.Miss.Minutes(),
			r.Fastest.CI, r.Fastest.Arrival.UTC().Format("15:04:05Z"), r.Fastest.Miss.Minutes())
	}
	return s
}

// ArrivalError is the error of a plan whose arrival window cannot be met
// (see Plan.ArrivalFailure).
type ArrivalError struct{ Detail string }

func (e *ArrivalError) Error() string { return e.Detail }

// ArrivalFailure returns an *ArrivalError when the plan was made for an
// arrival window it cannot meet, or nil.
func (p *Plan) ArrivalFailure() error {
	if p.Arrival == nil || p.Arrival.Met {
		return nil
	}
	return &ArrivalError{Detail: p.Arrival.missText()}
}
