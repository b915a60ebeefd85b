package optimizer

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
)

// SpeedKind selects how the cruise Mach is chosen on each leg.
type SpeedKind int

// Speed policies.
const (
	// SpeedEcon flies, per leg, the Mach that minimises fuel + CI x time at
	// that leg's mass, temperature and wind, inside the buffet band at the
	// floor and under MMO.
	SpeedEcon SpeedKind = iota
	// SpeedLRC flies the long-range cruise Mach (99 % of maximum specific
	// range, common practice).
	SpeedLRC
	// SpeedFixed flies one Mach throughout.
	SpeedFixed
)

// Speed is a speed policy.
type Speed struct {
	Kind SpeedKind
	Mach float64 // SpeedFixed only
}

// ParseSpeed reads "econ", "lrc" or a Mach number such as "0.82" or "M0.82".
func ParseSpeed(s string) (Speed, error) {
	switch t := strings.ToLower(strings.TrimSpace(s)); t {
	case "econ", "":
		return Speed{Kind: SpeedEcon}, nil
	case "lrc":
		return Speed{Kind: SpeedLRC}, nil
	default:
		m, err := strconv.ParseFloat(strings.TrimPrefix(t, "m"), 64)
		if err != nil || !(m >= 0.3 && m <= 0.95) {
			return Speed{}, fmt.Errorf("speed %q: want econ, lrc or a Mach number between 0.30 and 0.95", s)
		}
		return Speed{Kind: SpeedFixed, Mach: m}, nil
	}
}

func (s Speed) String() string {
	switch s.Kind {
	case SpeedLRC:
		return "lrc"
	case SpeedFixed:
		return strconv.FormatFloat(s.Mach, 'f', 3, 64)
	}
	return "econ"
}

// StepRules constrain level changes in cruise.
type StepRules struct {
	// MaxChange is the largest level change of one step, metres of
	// pressure altitude, 1,000..10,000 ft; zero means the default, 4,000 ft
	// (common practice). Plans work in whole feet: the value is rounded to
	// the nearest foot.
	MaxChange float64
	// AllowDescent permits step descents in cruise.
	AllowDescent bool
	// MinDistance is the least distance between the starts of two steps,
	// and from the segment of the top of climb to the first step, metres.
	// Zero means the default, 100 NM (common practice: no steps in quick
	// succession, and no level-off just to step again after the climb);
	// set NoMinDistance for none. Negative values are refused.
	MinDistance float64
	// NoMinDistance removes the least distance between steps (MinDistance
	// must then be zero).
	NoMinDistance bool
	// MaxSteps limits the number of steps (0: no limit; use NoSteps for a
	// constant level).
	MaxSteps int
	// NoSteps forbids every level change in cruise.
	NoSteps bool
}

// The default step rules (common practice): steps of at most 4,000 ft, at
// least 100 NM apart and from the top of climb.
const (
	DefaultMaxStepFt = 4000
	DefaultMinStepNM = 100
)

// maxChangeFt is MaxChange in whole feet.
func (r StepRules) maxChangeFt() int { return int(math.Round(r.MaxChange / ftToM)) }

// TurbulenceRule raises the protection floor where the forecast eddy
// dissipation rate exceeds EDR (m^(2/3)/s); Closed removes the level.
type TurbulenceRule struct {
	EDR    float64
	Floor  float64
	Closed bool
}

// DefaultTurbulence returns the default operator table (common practice;
// ICAO Annex 3 severity thresholds, from memory): EDR over 0.20 is moderate
// and raises the floor to 1.5 g, over 0.45 is severe and closes the level.
// Each call returns a new slice, so a caller's change affects only its own
// problem.
func DefaultTurbulence() []TurbulenceRule {
	return []TurbulenceRule{{EDR: 0.20, Floor: 1.5}, {EDR: 0.45, Closed: true}}
}

// Block removes levels over a distance range (metres from departure), for
// example airspace that is not available.
type Block struct {
	FromDist, ToDist float64
	Levels           []int
}

// Problem is one flight to plan.
type Problem struct {
	Track    *route.Track   // segments and their allowed levels
	Aircraft *perf.Aircraft // performance model
	Weather  *winds.Field   // nil: ISA and still air (with a warning)
	Depart   time.Time

	TakeoffMass float64 // kg
	// ZFW is the zero-fuel mass, kg (0: unknown); with it Assess flags a
	// trip that burns more than the fuel on board.
	ZFW        float64
	CI         float64 // cost index, kg/min
	Speed      Speed
	Floor      float64 // protection floor, g (default 1.3, common practice)
	Steps      StepRules
	MinFL      int // lowest cruise level considered (default FL100)
	MaxFL      int // highest (default: certified ceiling)
	Blocked    []Block
	Turbulence []TurbulenceRule // nil: DefaultTurbulence()

	// MassBucket is the width of the search's mass buckets, kg (default
	// 0.25 % of MTOW). States at the same boundary and level whose masses
	// fall in one bucket are merged, keeping the cheapest.
	MassBucket float64
	// Exact turns off the search's approximations beyond the mass bucket:
	// by default states that differ only in the segments flown since the
	// last step are merged, keeping the cheapest arrival (its count
	// decides when the next step may start); the default's cost is within
	// 0.02 % of the exact search's on the test instances.
	Exact bool
	// ClimbSchedule and DescentSchedule (zero: perf.DefaultSchedule).
	ClimbSchedule, DescentSchedule perf.Schedule
	// EndAltitude is the pressure altitude where the initial climb begins
	// and the final descent ends, m (default 1,500 ft).
	EndAltitude float64
	// LegCeilings asks the plan's legs to carry the buffet- and
	// thrust-limited maximum levels at their mass (for charts and
	// reports; it costs a few milliseconds a plan).
	LegCeilings bool
	// PerfFactorPct is the per-tail performance factor, percent: every
	// fuel flow is multiplied by 1 + PerfFactorPct/100 (see
	// perf.Aircraft.WithPerfFactor). A non-zero factor is named in the
	// plan's warnings.
	PerfFactorPct float64
	// ISADev is the temperature deviation from ISA, K, used where the
	// weather gives no temperature (no weather: ISA+ISADev and still
	// air). It is an error with a weather that has temperatures. A
	// non-zero value is named in the plan's warnings.
	ISADev float64
	// ContrailCost, kg of fuel equivalent per NM, is added to the
	// search's cost of level cruise where persistent contrails are
	// predicted (Schmidt-Appleman criterion at the engine's propulsion
	// efficiency, and relative humidity over ice at or above
	// ContrailRHiPct): the planner trades fuel for avoided contrail
	// distance by small changes of level, the kind of small-scale
	// altitude diversion Teoh, Schumann, Majumdar and Stettler, Environ.
	// Sci. Technol. 54 (2020) 2941-2950, assessed. 0, the default, plans
	// exactly as without it. It needs weather with humidity; negative or
	// non-finite values are errors. Plans report contrail classes
	// whenever the weather holds humidity (Plan.Contrail).
	ContrailCost float64
	// ContrailRHiPct is the relative humidity over ice at or above which
	// a contrail persists, % (0: DefaultContrailRHi, 100).
	ContrailRHiPct float64
	// Notes are remarks from whoever built the problem (a default it
	// applied, say); they open the plan's warnings.
	Notes []string
}

// InputError reports a Problem that cannot be planned because of its
// input: a mass out of limits, weather that does not cover the route, no
// feasible level. Field is the path of the Problem field at fault, in Go
// names ("TakeoffMass", "Steps.MaxChange", "Weather"), or "" when no one
// field is; Err, when not nil, is the underlying error (a
// *winds.RangeError, say), reachable with errors.As.
type InputError struct {
	Field string
	Msg   string
	Err   error
}

func (e *InputError) Error() string {
	msg := e.Msg
	if msg == "" && e.Err != nil {
		msg = e.Err.Error()
	}
	if e.Field == "" {
		return msg
	}
	return e.Field + ": " + msg
}

// Unwrap returns the underlying error, if any.
func (e *InputError) Unwrap() error { return e.Err }

func inputErrorf(field, format string, args ...any) error {
	err := fmt.Errorf(format, args...)
	return &InputError{Field: field, Msg: err.Error(), Err: errors.Unwrap(err)}
}

// IsInputError reports whether err was caused by the problem's input.
func IsInputError(err error) bool {
	var ie *InputError
	var re *winds.RangeError
	return errors.As(err, &ie) || errors.As(err, &re)
}

// MaxStepsLimit is the largest StepRules.MaxSteps accepted; the search's
// state space grows with it.
const MaxStepsLimit = 60

const fpm300 = 300 * perf.FtToM / 60 // 300 ft/min in m/s (common practice)

// normalise checks the problem and fills defaults, returning warnings.
func (p *Problem) normalise() ([]string, error) {
	warn := append([]string(nil), p.Notes...)
	if p.Track == nil || len(p.Track.Segments) == 0 {
		return nil, inputErrorf("Track", "no route segments")
	}
	if p.Aircraft == nil {
		return nil, inputErrorf("Aircraft", "no aircraft")
	}
	a := p.Aircraft
	if p.PerfFactorPct != 0 {
		b, err := a.WithPerfFactor(p.PerfFactorPct)
		if err != nil {
			return nil, &InputError{Field: "PerfFactorPct", Msg: err.Error()}
		}
		p.Aircraft, a = b, b
		warn = append(warn, fmt.Sprintf("performance factor %+.1f %%: every fuel flow of %s multiplied by %.3f", p.PerfFactorPct, a.Name, 1+p.PerfFactorPct/100))
	}
	if t := a.Tables(); t != nil {
		// Operator tables price every climb, descent and step from their
		// climb and descent tables, on the tables' own schedule.
		s := t.Schedule
		warn = append(warn, fmt.Sprintf("performance from the operator tables %s (format version %d): climbs, descents and steps are priced from their climb and descent tables, on the tables' schedule (%.0f/%.0f kt, Mach %.2f) whatever schedule is asked",
			t.Dir, t.Version, s.CASLow/perf.KtToMS, s.CAS/perf.KtToMS, s.Mach))
	}
	m := p.TakeoffMass
	if !(m > 0) {
		return nil, inputErrorf("TakeoffMass", "take-off mass %v kg is not a positive number", m)
	}
	if _, _, err := (Loading{TakeoffMass: m}).Resolve(a); err != nil {
		return nil, err
	}
	if err := CheckCI(p.CI); err != nil {
		return nil, &InputError{Field: "CI", Msg: err.Error()}
	}
	if p.Floor == 0 {
		p.Floor = DefaultFloor
	}
	if err := CheckFloor(p.Floor); err != nil {
		return nil, &InputError{Field: "Floor", Msg: err.Error()}
	}
	if p.Speed.Kind == SpeedFixed && !(p.Speed.Mach >= 0.3 && p.Speed.Mach <= a.MMO) {
		return nil, inputErrorf("Speed.Mach", "Mach %.3f is outside 0.30..MMO %.3f", p.Speed.Mach, a.MMO)
	}
	if p.Steps.MaxChange == 0 {
		p.Steps.MaxChange = DefaultMaxStepFt * ftToM
	}
	if ft := p.Steps.MaxChange / ftToM; !(ft >= 1000-0.5 && ft <= 10000+0.5) {
		return nil, inputErrorf("Steps.MaxChange", "largest step %v m (%.0f ft) must lie in 1,000..10,000 ft", p.Steps.MaxChange, ft)
	}
	if p.Steps.MaxSteps < 0 || p.Steps.MaxSteps > MaxStepsLimit {
		return nil, inputErrorf("Steps.MaxSteps", "the largest number of steps %d must lie in 0..%d", p.Steps.MaxSteps, MaxStepsLimit)
	}
	switch d := p.Steps.MinDistance; {
	case p.Steps.NoMinDistance && d != 0:
		return nil, inputErrorf("Steps.MinDistance", "least distance between steps %v m given with NoMinDistance", d)
	case p.Steps.NoMinDistance:
	case d == 0:
		p.Steps.MinDistance = DefaultMinStepNM * nmToM
	case !(d > 0) || d > 20000*nmToM:
		return nil, inputErrorf("Steps.MinDistance", "least distance between steps %v m must lie in 0..20,000 NM (NoMinDistance for none)", d)
	}
	if p.MinFL == 0 {
		p.MinFL = 100
	}
	cert := int(math.Floor(a.CertifiedCeiling/(100*perf.FtToM) + 1e-6)) // pressure altitude to FL
	if p.MaxFL == 0 || p.MaxFL > cert {
		p.MaxFL = cert
	}
	if p.MinFL > p.MaxFL {
		return nil, inputErrorf("MinFL", "lowest level FL%d is above the highest FL%d", p.MinFL, p.MaxFL)
	}
	if p.Turbulence == nil {
		p.Turbulence = DefaultTurbulence()
	}
	if p.MassBucket == 0 {
		p.MassBucket = 0.0025 * a.MTOW
	}
	if !(p.MassBucket > 0) {
		return nil, inputErrorf("MassBucket", "mass bucket %v kg must be positive", p.MassBucket)
	}
	if p.EndAltitude == 0 {
		p.EndAltitude = 1500 * perf.FtToM
	}
	if !(p.EndAltitude > 0 && p.EndAltitude <= 10000*perf.FtToM) {
		return nil, inputErrorf("EndAltitude", "%v m: the climb starts and the descent ends between 0 and 10,000 ft", p.EndAltitude)
	}
	if err := a.CheckTransitionLevel(perf.PressureToFL(perf.PressureAt(p.EndAltitude))); err != nil {
		// Operator tables only: never extrapolated (perf/tableperf.go).
		return nil, inputErrorf("EndAltitude", "the climb starts and the descent ends at %.0f ft: %w", p.EndAltitude/perf.FtToM, err)
	}
	if p.ClimbSchedule == (perf.Schedule{}) {
		if a.Tables() != nil {
			p.ClimbSchedule = perf.DefaultSchedule(a) // the tables' own: no choice to make
		} else {
			p.ClimbSchedule = bestClimbSchedule(a, p.TakeoffMass, p.CI, p.MaxFL, p.Speed, p.Floor, p.EndAltitude)
		}
	}
	if p.DescentSchedule == (perf.Schedule{}) {
		p.DescentSchedule = perf.DefaultSchedule(a)
	}
	switch {
	case !p.Depart.IsZero():
	case p.Weather == nil || len(p.Weather.Times()) == 0:
		// Still air does not depend on the time: the plan keeps the zero
		// time, and its times of passage count from it.
		warn = append(warn, "no departure time given: times count from the zero time")
	default:
		p.Depart = p.Weather.Times()[0]
		warn = append(warn, "no departure time given: the weather's first valid time "+p.Depart.UTC().Format(time.RFC3339)+" assumed")
	}
	if !(math.Abs(p.ISADev) <= 60) {
		return nil, inputErrorf("ISADev", "ISA deviation %v °C must lie in -60..60", p.ISADev)
	}
	if p.Weather != nil && p.Weather.Has(winds.ParamT) && p.ISADev != 0 {
		return nil, inputErrorf("ISADev", "an ISA deviation applies only where the weather has no temperature; this weather has temperatures")
	}
	if p.Weather == nil {
		warn = append(warn, fmt.Sprintf("no weather given: ISA%+.0f °C and still air assumed", p.ISADev))
	} else {
		if !p.Weather.Has(winds.ParamU) || !p.Weather.Has(winds.ParamV) {
			return nil, inputErrorf("Weather", "the weather has no winds aloft (u and v on isobaric levels)")
		}
		if !p.Weather.Has(winds.ParamT) {
			warn = append(warn, fmt.Sprintf("the weather has no temperature: ISA%+.0f °C assumed", p.ISADev))
		}
		for _, w := range p.Weather.Warnings() {
			warn = append(warn, "weather: "+w.String())
		}
	}
	if err := p.checkContrail(); err != nil {
		return nil, err
	}
	return warn, nil
}
