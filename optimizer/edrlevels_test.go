package optimizer

import (
	"strings"
	"testing"
	"time"

	"levelpath/perf"
	"levelpath/winds"
)

// edrField is levelField on FL300-FL340 with EDR added at FL310 and FL320
// only (a hazard forecast on fewer levels than the winds).
func edrField(t *testing.T) *winds.Field {
	t.Helper()
	base := levelField(t, []int{300, 310, 320, 330, 340}, func(int) float64 { return 0 })
	ref := time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)
	var msgs []winds.Message
	for _, h := range []int{0, 24} {
		for _, fl := range []int{300, 310, 320, 330, 340} {
			p := perf.FLToPressure(float64(fl))
			m := winds.Message{Edition: 2, LevelType: 100, Level: p, RefTime: ref, ValidTime: ref.Add(time.Duration(h) * time.Hour),
				Ni: 36, Nj: 19, Lat1: 90, Lon1: 0, Lat2: -90, Lon2: 350, Di: 10, Dj: 10, Ensemble: -1}
			for _, v := range []struct {
				c, n int
				par  winds.Param
				x    float32
			}{{2, 2, "u", 0}, {2, 3, "v", 0}, {0, 0, "t", float32(perf.ISATemperature(perf.AltitudeAt(p)))}, {19, 30, "edr", 0.05}} {
				if v.par == winds.ParamEDR && fl != 310 && fl != 320 {
					continue
				}
				mm := m
				mm.Category, mm.Number, mm.Param = v.c, v.n, v.par
				mm.Values = make([]float32, 36*19)
				for i := range mm.Values {
					mm.Values[i] = v.x
				}
				msgs = append(msgs, mm)
			}
		}
	}
	f, err := winds.NewField(msgs)
	if err != nil {
		t.Fatal(err)
	}
	if base.Has(winds.ParamEDR) || !f.Has(winds.ParamEDR) {
		t.Fatal("EDR: want it in the test field only")
	}
	return f
}

// TestEDRLevelWarning prices profiles that leave the EDR levels (FL310,
// FL320; FL330 is 262 hPa in the ICAO standard atmosphere, 4 % off the
// 274 hPa of FL320, far beyond winds.LevelTolerance) and checks the plan names each such level once; a profile inside
// them, or weather without EDR, gives no such warning.
func TestEDRLevelWarning(t *testing.T) {
	p := smallProblem(t, 0)
	p.Weather = edrField(t)
	cases := []struct {
		prof string
		want []string // levels named; nil: no warning
	}{
		{"FL310,FL330@200,FL310@400,FL330@500", []string{"FL330"}},
		{"FL310,FL320@300", nil},
		{"FL330,FL310@300", []string{"FL330"}},
	}
	for _, c := range cases {
		prof, err := ParseProfile(c.prof)
		if err != nil {
			t.Fatal(err)
		}
		plan, err := Assess(p, prof)
		if err != nil {
			t.Fatalf("%s: %v", c.prof, err)
		}
		var got []string
		for _, w := range plan.Warnings {
			if strings.HasPrefix(w, "no turbulence rule") {
				got = append(got, w)
			}
		}
		if c.want == nil {
			if len(got) != 0 {
				t.Errorf("%s: %q, want no EDR-level warning", c.prof, got)
			}
			continue
		}
		if len(got) != 1 {
			t.Fatalf("%s: EDR-level warnings %q, want one", c.prof, got)
		}
		// The levels named come before the colon, the EDR levels after.
		named, _, _ := strings.Cut(got[0], ":")
		for _, fl := range c.want {
			if strings.Count(named, fl) != 1 {
				t.Errorf("%s: %q: want %s named once", c.prof, got[0], fl)
			}
		}
		if strings.Contains(named, "FL310") {
			t.Errorf("%s: %q names FL310, which has EDR", c.prof, got[0])
		}
	}
	// Weather without EDR: nothing to warn about.
	p.Weather = levelField(t, []int{300, 310, 320, 330, 340}, func(int) float64 { return 0 })
	prof, _ := ParseProfile("FL330")
	plan, err := Assess(p, prof)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range plan.Warnings {
		if strings.HasPrefix(w, "no turbulence rule") {
			t.Errorf("no EDR in the weather: %q", w)
		}
	}
}
