package optimizer

import (
	"math"
	"strings"
	"testing"
	"time"

	"levelpath/perf"
)

// Physics checks of whole plans in still air at ISA (no weather) and in
// constructed winds. Sources are named at each check.

func longHaul(t testing.TB, rule string) *Problem {
	return &Problem{Track: track(t, longHaulRoute, rule, 50), Aircraft: aircraft(t, "demo-widebody"), TakeoffMass: 245000, CI: 40}
}

// TestStepsUpAsMassFalls: as fuel burns off the best level rises (at
// constant CL and Mach the cruise pressure is proportional to mass,
// isothermal hydrostatics, H = R T11 / g), so in still air at ISA the
// profile only steps up, and a 6,000 NM widebody flight steps at least
// once (Ng, Sridhar and Grabbe 2014 find multiple cruise altitudes pay on
// long flights).
func TestStepsUpAsMassFalls(t *testing.T) {
	p := longHaul(t, "odd-even-magnetic")
	plan := solve(t, p)
	if plan.Distance/nmToM < 5500 {
		t.Fatalf("long-haul route is %.0f NM", plan.Distance/nmToM)
	}
	if len(plan.Steps) < 1 {
		t.Errorf("no step on a %.0f NM flight: %s", plan.Distance/nmToM, plan.Profile)
	}
	for _, s := range plan.Steps {
		if s.ToFL < s.FromFL {
			t.Errorf("step down %d -> %d at %.0f NM in still air", s.FromFL, s.ToFL, s.AtDist/nmToM)
		}
	}
	checkMargins(t, plan)
	t.Logf("%s: fuel %.0f kg, %.0f min, saving %.2f %% against FL%d", plan.Profile, plan.Totals.Fuel, plan.Totals.Time/60,
		plan.Baseline.SavingPct, plan.Baseline.FL)
}

func checkMargins(t *testing.T, plan *Plan) {
	t.Helper()
	for i, l := range plan.Legs {
		if l.Phase == PhaseCruise && l.BuffetMargin < l.Floor-1e-9 {
			t.Errorf("leg %d at FL%.0f: margin %.4f g under its floor %.2f g", i, l.FL, l.BuffetMargin, l.Floor)
		}
	}
	if len(plan.Violations) > 0 {
		t.Errorf("plan breaks limits: %v", plan.Violations)
	}
}

// TestHeavierNeverStartsHigher: the buffet-limited and optimum levels fall
// with mass (CL = 2 m g / (gamma p M^2 S)), so a heavier take-off never
// starts higher.
func TestHeavierNeverStartsHigher(t *testing.T) {
	p := longHaul(t, "every-1000:290-430")
	prev := math.MaxInt
	for _, m := range []float64{200000, 215000, 230000, 245000} {
		q := *p
		q.TakeoffMass = m
		plan := solve(t, &q)
		checkMargins(t, plan)
		if plan.Profile.Initial > prev {
			t.Errorf("take-off at %.0f kg starts at FL%d, above the lighter take-off's FL%d", m, plan.Profile.Initial, prev)
		}
		prev = plan.Profile.Initial
	}
}

// TestHeadwindBandMovesProfile: ground speed is TAS plus the along-track
// wind (wind triangle), so a strong headwind at one level only makes that
// level costly and the profile leaves it.
func TestHeadwindBandMovesProfile(t *testing.T) {
	fls := []int{300, 320, 330, 340, 350, 360, 370, 380, 400}
	a := aircraft(t, "demo-narrowbody")
	tr := track(t, "45.0,-73.0 47.0,-40.0", "every-1000:330-370", 50) // eastbound
	calm := solve(t, &Problem{Track: tr, Aircraft: a, TakeoffMass: 70000, CI: 30, Weather: levelField(t, fls, func(int) float64 { return 0 })})
	var busy float64
	for _, fl := range []float64{330, 340, 350, 360, 370} {
		if d := distanceAt(calm, fl); d > busy {
			busy = d
			calm.Profile.Initial = int(fl) // remember the most used level
		}
	}
	used := float64(calm.Profile.Initial)
	head := func(fl int) float64 {
		if float64(fl) == used {
			return -60 // 60 m/s headwind on an eastbound track
		}
		return 0
	}
	windy := solve(t, &Problem{Track: tr, Aircraft: a, TakeoffMass: 70000, CI: 30, Weather: levelField(t, fls, head)})
	before, after := distanceAt(calm, used), distanceAt(windy, used)
	if after > 0.1*before {
		t.Errorf("FL%.0f: %.0f NM in calm air, still %.0f NM with a 117 kt headwind there", used, before/nmToM, after/nmToM)
	}
	t.Logf("FL%.0f: %.0f NM calm, %.0f NM with headwind; profiles %s / %s", used, before/nmToM, after/nmToM, calm.Profile, windy.Profile)
}

// TestCostIndexOrdering: a higher cost index weights time more, so CI 0
// burns no more fuel and flies no faster (cost = fuel + CI x time, the
// definition of the cost index; Cook, Tanner et al. 2009).
func TestCostIndexOrdering(t *testing.T) {
	p := longHaul(t, "odd-even-magnetic")
	var fuels, times []float64
	for _, ci := range []float64{0, 50, 150} {
		q := *p
		q.CI = ci
		plan := solve(t, &q)
		fuels = append(fuels, plan.Totals.Fuel)
		times = append(times, plan.Totals.Time)
	}
	for i := 1; i < len(fuels); i++ {
		if fuels[0] > fuels[i]*(1+1e-4) {
			t.Errorf("CI 0 burns %.0f kg, more than %.0f kg at a higher CI", fuels[0], fuels[i])
		}
		if times[0] < times[i]*(1-1e-4) {
			t.Errorf("CI 0 flies %.1f min, faster than %.1f min at a higher CI", times[0]/60, times[i]/60)
		}
	}
}

// TestBreguetLimit: with no step limits and 1,000 ft levels, the cruise
// fuel is within 0.5 % of a continuous cruise-climb at the optimum level
// from the same top-of-climb mass over the same distance. The cruise-climb
// is integrated from dm/dx = -1/SR_max(m), SR_max at each mass from the
// envelope's optimum level and its maximum-range Mach (the limit of the
// Breguet range equation with the best L/D; e.g. Anderson, Aircraft Performance and Design, 1999).
func TestBreguetLimit(t *testing.T) {
	p := longHaul(t, "every-1000:290-430")
	p.CI = 0
	p.Steps = StepRules{MaxChange: 1000 * ftToM}
	plan := solve(t, p)
	var fuel, from, to float64
	from = math.NaN()
	for _, l := range plan.Legs {
		if l.Phase == PhaseCruise || l.Phase == PhaseStep {
			if math.IsNaN(from) {
				from = l.FromDist
			}
			to = l.ToDist
			fuel += l.Fuel
		}
	}
	a := p.Aircraft
	m := plan.Legs[1].MassStart
	const dx = 10 * nmToM
	ideal := 0.0
	for x := from; x < to; x += dx {
		step := math.Min(dx, to-x)
		env, err := a.Envelope(m, 0, 1.3)
		if err != nil {
			t.Fatal(err)
		}
		fl := math.Min(env.OptimumFL, 430)
		pr := perf.FLToPressure(fl)
		mach, ok := a.MaxRangeMach(m, pr, 0, 1.3)
		if !ok {
			t.Fatalf("no max-range Mach at FL%.0f, %.0f kg", fl, m)
		}
		pt := a.Point(perf.State{Mass: m, Pressure: pr, Mach: mach, LoadFactor: 1})
		f := step / pt.SpecificRange
		ideal += f
		m -= f
	}
	if d := (fuel - ideal) / ideal; d > 0.005 || d < -0.001 {
		t.Errorf("cruise fuel %.0f kg against cruise-climb %.0f kg: %+.3f %%", fuel, ideal, 100*d)
	}
	t.Logf("cruise %.0f NM: plan %.0f kg, cruise-climb %.0f kg (%+.3f %%)", (to-from)/nmToM, fuel, ideal, 100*(fuel-ideal)/ideal)
}

// TestStepRules: the maximum number of steps and the minimum distance
// between steps hold.
func TestStepRules(t *testing.T) {
	p := longHaul(t, "every-1000:290-430")
	p.Steps = StepRules{MaxChange: 2000 * ftToM, MaxSteps: 2}
	plan := solve(t, p)
	if len(plan.Steps) > 2 {
		t.Errorf("%d steps with a limit of 2: %s", len(plan.Steps), plan.Profile)
	}
	p.Steps = StepRules{MaxChange: 2000 * ftToM, MinDistance: 1500 * nmToM}
	plan = solve(t, p)
	for i := 1; i < len(plan.Steps); i++ {
		if d := plan.Steps[i].AtDist - plan.Steps[i-1].AtDist; d < 1500*nmToM-1 {
			t.Errorf("steps %.0f NM apart, minimum 1500 NM: %s", d/nmToM, plan.Profile)
		}
	}
	p.Steps = StepRules{NoSteps: true}
	plan = solve(t, p)
	if len(plan.Steps) != 0 {
		t.Errorf("steps with NoSteps: %s", plan.Profile)
	}
}

// TestTurbulenceRaisesFloor: where the forecast EDR exceeds 0.20 the floor
// is 1.5 g and every leg there keeps it; with a rule closing levels above
// EDR 0.20 no cruise leg flies where it is exceeded. The thresholds are the
// default operator table (common practice; ICAO Annex 3 moderate and
// severe, from memory).
func TestTurbulenceRaisesFloor(t *testing.T) {
	wx, ref := demoWeather(t)
	p := longHaul(t, "odd-even-magnetic")
	p.Weather, p.Depart = wx, ref.Add(2*time.Hour)
	plan := solve(t, p)
	hit := 0
	for i, l := range plan.Legs {
		if l.Phase != PhaseCruise || math.IsNaN(l.EDR) {
			continue
		}
		if l.EDR > 0.20 {
			hit++
			if l.Floor != 1.5 || !strings.Contains(l.FloorReason, "EDR") {
				t.Errorf("leg %d: EDR %.3f but floor %.2f g (%s)", i, l.EDR, l.Floor, l.FloorReason)
			}
		} else if l.Floor != 1.3 { // the default floor (common practice)
			t.Errorf("leg %d: EDR %.3f and floor %.2f g", i, l.EDR, l.Floor)
		}
	}
	if hit == 0 {
		t.Fatal("the route meets no EDR over 0.20; the test has nothing to check")
	}
	checkMargins(t, plan)
	q := *p
	q.Turbulence = []TurbulenceRule{{EDR: 0.20, Closed: true}}
	closed := solve(t, &q)
	for i, l := range closed.Legs {
		if l.Phase == PhaseCruise && l.EDR > 0.20 {
			t.Errorf("leg %d flies FL%.0f through EDR %.3f although such levels are closed", i, l.FL, l.EDR)
		}
	}
	t.Logf("%d legs under raised floor: %s; with closure: %s", hit, plan.Profile, closed.Profile)
}
