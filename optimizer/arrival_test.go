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

// arrivalCase is a flight for the arrival-window properties: several
// routes, aircraft and masses, in still air and in the synthetic weather.
type arrivalCase struct {
	name string
	p    func(t *testing.T) *Problem
}

func arrivalCases() []arrivalCase {
	dep := time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC)
	still := func(route, ac string, mass float64) func(t *testing.T) *Problem {
		return func(t *testing.T) *Problem {
			return &Problem{Track: track(t, route, "odd-even-true", 50), Aircraft: aircraft(t, ac), Depart: dep, TakeoffMass: mass}
		}
	}
	return []arrivalCase{
		{"narrowbody 72 t transatlantic, still air", still("45.0,-73.0 40.0,-40.0", "demo-narrowbody", 72000)},
		{"narrowbody 60 t, still air", still("50.0,5.0 38.0,30.0", "demo-narrowbody", 60000)},
		{"regional 37 t, still air", still("52.0,-2.0 41.0,12.0", "demo-regional", 37000)},
		{"widebody 190 t, still air", still("10.0,100.0 35.0,140.0", "demo-widebody", 190000)},
		{"widebody 245 t, synthetic weather", func(t *testing.T) *Problem {
			wx, _ := demoWeather(t)
			return &Problem{Track: track(t, longHaulRoute, "odd-even-true", 100), Aircraft: aircraft(t, "demo-widebody"), Weather: wx, Depart: dep, TakeoffMass: 245000}
		}},
	}
}

// arrivalAt is the check's own arrival time: departure plus the plan's
// trip time, rounded to the nanosecond.
func arrivalAt(pl *Plan) time.Time {
	return pl.Depart.Add(time.Duration(pl.Totals.Time*1e9 + 0.5))
}

// TestArriveByProperties checks, on every case and for targets from
// beyond the fastest to beyond the slowest arrival: when the result says
// met, the plan's own arrival lies in the window and no arrival
// violation is listed; when not, the violation is listed with both ends
// of the speed range and the reason holds (the fastest plan is late, the
// slowest early, or the plans a tolerance apart fall on both sides); an
// earlier target never gets a lower cost index; from CI 0 the CI chosen
// is the least not late (the plan a tolerance lower is late). These are
// properties of the bisection method (Press et al., Numerical Recipes,
// 3rd ed., section 9.1) on a monotone step function; no value of the
// invented aircraft is a check value.
func TestArriveByProperties(t *testing.T) {
	if testing.Short() {
		t.Skip("plans each case about 60 times")
	}
	const win = 3 * time.Minute
	for _, c := range arrivalCases() {
		t.Run(c.name, func(t *testing.T) {
			p := c.p(t)
			slow, fast := *p, *p
			fast.CI = DefaultArrivalMaxCI
			as, af := arrivalAt(solve(t, &slow)), arrivalAt(solve(t, &fast))
			if as.Sub(af) < 2*win {
				t.Fatalf("CI 0 arrives %s, CI %g %s: too close to test a %v window", as, DefaultArrivalMaxCI, af, win)
			}
			for _, base := range []float64{0, 35} {
				prevCI := -1.0
				for _, frac := range []float64{1.5, 1.0, 0.8, 0.6, 0.4, 0.2, 0.0, -0.5} { // later targets first
					at := af.Add(time.Duration(frac * float64(as.Sub(af))))
					q := *p
					q.CI = base
					pl, res, err := SolveArriveBy(&q, ArrivalTarget{At: at, Early: -win, Late: win})
					if err != nil {
						t.Fatal(err)
					}
					a := arrivalAt(pl)
					open, close := at.Add(-win), at.Add(win)
					var viol []Violation
					for _, v := range pl.Violations {
						if v.Limit == LimitArrival {
							viol = append(viol, v)
						}
					}
					if pl.CI != res.CI || pl.Arrival == nil || pl.Arrival.CI != res.CI {
						t.Errorf("plan CI %g, result CI %g, Plan.Arrival %v", pl.CI, res.CI, pl.Arrival)
					}
					if res.Met {
						if a.Before(open) || a.After(close) || len(viol) != 0 {
							t.Errorf("base %g target %s: reported met but arrives %s (window %s-%s), %d arrival violations", base, at, a, open, close, len(viol))
						}
					} else {
						if len(viol) != 1 || res.Slowest == nil || res.Fastest == nil || pl.Status() == StatusOK {
							t.Fatalf("base %g target %s: not met, but violations %v, slowest %v, fastest %v, status %s", base, at, viol, res.Slowest, res.Fastest, pl.Status())
						}
						why := res.Fastest.Arrival.After(close) || res.Slowest.Arrival.Before(open)
						if !why && res.CI >= res.Tolerance { // a step over the window: the plans a tolerance apart straddle it
							lower := *p
							lower.CI = res.CI - res.Tolerance
							why = a.Before(open) && arrivalAt(solve(t, &lower)).After(close)
						}
						if !why {
							t.Errorf("base %g target %s: reported not met (CI %g arrives %s) with no reason: slowest %s, fastest %s", base, at, res.CI, a, res.Slowest.Arrival, res.Fastest.Arrival)
						}
					}
					if res.CI < prevCI {
						t.Errorf("base %g: earlier target %s got CI %g, lower than %g for a later one", base, at, res.CI, prevCI)
					}
					prevCI = res.CI
					if base == 0 && res.Met && res.CI >= res.Tolerance {
						lower := *p
						lower.CI = res.CI - res.Tolerance
						if la := arrivalAt(solve(t, &lower)); !la.After(close) {
							t.Errorf("target %s: CI %g chosen, but CI %g is not late either (%s)", at, res.CI, lower.CI, la)
						}
					}
					t.Logf("base %g target %s: CI %g, arrival %s, met %v, miss %v, %d plans", base, at.Format("15:04"), res.CI, a.Format("15:04:05"), res.Met, res.Miss, res.Tries)
				}
			}
		})
	}
}

// TestArriveByBaseCI: the problem's own CI is kept when it already
// arrives in the window (one plan), and a target it misses on the early
// side lowers the CI (the least-cost plan in the window is the one
// closest to the value of time).
func TestArriveByBaseCI(t *testing.T) {
	p := arrivalProblem(t)
	p.CI = 60
	base := solve(t, p)
	a := arrivalAt(base)
	_, res, err := SolveArriveBy(p, ArrivalTarget{At: a, Early: -time.Minute, Late: time.Minute})
	if err != nil || !res.Met || res.CI != 60 || res.Tries != 1 {
		t.Errorf("target at the base CI's own arrival: CI %g met %v, %d plans, err %v", res.CI, res.Met, res.Tries, err)
	}
	_, res, err = SolveArriveBy(p, ArrivalTarget{At: a.Add(6 * time.Minute), Early: -2 * time.Minute, Late: 2 * time.Minute})
	if err != nil || !(res.CI < 60) {
		t.Errorf("later target than the base CI flies: CI %g met %v err %v, want below 60", res.CI, res.Met, err)
	}
}

func TestParseArrivalWindow(t *testing.T) {
	for _, c := range []struct {
		in          string
		early, late time.Duration
		ok          bool
	}{
		{"-5m,+10m", -5 * time.Minute, 10 * time.Minute, true},
		{" -1h , 0m ", -time.Hour, 0, true},
		{"-5m;+10m", -5 * time.Minute, 10 * time.Minute, true},
		{"0s,0s", 0, 0, true},
		{"+10m,-5m", 0, 0, false}, // reversed
		{"5m", 0, 0, false},
		{"-5m,+10m,1m", 0, 0, false},
		{"-5x,+10m", 0, 0, false},
		{"-5m,", 0, 0, false},
		{"NaN,1m", 0, 0, false},
		{"-25h,0m", 0, 0, false},
		{"", 0, 0, false},
	} {
		e, l, err := ParseArrivalWindow(c.in)
		if (err == nil) != c.ok || c.ok && (e != c.early || l != c.late) {
			t.Errorf("ParseArrivalWindow(%q) = %v, %v, %v", c.in, e, l, err)
		}
	}
}

// TestArriveByDepartureFromWeather: with no departure time the plan
// departs at the weather's first valid time, and a target not after it is
// refused as input, for the window and the delay-cost search alike.
func TestArriveByDepartureFromWeather(t *testing.T) {
	wx, ref := demoWeather(t)
	p := &Problem{Track: track(t, "45.0,-73.0 40.0,-40.0", "odd-even-true", 50), Aircraft: aircraft(t, "demo-narrowbody"), Weather: wx, TakeoffMass: 72000}
	if _, _, err := SolveArriveBy(p, ArrivalTarget{At: ref.Add(-time.Hour)}); !IsInputError(err) {
		t.Errorf("window: %v, want an input error", err)
	}
	cost := DelayCost{Minutes: []float64{0}, Cost: []float64{0}}
	if _, _, err := SolveDelayCost(p, ref.Add(-time.Hour), cost, []float64{0}); !IsInputError(err) {
		t.Errorf("delay cost: %v, want an input error", err)
	}
	lrc := *p
	lrc.Speed = Speed{Kind: SpeedLRC}
	if _, _, err := SolveArriveBy(&lrc, ArrivalTarget{At: ref.Add(10 * time.Hour)}); !IsInputError(err) {
		t.Errorf("lrc: %v, want an input error", err)
	}
}

// BenchmarkArriveByLongHaul is the arrival search on the long-haul bench
// flight for a target 10 minutes before its CI-40 arrival (a bisection
// upward from CI 40); "plans" is the number of plans it made.
func BenchmarkArriveByLongHaul(b *testing.B) {
	p := benchProblem(b)
	pl, err := Solve(p)
	if err != nil {
		b.Fatal(err)
	}
	at := arrivalOf(pl).Add(-10 * time.Minute)
	b.ReportAllocs()
	b.ResetTimer()
	var res ArrivalResult
	for i := 0; i < b.N; i++ {
		if _, res, err = SolveArriveBy(p, ArrivalTarget{At: at, Early: -5 * time.Minute, Late: 5 * time.Minute}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(res.Tries), "plans")
}

// BenchmarkDelayCostLongHaul is the delay-cost search (grid every 16
// kg/min to 500, compass refinement to 1) on the same flight.
func BenchmarkDelayCostLongHaul(b *testing.B) {
	p := benchProblem(b)
	pl, err := Solve(p)
	if err != nil {
		b.Fatal(err)
	}
	s := DelaySearch{Scheduled: arrivalOf(pl).Add(-10 * time.Minute), Cost: DelayCost{Minutes: []float64{0, 5, 30, 90}, Cost: []float64{0, 0, 2500, 15000}}}
	b.ReportAllocs()
	b.ResetTimer()
	var c DelayChoice
	for i := 0; i < b.N; i++ {
		if _, c, err = SearchDelayCost(p, s); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(c.Tries), "plans")
}

// FuzzParseArrivalWindow: a window that parses has its early end not
// after its late end, both within MaxArrivalWindow, and parses again from
// its printed form to the same ends.
func FuzzParseArrivalWindow(f *testing.F) {
	for _, s := range []string{"-5m,+10m", "-1h;0s", "+10m,-5m", "5m", "NaN,1m", "-24h,24h"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		e, l, err := ParseArrivalWindow(s)
		if err != nil {
			return
		}
		if e > l || e < -MaxArrivalWindow || l > MaxArrivalWindow {
			t.Fatalf("%q: window %v,%v", s, e, l)
		}
		e2, l2, err := ParseArrivalWindow(e.String() + "," + l.String())
		if err != nil || e2 != e || l2 != l {
			t.Fatalf("%q: %v,%v printed does not read back: %v,%v %v", s, e, l, e2, l2, err)
		}
	})
}
