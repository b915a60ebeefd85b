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
	// MaxChange is the largest level change of one step, in feet
	// (default 4,000).
	MaxChange int
	// AllowDescent permits step descents in cruise.
	AllowDescent bool
	// MinDistance is the least distance between the starts of two steps,
	// and from the segment of the top of climb to the first step, metres.
	// Zero means the default, 100 NM (common practice: no steps in quick
	// succession, and no level-off just to step again after the climb);
	// a negative value means no minimum.
	MinDistance float64
	// MaxSteps limits the number of steps (0: no limit; use NoSteps for a
	// constant level).
	MaxSteps int
	// NoSteps forbids every level change in cruise.
	NoSteps bool
}

// TurbulenceRule raises the protection floor where the forecast eddy
// dissipation rate exceeds EDR (m^(2/3)/s); Closed removes the level.
type TurbulenceRule struct {
	EDR    float64
	Floor  float64
	Closed bool
}

// DefaultTurbulence is the default operator table (common practice; ICAO
// Annex 3 severity thresholds, from memory): EDR over 0.20 is moderate and
// raises the floor to 1.5 g, over 0.45 is severe and closes the level.
var DefaultTurbulence = []TurbulenceRule{{EDR: 0.20, Floor: 1.5}, {EDR: 0.45, Closed: true}}

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
	Turbulence []TurbulenceRule // nil: DefaultTurbulence

	// MassBucket is the width of the search's mass buckets, kg (default
	// 0.25 % of MTOW). States at the same boundary and level whose masses
	// fall in one bucket are merged, keeping the cheapest.
	MassBucket float64
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
}

// InputError reports a Problem that cannot be planned because of its
// input: a mass out of limits, weather that does not cover the route, no
// feasible level. Field names the input.
type InputError struct {
	Field string
	Msg   string
}

func (e *InputError) Error() string {
	if e.Field == "" {
		return e.Msg
	}
	return e.Field + ": " + e.Msg
}

func inputErrorf(field, format string, args ...any) error {
	return &InputError{Field: field, Msg: fmt.Sprintf(format, args...)}
}

// IsInputError reports whether err was caused by the problem's input.
func IsInputError(err error) bool {
	var ie *InputError
	var re *winds.RangeError
	return errors.As(err, &ie) || errors.As(err, &re)
}

const fpm300 = 300 * 0.3048 / 60 // 300 ft/min in m/s (common practice)

// normalise checks the problem and fills defaults, returning warnings.
func (p *Problem) normalise() ([]string, error) {
	var warn []string
	if p.Track == nil || len(p.Track.Segments) == 0 {
		return nil, inputErrorf("route", "no route segments")
	}
	if p.Aircraft == nil {
		return nil, inputErrorf("aircraft", "no aircraft")
	}
	a := p.Aircraft
	if p.PerfFactorPct != 0 {
		b, err := a.WithPerfFactor(p.PerfFactorPct)
		if err != nil {
			return nil, &InputError{Field: "perf-factor", Msg: err.Error()}
		}
		p.Aircraft, a = b, b
		warn = append(warn, fmt.Sprintf("performance factor %+.1f %%: every fuel flow of %s multiplied by %.3f", p.PerfFactorPct, a.Name, 1+p.PerfFactorPct/100))
	}
	m := p.TakeoffMass
	if !(m > 0) || math.IsInf(m, 0) {
		return nil, inputErrorf("mass", "take-off mass %v kg is not a positive number", m)
	}
	if err := a.CheckMass(m); err != nil {
		return nil, &InputError{Field: "mass", Msg: err.Error()}
	}
	if m > a.MTOW {
		return nil, inputErrorf("mass", "take-off mass %.0f kg is over MTOW %.0f kg", m, a.MTOW)
	}
	if math.IsNaN(p.CI) || p.CI < 0 || p.CI > 10000 {
		return nil, inputErrorf("ci", "cost index %v kg/min must lie in 0..10000", p.CI)
	}
	if p.Floor == 0 {
		p.Floor = 1.3
	}
	if !(p.Floor >= 1 && p.Floor <= 2.5) {
		return nil, inputErrorf("floor", "protection floor %v g must lie in 1.0..2.5", p.Floor)
	}
	if p.Speed.Kind == SpeedFixed && !(p.Speed.Mach >= 0.3 && p.Speed.Mach <= a.MMO) {
		return nil, inputErrorf("speed", "Mach %.3f is outside 0.30..MMO %.3f", p.Speed.Mach, a.MMO)
	}
	if p.Steps.MaxChange == 0 {
		p.Steps.MaxChange = 4000
	}
	if p.Steps.MaxChange < 1000 || p.Steps.MaxChange > 10000 {
		return nil, inputErrorf("max-step", "largest step %d ft must lie in 1000..10000", p.Steps.MaxChange)
	}
	if p.Steps.MaxSteps < 0 {
		return nil, inputErrorf("steps", "the largest number of steps must not be negative")
	}
	switch d := p.Steps.MinDistance; {
	case d == 0:
		p.Steps.MinDistance = 100 * nmToM
	case d < 0:
		p.Steps.MinDistance = 0
	case math.IsNaN(d) || d > 20000*nmToM:
		return nil, inputErrorf("min-step-nm", "least distance between steps %v m is not usable", d)
	}
	if p.MinFL == 0 {
		p.MinFL = 100
	}
	cert := int(math.Floor(a.CertifiedCeiling/(100*perf.FtToM) + 1e-6)) // pressure altitude to FL
	if p.MaxFL == 0 || p.MaxFL > cert {
		p.MaxFL = cert
	}
	if p.MinFL > p.MaxFL {
		return nil, inputErrorf("levels", "lowest level FL%d is above the highest FL%d", p.MinFL, p.MaxFL)
	}
	if p.Turbulence == nil {
		p.Turbulence = DefaultTurbulence
	}
	if p.MassBucket == 0 {
		p.MassBucket = 0.0025 * a.MTOW
	}
	if !(p.MassBucket > 0) {
		return nil, inputErrorf("mass-bucket", "mass bucket %v kg must be positive", p.MassBucket)
	}
	if p.ClimbSchedule == (perf.Schedule{}) {
		p.ClimbSchedule = bestClimbSchedule(a, p.TakeoffMass, p.CI, p.MaxFL, p.Speed, p.Floor)
	}
	if p.DescentSchedule == (perf.Schedule{}) {
		p.DescentSchedule = perf.DefaultSchedule(a)
	}
	if p.EndAltitude == 0 {
		p.EndAltitude = 1500 * 0.3048
	}
	if p.Depart.IsZero() {
		if p.Weather != nil && len(p.Weather.Times()) > 0 {
			p.Depart = p.Weather.Times()[0]
		} else {
			p.Depart = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
		}
	}
	if !(math.Abs(p.ISADev) <= 60) {
		return nil, inputErrorf("isa-dev", "ISA deviation %v °C must lie in -60..60", p.ISADev)
	}
	if p.Weather != nil && p.Weather.Has(winds.ParamT) && p.ISADev != 0 {
		return nil, inputErrorf("isa-dev", "an ISA deviation applies only where the weather has no temperature; this weather has temperatures")
	}
	if p.Weather == nil {
		warn = append(warn, fmt.Sprintf("no weather given: ISA%+.0f °C and still air assumed", p.ISADev))
	} else {
		if !p.Weather.Has(winds.ParamU) || !p.Weather.Has(winds.ParamV) {
			return nil, inputErrorf("weather", "the weather has no winds aloft (u and v on isobaric levels)")
		}
		if !p.Weather.Has(winds.ParamT) {
			warn = append(warn, fmt.Sprintf("the weather has no temperature: ISA%+.0f °C assumed", p.ISADev))
		}
	}
	return warn, nil
}
