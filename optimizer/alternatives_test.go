package optimizer

import (
	"cmp"
	"slices"
	"testing"
)

// TestAlternativesMatchEnumeration checks Alternatives (Yen's k shortest
// paths on the level graph, then exact pricing) against an exhaustive
// reference: every path of the search graph of the small instance is
// enumerated at its exact masses, each distinct profile is priced by
// Assess, and those breaking no limit are sorted by cost. The k
// alternatives must be distinct, sorted, free of violations, never cheaper
// than the plan, and the i-th must cost no more than the i-th profile of
// the enumeration after the plan's own (0.05 % tolerance: the search's
// mass-grid interpolation).
func TestAlternativesMatchEnumeration(t *testing.T) {
	for _, steps := range []StepRules{
		{MaxChange: 2000 * ftToM, AllowDescent: true, NoMinDistance: true},
		{MaxChange: 2000 * ftToM, MinDistance: 100 * nmToM, MaxSteps: 1}, // step rules the level graph must keep
	} {
		p := smallProblem(t, 0)
		p.Steps = steps
		alternativesVsEnumeration(t, p)
	}
}

func alternativesVsEnumeration(t *testing.T, p *Problem) {
	plan := solve(t, p)
	const k = 3
	alts, err := Alternatives(p, plan, k)
	if err != nil {
		t.Fatal(err)
	}
	// The reference: every path, exact masses.
	s := prepared(t, p)
	profiles := map[string]Profile{}
	var walk func(path []label, id int64, mass float64)
	walk = func(path []label, id int64, mass float64) {
		path = append(path, label{id: id})
		if id == sinkID {
			pr := s.profileOf(path)
			profiles[pr.String()] = pr
			return
		}
		s.successors(id, mass, func(e edge) { walk(path, e.to, mass-e.fuel) })
	}
	walk(nil, sourceID, p.TakeoffMass)
	var ref []Alternative
	for key, pr := range profiles {
		if key == plan.Profile.String() {
			continue
		}
		ap, err := Assess(p, pr)
		if err != nil || breaksProfileLimits(ap.Violations) {
			continue
		}
		ref = append(ref, Alternative{Profile: pr, Totals: ap.Totals})
	}
	slices.SortFunc(ref, func(a, b Alternative) int { return cmp.Compare(a.Totals.Cost, b.Totals.Cost) })
	if len(ref) < k {
		t.Fatalf("the enumeration found only %d feasible profiles besides the plan's", len(ref))
	}
	if len(alts) != k {
		t.Fatalf("got %d alternatives, want %d", len(alts), k)
	}
	seen := map[string]bool{plan.Profile.String(): true}
	for i, a := range alts {
		key := a.Profile.String()
		if seen[key] {
			t.Errorf("alternative %d %s repeats a profile", i, key)
		}
		seen[key] = true
		if breaksProfileLimits(a.Plan.Violations) {
			t.Errorf("alternative %d %s breaks %v", i, key, a.Plan.Violations)
		}
		if a.CostDelta < -5e-4*plan.Totals.Cost {
			t.Errorf("alternative %d %s is cheaper than the plan by %.2f", i, key, -a.CostDelta)
		}
		if i > 0 && a.Totals.Cost < alts[i-1].Totals.Cost {
			t.Errorf("alternatives not sorted by cost at %d", i)
		}
		if a.Totals.Cost > ref[i].Totals.Cost*(1+5e-4) {
			t.Errorf("alternative %d %s costs %.3f; the enumeration's %d-th, %s, costs %.3f", i, key, a.Totals.Cost, i+1, ref[i].Profile, ref[i].Totals.Cost)
		}
	}
	t.Logf("plan %s %.3f; %d profiles enumerated (%d feasible besides the plan's)", plan.Profile, plan.Totals.Cost, len(profiles), len(ref))
	for i := range alts {
		t.Logf("alternative %d: %s %+.3f (margin %.3f g); enumeration %s %.3f", i+1, alts[i].Profile, alts[i].CostDelta, alts[i].MinMargin, ref[i].Profile, ref[i].Totals.Cost)
	}
}
