// Package planjson renders optimizer plans for people and programs: the
// JSON document (snake_case fields with their unit as suffix), a CSV of
// the legs and the dispatcher's table. Every form carries the caution.
package planjson

import (
	"encoding/json"
	"io"
	"math"
	"time"

	"levelpath/optimizer"
	"levelpath/perf"
)

// Trade units at the edge (perf holds the definitions).
const (
	mPerNM   = perf.NMToM
	msPerKt  = perf.KtToMS
	fpmPerMS = 60 / perf.FtToM
)

// Doc is the JSON form of a plan.
type Doc struct {
	Caution       string      `json:"caution"`
	Status        string      `json:"status"`
	Aircraft      string      `json:"aircraft"`
	CI            float64     `json:"ci"`
	FloorG        float64     `json:"floor_g"`
	Speed         string      `json:"speed"`
	Depart        string      `json:"depart"`
	TakeoffMassKg float64     `json:"takeoff_mass_kg"`
	DistanceNM    float64     `json:"distance_nm"`
	Profile       string      `json:"profile"`
	InitialFL     int         `json:"initial_fl"`
	MinMarginG    *float64    `json:"min_margin_g"`
	Totals        Totals      `json:"totals"`
	Baseline      *Baseline   `json:"baseline"`
	BaselineNote  string      `json:"baseline_note,omitempty"`
	Steps         []Step      `json:"steps"`
	Legs          []Leg       `json:"legs"`
	Warnings      []string    `json:"warnings"`
	Violations    []Violation `json:"violations"`
	Fuel          *Fuel       `json:"fuel,omitempty"`
	Waypoints     []Waypoint  `json:"waypoints"`
	SearchCost    *float64    `json:"search_cost,omitempty"`
	SearchNodes   int         `json:"search_nodes,omitempty"`
	SearchEdges   int         `json:"search_edges,omitempty"`
	Assessed      bool        `json:"assessed"`
	// Alternatives are present when they were asked for (plan
	// --alternatives K).
	Alternatives []Alternative `json:"alternatives,omitempty"`
	// Arrival is present for a plan made for an arrival window (plan
	// --arrive-by), Delay for one chosen against a delay cost (plan
	// --delay-cost).
	Arrival *Arrival `json:"arrival,omitempty"`
	Delay   *Delay   `json:"delay_cost,omitempty"`
	// Policy is the resolved policy the plan was made under.
	Policy Policy `json:"policy"`
	// Contrail sums the cruise legs by contrail class; present when the
	// weather holds humidity.
	Contrail *Contrail `json:"contrail,omitempty"`
}

// Contrail is the plan's contrail summary (optimizer.ContrailTotals).
type Contrail struct {
	Caution           string  `json:"caution"`
	PersistentNM      float64 `json:"persistent_contrail_nm"`
	PersistentDayNM   float64 `json:"persistent_contrail_day_nm"`
	PersistentNightNM float64 `json:"persistent_contrail_night_nm"`
	ShortLivedNM      float64 `json:"short_lived_contrail_nm"`
	UnclassifiedNM    float64 `json:"unclassified_nm"`
	CostPerNMKg       float64 `json:"contrail_cost_kg_per_nm"`
	CostKg            float64 `json:"contrail_cost_kg"`
	RHiThresholdPct   float64 `json:"rhi_threshold_pct"`
}

// Policy is the resolved planning policy (defaults applied).
type Policy struct {
	MaxStepFt       float64          `json:"max_step_ft"`
	StepDescents    bool             `json:"step_descents"`
	MinStepNM       float64          `json:"min_step_nm"`
	MaxSteps        int              `json:"max_steps"`
	NoSteps         bool             `json:"no_steps"`
	MinFL           int              `json:"min_fl"`
	MaxFL           int              `json:"max_fl"`
	MassBucketKg    float64          `json:"mass_bucket_kg"`
	ClimbCASLowKt   float64          `json:"climb_cas_low_kt"`
	ClimbCASKt      float64          `json:"climb_cas_kt"`
	ClimbMach       float64          `json:"climb_mach"`
	DescentCASLowKt float64          `json:"descent_cas_low_kt"`
	DescentCASKt    float64          `json:"descent_cas_kt"`
	DescentMach     float64          `json:"descent_mach"`
	EndAltitudeFt   float64          `json:"end_altitude_ft"`
	Turbulence      []TurbulenceRule `json:"turbulence"`
	BlockedLevels   []BlockedLevels  `json:"blocked"`
}

// TurbulenceRule is one row of the turbulence table.
type TurbulenceRule struct {
	EDR    float64  `json:"edr"`
	FloorG *float64 `json:"floor_g"`
	Closed bool     `json:"closed"`
}

// BlockedLevels are levels unavailable over a stretch of route.
type BlockedLevels struct {
	FromNM float64 `json:"from_nm"`
	ToNM   float64 `json:"to_nm"`
	Levels []int   `json:"levels"`
}

func policy(p optimizer.Policy) Policy {
	d := Policy{MaxStepFt: math.Round(p.Steps.MaxChange / perf.FtToM), StepDescents: p.Steps.AllowDescent, MinStepNM: p.Steps.MinDistance / mPerNM,
		MaxSteps: p.Steps.MaxSteps, NoSteps: p.Steps.NoSteps, MinFL: p.MinFL, MaxFL: p.MaxFL, MassBucketKg: p.MassBucket,
		ClimbCASLowKt: p.Climb.CASLow / msPerKt, ClimbCASKt: p.Climb.CAS / msPerKt, ClimbMach: p.Climb.Mach,
		DescentCASLowKt: p.Descent.CASLow / msPerKt, DescentCASKt: p.Descent.CAS / msPerKt, DescentMach: p.Descent.Mach,
		EndAltitudeFt: p.EndAltitude / perf.FtToM, Turbulence: []TurbulenceRule{}, BlockedLevels: []BlockedLevels{}}
	for _, r := range p.Turbulence {
		t := TurbulenceRule{EDR: r.EDR, Closed: r.Closed}
		if !r.Closed {
			t.FloorG = Number(r.Floor)
		}
		d.Turbulence = append(d.Turbulence, t)
	}
	for _, b := range p.Blocked {
		d.BlockedLevels = append(d.BlockedLevels, BlockedLevels{FromNM: b.FromDist / mPerNM, ToNM: b.ToDist / mPerNM, Levels: append([]int{}, b.Levels...)})
	}
	return d
}

// Alternative is one of the next-cheapest distinct profiles.
type Alternative struct {
	Profile     string   `json:"profile"`
	CostDelta   float64  `json:"cost_delta"`
	FuelKg      float64  `json:"fuel_kg"`
	TimeMin     float64  `json:"time_min"`
	Cost        float64  `json:"cost"`
	MinMarginG  *float64 `json:"min_margin_g"`
	InitialFL   int      `json:"initial_fl"`
	StepsCount  int      `json:"steps"`
	LandingMass float64  `json:"landing_mass_kg"`
}

// Totals sums the flight.
type Totals struct {
	FuelKg        float64 `json:"fuel_kg"`
	TimeMin       float64 `json:"time_min"`
	Cost          float64 `json:"cost"`
	CO2Kg         float64 `json:"co2_kg"`
	LandingMassKg float64 `json:"landing_mass_kg"`
}

// Baseline is the best constant-level profile.
type Baseline struct {
	FL        int     `json:"fl"`
	FuelKg    float64 `json:"fuel_kg"`
	TimeMin   float64 `json:"time_min"`
	Cost      float64 `json:"cost"`
	SavingPct float64 `json:"saving_pct"`
}

// Step is a level change.
type Step struct {
	AtNM   float64 `json:"at_nm"`
	FromFL int     `json:"from_fl"`
	ToFL   int     `json:"to_fl"`
}

// Leg is one priced leg.
type Leg struct {
	Segment          int      `json:"segment"`
	FromNM           float64  `json:"from_nm"`
	ToNM             float64  `json:"to_nm"`
	Phase            string   `json:"phase"`
	FromFL           float64  `json:"from_fl"`
	FL               float64  `json:"fl"`
	Mach             float64  `json:"mach"`
	TASKt            float64  `json:"tas_kt"`
	WindKt           float64  `json:"wind_kt"`
	GSKt             float64  `json:"gs_kt"`
	ISADevC          float64  `json:"isa_dev_c"`
	EDR              *float64 `json:"edr"`
	FuelKg           float64  `json:"fuel_kg"`
	TimeMin          float64  `json:"time_min"`
	MassStartKg      float64  `json:"mass_start_kg"`
	BuffetMarginG    *float64 `json:"buffet_margin_g"`
	FloorG           float64  `json:"floor_g"`
	FloorReason      string   `json:"floor_reason"`
	ResidualClimbFPM *float64 `json:"residual_climb_fpm"`
	MaxFLBuffet      *float64 `json:"max_fl_buffet"`
	MaxFLThrust      *float64 `json:"max_fl_thrust"`
	// Contrail is a cruise leg's contrail class (none, short-lived,
	// persistent) and RHiPct the relative humidity over ice it was
	// judged with; both absent where not classified.
	Contrail string   `json:"contrail,omitempty"`
	RHiPct   *float64 `json:"rhi_pct,omitempty"`
}

// Violation is a limit broken by an assessed profile.
type Violation struct {
	Leg    int     `json:"leg"`
	Limit  string  `json:"limit"`
	By     float64 `json:"by"`
	Unit   string  `json:"unit"`
	Detail string  `json:"detail"`
}

// Number returns x for JSON, or nil (null) when x is NaN or infinite.
func Number(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

// FromPlan converts a plan to its JSON form. assessed marks an Assess
// result (violations are always listed then, even when empty).
func FromPlan(p *optimizer.Plan, assessed bool) *Doc {
	d := &Doc{
		Caution: optimizer.Caution, Status: p.Status(), BaselineNote: p.BaselineNote, Aircraft: p.Aircraft, CI: p.CI, FloorG: p.Floor, Speed: p.Speed,
		Depart: p.Depart.UTC().Format(time.RFC3339), TakeoffMassKg: p.TakeoffMass, DistanceNM: p.Distance / mPerNM,
		Profile: p.Profile.String(), InitialFL: p.Profile.Initial, MinMarginG: Number(p.MinMargin()),
		Totals:   totals(p.Totals),
		Steps:    []Step{},
		Legs:     make([]Leg, 0, len(p.Legs)),
		Warnings: append([]string{}, p.Warnings...),
		Assessed: assessed,
	}
	if p.Baseline != nil {
		d.Baseline = &Baseline{FL: p.Baseline.FL, FuelKg: p.Baseline.Totals.Fuel, TimeMin: p.Baseline.Totals.Time / 60,
			Cost: p.Baseline.Totals.Cost, SavingPct: p.Baseline.SavingPct}
	}
	for _, s := range p.Steps {
		d.Steps = append(d.Steps, Step{AtNM: s.AtDist / mPerNM, FromFL: s.FromFL, ToFL: s.ToFL})
	}
	for _, l := range p.Legs {
		var resid *float64
		if !math.IsNaN(l.ResidualClimb) {
			resid = Number(l.ResidualClimb * fpmPerMS)
		}
		d.Legs = append(d.Legs, Leg{
			Segment: l.Segment, FromNM: l.FromDist / mPerNM, ToNM: l.ToDist / mPerNM, Phase: string(l.Phase),
			FromFL: l.FromFL, FL: l.FL, Mach: l.Mach, TASKt: l.TAS / msPerKt, WindKt: l.WindAlong / msPerKt,
			GSKt: l.GS / msPerKt, ISADevC: l.ISADev, EDR: Number(l.EDR), FuelKg: l.Fuel, TimeMin: l.Time / 60,
			MassStartKg: l.MassStart, BuffetMarginG: Number(l.BuffetMargin), FloorG: l.Floor, FloorReason: l.FloorReason,
			ResidualClimbFPM: resid, MaxFLBuffet: Number(l.MaxFLBuffet), MaxFLThrust: Number(l.MaxFLThrust),
		})
		if l.Contrail != optimizer.ContrailUnknown {
			d.Legs[len(d.Legs)-1].Contrail, d.Legs[len(d.Legs)-1].RHiPct = string(l.Contrail), Number(l.RHi)
		}
	}
	if c := p.Contrail; c != nil {
		d.Contrail = &Contrail{Caution: optimizer.ContrailCaution, PersistentNM: c.PersistentNM, PersistentDayNM: c.DayNM, PersistentNightNM: c.NightNM,
			ShortLivedNM: c.ShortLivedNM, UnclassifiedNM: c.UnknownNM, CostPerNMKg: c.CostPerNM, CostKg: c.Cost, RHiThresholdPct: c.RHiPct}
	}
	d.Fuel = fuelDoc(p.Fuel)
	d.Waypoints = waypointDocs(p)
	d.Violations = []Violation{}
	for _, v := range p.Violations {
		d.Violations = append(d.Violations, Violation{Leg: v.Leg, Limit: string(v.Limit), By: v.By, Unit: v.Unit, Detail: v.Detail})
	}
	d.Policy = policy(p.Policy)
	for _, a := range p.Alternatives {
		d.Alternatives = append(d.Alternatives, Alternative{Profile: a.Profile.String(), CostDelta: a.CostDelta,
			FuelKg: a.Totals.Fuel, TimeMin: a.Totals.Time / 60, Cost: a.Totals.Cost, MinMarginG: Number(a.MinMargin),
			InitialFL: a.Profile.Initial, StepsCount: len(a.Profile.Changes), LandingMass: a.Totals.LandingMass})
	}
	d.Arrival, d.Delay = arrivalDoc(p.Arrival), delayDoc(p.Delay)
	if !assessed {
		d.SearchCost = Number(p.SearchCost)
		d.SearchNodes, d.SearchEdges = p.Nodes, p.Edges
	}
	return d
}

func totals(t optimizer.Totals) Totals {
	return Totals{FuelKg: t.Fuel, TimeMin: t.Time / 60, Cost: t.Cost, CO2Kg: t.CO2, LandingMassKg: t.LandingMass}
}

// WriteJSON writes the plan as indented JSON.
func WriteJSON(w io.Writer, p *optimizer.Plan, assessed bool) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(FromPlan(p, assessed))
}
