package optimizer

import (
	"errors"
	"strings"
	"testing"
	"time"

	"levelpath/perf"
	"levelpath/winds"
)

// shortHop is a still-air narrowbody problem on an invented 770 NM route.
func shortHop(t *testing.T) *Problem {
	return &Problem{Track: track(t, "50,0 50,20", "every-1000:290-410", 50), Aircraft: aircraft(t, "demo-narrowbody"), TakeoffMass: 70000}
}

// calmField is a global calm field on the pressures of fls with
// temperature ISA + dev, valid over a day.
func calmField(t *testing.T, fls []int, dev float64) *winds.Field {
	t.Helper()
	ref := time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)
	const ni, nj = 36, 19
	var msgs []winds.Message
	for _, h := range []int{0, 24} {
		for _, fl := range fls {
			p := perf.FLToPressure(float64(fl))
			zero, tt := make([]float32, ni*nj), make([]float32, ni*nj)
			for i := range tt {
				tt[i] = float32(perf.ISATemperature(perf.AltitudeAt(p)) + dev)
			}
			base := winds.Message{LevelType: 100, Level: p, RefTime: ref, ValidTime: ref.Add(time.Duration(h) * time.Hour),
				Ni: ni, Nj: nj, Lat1: 90, Lon1: 0, Lat2: -90, Lon2: 350, Di: 10, Dj: 10, Ensemble: -1}
			for _, f := range []struct {
				c, n int
				par  winds.Param
				v    []float32
			}{{2, 2, "u", zero}, {2, 3, "v", zero}, {0, 0, "t", tt}} {
				m := base
				m.Category, m.Number, m.Param, m.Values = f.c, f.n, f.par, f.v
				msgs = append(msgs, m)
			}
		}
	}
	fld, err := winds.NewField(msgs)
	if err != nil {
		t.Fatal(err)
	}
	return fld
}

func hasWarning(p *Plan, sub string) bool {
	for _, w := range p.Warnings {
		if strings.Contains(w, sub) {
			return true
		}
	}
	return false
}

// A performance factor multiplies every fuel flow (its definition): the same
// profile at cost index 0 (Mach of best specific range, which a uniform
// factor does not move) burns 2 % more, a little less than 2 % because the
// extra burn lightens the aircraft sooner; the time is unchanged to the
// second; the plan says so.
func TestPerfFactorScalesFuel(t *testing.T) {
	p := shortHop(t)
	base := solve(t, p)
	q := *p
	q.PerfFactorPct = 2
	got, err := Assess(&q, base.Profile)
	if err != nil {
		t.Fatal(err)
	}
	r := got.Totals.Fuel / base.Totals.Fuel
	if r < 1.015 || r > 1.0201 || relDiff(got.Totals.Time, base.Totals.Time) > 1e-3 {
		t.Errorf("fuel ratio %.5f (%.0f vs %.0f kg), time %.0f vs %.0f s", r, got.Totals.Fuel, base.Totals.Fuel, got.Totals.Time, base.Totals.Time)
	}
	if !hasWarning(got, "performance factor +2.0 %") || hasWarning(base, "performance factor") {
		t.Errorf("warnings: %q / %q", got.Warnings, base.Warnings)
	}
	if p.Aircraft.PerfFactorPct != 0 {
		t.Error("the caller's aircraft was changed")
	}
	q.PerfFactorPct = 45
	_, err = Solve(&q)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Field != "PerfFactorPct" {
		t.Errorf("factor 45 %%: %v, want an input error naming PerfFactorPct", err)
	}
}

// Planning without a forecast at ISA+15 is planning in a calm forecast of
// ISA+15 (the deviation is applied to still air): the same profile prices
// the same. With a forecast that has temperatures the deviation is refused.
func TestISADevWithoutForecast(t *testing.T) {
	p := shortHop(t)
	p.ISADev = 15
	plan := solve(t, p)
	if !hasWarning(plan, "ISA+15") {
		t.Errorf("warnings %q do not name ISA+15", plan.Warnings)
	}
	fls := []int{250, 270, 290, 300, 310, 320, 330, 340, 350, 360, 370, 380, 390, 400, 410, 430}
	q := shortHop(t)
	q.Weather = calmField(t, fls, 15)
	q.Depart = time.Date(2026, 12, 1, 6, 0, 0, 0, time.UTC)
	p.Depart = q.Depart
	a, err := Assess(p, plan.Profile)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Assess(q, plan.Profile)
	if err != nil {
		t.Fatal(err)
	}
	if relDiff(a.Totals.Fuel, b.Totals.Fuel) > 1e-4 || relDiff(a.Totals.Time, b.Totals.Time) > 1e-4 {
		t.Errorf("ISA+15 still air %.1f kg %.0f s; calm ISA+15 forecast %.1f kg %.0f s", a.Totals.Fuel, a.Totals.Time, b.Totals.Fuel, b.Totals.Time)
	}
	isa, err := Assess(shortHop(t), plan.Profile)
	if err != nil {
		t.Fatal(err)
	}
	if !(a.Totals.Fuel != isa.Totals.Fuel) {
		t.Errorf("ISA+15 prices as ISA: %.1f kg", a.Totals.Fuel)
	}
	q.ISADev = 10
	_, err = Assess(q, plan.Profile)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Field != "ISADev" {
		t.Errorf("ISA deviation with forecast temperatures: %v, want an input error naming ISADev", err)
	}
}
