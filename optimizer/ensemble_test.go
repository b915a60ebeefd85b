package optimizer

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os/exec"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// ensembleMembers builds n members of the invented ensemble
// (synthetic.Ensemble), each opened with winds.Options.Member.
func ensembleMembers(t testing.TB, n int) []Member {
	t.Helper()
	ref := time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC)
	msgs := synthetic.Ensemble(ref, n)
	out := make([]Member, n)
	for k := range n {
		f, err := winds.NewFieldWith(winds.Options{Member: &k}, msgs)
		if err != nil {
			t.Fatal(err)
		}
		out[k] = Member{Number: k, Weather: f}
	}
	return out
}

// ensembleFlight is the demo long-haul flight on 100 NM segments.
func ensembleFlight(t testing.TB) Problem {
	ref := time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC)
	return Problem{Track: track(t, longHaulRoute, "every-1000:290-430", 100), Aircraft: aircraft(t, "demo-widebody"),
		Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
}

// TestEnsembleIdenticalMembers: an ensemble whose members are all one
// forecast has, on every edge, the mean of equal costs, so its plan must
// be Solve's plan of that forecast, exactly (every field of the plan),
// without and with a contrail cost.
func TestEnsembleIdenticalMembers(t *testing.T) {
	wx, ref := demoWeather(t)
	p := Problem{Track: track(t, longHaulRoute, "every-1000:290-430", 100), Aircraft: aircraft(t, "demo-widebody"),
		Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
	for _, cc := range []float64{0, 20} { // with a contrail cost the search prices contrails too
		p.ContrailCost = cc
		identicalMembers(t, p, wx, true)
	}
	// Other policies and routes, so that the ensemble's edges (a copy of
	// the solver's, priced on every member) cannot drift from Solve's.
	variants := []func(q *Problem){
		func(q *Problem) { q.Exact = true },
		func(q *Problem) { q.Speed = Speed{Kind: SpeedLRC} },
		func(q *Problem) { q.Steps.AllowDescent, q.Steps.MaxSteps = true, 2 },
		func(q *Problem) { q.Steps.NoSteps = true },
		func(q *Problem) {
			q.Track, q.Aircraft, q.TakeoffMass = track(t, "../testdata/demo/route-sunhaven.geojson", "odd-even-magnetic", 50), aircraft(t, "demo-narrowbody"), 72000
		},
	}
	for i, v := range variants {
		q := p
		q.ContrailCost = 0
		v(&q)
		t.Run(strconv.Itoa(i), func(t *testing.T) { identicalMembers(t, q, wx, false) })
	}
}

func identicalMembers(t *testing.T, p Problem, wx *winds.Field, quantile bool) {
	want := solve(t, &p)
	objs := []Objective{{}}
	if quantile {
		objs = append(objs, Objective{Quantile: 0.9})
	}
	for _, obj := range objs {
		ms := []Member{{0, wx}, {1, wx}, {2, wx}, {3, wx}}
		got, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: ms, Objective: obj})
		if err != nil {
			t.Fatal(err)
		}
		r := got.Ensemble
		got.Ensemble = nil
		if obj.Quantile == 0 {
			// Field by field; legs and waypoints hold NaN (no margin on a
			// climb), which DeepEqual never finds equal, so they are
			// compared as printed (%v prints every bit of a float64 that
			// matters: the shortest repr that round-trips).
			gv, wv := reflect.ValueOf(*got), reflect.ValueOf(*want)
			for i := range gv.NumField() {
				name := gv.Type().Field(i).Name
				g, w := gv.Field(i).Interface(), wv.Field(i).Interface()
				same := reflect.DeepEqual(g, w) || name == "Nodes" || name == "Edges" // the ensemble's search is Dijkstra
				if name == "Legs" || name == "Waypoints" {
					same = fmt.Sprintf("%v", g) == fmt.Sprintf("%v", w)
				}
				if !same {
					t.Errorf("field %s differs from Solve's:\n got %v\nwant %v", name, g, w)
				}
			}
		}
		// Dijkstra (the quantile's search) finds what A* finds.
		if !sameProfile(got.Profile, want.Profile) || got.Totals != want.Totals {
			t.Errorf("%s: profile %s %+v, Solve %s %+v", obj, got.Profile, got.Totals, want.Profile, want.Totals)
		}
		if r == nil || r.Profile.Fuel.Min != r.Profile.Fuel.Max || r.Profile.Fuel.P50 != want.Totals.Fuel {
			t.Errorf("%s: report %+v", obj, r)
		}
	}
}

// memberProblem is the flight on member m's weather.
func memberProblem(p Problem, m Member) *Problem {
	q := p
	q.Weather = m.Weather
	return &q
}

// TestEnsembleMeanAndRegret plans the invented 6-member ensemble under
// the mean objective and checks, by pricing with Assess and planning with
// Solve member by member (not from the report): the chosen profile's
// expected cost is not above the control member's own plan priced on
// every member; each member's own plan is not beaten on that member
// (beyond the search's documented approximations, 0.02 %); with
// RobustShare 1 every member's priced legs keep the floor.
func TestEnsembleMeanAndRegret(t *testing.T) {
	ms := ensembleMembers(t, 6)
	p := ensembleFlight(t)
	plan, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: ms, Regret: true})
	if err != nil {
		t.Fatal(err)
	}
	ctrlOwn := solve(t, memberProblem(p, ms[0]))
	var chosenMean, ctrlMean float64
	for i, m := range ms {
		q := memberProblem(p, m)
		on, err := Assess(q, plan.Profile)
		if err != nil {
			t.Fatal(err)
		}
		c, err := Assess(q, ctrlOwn.Profile)
		if err != nil {
			t.Fatal(err)
		}
		chosenMean += on.Totals.Cost / float64(len(ms))
		ctrlMean += c.Totals.Cost / float64(len(ms))
		own := solve(t, q)
		if own.Totals.Cost > on.Totals.Cost*(1+2e-4) {
			t.Errorf("member %d: its own plan %s costs %.1f, the ensemble's %s only %.1f on it", m.Number, own.Profile, own.Totals.Cost, plan.Profile, on.Totals.Cost)
		}
		if r := plan.Ensemble.PerMember[i]; math.Abs(r.Cost-on.Totals.Cost) > 1e-6*on.Totals.Cost || math.Abs(r.Regret-(on.Totals.Cost-own.Totals.Cost)) > 1e-3*on.Totals.Cost {
			t.Errorf("member %d: report cost %.2f regret %.2f, Assess %.2f, own %.2f", m.Number, r.Cost, r.Regret, on.Totals.Cost, own.Totals.Cost)
		}
		for _, v := range on.Violations {
			t.Errorf("member %d: robust share 1 but %s: %s", m.Number, v.Limit, v.Detail)
		}
		for _, l := range on.Legs {
			if l.BuffetMargin < l.Floor-1e-9 {
				t.Errorf("member %d leg at %.0f NM: margin %.4f under floor %.2f", m.Number, l.FromDist/nmToM, l.BuffetMargin, l.Floor)
			}
		}
	}
	if chosenMean > ctrlMean*(1+1e-9) {
		t.Errorf("mean cost of the ensemble plan %.2f above the control's own plan's %.2f", chosenMean, ctrlMean)
	}
	r := plan.Ensemble
	if r.Members != 6 || r.Need != 6 || r.Control == nil || r.Regret == nil || math.Abs(r.Profile.MeanCost-chosenMean) > 1e-6*chosenMean {
		t.Errorf("report: members %d need %d control %v regret %v mean %.2f (Assess %.2f)", r.Members, r.Need, r.Control != nil, r.Regret, r.Profile.MeanCost, chosenMean)
	}
	t.Logf("ensemble %s mean %.1f (chosen: %s); control's own %s mean %.1f; fuel P10-P90 %.0f-%.0f kg; regret min %.1f P50 %.1f max %.1f",
		plan.Profile, chosenMean, r.Chosen, ctrlOwn.Profile, ctrlMean, r.Profile.Fuel.P10, r.Profile.Fuel.P90, r.Regret.Min, r.Regret.P50, r.Regret.Max)
}

// TestEnsembleBadInput: a robust share outside (0, 1], members on
// different grids, an objective out of range.
func TestEnsembleBadInput(t *testing.T) {
	ms := ensembleMembers(t, 2)
	p := ensembleFlight(t)
	for _, s := range []float64{-0.5, 1.5, math.NaN()} {
		_, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: ms, RobustShare: s})
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != "RobustShare" || !strings.Contains(err.Error(), strconv.FormatFloat(s, 'g', -1, 64)) {
			t.Errorf("share %v: %v", s, err)
		}
	}
	wx, _ := demoWeather(t) // 2-degree grid, the members' is 5-degree
	_, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: []Member{ms[0], {7, wx}}})
	if !IsInputError(err) || !strings.Contains(err.Error(), "member 7") || !strings.Contains(err.Error(), "grid") {
		t.Errorf("members on different grids: %v", err)
	}
	if _, err := ParseObjective("quantile:1.5"); err == nil || !strings.Contains(err.Error(), "quantile:1.5") {
		t.Errorf("quantile 1.5: %v", err)
	}
	if o, err := ParseObjective("quantile:0.9"); err != nil || o.Quantile != 0.9 || o.String() != "quantile:0.9" {
		t.Errorf("quantile:0.9: %v %v", o, err)
	}
}

// TestSpreadAgainstPython compares SpreadOf's P10, P50 and P90 with
// Python 3's statistics.quantiles(method="inclusive"), which is Hyndman
// and Fan's definition 7 (skipped when python3 is not installed).
func TestSpreadAgainstPython(t *testing.T) {
	py, err := exec.LookPath("python3")
	if err != nil {
		t.Skip("python3 not installed")
	}
	xs := []float64{93512.5, 93100, 94020.25, 92877, 93999, 93650.75, 93001, 94410, 92950.5, 93333}
	var args []string
	for _, x := range xs {
		args = append(args, strconv.FormatFloat(x, 'g', -1, 64))
	}
	script := "import statistics,sys; q=statistics.quantiles([float(a) for a in sys.argv[1:]], n=10, method='inclusive'); print(repr(q[0]), repr(q[4]), repr(q[8]))"
	out, err := exec.Command(py, append([]string{"-c", script}, args...)...).Output()
	if err != nil {
		t.Fatal(err)
	}
	f := strings.Fields(string(out))
	s := SpreadOf(xs)
	for i, got := range []float64{s.P10, s.P50, s.P90} {
		want, _ := strconv.ParseFloat(f[i], 64)
		if math.Abs(got-want) > 1e-9*want {
			t.Errorf("quantile %d: %v, Python %v", i, got, want)
		}
	}
	if s.Min != 92877 || s.Max != 94410 {
		t.Errorf("min %v max %v", s.Min, s.Max)
	}
}

// TestEnsembleSharedMach compares the default search (members at the
// control's Mach) with MemberMach (each member at its own econ Mach, as
// Solve prices it): the envelope theorem makes the shared Mach's error
// second order, so the two profiles' expected costs, priced exactly on
// every member, must agree within 0.02 % (the search's documented
// approximation), and MemberMach's must not be lower by more.
func TestEnsembleSharedMach(t *testing.T) {
	ms := ensembleMembers(t, 5)
	p := ensembleFlight(t)
	shared, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: ms})
	if err != nil {
		t.Fatal(err)
	}
	own, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: ms, MemberMach: true})
	if err != nil {
		t.Fatal(err)
	}
	a, b := shared.Ensemble.Profile.MeanCost, own.Ensemble.Profile.MeanCost
	if a > b*(1+2e-4) {
		t.Errorf("shared Mach %s mean cost %.2f, member Mach %s %.2f: %.4f %% apart", shared.Profile, a, own.Profile, b, 100*(a-b)/b)
	}
	t.Logf("shared Mach %s %.2f (%d edges), member Mach %s %.2f (%d edges)", shared.Profile, a, shared.Edges, own.Profile, b, own.Edges)
}

// TestEnsembleRobustShare: with RobustShare 0.6 of 6 members an edge needs
// 4 members (ceil(3.6)); the chosen profile, priced on every member,
// breaks a limit in at most 2; the quantile objective's value is the
// Hyndman-Fan quantile of the members' priced costs.
func TestEnsembleRobustShare(t *testing.T) {
	ms := ensembleMembers(t, 6)
	p := ensembleFlight(t)
	p.Floor = 1.45 // near the ceiling: members differ in what they allow
	plan, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: ms, RobustShare: 0.6, Objective: Objective{Quantile: 0.8}})
	if err != nil {
		t.Fatal(err)
	}
	r := plan.Ensemble
	if r.Need != 4 || r.Profile.Breaking > 2 || len(r.Approximations) < 2 {
		t.Errorf("need %d, breaking %d, approximations %q", r.Need, r.Profile.Breaking, r.Approximations)
	}
	costs := make([]float64, len(r.PerMember))
	for i, m := range r.PerMember {
		costs[i] = m.Cost
	}
	if q := quantile7(costs, 0.8); math.Abs(q-r.Profile.Objective) > 1e-9*q {
		t.Errorf("objective %.3f, quantile of the members' costs %.3f", r.Profile.Objective, q)
	}
	t.Logf("floor 1.45: %s, breaking in %d members, chosen %s", plan.Profile, r.Profile.Breaking, r.Chosen)
}

// TestEnsembleKeepsRobustShare: over flights not tuned for, the chosen
// profile breaks limits in no more members than the robust share allows
// when each member is priced exactly, or the plan says so in a warning
// (never silent). The narrowbody case once chose a profile whose first
// step came too soon after a later top of climb in one member.
func TestEnsembleKeepsRobustShare(t *testing.T) {
	ms := ensembleMembers(t, 10)
	ref := time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC)
	for _, c := range []struct {
		route, ac string
		mass, ci  float64
		dep       time.Duration
	}{
		{"../testdata/demo/route-lakeport.geojson", "demo-narrowbody", 70000, 20, 3 * time.Hour},
		{"../testdata/demo/route-lakeport.geojson", "demo-narrowbody", 64000, 0, 4 * time.Hour},
		{"../testdata/demo/route-sunhaven.geojson", "demo-narrowbody", 72000, 40, 3 * time.Hour},
		{"../testdata/demo/route-corvale.geojson", "demo-regional", 37000, 10, 2 * time.Hour},
	} {
		p := Problem{Track: track(t, c.route, "", 50), Aircraft: aircraft(t, c.ac), Depart: ref.Add(c.dep), TakeoffMass: c.mass, CI: c.ci}
		plan, err := SolveEnsemble(context.Background(), &EnsembleProblem{Problem: p, Members: ms})
		if err != nil {
			t.Errorf("%s %s %.0f kg: %v", c.route, c.ac, c.mass, err)
			continue
		}
		r := plan.Ensemble
		if r.Profile.Breaking > r.Members-r.Need && !slices.ContainsFunc(plan.Warnings, func(w string) bool { return strings.Contains(w, "more than the robust share allows") }) {
			t.Errorf("%s %s %.0f kg: the chosen %s breaks limits in %d of %d members (need %d) without a warning: %q",
				c.route, c.ac, c.mass, r.Profile.Profile, r.Profile.Breaking, r.Members, r.Need, plan.Warnings)
		}
	}
}
