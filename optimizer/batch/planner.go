package batch

import (
	"context"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"time"

	"levelpath/optimizer"
	"levelpath/optimizer/planjson"
	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
)

// StillAirWarning is the warning every result of a run without weather
// carries.
const StillAirWarning = "no weather given: every flight is planned in still air at ISA temperatures"

// SchedulePlanner turns schedule rows into optimizer problems, with the
// same defaults and checks as levelpath plan, and plans them. Its Plan
// method is a Planner for Run. It shares one decoded weather field and
// caches aircraft models and segmented routes (read-only once built), so
// one SchedulePlanner serves every worker of a run. A researcher's
// program that uses it gets the same answer as the dispatch run.
type SchedulePlanner struct {
	Weather    *winds.Field        // nil: still air at ISA
	MaxSegment float64             // m; 0: 50 NM
	Steps      optimizer.StepRules // step rules of every flight
	Exact      bool                // turn the search's approximations off
	// Policy is the fuel policy of fuel-plan rows (zfw_kg alone) without
	// a policy column of their own; nil: optimizer.DefaultFuelPolicy.
	Policy *optimizer.FuelPolicy
	// Ensemble, when not empty, plans every flight (but fuel-plan rows,
	// which are refused) on these members (Weather is then the control's,
	// Ensemble[0]) with EnsembleObjective and EnsembleShare (see
	// optimizer.EnsembleProblem); the results gain the members' fuel
	// percentiles and least margin.
	// WeatherNote, when not empty, is a warning every result carries
	// about the weather (the ensemble member chosen, say).
	WeatherNote       string
	Ensemble          []optimizer.Member
	EnsembleObjective optimizer.Objective
	EnsembleShare     float64
	// ContrailCost and ContrailRHiPct are every flight's
	// optimizer.Problem fields of those names (0: none, and 100 %).
	ContrailCost, ContrailRHiPct float64
	// DelayCost, when not nil, is the cost of lateness of every row with
	// an arrive_by time: such a row flies the cost index that minimises
	// fuel + its ci x time + delay cost (optimizer.SearchDelayCost) instead
	// of the least-cost one in its window (optimizer.SolveArriveBy).
	DelayCost *optimizer.DelayCost
	// Sweep says the run plans every row at each CI of a sweep: a row's
	// arrival target is then measured (delay, on time), not searched for.
	Sweep bool

	mu       sync.Mutex
	aircraft map[string]*perf.Aircraft
	tracks   map[string]trackEntry
	policies map[string]optimizer.FuelPolicy
}

// policyFor reads (once) the fuel policy file of a row's policy column.
func (p *SchedulePlanner) policyFor(path string) (optimizer.FuelPolicy, error) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if pol, ok := p.policies[path]; ok {
		return pol, nil
	}
	f, err := openRegular(path)
	if err != nil {
		return optimizer.FuelPolicy{}, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, 1<<16+1))
	if err != nil {
		return optimizer.FuelPolicy{}, err
	}
	if len(data) > 1<<16 {
		return optimizer.FuelPolicy{}, fmt.Errorf("fuel policy %s: more than 65536 bytes", filepath.Base(path))
	}
	pol, err := optimizer.ParseFuelPolicy(data, filepath.Base(path))
	if err != nil {
		return optimizer.FuelPolicy{}, err
	}
	if p.policies == nil {
		p.policies = map[string]optimizer.FuelPolicy{}
	}
	p.policies[path] = pol
	return pol, nil
}

// trackEntry is a segmented route and the warnings made building it.
type trackEntry struct {
	track    *route.Track
	warnings []string
}

func (p *SchedulePlanner) aircraftFor(name string) (*perf.Aircraft, error) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if a, ok := p.aircraft[name]; ok {
		return a, nil
	}
	a, err := perf.Load(name)
	if err != nil {
		return nil, err
	}
	if p.aircraft == nil {
		p.aircraft = map[string]*perf.Aircraft{}
	}
	p.aircraft[name] = a
	return a, nil
}

func (p *SchedulePlanner) trackFor(path, levels string, dep time.Time) (trackEntry, error) {
	key := path + "\x00" + levels + "\x00" + dep.UTC().Format("2006-01-02")
	p.mu.Lock()
	if t, ok := p.tracks[key]; ok {
		p.mu.Unlock()
		return t, nil
	}
	p.mu.Unlock()
	seg := p.MaxSegment
	if seg == 0 {
		seg = 50 * perf.NMToM
	}
	opt := route.Options{MaxSegment: seg}
	if levels != "" { // else the zero rule: odd-even-magnetic
		rule, err := route.ParseLevelRule(levels)
		if err != nil {
			return trackEntry{}, err
		}
		opt.Levels = rule
	}
	date, w := route.ClampDate(dep)
	opt.Date = date
	t, warns, err := route.Open(path, opt)
	if err != nil {
		return trackEntry{}, err
	}
	e := trackEntry{track: t, warnings: warns}
	if w != "" {
		e.warnings = append([]string{w}, e.warnings...)
	}
	p.mu.Lock()
	if p.tracks == nil {
		p.tracks = map[string]trackEntry{}
	}
	p.tracks[key] = e
	p.mu.Unlock()
	return e, nil
}

// Problem builds the optimizer problem of row at cost index ci, with the
// warnings its route gave. The loading is checked by
// optimizer.Loading.Resolve, as for levelpath plan.
func (p *SchedulePlanner) Problem(row Row, ci float64) (*optimizer.Problem, []string, error) {
	a, err := p.aircraftFor(row.Aircraft)
	if err != nil {
		return nil, nil, err
	}
	te, err := p.trackFor(row.Route, row.Levels, row.Departure)
	if err != nil {
		return nil, nil, err
	}
	pr := &optimizer.Problem{Track: te.track, Aircraft: a, Weather: p.Weather, Depart: row.Departure, CI: ci, Floor: row.Floor, Steps: p.Steps, Exact: p.Exact,
		ContrailCost: p.ContrailCost, ContrailRHiPct: p.ContrailRHiPct, PerfFactorPct: row.PerfFactorPct}
	if row.FuelPlan {
		// The fuel plan solves the take-off mass; the ZFW stands in.
		if row.ZFW > a.MZFW {
			return nil, nil, fmt.Errorf("zfw_kg %.0f is over MZFW %.0f kg of %s", row.ZFW, a.MZFW, a.Name)
		}
		if pr.TakeoffMass, _, err = (optimizer.Loading{TakeoffMass: row.ZFW}).Resolve(a); err != nil {
			return nil, nil, err
		}
		pr.ZFW = row.ZFW
	} else if pr.TakeoffMass, pr.ZFW, err = (optimizer.Loading{TakeoffMass: row.TOW, ZFW: row.ZFW, Fuel: row.Fuel}).Resolve(a); err != nil {
		return nil, nil, err
	}
	if row.Speed != "" {
		if pr.Speed, err = optimizer.ParseSpeed(row.Speed); err != nil {
			return nil, nil, err
		}
	}
	return pr, te.warnings, nil
}

// Plan is the Planner: it plans row at ci and fills the result's columns
// and plan document.
func (p *SchedulePlanner) Plan(ctx context.Context, row Row, ci float64) (Result, error) {
	var res Result
	if err := ctx.Err(); err != nil {
		return res, err
	}
	pr, trackWarnings, err := p.Problem(row, ci)
	if err != nil {
		return res, err
	}
	if row.FuelPlan && len(p.Ensemble) > 0 {
		return res, fmt.Errorf("zfw_kg without tow_kg asks for a fuel plan, which is made on one forecast: not with an ensemble (give tow_kg, or plan without --ensemble)")
	}
	price := func(q *optimizer.Problem) (*optimizer.Plan, error) {
		if len(p.Ensemble) > 0 {
			return optimizer.SolveEnsemble(ctx, &optimizer.EnsembleProblem{Problem: *q, Members: p.Ensemble,
				Objective: p.EnsembleObjective, RobustShare: p.EnsembleShare})
		}
		return optimizer.SolveContext(ctx, q) // SIGTERM stops a running plan
	}
	if row.FuelPlan {
		pol := optimizer.DefaultFuelPolicy()
		switch {
		case row.Policy != "":
			if pol, err = p.policyFor(row.Policy); err != nil {
				return res, err
			}
		case p.Policy != nil:
			pol = *p.Policy
		}
		price = func(q *optimizer.Problem) (*optimizer.Plan, error) {
			return optimizer.PlanFuel(optimizer.FuelRequest{Problem: q, ZFW: row.ZFW, Policy: pol})
		}
	}
	target := !row.ArriveBy.IsZero()
	early, late := row.Window()
	var plan *optimizer.Plan
	switch {
	case target && !p.Sweep && p.DelayCost != nil:
		plan, _, err = optimizer.SearchDelayCost(pr, optimizer.DelaySearch{Scheduled: row.ArriveBy, Cost: *p.DelayCost, Price: price})
	case target && !p.Sweep:
		plan, _, err = optimizer.SolveArriveBy(pr, optimizer.ArrivalTarget{At: row.ArriveBy, Early: early, Late: late, Price: price})
	default:
		plan, err = price(pr)
	}
	if err != nil {
		return res, err
	}
	var buf strings.Builder
	if err := planjson.WriteJSON(&buf, plan, false); err != nil {
		return res, err
	}
	res = Result{Fuel: plan.Totals.Fuel, Time: plan.Totals.Time / 60, Cost: plan.Totals.Cost, CO2: plan.Totals.CO2,
		InitialFL: plan.Profile.Initial, Steps: len(plan.Steps), MinMargin: plan.MinMargin(), CostSavingPct: math.NaN(),
		LandingMass: plan.Totals.LandingMass, TakeoffMass: plan.TakeoffMass, ZFW: pr.ZFW, Distance: plan.Distance,
		Floor: plan.Floor, Speed: row.Speed, Levels: row.Levels, Profile: plan.Profile.String(),
		PlanJSON: []byte(buf.String())}
	if c := plan.Contrail; c != nil {
		res.Contrail = true
		res.PersistentNM, res.PersistentDayNM, res.PersistentNightNM = c.PersistentNM, c.DayNM, c.NightNM
	}
	if res.Speed == "" {
		res.Speed = "econ" // optimizer.Problem's zero Speed
	}
	if res.Levels == "" {
		res.Levels = "odd-even-magnetic" // route.Options' zero rule
	}
	if plan.Baseline != nil {
		res.CostSavingPct = plan.Baseline.SavingPct
	}
	if e := plan.Ensemble; e != nil {
		res.Ensemble = true
		res.FuelP10, res.FuelP90 = e.Profile.Fuel.P10, e.Profile.Fuel.P90
		res.MinMarginAll = e.Profile.Margin.Min
	}
	if f := plan.Fuel; f != nil {
		res.Block, res.LimitedBy = f.Block, strings.Join(f.LimitedBy, " ")
		res.TakeoffMass = f.TakeoffMass
	}
	if target {
		a := plan.Depart.Add(time.Duration(math.Round(plan.Totals.Time * 1e9)))
		open, close := row.ArriveBy.Add(early), row.ArriveBy.Add(late)
		res.Arrival = &ArrivalResult{CIUsed: plan.CI, DelayMin: a.Sub(row.ArriveBy).Minutes(),
			OnTime: !a.Before(open) && !a.After(close), DelayCost: math.NaN()}
		if p.DelayCost != nil {
			res.Arrival.DelayCost = p.DelayCost.At(res.Arrival.DelayMin)
		}
	}
	if p.Weather == nil {
		res.Warnings = append(res.Warnings, StillAirWarning)
	}
	if p.WeatherNote != "" {
		res.Warnings = append(res.Warnings, p.WeatherNote)
	}
	res.Warnings = append(res.Warnings, trackWarnings...)
	res.Warnings = append(res.Warnings, plan.Warnings...)
	// Keep each violation once, as a violation.
	for _, v := range plan.Violations {
		res.Violations = append(res.Violations, v.Detail)
		res.Warnings = slices.DeleteFunc(res.Warnings, func(w string) bool { return w == v.Detail })
	}
	return res, nil
}

var _ Planner = (&SchedulePlanner{}).Plan
