package optimizer

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"time"

	"levelpath/perf"
	"levelpath/route"
)

// FuelRequest asks for a dispatch fuel plan: the flight (its TakeoffMass
// is solved for), the zero-fuel mass from the load sheet, the policy and
// an optional alternate route from the destination to the alternate.
type FuelRequest struct {
	Problem   *Problem
	ZFW       float64 // kg
	Policy    FuelPolicy
	Alternate *route.Track // nil: no alternate; the final reserve is held above the destination
}

// FuelPlan is the fuel required by the policy, the masses it gives and
// the limits that bind. Masses and fuel kg.
type FuelPlan struct {
	Policy FuelPolicy

	Taxi, Trip, Contingency, Alternate, FinalReserve, Additional, Extra float64
	// Block = Taxi + Trip + Contingency + Alternate + FinalReserve +
	// Additional + Extra.
	Block float64
	// ContingencyBasis says which term of the contingency governed;
	// ContingencyHoldFuel is its holding term.
	ContingencyBasis    string
	ContingencyHoldFuel float64

	ZFW, TakeoffMass, LandingMass float64
	// AlternateMass is the expected mass on arrival over the alternate
	// (or the destination when there is none), where the final reserve
	// is held.
	AlternateMass float64

	// ContingencyHold and FinalHold are the holding speeds and fuel
	// flows at the start of each hold.
	ContingencyHold, FinalHold perf.Hold
	// AlternatePlan is the plan of the alternate route from the
	// destination's landing mass (nil without an alternate).
	AlternatePlan *Plan

	// Iterations of the take-off mass fixed point, and the take-off
	// masses tried.
	Iterations int
	History    []float64

	// LimitedBy lists the limits the loading breaks ("MTOW", "MLW",
	// "MZFW", "fuel capacity"); empty when the flight can be loaded.
	LimitedBy []string
	// Binding is the limit that sets MaxPayloadZFW.
	Binding string
	// MaxPayloadZFW is the largest zero-fuel mass whose fuel plan keeps
	// every limit: exact when MTOW binds (MTOW - F(MTOW), from a plan at
	// MTOW), otherwise a first-order estimate from the sensitivity of the
	// fuel required to the take-off mass.
	MaxPayloadZFW float64

	Warnings []string

	// InFlight marks the reserves of a re-plan (InFlightFuel): Trip is
	// the remaining trip, the contingency is on it, Block is the fuel
	// required now and FuelOnBoard the fuel on board.
	InFlight              bool
	FuelOnBoard           float64
	ExpectedAtDestination float64 // FuelOnBoard - Trip

	cands map[string]float64 // the largest ZFW each limit allows
}

// limitNames are the loading limits in the order they are reported.
var limitNames = []string{"MZFW", "MTOW", "MLW", "fuel capacity"}

// Fuel-plan iteration bounds.
const (
	fuelTolerance = 1.0 // kg: converged when the take-off mass moves less
	fuelMaxIter   = 25
)

// fuelEval is the fuel required at one take-off mass.
type fuelEval struct {
	tow  float64
	plan *Plan
	fp   FuelPlan
	need float64 // block - taxi: the fuel on board at take-off
	trip float64
}

// PlanFuel plans the flight from its zero-fuel mass: the take-off mass
// TOW = ZFW + block - taxi is found as the fixed point of TOW -> the
// optimizer's plan at TOW -> the fuel the policy requires for that plan.
// It returns the plan at the converged take-off mass with Plan.Fuel set.
//
// Method: the fuel required F(TOW) rises with TOW (a heavier aircraft
// burns more) with slope s well under 1, so G(TOW) = ZFW + F(TOW) is a
// contraction; each step is a secant (Newton) step on TOW - G(TOW) with
// the slope from the last two evaluations, clamped to [0, 0.9], falling
// back to the plain step G(TOW). The profile may change between
// iterations (a level the heavier aircraft cannot take); the iteration
// stops with an error after 25 tries. Convergence: |G(TOW) - TOW| < 1 kg.
// A TOW over MTOW is not planned: the flight is then evaluated at MTOW
// and reported as limited by MTOW, with the largest ZFW that fits.
//
// Holding fuel (contingency minimum, final reserve) is perf's fuel flow at
// the holding speed at the policy's height above the aerodrome (ISA),
// integrated minute by minute from the mass where it would be flown.
//
// Cost: each iteration is one Solve of the route and, with an alternate,
// one of the alternate route; typically 3 to 6 iterations.
func PlanFuel(req FuelRequest) (*Plan, error) {
	if req.Problem == nil || req.Problem.Aircraft == nil {
		return nil, inputErrorf("aircraft", "no aircraft")
	}
	a := req.Problem.Aircraft
	z := req.ZFW
	if !(z > 0) || math.IsInf(z, 0) {
		return nil, inputErrorf("zfw", "zero-fuel mass %v kg is not a positive number", z)
	}
	if z < a.OEW {
		return nil, inputErrorf("zfw", "zero-fuel mass %.0f kg is under the operating empty mass %.0f kg of %s", z, a.OEW, a.Name)
	}
	if z >= a.MTOW {
		return nil, inputErrorf("zfw", "zero-fuel mass %.0f kg is not under MTOW %.0f kg of %s", z, a.MTOW, a.Name)
	}
	pol := req.Policy
	if err := pol.check(); err != nil {
		return nil, err
	}
	if req.Alternate != nil {
		if err := checkAlternate(req.Problem.Track, req.Alternate); err != nil {
			return nil, err
		}
	}
	taxi := pol.TaxiKg
	if taxi < 0 {
		taxi = pol.TaxiMinutes * 60 * float64(a.Engines.Count) * a.Engines.IdleFuelFlow
	}
	eval := func(tow float64) (*fuelEval, error) {
		q := *req.Problem
		q.TakeoffMass, q.ZFW = tow, z
		plan, err := Solve(&q)
		if err != nil {
			return nil, err
		}
		fp, err := reserves(req, taxi, tow, plan)
		if err != nil {
			return nil, err
		}
		need := fp.Trip + fp.Contingency + fp.Alternate + fp.FinalReserve + fp.Additional + fp.Extra
		return &fuelEval{tow: tow, plan: plan, fp: fp, need: need, trip: fp.Trip}, nil
	}
	var hist []*fuelEval
	need := func(tow float64) (float64, error) {
		e, err := eval(tow)
		if err != nil {
			return 0, fuelEvalError(tow, err)
		}
		hist = append(hist, e)
		return e.need, nil
	}
	// Start at a quarter of the fuel that fits; when that cannot be
	// planned (the trip would burn the aircraft below its empty mass),
	// start again from the most fuel that fits.
	start := math.Min(a.MTOW, z+0.25*math.Min(a.FuelCapacity, a.MTOW-z))
	clamped, err := fixedTOW(z, a.MTOW, start, need)
	if full := math.Min(a.MTOW, z+a.FuelCapacity); err != nil && len(hist) == 0 && IsInputError(err) && full > start {
		clamped, err = fixedTOW(z, a.MTOW, full, need)
	}
	if err != nil {
		if errors.Is(err, errNoConvergence) {
			return nil, fuelIterError(hist)
		}
		return nil, err
	}
	last := hist[len(hist)-1]
	fp := last.fp
	fp.Iterations = len(hist)
	for _, e := range hist {
		fp.History = append(fp.History, e.tow)
	}
	fp.TakeoffMass = z + last.need
	fp.LandingMass = fp.TakeoffMass - fp.Trip
	fp.Block = taxi + last.need
	plan := last.plan
	limits(req, &fp, hist, clamped)
	if fp.Binding == "MTOW" && !clamped && a.MTOW-fp.TakeoffMass > fuelTolerance {
		// Exact: the fixed point TOW = ZFW + F(TOW) is MTOW exactly
		// when ZFW = MTOW - F(MTOW).
		if e, err := eval(a.MTOW); err == nil {
			fp.cands["MTOW"] = a.MTOW - e.need
			fp.MaxPayloadZFW, fp.Binding = math.Inf(1), ""
			for _, name := range limitNames {
				if z, ok := fp.cands[name]; ok && z < fp.MaxPayloadZFW {
					fp.MaxPayloadZFW, fp.Binding = z, name
				}
			}
		}
	}
	if clamped {
		fp.Warnings = append(fp.Warnings, fmt.Sprintf("the fuel required makes the take-off mass %.0f kg, over MTOW %.0f kg: the flight was planned at MTOW and cannot be flown with this payload", fp.TakeoffMass, a.MTOW))
	}
	for _, l := range fp.LimitedBy {
		lim, by, detail := fuelViolation(l, &fp, a)
		plan.Violations = append(plan.Violations, Violation{Leg: len(plan.Legs) - 1, Limit: lim, By: by, Unit: "kg", Detail: detail})
	}
	for _, k := range pol.Defaulted {
		if k == "destination_elevation_ft" || k == "alternate_elevation_ft" {
			fp.Warnings = append(fp.Warnings, fmt.Sprintf("fuel policy: %s not given: 0 ft assumed", k))
		}
	}
	if pol.Source != DefaultFuelPolicy().Source && len(pol.Defaulted) > 0 {
		fp.Warnings = append(fp.Warnings, fmt.Sprintf("fuel policy %s: defaults used for %s", pol.Source, strings.Join(pol.Defaulted, ", ")))
	}
	fp.Warnings = append(fp.Warnings, "holding fuel is priced in straight level flight at ISA (turns and temperature not included)")
	plan.Warnings = append(plan.Warnings, fp.Warnings...)
	plan.Fuel = &fp
	fp.requiredAt(plan.Waypoints)
	if w := lowFuelWarning(plan.Waypoints); w != "" {
		plan.Warnings = append(plan.Warnings, w)
	}
	return plan, nil
}

// InFlightFuel adds to a re-plan (Replan's result for req.Problem) the
// fuel required from its start under req.Policy: the remaining trip, the
// contingency on the remaining trip (ICAO Annex 6 Part I 4.3.6.3 applied
// at the re-planning point), alternate (planned from the expected landing
// mass), final reserve and additional fuel; the fuel on board is the
// plan's mass minus req.ZFW. It warns when the fuel on board is under the
// fuel required, and when the fuel expected at the destination is under
// the alternate and final reserve fuel.
func InFlightFuel(req FuelRequest, plan *Plan) error {
	if req.ZFW <= 0 || plan.TakeoffMass < req.ZFW {
		return inputErrorf("zfw", "the zero-fuel mass %.0f kg must be positive and at most the mass %.0f kg", req.ZFW, plan.TakeoffMass)
	}
	if err := req.Policy.check(); err != nil {
		return err
	}
	if req.Alternate != nil {
		if err := checkAlternate(req.Problem.Track, req.Alternate); err != nil {
			return err
		}
	}
	fp, err := reserves(req, 0, plan.TakeoffMass, plan)
	if err != nil {
		return err
	}
	fp.InFlight = true
	fp.Iterations = 0
	fp.ZFW = req.ZFW
	fp.FuelOnBoard = plan.TakeoffMass - req.ZFW
	fp.Block = fp.Trip + fp.Contingency + fp.Alternate + fp.FinalReserve + fp.Additional + fp.Extra
	fp.TakeoffMass = plan.TakeoffMass
	fp.LandingMass = plan.TakeoffMass - fp.Trip
	fp.ExpectedAtDestination = fp.FuelOnBoard - fp.Trip
	fp.Binding, fp.MaxPayloadZFW = "", nan
	if d := fp.FuelOnBoard - fp.Block; d < 0 {
		fp.Warnings = append(fp.Warnings, fmt.Sprintf("fuel on board %.0f kg is %.0f kg under the %.0f kg required from here (trip %.0f, contingency %.0f, alternate %.0f, final reserve %.0f, additional %.0f, extra %.0f)", fp.FuelOnBoard, -d, fp.Block, fp.Trip, fp.Contingency, fp.Alternate, fp.FinalReserve, fp.Additional, fp.Extra))
	}
	if need := fp.Alternate + fp.FinalReserve; fp.ExpectedAtDestination < need {
		fp.Warnings = append(fp.Warnings, fmt.Sprintf("fuel expected at the destination %.0f kg is under the alternate plus final reserve fuel %.0f kg", fp.ExpectedAtDestination, need))
	}
	plan.Warnings = append(plan.Warnings, fp.Warnings...)
	plan.Fuel = &fp
	fp.requiredAt(plan.Waypoints)
	return nil
}

// requiredAt sets each waypoint's fuel remaining (block - taxi - used)
// and the least fuel required there: the remaining trip, contingency on
// the remaining trip (ICAO Annex 6 re-planning; the holding minimum
// still applies), alternate, final reserve and additional fuel.
func (fp *FuelPlan) requiredAt(ws []Waypoint) {
	fob := fp.Block - fp.Taxi
	if fp.InFlight {
		fob = fp.FuelOnBoard
	}
	for i := range ws {
		w := &ws[i]
		rem := math.Max(0, fp.Trip-w.FuelUsed)
		if rem < 0.5 {
			rem = 0 // at the destination: the sums of leg fuel and the trip differ only by rounding
		}
		cont := math.Max(fp.Policy.ContingencyPct/100*rem, fp.ContingencyHoldFuel)
		if rem == 0 {
			cont = 0
		}
		w.FuelRemaining = fob - w.FuelUsed
		w.MinRequired = rem + cont + fp.Alternate + fp.FinalReserve + fp.Additional
	}
}

// errNoConvergence: the take-off mass did not settle in fuelMaxIter tries.
var errNoConvergence = errors.New("optimizer: the take-off mass did not converge")

// fixedTOW solves TOW = z + need(TOW) for TOW in [z, mtow], starting at
// start: secant steps on TOW - z - need(TOW) with the slope of the last two
// evaluations clamped to [0, 0.9] (the plain step where there is none),
// until the take-off mass moves less than fuelTolerance. It reports
// clamped when the fixed point lies over mtow (need evaluated at mtow
// asks for more), and errNoConvergence after fuelMaxIter evaluations. The
// last call of need is at the answer.
func fixedTOW(z, mtow, start float64, need func(float64) (float64, error)) (clamped bool, err error) {
	tow := start
	var pTow, pNeed float64
	for it := 1; it <= fuelMaxIter; it++ {
		n, err := need(tow)
		if err != nil {
			return false, err
		}
		g := z + n
		if math.Abs(g-tow) < fuelTolerance {
			return false, nil
		}
		if tow >= mtow && g > mtow {
			return true, nil // the fixed point lies over MTOW
		}
		next := g
		if d := tow - pTow; it > 1 && math.Abs(d) > 1 {
			s := math.Max(0, math.Min(0.9, (n-pNeed)/d))
			next = tow + (g-tow)/(1-s)
		}
		pTow, pNeed = tow, n
		tow = math.Max(z, math.Min(mtow, next))
	}
	return false, errNoConvergence
}

// reserves works out the fuel components other than taxi for the plan
// flown from take-off mass tow.
func reserves(req FuelRequest, taxi, tow float64, plan *Plan) (FuelPlan, error) {
	pol := req.Policy
	a := req.Problem.Aircraft
	fp := FuelPlan{Policy: pol, Taxi: taxi, Trip: plan.Totals.Fuel, Additional: pol.AdditionalKg, Extra: pol.ExtraKg, ZFW: req.ZFW}
	lm := tow - fp.Trip
	destP := perf.PressureAt((pol.DestinationElevationFt + pol.HoldingHeightFt) * perf.FtToM)
	cHold, h, err := holdFuel(a, lm, destP, pol.HoldingSpeedKt*perf.KtToMS, pol.ContingencyMinMinutes)
	if err != nil {
		return fp, inputErrorf("contingency", "holding above the destination at %.0f kg: %v", lm, err)
	}
	fp.ContingencyHold, fp.ContingencyHoldFuel = h, cHold
	fp.Contingency = pol.ContingencyPct / 100 * fp.Trip
	fp.ContingencyBasis = fmt.Sprintf("%g %% of trip fuel", pol.ContingencyPct)
	if cHold > fp.Contingency {
		fp.Contingency = cHold
		fp.ContingencyBasis = fmt.Sprintf("%g min holding at %.0f ft above the destination", pol.ContingencyMinMinutes, pol.HoldingHeightFt)
	}
	atAlt := lm
	altP := destP
	if req.Alternate != nil {
		q := *req.Problem
		q.Track, q.TakeoffMass, q.ZFW, q.Blocked = req.Alternate, lm, 0, nil
		q.ClimbSchedule = perf.Schedule{}
		q.LegCeilings = false
		q.Depart = plan.Depart.Add(time.Duration(plan.Totals.Time * float64(time.Second)))
		ap, err := Solve(&q)
		if err != nil {
			return fp, &InputError{Field: "alternate", Msg: fmt.Sprintf("the alternate route from %.0f kg: %v", lm, err)}
		}
		fp.AlternatePlan = ap
		fp.Alternate = ap.Totals.Fuel
		atAlt = lm - fp.Alternate
		altP = perf.PressureAt((pol.AlternateElevationFt + pol.HoldingHeightFt) * perf.FtToM)
	}
	fp.AlternateMass = atAlt
	fr, h, err := holdFuel(a, atAlt, altP, pol.HoldingSpeedKt*perf.KtToMS, pol.FinalReserveMinutes)
	if err != nil {
		return fp, inputErrorf("final-reserve", "holding above the alternate at %.0f kg: %v", atAlt, err)
	}
	fp.FinalHold, fp.FinalReserve = h, fr
	return fp, nil
}

// holdFuel integrates minutes of holding at pressure p from mass m0, one
// minute at a time (fuel flow at each minute's start mass, which
// overstates the burn by under 0.1 % a minute); it returns the fuel and
// the first minute's holding point.
func holdFuel(a *perf.Aircraft, m0, p, cas, minutes float64) (float64, perf.Hold, error) {
	first, err := a.Holding(m0, p, 0, 0, cas)
	if err != nil {
		return 0, first, err
	}
	m, fuel := m0, 0.0
	for left := minutes; left > 1e-9; left-- {
		dt := 60 * math.Min(1, left)
		h, err := a.Holding(m, p, 0, 0, cas)
		if err != nil {
			return 0, first, err
		}
		fuel += h.FuelFlow * dt
		m -= h.FuelFlow * dt
	}
	return fuel, first, nil
}

// checkAlternate requires the alternate route to start within 5 NM of the
// destination.
func checkAlternate(main, alt *route.Track) error {
	if main == nil || main.Route == nil || alt.Route == nil || len(alt.Route.Points) < 2 {
		return inputErrorf("alternate", "the alternate route has no points")
	}
	d := main.Route.Points[len(main.Route.Points)-1]
	s := alt.Route.Points[0]
	dist, _, _ := route.Inverse(d.Lat, d.Lon, s.Lat, s.Lon)
	if !(dist <= 5*nmToM) {
		return inputErrorf("alternate", "the alternate route starts at %.4f,%.4f, %.1f NM from the destination %.4f,%.4f (want within 5 NM)", s.Lat, s.Lon, dist/nmToM, d.Lat, d.Lon)
	}
	return nil
}

// limits fills LimitedBy, Binding and MaxPayloadZFW. s is the slope of
// the fuel required against the take-off mass and st that of the trip
// fuel, from the widest pair of evaluations; to first order TOW moves by
// 1/(1-s), block by s/(1-s) and landing mass by (1-st)/(1-s) per kg of
// ZFW.
func limits(req FuelRequest, fp *FuelPlan, hist []*fuelEval, clamped bool) {
	a := req.Problem.Aircraft
	s, st := 0.0, 0.0
	if n := len(hist); n >= 2 {
		// The widest secant through the last evaluation: the profile's
		// discrete levels make close evaluations noisy.
		e, p := hist[n-1], hist[0]
		for _, h := range hist[:n-1] {
			if math.Abs(h.tow-e.tow) > math.Abs(p.tow-e.tow) {
				p = h
			}
		}
		if d := e.tow - p.tow; math.Abs(d) > 1 {
			s = math.Max(0, math.Min(0.9, (e.need-p.need)/d))
			st = math.Max(0, math.Min(0.9, (e.trip-p.trip)/d))
		}
	}
	z := fp.ZFW
	cand := []struct {
		name string
		zfw  float64
		over bool
	}{
		{"MZFW", a.MZFW, z > a.MZFW},
		{"MTOW", z + (a.MTOW-fp.TakeoffMass)*(1-s), fp.TakeoffMass > a.MTOW+0.5},
		{"MLW", z + (a.MLW-fp.LandingMass)*(1-s)/(1-st), fp.LandingMass > a.MLW},
		{"fuel capacity", math.Inf(1), fp.Block > a.FuelCapacity},
	}
	if clamped {
		cand[1].zfw = a.MTOW - (fp.Block - fp.Taxi) // exact: F evaluated at MTOW
	}
	if s > 0 {
		cand[3].zfw = z + (a.FuelCapacity-fp.Block)*(1-s)/s
	}
	fp.MaxPayloadZFW = math.Inf(1)
	fp.cands = map[string]float64{}
	for _, c := range cand {
		fp.cands[c.name] = c.zfw
		if c.over {
			fp.LimitedBy = append(fp.LimitedBy, c.name)
		}
		if c.zfw < fp.MaxPayloadZFW {
			fp.MaxPayloadZFW, fp.Binding = c.zfw, c.name
		}
	}
	if fp.MaxPayloadZFW < a.OEW {
		fp.Warnings = append(fp.Warnings, fmt.Sprintf("no payload fits: the %s limit is broken even at the operating empty mass %.0f kg", fp.Binding, a.OEW))
	}
}

// fuelViolation is the plan violation for a broken loading limit.
func fuelViolation(l string, fp *FuelPlan, a *perf.Aircraft) (Limit, float64, string) {
	switch l {
	case "MZFW":
		return LimitMZFW, fp.ZFW - a.MZFW, fmt.Sprintf("zero-fuel mass %.0f kg over MZFW %.0f kg", fp.ZFW, a.MZFW)
	case "MTOW":
		return LimitMTOW, fp.TakeoffMass - a.MTOW, fmt.Sprintf("take-off mass %.0f kg (ZFW %.0f + fuel %.0f) over MTOW %.0f kg; largest ZFW that fits %.0f kg", fp.TakeoffMass, fp.ZFW, fp.Block-fp.Taxi, a.MTOW, fp.MaxPayloadZFW)
	case "MLW":
		return LimitLandingMass, fp.LandingMass - a.MLW, fmt.Sprintf("landing mass %.0f kg over MLW %.0f kg; largest ZFW that fits %.0f kg", fp.LandingMass, a.MLW, fp.MaxPayloadZFW)
	}
	return LimitFuelCap, fp.Block - a.FuelCapacity, fmt.Sprintf("block fuel %.0f kg over the fuel capacity %.0f kg: %.0f kg cannot be carried", fp.Block, a.FuelCapacity, fp.Block-a.FuelCapacity)
}

// fuelEvalError wraps an error of the plan at one take-off mass.
func fuelEvalError(tow float64, err error) error {
	var ie *InputError
	if errors.As(err, &ie) {
		return &InputError{Field: ie.Field, Msg: fmt.Sprintf("fuel plan at take-off mass %.0f kg: %s", tow, ie.Msg)}
	}
	return fmt.Errorf("fuel plan at take-off mass %.0f kg: %w", tow, err)
}

// fuelIterError reports a fixed point that did not converge.
func fuelIterError(hist []*fuelEval) error {
	var parts []string
	for _, e := range hist {
		parts = append(parts, fmt.Sprintf("%.0f (%s)", e.tow, e.plan.Profile))
	}
	return inputErrorf("zfw", "the take-off mass did not converge to 1 kg in %d tries (the profile changes with the mass): %s", fuelMaxIter, strings.Join(parts, ", "))
}
