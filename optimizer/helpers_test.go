package optimizer

import (
	"math"
	"testing"
	"time"

	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// The demo scenario's invented long-haul route (written by `levelpath demo`
// into testdata/demo). It serves as a realistic test setting; no value of
// it is used as a check value.
const longHaulRoute = "../testdata/demo/route.geojson"

func aircraft(t testing.TB, name string) *perf.Aircraft {
	t.Helper()
	a, err := perf.Builtin(name)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

func track(t testing.TB, arg, rule string, segNM float64) *route.Track {
	t.Helper()
	r, err := route.Load(arg)
	if err != nil {
		t.Fatal(err)
	}
	lr, err := route.ParseLevelRule(rule)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := route.Build(r, route.Options{MaxSegment: segNM * nmToM, Levels: lr, Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)})
	if err != nil {
		t.Fatal(err)
	}
	return tr
}

func solve(t testing.TB, p *Problem) *Plan {
	t.Helper()
	plan, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	return plan
}

// demoWeather decodes nothing: it builds the field straight from the
// invented synthetic messages.
func demoWeather(t testing.TB) (*winds.Field, time.Time) {
	t.Helper()
	ref := time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC)
	f, err := winds.NewField(synthetic.Weather(ref))
	if err != nil {
		t.Fatal(err)
	}
	return f, ref
}

// levelField builds a global 10-degree field on the pressures of the given
// flight levels with ISA temperature and wind u(fl) (m/s, eastward),
// valid over a day.
func levelField(t testing.TB, fls []int, u func(fl int) float64) *winds.Field {
	t.Helper()
	ref := time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)
	const ni, nj = 36, 19
	var msgs []winds.Message
	for _, h := range []int{0, 24} {
		for _, fl := range fls {
			p := perf.FLToPressure(float64(fl))
			uu := make([]float32, ni*nj)
			vv := make([]float32, ni*nj)
			tt := make([]float32, ni*nj)
			for i := range uu {
				uu[i] = float32(u(fl))
				tt[i] = float32(perf.ISATemperature(perf.AltitudeAt(p)))
			}
			base := winds.Message{LevelType: 100, Level: p, RefTime: ref, ValidTime: ref.Add(time.Duration(h) * time.Hour),
				Ni: ni, Nj: nj, Lat1: 90, Lon1: 0, Lat2: -90, Lon2: 350, Di: 10, Dj: 10, Ensemble: -1}
			for _, f := range []struct {
				c, n int
				par  winds.Param
				v    []float32
			}{{2, 2, "u", uu}, {2, 3, "v", vv}, {0, 0, "t", tt}} {
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

// distanceAt sums the cruise distance flown at level fl.
func distanceAt(p *Plan, fl float64) float64 {
	d := 0.0
	for _, l := range p.Legs {
		if l.Phase == PhaseCruise && l.FL == fl {
			d += l.ToDist - l.FromDist
		}
	}
	return d
}

func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b)) }
