package optimizer

import (
	"math"
	"strings"
	"testing"

	"levelpath/perf"
)

// TestAssessUnreachableLevel: a level the aircraft cannot climb to is
// priced as far as the climb goes (levelled off at the highest whole level
// the climb completes to, under perf's 100 ft/min rule) and listed as a
// "climb" violation, never an error.
func TestAssessUnreachableLevel(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "odd-even-magnetic", 50)
	a := aircraft(t, "demo-narrowbody")
	p := &Problem{Track: tr, Aircraft: a, TakeoffMass: a.MTOW}
	for _, prof := range []string{"FL410", "FL330,FL410@600"} {
		pr, err := ParseProfile(prof)
		if err != nil {
			t.Fatal(err)
		}
		plan, err := Assess(p, pr)
		if err != nil {
			t.Fatalf("%s: %v", prof, err)
		}
		var v *Violation
		for i := range plan.Violations {
			if plan.Violations[i].Limit == "climb" {
				v = &plan.Violations[i]
				break
			}
		}
		if v == nil {
			t.Fatalf("%s: no climb violation in %v", prof, plan.Violations)
		}
		if !strings.Contains(v.Detail, "levels off at FL") {
			t.Errorf("%s: %q does not say where the aircraft levels off", prof, v.Detail)
		}
		// The level-off level: the climb to it completes, one level
		// higher it does not (the same perf climb, asked directly).
		var lo *Leg
		for i := range plan.Legs {
			if l := &plan.Legs[i]; (l.Phase == PhaseClimb || l.Phase == PhaseStep) && l.FL < 410 {
				lo = l
			}
			if l := &plan.Legs[i]; l.FL < 410 && l.Phase == PhaseCruise && l.FromDist >= plan.Legs[v.Leg].FromDist {
				break
			}
		}
		if lo == nil {
			t.Fatalf("%s: no leg levels off below FL410", prof)
		}
		q := *p
		if _, err := q.normalise(); err != nil {
			t.Fatal(err)
		}
		sch := q.ClimbSchedule
		from := perf.PressureAt(q.EndAltitude)
		if lo.Phase == PhaseStep {
			from = perf.FLToPressure(lo.FromFL)
			sch = machSchedule(a, q.ClimbSchedule, lo.Mach, from)
		}
		up := transition(a, lo.MassStart, from, perf.FLToPressure(lo.FL+1), lo.ISADev, sch, true)
		if up.ok {
			t.Errorf("%s: levelled off at FL%.0f although the climb to FL%.0f completes", prof, lo.FL, lo.FL+1)
		}
		if !(plan.Totals.Fuel > 0) || math.Abs(plan.Legs[len(plan.Legs)-1].ToDist-plan.Distance) > 1e-6 {
			t.Errorf("%s: not priced to the destination", prof)
		}
	}
}

// TestAssessStepOnBoundary: a change that begins exactly on a segment
// boundary is judged with the segment that begins there. A level blocked
// from inside that segment makes the step descent forced, hence allowed
// (the search's rule), and the step leg carries that segment.
func TestAssessStepOnBoundary(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "odd-even-magnetic", 50)
	a := aircraft(t, "demo-narrowbody")
	k := len(tr.Segments) / 2
	b := tr.Segments[k].FromDist
	p := &Problem{Track: tr, Aircraft: a, TakeoffMass: 64000,
		Blocked: []Block{{FromDist: b + 5*nmToM, ToDist: tr.Segments[k+3].ToDist, Levels: []int{330}}}}
	prof := Profile{Initial: 330, Changes: []Change{{AtDist: b, FL: 310}}}
	plan, err := Assess(p, prof)
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range plan.Violations {
		t.Errorf("unexpected violation: %s: %s", v.Limit, v.Detail)
	}
	found := false
	for _, l := range plan.Legs {
		if l.Phase == PhaseStep {
			found = true
			if l.Segment != k {
				t.Errorf("step leg on segment %d, want %d (the one beginning at the step)", l.Segment, k)
			}
		}
	}
	if !found {
		t.Fatal("no step leg")
	}
	// The plan of the same problem breaks none of its own rules.
	sp := solve(t, p)
	for _, v := range sp.Violations {
		t.Errorf("plan %s breaks %s: %s", sp.Profile, v.Limit, v.Detail)
	}
}

// TestAssessAboveCeiling: a level above the certified ceiling is listed,
// not refused.
func TestAssessAboveCeiling(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "odd-even-magnetic", 50)
	a := aircraft(t, "demo-narrowbody")
	plan, err := Assess(&Problem{Track: tr, Aircraft: a, TakeoffMass: 60000}, Profile{Initial: 590})
	if err != nil {
		t.Fatal(err)
	}
	var lims []string
	for _, v := range plan.Violations {
		lims = append(lims, string(v.Limit))
	}
	if s := strings.Join(lims, ","); !strings.Contains(s, "certified") || !strings.Contains(s, "climb") {
		t.Errorf("FL590: violations %s, want certified and climb", s)
	}
}

// TestAssessNamesOpenLevels: a level the semicircular rule (ICAO Annex 2,
// Appendix 3: eastbound odd thousands) does not allow is listed with the
// nearest allowed levels, what the aircraft would fly instead.
func TestAssessNamesOpenLevels(t *testing.T) {
	tr := track(t, "45.0,-73.0 47.0,-40.0", "odd-even-magnetic", 50) // eastbound
	plan, err := Assess(&Problem{Track: tr, Aircraft: aircraft(t, "demo-narrowbody"), TakeoffMass: 64000}, Profile{Initial: 340})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, v := range plan.Violations {
		found = found || v.Limit == "level-rule" && strings.Contains(v.Detail, "nearest open levels FL330 and FL350")
	}
	if !found {
		t.Errorf("no level-rule violation naming FL330 and FL350: %v", plan.Violations)
	}
}
