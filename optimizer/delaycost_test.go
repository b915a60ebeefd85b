package optimizer

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"
)

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

func TestParseDelayCost(t *testing.T) {
	good := "# grace 15 min, then 100 kg a minute\nminutes_late,cost_kg\n-10,0\n15,0\n60,4500\n"
	d, err := ParseDelayCost([]byte(good), "d.csv")
	if err != nil || len(d.Minutes) != 3 || d.Minutes[0] != -10 || d.Cost[2] != 4500 {
		t.Fatalf("%+v %v", d, err)
	}
	for _, c := range []struct {
		name, data string
		line       int
		value      string
	}{
		{"falls with lateness", "minutes_late,cost_kg\n0,0\n30,100\n60,50\n", 4, "50"},
		{"minutes repeat", "minutes_late,cost_kg\n0,0\n0,10\n", 3, "0"},
		{"minutes fall", "minutes_late,cost_kg\n10,0\n5,10\n", 3, "5"},
		{"NaN cost", "minutes_late,cost_kg\n0,NaN\n", 2, "NaN"},
		{"infinite minutes", "minutes_late,cost_kg\n+Inf,0\n", 2, "+Inf"},
		{"negative cost", "minutes_late,cost_kg\n0,-1\n", 2, "-1"},
		{"not a number", "minutes_late,cost_kg\n0,abc\n", 2, "abc"},
		{"three fields", "minutes_late,cost_kg\n0,0,1\n", 2, "0,0,1"},
		{"wrong header", "late,cost\n0,0\n", 1, "late,cost"},
		{"empty", "# nothing\n", 0, ""},
		{"no points", "minutes_late,cost_kg\n", 0, ""},
		{"beyond a day", "minutes_late,cost_kg\n2000,0\n", 2, "2000"},
	} {
		_, err := ParseDelayCost([]byte(c.data), "d.csv")
		var de *DelayCostError
		if !errors.As(err, &de) || de.Line != c.line || de.Value != c.value || !strings.Contains(err.Error(), "d.csv") {
			t.Errorf("%s: %v (want line %d, value %q)", c.name, err, c.line, c.value)
		}
	}
}

// lateCost is the test's own piecewise-linear interpolation of (minutes,
// cost) points, flat before the first and on the last slope after the
// last: written apart from DelayCost.At, so that the brute force below is
// a check from outside the code path.
func lateCost(mins, cost []float64, late float64) float64 {
	if late <= mins[0] || len(mins) == 1 {
		return cost[0]
	}
	for i := 1; i < len(mins); i++ {
		if late <= mins[i] || i == len(mins)-1 {
			return cost[i-1] + (cost[i]-cost[i-1])*(late-mins[i-1])/(mins[i]-mins[i-1])
		}
	}
	panic("unreachable")
}

// TestSearchDelayCostBruteForce plans, independently of the search, the
// flight at the chosen CI's neighbours (distances 1, 2, 4 and 8 kg/min)
// and at every grid CI, prices each by the objective fuel + value of time
// x time + delay cost with the test's own interpolation, and checks that
// none is cheaper than the choice (the compass-search guarantee, Kolda,
// Lewis and Torczon 2003, section 3), on several flights and delay costs.
// The gap to the best of a finer brute-force grid (every 4 kg/min) is
// logged, not asserted: the objective is not unimodal.
func TestSearchDelayCostBruteForce(t *testing.T) {
	if testing.Short() {
		t.Skip("plans about 150 times")
	}
	const maxCI = 200.0
	costs := []DelayCost{
		{Minutes: []float64{0, 5, 30, 120}, Cost: []float64{0, 0, 3000, 20000}},
		{Minutes: []float64{0, 1}, Cost: []float64{0, 400}},
	}
	for i, c := range arrivalCases() {
		p := c.p(t)
		p.CI = 20
		ref := arrivalAt(solve(t, p))
		cost := costs[i%len(costs)]
		sched := ref.Add(-8 * time.Minute)
		pl, ch, err := SearchDelayCost(p, DelaySearch{Scheduled: sched, Cost: cost, MaxCI: maxCI})
		if err != nil {
			t.Fatal(err)
		}
		total := func(ci float64) float64 {
			q := *p
			q.CI = ci
			x := solve(t, &q)
			late := arrivalAt(x).Sub(sched).Minutes()
			return x.Totals.Fuel + 20*x.Totals.Time/60 + lateCost(cost.Minutes, cost.Cost, late)
		}
		got := total(ch.CI)
		if math.Abs(got-ch.Total) > 1e-6*got || pl.CI != ch.CI || pl.Delay == nil {
			t.Errorf("%s: choice CI %g total %v, recomputed %v; plan CI %g", c.name, ch.CI, ch.Total, got, pl.CI)
		}
		check := []float64{}
		for _, d := range []float64{1, 2, 4, 8} {
			check = append(check, ch.CI-d, ch.CI+d)
		}
		for ci := 0.0; ci < maxCI; ci += DefaultDelayStep {
			check = append(check, ci)
		}
		check = append(check, maxCI)
		for _, ci := range check {
			if ci < 0 || ci > maxCI {
				continue
			}
			if v := total(ci); v < got-1e-9*got {
				t.Errorf("%s: CI %g totals %.3f, less than %.3f at the chosen CI %g", c.name, ci, v, got, ch.CI)
			}
		}
		bestCI, best := 0.0, math.Inf(1)
		for ci := 0.0; ci <= maxCI; ci += 4 {
			if v := total(ci); v < best {
				bestCI, best = ci, v
			}
		}
		t.Logf("%s: chosen CI %g (late %.1f min, delay cost %.0f, total %.1f, %d plans); brute force every 4: CI %g total %.1f (gap %.3f %%)",
			c.name, ch.CI, ch.LateMin, ch.DelayCost, ch.Total, ch.Tries, bestCI, best, 100*(got-best)/best)
	}
}

// FuzzParseDelayCost: any input either fails with a *DelayCostError or
// gives a delay cost that passes Check and whose At is finite and
// non-decreasing in lateness (the property the file format promises).
func FuzzParseDelayCost(f *testing.F) {
	for _, s := range []string{"minutes_late,cost_kg\n0,0\n15,0\n60,4500\n", "minutes_late,cost_kg\n-5,1\n", "minutes_late,cost_kg\n0,NaN\n", "x\n", "minutes_late,cost_kg\n\"1\",2\n"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		d, err := ParseDelayCost(data, "f.csv")
		if err != nil {
			var de *DelayCostError
			if !errors.As(err, &de) {
				t.Fatalf("error %T %v, want a *DelayCostError", err, err)
			}
			return
		}
		if err := d.Check(); err != nil {
			t.Fatalf("parsed %+v fails Check: %v", d, err)
		}
		prev := math.Inf(-1)
		for _, m := range []float64{-1e4, -60, 0, 1, 30, 90, 1e3, 1e4} {
			c := d.At(m)
			if !finite(c) || c < prev-1e-9*math.Abs(c) {
				t.Fatalf("%+v: At(%v) = %v after %v", d, m, c, prev)
			}
			prev = c
		}
	})
}
