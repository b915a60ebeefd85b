package optimizer

import (
	"errors"
	"math"
	"testing"
	"time"

	"levelpath/perf"
	"levelpath/perf/contrail"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// contrailInstance is a test flight over the invented demo weather
// (which has invented ice-supersaturated layers); none of its numbers is
// a check value: the tests check properties.
type contrailInstance struct {
	route, aircraft string
	tow             float64
	depart          time.Duration // after the weather's reference time
}

var contrailInstances = []contrailInstance{
	{"route.geojson", "demo-widebody", 230000, 3 * time.Hour},
	{"route.geojson", "demo-widebody", 245000, 2 * time.Hour},
	{"route-sunhaven.geojson", "demo-narrowbody", 70000, 3 * time.Hour},
	{"route-sunhaven.geojson", "demo-narrowbody", 72000, 5 * time.Hour},
	{"route-corvale.geojson", "demo-widebody", 205000, 150 * time.Minute},
	{"route-lakeport.geojson", "demo-regional", 36500, 140 * time.Minute},
}

func (c contrailInstance) problem(t testing.TB, wx *winds.Field, ref time.Time, cost float64) *Problem {
	return &Problem{Track: track(t, "../testdata/demo/"+c.route, "odd-even-magnetic", 50), Aircraft: aircraft(t, c.aircraft),
		Weather: wx, Depart: ref.Add(c.depart), TakeoffMass: c.tow, ContrailCost: cost}
}

// dryWeather is the demo weather without its humidity.
func dryWeather(t testing.TB, ref time.Time) *winds.Field {
	var msgs []winds.Message
	for _, m := range synthetic.Weather(ref) {
		if m.Param != winds.ParamRH {
			msgs = append(msgs, m)
		}
	}
	f, err := winds.NewField(msgs)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// With ContrailCost 0 humidity changes nothing in the plan: profile,
// every leg's fuel, time and mass and the totals are identical, bit for
// bit, to the plan over the same weather without humidity; only the
// contrail classes are added.
func TestContrailCostZeroIsToday(t *testing.T) {
	wx, ref := demoWeather(t)
	dry := dryWeather(t, ref)
	for _, c := range contrailInstances[:3] {
		wet, base := solve(t, c.problem(t, wx, ref, 0)), solve(t, c.problem(t, dry, ref, 0))
		if wet.Profile.String() != base.Profile.String() || wet.Totals != base.Totals || len(wet.Legs) != len(base.Legs) || wet.SearchCost != base.SearchCost {
			t.Fatalf("%s: with humidity %v %+v, without %v %+v", c.route, wet.Profile, wet.Totals, base.Profile, base.Totals)
		}
		for i := range wet.Legs {
			a, b := wet.Legs[i], base.Legs[i]
			if a.Fuel != b.Fuel || a.Time != b.Time || a.MassStart != b.MassStart || a.FL != b.FL || a.Mach != b.Mach {
				t.Errorf("%s leg %d differs: %+v vs %+v", c.route, i, a, b)
			}
		}
		if base.Contrail != nil || wet.Contrail == nil {
			t.Errorf("%s: contrail totals %v without humidity, %v with", c.route, base.Contrail, wet.Contrail)
		}
	}
}

// Raising the contrail cost never increases the persistent-contrail
// distance and never lowers the fuel (CI 0, so the search's cost is fuel
// plus the contrail charge: a cheaper-fuel plan with less contrail
// distance would have been cheaper at the lower cost too). Checked over
// several costs and flights; at least one flight must trade fuel for
// contrail distance, or the test proves nothing.
func TestContrailCostMonotone(t *testing.T) {
	wx, ref := demoWeather(t)
	traded := false
	for _, c := range contrailInstances {
		prevNM, prevFuel := math.Inf(1), 0.0
		for _, cost := range []float64{0, 1, 5, 20, 100} {
			plan := solve(t, c.problem(t, wx, ref, cost))
			ct := plan.Contrail
			if ct == nil {
				t.Fatalf("%s: no contrail totals", c.route)
			}
			if ct.PersistentNM > prevNM+1e-9 || plan.Totals.Fuel < prevFuel-1e-9 {
				t.Errorf("%s +%v at %v kg/NM: persistent %.2f NM (before %.2f), fuel %.2f kg (before %.2f)", c.route, c.depart, cost, ct.PersistentNM, prevNM, plan.Totals.Fuel, prevFuel)
			}
			if cost > 0 && ct.PersistentNM < prevNM-1 && plan.Totals.Fuel > prevFuel {
				traded = true
			}
			if d := ct.DayNM + ct.NightNM - ct.PersistentNM; math.Abs(d) > 1e-6 {
				t.Errorf("%s: day %.3f + night %.3f NM != persistent %.3f NM", c.route, ct.DayNM, ct.NightNM, ct.PersistentNM)
			}
			if math.Abs(ct.Cost-cost*ct.PersistentNM) > 1e-9 {
				t.Errorf("%s: contrail cost %v, want %v x %v", c.route, ct.Cost, cost, ct.PersistentNM)
			}
			prevNM, prevFuel = ct.PersistentNM, plan.Totals.Fuel
		}
	}
	if !traded {
		t.Error("no flight traded fuel for contrail distance")
	}
}

// Each classified leg agrees with package contrail's Classify, which
// applies the Schmidt-Appleman criterion through T_LC (Schumann 1996,
// eq. (11)) rather than the critical efficiency the optimizer uses, at
// the leg's propulsion efficiency from the engine model and its humidity.
func TestContrailLegsAgreeWithClassify(t *testing.T) {
	wx, ref := demoWeather(t)
	kinds := map[ContrailClass]int{}
	for _, c := range contrailInstances[:3] {
		p := c.problem(t, wx, ref, 0)
		plan := solve(t, p)
		el := 0.0
		for i, l := range plan.Legs {
			start := el
			el += l.Time
			if l.Phase != PhaseCruise {
				if l.Contrail != ContrailUnknown {
					t.Errorf("%s leg %d (%s) classified %q", c.route, i, l.Phase, l.Contrail)
				}
				continue
			}
			pr := perf.FLToPressure(l.FL)
			tk, rhw, rhi, ok := segHumidity(wx, &p.Track.Segments[l.Segment], pr, plan.Depart.Add(time.Duration(start*float64(time.Second))))
			if !ok {
				t.Fatalf("%s leg %d: no humidity", c.route, i)
			}
			eta := efficiency(p.Aircraft, l.MassStart, pr, l.Mach, l.ISADev)
			if !(eta > 0.2 && eta < 0.45) {
				t.Errorf("%s leg %d: propulsion efficiency %.3f outside 0.2..0.45 (modern engines about 0.3-0.4, Schumann 1996, from memory)", c.route, i, eta)
			}
			// Classify's own persistence test uses RHi from the mean
			// RH over water; the optimizer averages RHi itself.
			want := ContrailNone
			if contrail.Classify(tk, pr, eta, rhw/100, math.Inf(1)) != contrail.None {
				want = ContrailShortLived
				if rhi >= DefaultContrailRHi {
					want = ContrailPersistent
				}
			}
			if l.Contrail != want || l.RHi != rhi {
				t.Errorf("%s leg %d FL%.0f: %q (RHi %.2f), Classify says %q (RHi %.2f)", c.route, i, l.FL, l.Contrail, l.RHi, want, rhi)
			}
			kinds[l.Contrail]++
		}
	}
	if kinds[ContrailPersistent] == 0 || kinds[ContrailShortLived] == 0 {
		t.Errorf("classes met: %v; the demo weather should give persistent and short-lived legs", kinds)
	}
}

// A negative, infinite or NaN cost, a cost with weather that has no
// humidity and a bad persistence threshold are input errors naming the
// field.
func TestContrailCostBad(t *testing.T) {
	wx, ref := demoWeather(t)
	dry := dryWeather(t, ref)
	c := contrailInstances[5]
	for _, bad := range []struct {
		p     *Problem
		field string
	}{
		{c.problem(t, wx, ref, -1), "ContrailCost"},
		{c.problem(t, wx, ref, math.NaN()), "ContrailCost"},
		{c.problem(t, wx, ref, math.Inf(1)), "ContrailCost"},
		{c.problem(t, dry, ref, 5), "ContrailCost"},
		{c.problem(t, nil, ref, 5), "ContrailCost"},
		{func() *Problem { p := c.problem(t, wx, ref, 5); p.ContrailRHiPct = 20; return p }(), "ContrailRHiPct"},
	} {
		_, err := Solve(bad.p)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != bad.field {
			t.Errorf("cost %v: error %v, want an InputError on %s", bad.p.ContrailCost, err, bad.field)
		}
	}
}

// The cross-section agrees with the plan's own legs: every cruise leg
// classified persistent lies in a cell of its segment at its level, since
// both judge a segment the same way; dry weather gives no cells.
func TestContrailSection(t *testing.T) {
	wx, ref := demoWeather(t)
	c := contrailInstances[0]
	p := c.problem(t, wx, ref, 0)
	plan := solve(t, p)
	cells, err := ContrailSection(p, plan)
	if err != nil {
		t.Fatal(err)
	}
	in := map[[2]int]bool{}
	for _, cell := range cells {
		k := segmentIndex(p.Track.Segments, cell.FromDist+1)
		in[[2]int{k, cell.FL}] = true
	}
	found := 0
	for i, l := range plan.Legs {
		if l.Contrail != ContrailPersistent || l.FromDist != p.Track.Segments[l.Segment].FromDist {
			continue // judged at the leg's own start time: only legs that start on a boundary are comparable
		}
		found++
		if !in[[2]int{l.Segment, int(l.FL)}] {
			t.Errorf("leg %d (segment %d, FL%.0f) persistent but not in the cross-section", i, l.Segment, l.FL)
		}
	}
	if found == 0 || len(cells) == 0 {
		t.Errorf("%d persistent legs, %d cells: the demo weather should give both", found, len(cells))
	}
	dp := c.problem(t, dryWeather(t, ref), ref, 0)
	if cells, err := ContrailSection(dp, solve(t, dp)); err != nil || cells != nil {
		t.Errorf("dry weather: %d cells, %v", len(cells), err)
	}
}

// Day and night split the persistent distance by the sun's elevation at
// each persistent leg's midpoint in distance and time (perf/contrail's
// SunElevation, checked there against the solstice and the equinox): the
// sums agree with the legs, and a long flight through dusk has both.
func TestContrailDayNight(t *testing.T) {
	wx, ref := demoWeather(t)
	c := contrailInstance{"route.geojson", "demo-widebody", 230000, 16 * time.Hour}
	p := c.problem(t, wx, ref, 0)
	plan := solve(t, p)
	var day, night float64
	el := 0.0
	for _, l := range plan.Legs {
		start := el
		el += l.Time
		if l.Contrail != ContrailPersistent {
			continue
		}
		mid, _ := p.Track.PointAt((l.FromDist + l.ToDist) / 2)
		tm := plan.Depart.Add(time.Duration((start + l.Time/2) * float64(time.Second)))
		nm := (l.ToDist - l.FromDist) / nmToM
		if contrail.SunElevation(mid.Lat, mid.Lon, tm) > 0 {
			day += nm
		} else {
			night += nm
		}
	}
	ct := plan.Contrail
	if math.Abs(day-ct.DayNM) > 1e-6 || math.Abs(night-ct.NightNM) > 1e-6 || !(day > 0 && night > 0) {
		t.Errorf("legs give day %.2f, night %.2f NM; totals day %.2f, night %.2f NM", day, night, ct.DayNM, ct.NightNM)
	}
}
