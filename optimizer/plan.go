package optimizer

import (
	"time"

	"levelpath/perf"
)

// Phase names a leg's flight phase.
type Phase string

// Leg phases.
const (
	PhaseClimb   Phase = "climb"   // initial climb from departure to the first cruise level
	PhaseCruise  Phase = "cruise"  // level flight
	PhaseStep    Phase = "step"    // a step climb or descent and the level flight after it in the same segment
	PhaseDescent Phase = "descent" // final descent to the destination
)

// Leg is one priced piece of the profile. Distances are metres from
// departure, times seconds, masses and fuel kilograms, speeds m/s.
type Leg struct {
	Segment   int   // route segment index holding the leg's start
	Phase     Phase // flight phase
	FromDist  float64
	ToDist    float64
	FromFL    float64 // flight level at the leg's start
	FL        float64 // flight level at the leg's end
	Mach      float64 // cruise Mach (or the schedule Mach of a climb or descent)
	TAS       float64 // true airspeed at FL
	WindAlong float64 // along-track wind, tailwind positive
	GS        float64 // ground speed
	ISADev    float64 // K, at FL
	EDR       float64 // eddy dissipation rate at FL, NaN where the weather has none
	Fuel      float64
	Time      float64
	MassStart float64
	// BuffetMargin is CL_buffet/CL at the leg's heaviest point (its
	// start), in g; NaN for climb and descent legs.
	BuffetMargin float64
	// Floor is the protection floor that applied to the leg, in g, and
	// FloorReason why (the problem's floor, or the turbulence rule).
	Floor       float64
	FloorReason string
	// MaxFLBuffet and MaxFLThrust are the buffet-limited and
	// thrust-limited maximum levels at the leg's start mass and
	// temperature (continuous flight levels).
	MaxFLBuffet float64
	MaxFLThrust float64
	// ResidualClimb is the rate of climb at maximum climb thrust at the
	// leg's Mach and start mass, m/s.
	ResidualClimb float64
	// Contrail is a cruise leg's contrail class and RHi the relative
	// humidity over ice it was judged with, % (see classifyContrails);
	// ContrailUnknown and NaN (0 without humidity in the weather) for
	// other legs.
	Contrail ContrailClass
	RHi      float64
}

// Step is a level change that begins at AtDist metres from departure.
type Step struct {
	AtDist float64
	FromFL int
	ToFL   int
}

// Totals sums a profile from brake release at the start of the climb to the
// end of the final descent.
type Totals struct {
	Fuel        float64 // kg
	Time        float64 // s
	Cost        float64 // fuel_kg + CI x time_min
	CO2         float64 // kg, 3.16 x fuel (ICAO)
	LandingMass float64 // kg
}

// Baseline is the best constant-level profile under the same policy.
type Baseline struct {
	FL        int
	Totals    Totals
	SavingPct float64 // (baseline cost - plan cost) / baseline cost x 100
}

// Limit names a kind of limit that a profile can break. Programs that read
// plans should compare against the constants; the strings are the JSON
// values of violations[].limit.
type Limit string

// The limits a Violation can name.
const (
	LimitBuffet      Limit = "buffet"        // buffet margin under the leg's protection floor
	LimitThrust      Limit = "thrust"        // residual climb under 300 ft/min, or drag over maximum cruise thrust
	LimitMachBand    Limit = "mach-band"     // no Mach band at the floor, or the Mach flown outside it
	LimitCertified   Limit = "certified"     // above the highest usable level (certified ceiling or the problem's MaxFL)
	LimitLevelRule   Limit = "level-rule"    // a level the direction-of-flight rule does not allow on the segment
	LimitBlocked     Limit = "blocked"       // a level blocked over that stretch of route
	LimitTurbulence  Limit = "turbulence"    // a level closed by the turbulence rule
	LimitWeather     Limit = "weather"       // a level outside the weather's pressure levels
	LimitStepRule    Limit = "step-rule"     // a step the step rules do not allow
	LimitProfile     Limit = "profile"       // a profile change that could not be flown as written
	LimitClimb       Limit = "climb"         // a climb that cannot be completed to the level asked for
	LimitLandingMass Limit = "landing-mass"  // landing mass over MLW or under OEW
	LimitFuel        Limit = "fuel"          // trip fuel over the fuel on board
	LimitFuelCap     Limit = "fuel-capacity" // fuel over the tanks' capacity
	LimitMTOW        Limit = "mtow"          // take-off mass over MTOW
	LimitMZFW        Limit = "mzfw"          // zero-fuel mass over MZFW
)

// Violation is a limit that a priced profile breaks.
type Violation struct {
	Leg    int     // index into Plan.Legs
	Limit  Limit   // the kind of limit broken
	By     float64 // how far beyond the limit, in Unit
	Unit   string  // "g", "fpm", "ft", "" ...
	Detail string
}

// Policy is the resolved planning policy a plan was made under: the
// problem's inputs after defaults were applied, so that a plan can be
// reproduced and compared with another.
type Policy struct {
	Steps          StepRules
	MinFL, MaxFL   int
	MassBucket     float64 // kg
	Climb, Descent perf.Schedule
	EndAltitude    float64 // m, pressure altitude where the climb starts and the descent ends
	Turbulence     []TurbulenceRule
	Blocked        []Block
}

func policyOf(q *Problem) Policy {
	return Policy{Steps: q.Steps, MinFL: q.MinFL, MaxFL: q.MaxFL, MassBucket: q.MassBucket,
		Climb: q.ClimbSchedule, Descent: q.DescentSchedule, EndAltitude: q.EndAltitude,
		Turbulence: append([]TurbulenceRule(nil), q.Turbulence...), Blocked: append([]Block(nil), q.Blocked...)}
}

// Plan is a priced vertical profile.
type Plan struct {
	// Policy is the resolved policy the plan was made under.
	Policy      Policy
	Aircraft    string
	CI          float64 // kg/min
	Floor       float64 // g
	Speed       string  // policy as given
	Depart      time.Time
	TakeoffMass float64
	Distance    float64 // route length, m
	Profile     Profile // initial level and changes
	Totals      Totals
	Legs        []Leg
	Steps       []Step
	Baseline    *Baseline // nil when no constant level is feasible, or not computed
	// BaselineNote says why Baseline is nil ("no constant level is
	// feasible ...", or "not computed: ...").
	BaselineNote string
	Warnings     []string
	Violations   []Violation // filled by Assess; empty for a Solve result
	// Fuel is the dispatch fuel plan (PlanFuel only; nil otherwise).
	Fuel *FuelPlan
	// Waypoints are the route's points, top of climb, steps and top of
	// descent with time, level and fuel.
	Waypoints []Waypoint
	// SearchCost is the cost the graph search found (Solve only), before
	// the exact re-pricing that fills Totals.
	SearchCost float64
	// Nodes and Edges count the states settled and edges priced by the
	// search (Solve only).
	Nodes, Edges int
	// Alternatives are the next-cheapest distinct profiles, when asked
	// for (see Alternatives); nil otherwise.
	Alternatives []Alternative
	// Contrail sums the cruise legs by contrail class; nil when the
	// weather holds no humidity.
	Contrail *ContrailTotals
	// Arrival is how the plan meets its arrival window (SolveArriveBy);
	// nil when none was asked for.
	Arrival *ArrivalResult
	// Delay is how the plan was chosen against a cost of lateness
	// (SearchDelayCost, SolveDelayCost); nil when none was asked for.
	Delay *DelayChoice
}

// MinMargin returns the least buffet margin over the cruise and step legs,
// or NaN when there is none.
func (p *Plan) MinMargin() float64 {
	m := nan
	for _, l := range p.Legs {
		if l.BuffetMargin == l.BuffetMargin && (m != m || l.BuffetMargin < m) {
			m = l.BuffetMargin
		}
	}
	return m
}
