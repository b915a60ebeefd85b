package optimizer

import (
	"math"
	"strings"
	"testing"

	"levelpath/perf"
)

// TestSpeedPolicies: a fixed Mach is flown on every cruise leg; LRC legs
// fly the aircraft's long-range cruise Mach (99 % of maximum specific
// range, common practice) at the leg's mass, level and temperature.
func TestSpeedPolicies(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "every-1000:310-390", 50)
	a := aircraft(t, "demo-narrowbody")
	fixed := solve(t, &Problem{Track: tr, Aircraft: a, TakeoffMass: 70000, Speed: Speed{Kind: SpeedFixed, Mach: 0.76}})
	lrc := solve(t, &Problem{Track: tr, Aircraft: a, TakeoffMass: 70000, Speed: Speed{Kind: SpeedLRC}})
	n := 0
	for _, l := range fixed.Legs {
		if l.Phase == PhaseCruise && l.Mach != 0.76 {
			t.Errorf("fixed-Mach plan flies M%.4f at %.0f NM", l.Mach, l.FromDist/nmToM)
		}
	}
	for _, l := range lrc.Legs {
		if l.Phase != PhaseCruise {
			continue
		}
		want, ok := a.LRCMach(l.MassStart, perf.FLToPressure(l.FL), l.ISADev, l.Floor)
		if !ok || math.Abs(l.Mach-want) > 1e-9 {
			t.Errorf("LRC leg at %.0f NM: M%.4f, perf's LRC M%.4f", l.FromDist/nmToM, l.Mach, want)
		}
		n++
	}
	if n == 0 {
		t.Fatal("no cruise leg")
	}
}

// TestAssessViolations: a proposed profile that breaks the level rule, a
// block, the step rules or the buffet floor is priced and each broken
// limit listed.
func TestAssessViolations(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "odd-even-magnetic", 50) // eastbound: odd levels
	a := aircraft(t, "demo-narrowbody")
	p := &Problem{Track: tr, Aircraft: a, TakeoffMass: 70000, Steps: StepRules{MaxSteps: 1},
		Blocked: []Block{{FromDist: 600 * nmToM, ToDist: 700 * nmToM, Levels: []int{350}}}}
	cases := []struct {
		profile string
		limit   Limit
	}{
		{"FL340", "level-rule"},
		{"FL330,FL350@400", "blocked"},
		{"FL310,FL330@300,FL350@600", "step-rule"},
		{"FL330,FL310@600", "step-rule"}, // a step descent where none is allowed
	}
	for _, c := range cases {
		pr, err := ParseProfile(c.profile)
		if err != nil {
			t.Fatal(err)
		}
		plan, err := Assess(p, pr)
		if err != nil {
			t.Fatalf("%s: %v", c.profile, err)
		}
		found := false
		for _, v := range plan.Violations {
			found = found || v.Limit == c.limit
		}
		if !found {
			t.Errorf("%s: no %s violation in %v", c.profile, c.limit, plan.Violations)
		}
		if plan.Totals.Fuel <= 0 {
			t.Errorf("%s: not priced", c.profile)
		}
	}
	// The buffet floor: at 1.6 g the narrowbody's band at 66 t closes
	// near FL320 (1.6 g at m is 1 g at 1.6 m: CL = 2 n m g / (gamma p M^2 S)).
	q := *p
	q.Floor = 1.6
	q.TakeoffMass = 66000
	plan, err := Assess(&q, Profile{Initial: 350})
	if err != nil {
		t.Fatal(err)
	}
	var msgs []string
	for _, v := range plan.Violations {
		msgs = append(msgs, string(v.Limit))
	}
	if s := strings.Join(msgs, ","); !strings.Contains(s, "buffet") {
		t.Errorf("FL350 at 1.6 g: violations %s, want buffet", s)
	}
}

// TestMissingWeatherValues: a hole in the weather (bitmap-missing values)
// on the route is an input error naming it, never still air.
func TestMissingWeatherValues(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "every-1000:310-390", 50)
	fls := []int{300, 320, 340, 360, 380, 400}
	wx := levelField(t, fls, func(fl int) float64 {
		if fl == 340 {
			return math.NaN()
		}
		return 10
	})
	_, err := Solve(&Problem{Track: tr, Aircraft: aircraft(t, "demo-narrowbody"), Weather: wx, TakeoffMass: 70000,
		Depart: wx.Times()[0]})
	if err == nil || !IsInputError(err) || !strings.Contains(err.Error(), "missing values") {
		t.Errorf("got %v, want an input error about missing values", err)
	}
}

// TestLegEnds: the climb starts and the descent ends at the end altitude
// (1,500 ft by default, FL015), and the legs tile the route without gaps.
func TestLegEnds(t *testing.T) {
	plan := solve(t, &Problem{Track: track(t, "45.0,-73.0 47.0,-40.0", "every-1000:310-390", 50), Aircraft: aircraft(t, "demo-narrowbody"), TakeoffMass: 70000})
	first, last := plan.Legs[0], plan.Legs[len(plan.Legs)-1]
	if first.Phase != PhaseClimb || math.Abs(first.FromFL-15) > 1e-9 || last.Phase != PhaseDescent || math.Abs(last.FL-15) > 1e-9 {
		t.Errorf("climb from FL%.1f, descent to FL%.1f; want FL015 both", first.FromFL, last.FL)
	}
	for i := 1; i < len(plan.Legs); i++ {
		if math.Abs(plan.Legs[i].FromDist-plan.Legs[i-1].ToDist) > 1e-6 {
			t.Errorf("gap between legs %d and %d", i-1, i)
		}
	}
	if math.Abs(last.ToDist-plan.Distance) > 1e-6 {
		t.Errorf("last leg ends at %.3f m, route %.3f m", last.ToDist, plan.Distance)
	}
}
