package optimizer

import (
	"testing"
	"time"
)

func arrivalProblem(t *testing.T) *Problem {
	t.Helper()
	return &Problem{Track: track(t, "45.0,-73.0 40.0,-40.0", "odd-even-true", 50), Aircraft: aircraft(t, "demo-narrowbody"),
		Depart: time.Date(2026, 12, 1, 6, 0, 0, 0, time.UTC), TakeoffMass: 72000}
}

// TestSolveArriveBy: the plan returned arrives inside the window whenever
// the result says it is met; an earlier target never gets a lower cost
// index (arrival is non-increasing in CI); windows outside what CI 0 and
// the highest CI can fly are reported as not met, by how much.
func TestSolveArriveBy(t *testing.T) {
	p := arrivalProblem(t)
	slow, fast := *p, *p
	fast.CI = 300
	ps, pf := solve(t, &slow), solve(t, &fast)
	as, af := arrivalOf(ps), arrivalOf(pf)
	if !as.After(af.Add(2 * time.Minute)) {
		t.Fatalf("CI 0 arrives %s, CI 300 %s: too close to test", as, af)
	}
	prevCI := -1.0
	for i, frac := range []float64{0.9, 0.6, 0.3} { // later targets first
		at := af.Add(time.Duration(frac * float64(as.Sub(af))))
		pl, res, err := SolveArriveBy(p, ArrivalTarget{At: at, Early: -3 * time.Minute, Late: 3 * time.Minute, MaxCI: 300})
		if err != nil {
			t.Fatal(err)
		}
		a := arrivalOf(pl)
		if res.Met && (a.Before(at.Add(-3*time.Minute)) || a.After(at.Add(3*time.Minute))) {
			t.Errorf("target %s: reported met but arrives %s", at, a)
		}
		if a.After(at.Add(3 * time.Minute)) {
			t.Errorf("target %s: arrives late, %s", at, a)
		}
		if i > 0 && res.CI < prevCI {
			t.Errorf("earlier target %s got CI %g, lower than %g for a later one", at, res.CI, prevCI)
		}
		prevCI = res.CI
		t.Logf("target %s: CI %g, arrival %s, met %v, %d plans", at.Format("15:04"), res.CI, a.Format("15:04:05"), res.Met, res.Tries)
	}
	// Faster than the fastest plan: late by the difference.
	_, res, err := SolveArriveBy(p, ArrivalTarget{At: af.Add(-20 * time.Minute), MaxCI: 300})
	if err != nil || res.Met || res.Miss < 19*time.Minute {
		t.Errorf("unreachable early target: met %v, miss %v, err %v", res.Met, res.Miss, err)
	}
	// Slower than CI 0 within a narrow window: CI 0, early.
	_, res, err = SolveArriveBy(p, ArrivalTarget{At: as.Add(30 * time.Minute), Early: -time.Minute, Late: time.Minute})
	if err != nil || res.Met || res.CI != 0 || res.Miss > -28*time.Minute {
		t.Errorf("late target: CI %g met %v miss %v err %v", res.CI, res.Met, res.Miss, err)
	}
	for _, bad := range []ArrivalTarget{
		{At: as, Early: time.Minute, Late: -time.Minute},
		{At: p.Depart.Add(-time.Hour)},
		{},
	} {
		if _, _, err := SolveArriveBy(p, bad); !IsInputError(err) {
			t.Errorf("%+v: %v, want an input error", bad, err)
		}
	}
}

func TestDelayCost(t *testing.T) {
	d := DelayCost{Minutes: []float64{0, 15, 60}, Cost: []float64{0, 0, 4500}}
	if err := d.Check(); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ late, want float64 }{{-10, 0}, {0, 0}, {10, 0}, {37.5, 2250}, {60, 4500}, {90, 7500}} {
		if got := d.At(c.late); got != c.want {
			t.Errorf("At(%v) = %v, want %v", c.late, got, c.want)
		}
	}
	for _, bad := range []DelayCost{
		{Minutes: []float64{0, 30}, Cost: []float64{100, 50}}, // falls with lateness
		{Minutes: []float64{10, 5}, Cost: []float64{0, 1}},
		{},
	} {
		if err := bad.Check(); !IsInputError(err) {
			t.Errorf("%+v: %v, want an input error", bad, err)
		}
	}
	// A steep delay cost makes a late flight fly a higher cost index than
	// no delay cost does; with none the lowest-cost CI is the problem's own.
	p := arrivalProblem(t)
	p.CI = 20
	slow := solve(t, p)
	sched := arrivalOf(slow).Add(-15 * time.Minute)
	cis := []float64{0, 20, 60, 150, 300}
	_, none, err := SolveDelayCost(p, sched, DelayCost{Minutes: []float64{0}, Cost: []float64{0}}, cis)
	if err != nil {
		t.Fatal(err)
	}
	_, steep, err := SolveDelayCost(p, sched, DelayCost{Minutes: []float64{0, 1}, Cost: []float64{0, 500}}, cis)
	if err != nil {
		t.Fatal(err)
	}
	if none.CI != 20 || !(steep.CI > none.CI) || steep.LateMin > none.LateMin {
		t.Errorf("no delay cost: CI %g (want 20, the value of time itself), steep: CI %g, late %.1f min vs %.1f", none.CI, steep.CI, steep.LateMin, none.LateMin)
	}
}
