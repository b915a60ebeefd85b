package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"time"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
)

// problemFlags are the inputs shared by plan and assess.
type problemFlags struct {
	route       string
	aircraft    string
	mass        float64
	zfw, fuel   float64
	zfwOnly     bool // --zfw without --fuel is allowed (plan's fuel plan)
	massAndZFW  bool // --mass with --zfw is allowed (plan's in-flight re-plan)
	weather     []string
	depart      string
	ci          float64
	speed       string
	floor       float64
	levels      string
	polar       string
	maxSegNM    float64
	minFL       int
	maxFL       int
	maxStepFt   int
	stepDescent bool
	minStepNM   float64
	maxSteps    int
	noSteps     bool
	blocks      []string
	turb        string
	bucketKg    float64
	exact       bool
	date        string
	perfFactor  float64
	isaDev      float64
	contrail    contrailFlags
	wx          weatherOpts
}

func (f *problemFlags) register(c *cobra.Command) {
	fl := c.Flags()
	fl.StringVar(&f.route, "route", "", "route: GeoJSON or CSV file, or inline \"lat,lon lat,lon ...\"")
	fl.StringVar(&f.aircraft, "aircraft", "", "built-in aircraft name, YAML file or operator tables directory")
	fl.Float64Var(&f.mass, "mass", 0, "take-off mass, kg (or give --zfw and --fuel)")
	fl.Float64Var(&f.zfw, "zfw", 0, "zero-fuel mass, kg (with --fuel)")
	fl.Float64Var(&f.fuel, "fuel", 0, "fuel on board at take-off, kg (with --zfw)")
	fl.StringArrayVar(&f.weather, "weather", nil, "GRIB2 or GRIB1 weather file (repeatable); none: ISA and still air")
	fl.StringVar(&f.depart, "depart", "", "departure time, RFC3339 (default: the weather's first valid time)")
	fl.Float64Var(&f.ci, "ci", 0, "cost index, kg/min")
	fl.StringVar(&f.speed, "speed", "econ", "speed policy: econ, lrc or a Mach number such as 0.84")
	fl.Float64Var(&f.floor, "floor", 1.3, "buffet protection floor, g (common practice 1.3)")
	fl.StringVar(&f.levels, "levels", "", "level rule, e.g. odd-even-magnetic, odd-even-true, every-1000:290-430, list:310,350,390 (default odd-even-magnetic)")
	fl.StringVar(&f.polar, "polar", "true", "course the magnetic level rule uses where the WMM2025 compass caution/blackout zones make the compass unreliable: true or grid")
	fl.Float64Var(&f.maxSegNM, "max-seg-nm", 50, "longest route segment, NM")
	fl.IntVar(&f.minFL, "min-fl", 0, "lowest cruise level (default FL100)")
	fl.IntVar(&f.maxFL, "max-fl", 0, "highest cruise level (default: certified ceiling)")
	fl.IntVar(&f.maxStepFt, "max-step-ft", 4000, "largest level change of one step, ft")
	fl.BoolVar(&f.stepDescent, "step-descents", false, "allow step descents in cruise")
	fl.Float64Var(&f.minStepNM, "min-step-nm", 100, "least distance between steps, and from the top of climb to the first step, NM (0: none)")
	fl.IntVar(&f.maxSteps, "max-steps", 0, "most steps (0: no limit)")
	fl.BoolVar(&f.noSteps, "no-steps", false, "fly one constant level")
	fl.StringArrayVar(&f.blocks, "block", nil, "levels unavailable over a distance range: FL370,FL390@1200-1800 (NM, repeatable)")
	fl.StringVar(&f.turb, "turbulence", "", "EDR rules: EDR:FLOOR or EDR:closed, comma-separated (default 0.20:1.5,0.45:closed)")
	fl.Float64Var(&f.bucketKg, "mass-bucket-kg", 0, "mass bucket of the search, kg (default 0.25 % of MTOW)")
	fl.BoolVar(&f.exact, "exact", false, "turn off the search's approximations (merged step counters)")
	fl.StringVar(&f.date, "date", "", "date for magnetic variation, YYYY-MM-DD (default: departure date)")
	fl.Float64Var(&f.perfFactor, "perf-factor", 0, "performance factor, percent: every fuel flow multiplied by 1 + PCT/100 (per tail, e.g. 2.5)")
	fl.Float64Var(&f.isaDev, "isa-dev", 0, "temperature deviation from ISA, °C, where there is no forecast temperature (no --weather: still air at ISA+DEV)")
	f.contrail.register(c)
	weatherFlags(c, &f.wx)
}

// loadWeather opens the weather files for planning (nil when none).
// Cruise levels lie between FL050 and FL600: it keeps those pressure
// levels (and one beyond each end) and drops the rest of a full forecast.
func loadWeather(paths []string, o weatherOpts) (*winds.Field, error) {
	if len(paths) == 0 {
		return nil, nil
	}
	return openWeather(paths, perf.FLToPressure(600), perf.FLToPressure(50), o)
}

// weatherOpts are the flags of every command that decodes weather.
type weatherOpts struct {
	budgetMiB int64
	edrParam  int
	member    *int // --member: one ensemble member (nil: all fields)
	rhRef     string
}

// weatherFlags registers --weather-budget-mib, --edr-param and
// --rh-reference on c.
func weatherFlags(c *cobra.Command, o *weatherOpts) {
	c.Flags().Int64Var(&o.budgetMiB, "weather-budget-mib", winds.DefaultBudget>>20, "memory the decoded weather may take, MiB; larger inputs are refused before decoding")
	c.Flags().IntVar(&o.edrParam, "edr-param", 0, fmt.Sprintf("EDR to use when the weather holds several (GRIB2 parameter 0.19.N): 28 mountain wave, 29 clear air, 30 eddy dissipation parameter, 31 its maximum; 0: %d if present, else the only one, else the first of 29, 28, 31 (the others are listed in the warnings)", winds.DefaultEDRParam))
	c.Flags().StringVar(&o.rhRef, "rh-reference", "auto", "what the weather's relative humidity is relative to: water (liquid water at every temperature), mixed (the ECMWF IFS water/ice mixture: over ice below -23 °C) or auto (mixed for ECMWF, centre 98; water otherwise)")
}

// openWeather opens the weather files keeping the levels from pLow to
// pHigh (Pa) within a memory budget (MiB), with the EDR parameter asked
// for; a missing file is named.
func openWeather(paths []string, pLow, pHigh float64, o weatherOpts) (*winds.Field, error) {
	if o.budgetMiB <= 0 || o.budgetMiB > 1<<24 {
		return nil, badInputf("--weather-budget-mib %d: want 1..%d", o.budgetMiB, 1<<24)
	}
	if o.edrParam != 0 && (o.edrParam < 28 || o.edrParam > 31) {
		return nil, badInputf("--edr-param %d: want 28..31 (GRIB2 code table 4.2.0.19), or 0 for the default", o.edrParam)
	}
	var ref winds.RHReference
	switch o.rhRef {
	case "auto", "":
		ref = winds.RHAuto
	case "water":
		ref = winds.RHWater
	case "mixed":
		ref = winds.RHMixed
	default:
		return nil, badInputf("--rh-reference %q: want auto, water or mixed", o.rhRef)
	}
	for _, p := range paths {
		// winds refuses non-regular files itself; a missing one is named here.
		if _, err := os.Stat(p); err != nil {
			return nil, badInputf("weather file %s: %w", p, err)
		}
	}
	f, err := winds.Options{Budget: o.budgetMiB << 20, EDRParam: o.edrParam, RHReference: ref, Member: o.member}.OpenBetween(pLow, pHigh, paths...)
	if err != nil {
		return nil, badInput(err)
	}
	return f, nil
}

// problem builds the optimizer problem from the flags, with weather
// already decoded (shared by batch runs).
func (f *problemFlags) problem(c *cobra.Command, wx *winds.Field, stderr io.Writer) (*optimizer.Problem, error) {
	a, err := loadAircraft(f.aircraft)
	if err != nil {
		return nil, err
	}
	if f.route == "" {
		return nil, badInputf("--route is required")
	}
	p := &optimizer.Problem{Aircraft: a, Weather: wx, CI: f.ci, Floor: f.floor, MinFL: f.minFL, MaxFL: f.maxFL, MassBucket: f.bucketKg, Exact: f.exact,
		PerfFactorPct: f.perfFactor, ISADev: f.isaDev}
	if err := f.contrail.check(f.weather, wx); err != nil {
		return nil, err
	}
	p.ContrailCost, p.ContrailRHiPct = f.contrail.cost, f.contrail.rhi
	if !(f.perfFactor >= perf.MinPerfFactorPct && f.perfFactor <= perf.MaxPerfFactorPct) {
		return nil, badInputf("--perf-factor %v: want %g..%g percent", f.perfFactor, perf.MinPerfFactorPct, perf.MaxPerfFactorPct)
	}
	if !(f.isaDev >= -60 && f.isaDev <= 60) {
		return nil, badInputf("--isa-dev %v: want -60..60 °C", f.isaDev)
	}
	if f.minFL != 0 && (f.minFL < 1 || f.minFL > 600) || f.maxFL != 0 && (f.maxFL < 1 || f.maxFL > 600) {
		return nil, badInputf("--min-fl %d, --max-fl %d: each must be 0 (the default) or a flight level 1..600", f.minFL, f.maxFL)
	}
	massSet := c.Flags().Changed("mass")
	if massSet && !(f.mass > 0) {
		return nil, badInputf("--mass %v: want a take-off mass in kg", f.mass)
	}
	if err := checkFloorFlag(f.floor); err != nil {
		return nil, err
	}
	switch {
	case massSet && f.massAndZFW && f.zfw > 0 && f.fuel == 0:
		// In flight: the mass now, and the ZFW.
		if p.TakeoffMass, _, err = (optimizer.Loading{TakeoffMass: f.mass}).Resolve(a); err != nil {
			return nil, badInput(err)
		}
		if f.zfw > a.MZFW {
			return nil, badInputf("--zfw %.0f kg: the zero-fuel mass is over MZFW %.0f kg of %s", f.zfw, a.MZFW, a.Name)
		}
		if f.zfw > f.mass {
			return nil, badInputf("--mass %.0f kg is below the zero-fuel mass %.0f kg: no fuel would be left", f.mass, f.zfw)
		}
		p.ZFW = f.zfw
	case f.zfwOnly && f.zfw > 0 && !c.Flags().Changed("fuel") && !massSet:
		// The fuel plan solves for the take-off mass; ZFW stands in.
		if f.zfw > a.MZFW {
			return nil, badInputf("--zfw %.0f kg is over MZFW %.0f kg of %s", f.zfw, a.MZFW, a.Name)
		}
		if p.TakeoffMass, _, err = (optimizer.Loading{TakeoffMass: f.zfw}).Resolve(a); err != nil {
			return nil, badInput(err)
		}
		p.ZFW = f.zfw
	case f.mass == 0 && (f.zfw > 0) != (f.fuel > 0) || f.mass == 0 && f.zfw == 0 && f.fuel == 0:
		return nil, badInputf("--mass (kg), --zfw alone (a fuel plan) or both --zfw and --fuel are required")
	default:
		if p.TakeoffMass, p.ZFW, err = (optimizer.Loading{TakeoffMass: f.mass, ZFW: f.zfw, Fuel: f.fuel}).Resolve(a); err != nil {
			return nil, badInput(err)
		}
	}
	if f.depart != "" {
		t, err := time.Parse(time.RFC3339, f.depart)
		if err != nil {
			return nil, badInputf("--depart %q: want RFC3339 such as 2026-12-01T22:00:00Z", f.depart)
		}
		p.Depart = t
	} else if wx == nil {
		// Still air: the time only dates the plan and the magnetic variation.
		p.Depart = time.Now().UTC().Truncate(time.Minute)
		p.Notes = append(p.Notes, "no --depart given: the current time "+p.Depart.Format(time.RFC3339)+" assumed")
	} // else the optimizer takes the weather's first valid time and says so
	sp, err := optimizer.ParseSpeed(f.speed)
	if err != nil {
		return nil, badInputf("--speed: %v", err)
	}
	p.Speed = sp
	if p.Steps, err = stepRules(f.maxStepFt, f.stepDescent, f.minStepNM, f.maxSteps, f.noSteps); err != nil {
		return nil, err
	}
	for _, b := range f.blocks {
		blk, err := parseBlock(b)
		if err != nil {
			return nil, err
		}
		p.Blocked = append(p.Blocked, blk)
	}
	if f.turb != "" {
		rules, err := parseTurbulence(f.turb)
		if err != nil {
			return nil, err
		}
		p.Turbulence = rules
	}
	magDate := p.Depart
	if magDate.IsZero() {
		magDate = wx.Times()[0]
	}
	tr, err := buildTrackPolar(f.route, f.levels, f.polar, f.maxSegNM, f.date, magDate, stderr)
	if err != nil {
		return nil, err
	}
	p.Track = tr
	return p, nil
}

// buildTrack loads a route and segments it with the default polar policy.
func buildTrack(arg, levels string, maxSegNM float64, date string, depart time.Time, stderr io.Writer) (*route.Track, error) {
	return buildTrackPolar(arg, levels, route.PolarTrue, maxSegNM, date, depart, stderr)
}

// buildTrackPolar loads a route and segments it; polar is the course the
// magnetic level rule uses in the WMM2025 compass zones (route.PolarTrue
// or route.PolarGrid). The route's and the track's warnings go to stderr.
func buildTrackPolar(arg, levels, polar string, maxSegNM float64, date string, depart time.Time, stderr io.Writer) (*route.Track, error) {
	switch polar {
	case route.PolarTrue, route.PolarGrid:
	default:
		return nil, badInputf("--polar %q: want %s or %s", polar, route.PolarTrue, route.PolarGrid)
	}
	r, err := route.Load(arg)
	if err != nil {
		return nil, badInput(err)
	}
	for _, w := range r.Warnings {
		warnf(stderr, "%s", w)
	}
	if math.IsNaN(maxSegNM) || maxSegNM < 1 || maxSegNM > 1000 {
		return nil, badInputf("--max-seg-nm %v: want 1..1000", maxSegNM)
	}
	opt := route.Options{MaxSegment: maxSegNM * perf.NMToM, Polar: polar}
	if levels != "" { // else the zero rule: odd-even-magnetic
		rule, err := route.ParseLevelRule(levels)
		if err != nil {
			return nil, badInputf("--levels: %v", err)
		}
		opt.Levels = rule
	}
	switch {
	case date != "":
		d, err := time.Parse("2006-01-02", date)
		if err != nil {
			return nil, badInputf("--date %q: want YYYY-MM-DD", date)
		}
		// 0001-01-01 is time.Time's zero, which Build refuses as no date:
		// clamp every given date, that one included.
		opt.Date = clampMagDate(d, stderr)
	case !depart.IsZero():
		opt.Date = clampMagDate(depart, stderr)
	}
	tr, err := route.Build(r, opt)
	if err != nil {
		return nil, badInput(err)
	}
	for _, w := range tr.Warnings {
		warnf(stderr, "%s", w)
	}
	return tr, nil
}

// parseBlock reads --block with the optimizer's parser.
func parseBlock(s string) (optimizer.Block, error) {
	b, err := optimizer.ParseBlock(s)
	if err != nil {
		return b, badInputf("--block %s", optimizer.InputMsg(err))
	}
	return b, nil
}

// parseTurbulence reads --turbulence with the optimizer's parser.
func parseTurbulence(s string) ([]optimizer.TurbulenceRule, error) {
	r, err := optimizer.ParseTurbulence(s)
	if err != nil {
		return nil, badInputf("--turbulence %s", optimizer.InputMsg(err))
	}
	return r, nil
}

// planErr maps optimizer errors to exit codes.
func planErr(err error) error {
	if err == nil {
		return nil
	}
	if optimizer.IsInputError(err) {
		return badInput(err)
	}
	return fmt.Errorf("internal: %w", err)
}

// clampMagDate moves a date outside WMM2025's validity (a replay of an
// older reanalysis day, say) to the nearest valid date, with a warning:
// the variation drifts by a fraction of a degree a year, which moves the
// semicircular level rule only on tracks within that of north or south.
func clampMagDate(d time.Time, stderr io.Writer) time.Time {
	d, w := route.ClampDate(d)
	if w != "" {
		warnf(stderr, "%s", w)
	}
	return d
}

// stepFlags names the flag of each step rule field.
var stepFlags = map[string]string{"Steps.MinDistance": "--min-step-nm", "Steps.MaxChange": "--max-step-ft", "Steps.MaxSteps": "--max-steps"}

// stepRules builds the step rules from the flags (optimizer.NewStepRules),
// an error naming the flag.
func stepRules(maxStepFt int, descents bool, minStepNM float64, maxSteps int, none bool) (optimizer.StepRules, error) {
	r, err := optimizer.NewStepRules(maxStepFt, descents, minStepNM, maxSteps, none)
	if ie, ok := err.(*optimizer.InputError); ok {
		return r, badInputf("%s %s", stepFlags[ie.Field], ie.Msg)
	}
	return r, err
}

// checkFloorFlag checks --floor with the optimizer's one floor range.
func checkFloorFlag(g float64) error {
	if err := optimizer.CheckFloor(g); err != nil {
		return badInputf("--floor: %v", err)
	}
	return nil
}
