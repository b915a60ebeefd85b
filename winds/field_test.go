package winds

import (
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

var t0 = time.Date(2024, 1, 15, 6, 0, 0, 0, time.UTC)

// multilinear is affine in each of latitude, longitude, ln p and time
// separately, so the interpolation Sample documents (bilinear in lat/lon,
// linear in ln p, linear in time) must reproduce it exactly between grid
// nodes: the defining property of multilinear interpolation.
func multilinear(lat, lon, p float64, t time.Time) float64 {
	h := t.Sub(t0).Hours()
	return 1 + 0.1*lat + 0.02*lon + 5*math.Log(p) + 0.3*h + 0.001*lat*lon
}

// synthetic builds a global 10-degree grid (36 x 19 from 90N, 0E) of
// parameter p at the given levels and hours after t0, with values from fn.
func synthetic(p Param, levels []float64, hours []int, fn func(lat, lon, p float64, t time.Time) float64) []Message {
	var out []Message
	for _, h := range hours {
		for _, l := range levels {
			m := Message{Source: "synthetic", Param: p, LevelType: 100, Level: l, RefTime: t0,
				ValidTime: t0.Add(time.Duration(h) * time.Hour), Ni: 36, Nj: 19, Lat1: 90, Lon1: 0,
				Lat2: -90, Lon2: 350, Di: 10, Dj: 10, Ensemble: -1}
			m.Values = make([]float32, 36*19)
			for j := range 19 {
				for i := range 36 {
					m.Values[j*36+i] = float32(fn(90-10*float64(j), 10*float64(i), l, m.ValidTime))
				}
			}
			out = append(out, m)
		}
	}
	return out
}

func TestSampleMultilinear(t *testing.T) {
	levels := []float64{30000, 25000, 20000}
	msgs := synthetic(ParamT, levels, []int{0, 6, 12}, multilinear)
	f, err := NewField(msgs)
	if err != nil {
		t.Fatal(err)
	}
	if !f.Has(ParamT) || f.Has(ParamU) || len(f.Times()) != 3 || f.Levels()[0] != 30000 {
		t.Fatalf("Has/Times/Levels: %v %v %v %v", f.Has(ParamT), f.Has(ParamU), f.Times(), f.Levels())
	}
	for _, c := range []struct {
		lat, lon, p float64
		dt          time.Duration
	}{
		{51.5, 0.1, 23842, 150 * time.Minute}, // FL350 is 238.42 hPa (ICAO Doc 7488 / U.S. Standard Atmosphere 1976)
		{-33.3, 151.2, 27000, 7 * time.Hour},
		{0, 340, 30000, 0},
		{90, 10, 20000, 12 * time.Hour},
		{-90, 0, 25000, 6 * time.Hour},
		{12.34, 56.78, 21111, 11*time.Hour + 59*time.Minute},
	} {
		tt := t0.Add(c.dt)
		s, err := f.Sample(c.lat, c.lon, c.p, tt)
		if err != nil {
			t.Fatalf("Sample(%v): %v", c, err)
		}
		want := multilinear(c.lat, c.lon, c.p, tt)
		if math.Abs(s.T-want) > 1e-4 {
			t.Errorf("Sample(%v).T = %.6f, want %.6f", c, s.T, want)
		}
		if !math.IsNaN(s.U) || !math.IsNaN(s.V) || !math.IsNaN(s.EDR) {
			t.Errorf("absent variables not NaN: %+v", s)
		}
	}
}

// TestSampleHandComputed checks one point against arithmetic done by hand:
// corners of the cell 50-60N, 0-10E at 30000 and 20000 Pa hold
// 10 + i + 2j (i = column, j = row from the north) + 100 at 20000 Pa.
// At (55N, 2.5E): bilinear weights 0.375/0.125/0.375/0.125 on
// (j=3,i=0)=16, (3,1)=17, (4,0)=18, (4,1)=19 give 17.25 at each level;
// at p = sqrt(30000*20000) (halfway in ln p) the level term adds 50:
// 67.25. One hour later with 0 and 6 h times holding +0 and +60, add 10.
func TestSampleHandComputed(t *testing.T) {
	fn := func(lat, lon, p float64, tt time.Time) float64 {
		i, j := lon/10, (90-lat)/10
		v := 10 + i + 2*j
		if p == 20000 {
			v += 100
		}
		return v + 10*tt.Sub(t0).Hours()
	}
	f, err := NewField(synthetic(ParamU, []float64{30000, 20000}, []int{0, 6}, fn))
	if err != nil {
		t.Fatal(err)
	}
	p := math.Sqrt(30000 * 20000)
	s, err := f.Sample(55, 2.5, p, t0)
	if err != nil || math.Abs(s.U-67.25) > 1e-4 {
		t.Errorf("Sample = %v, %v, want U 67.25", s.U, err)
	}
	s, err = f.Sample(55, 2.5, p, t0.Add(time.Hour))
	if err != nil || math.Abs(s.U-77.25) > 1e-4 {
		t.Errorf("Sample +1h = %v, %v, want U 77.25", s.U, err)
	}
	// Across the antimeridian of the grid (between column 35 at 350E and
	// column 0 at 0E), row 0 at 90N holds 45 and 10: halfway is 27.5, at
	// 30000 Pa and t0. -5, 355 and 715 are the same meridian.
	for _, lon := range []float64{355, -5, 715} {
		s, err := f.Sample(90, lon, 30000, t0)
		if err != nil || math.Abs(s.U-27.5) > 1e-4 {
			t.Errorf("Sample lon %g = %v, %v, want 27.5", lon, s.U, err)
		}
	}
	// -180 and 180 are column 18: 10 + 18 + 2*9 = 46 at the equator.
	for _, lon := range []float64{-180, 180} {
		s, err := f.Sample(0, lon, 30000, t0)
		if err != nil || math.Abs(s.U-46) > 1e-4 {
			t.Errorf("Sample lon %g = %v, %v, want 46", lon, s.U, err)
		}
	}
}

func TestSampleRange(t *testing.T) {
	f, err := NewField(synthetic(ParamU, []float64{30000, 20000}, []int{0, 6}, multilinear))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		lat, lon, p float64
		dt          time.Duration
		what        string
	}{
		{0, 0, 35000, 0, "pressure"},
		{0, 0, 19899, 0, "pressure"}, // 0.5 % beyond the top level: LevelTolerance
		{0, 0, 30151, 0, "pressure"},
		{0, 0, 25000, -time.Minute, "time"},
		{0, 0, 25000, 7 * time.Hour, "time"},
		{90.01, 0, 25000, 0, "latitude"},
		{math.NaN(), 0, 25000, 0, "latitude"},
	} {
		_, err := f.Sample(c.lat, c.lon, c.p, t0.Add(c.dt))
		var re *RangeError
		if !errors.As(err, &re) || !strings.Contains(err.Error(), c.what) {
			t.Errorf("Sample(%v) error %v, want RangeError on %s", c, err, c.what)
		}
	}
}

// TestOpenRegional opens the ecCodes-written regional fixture (5-degree
// grid, 140E-200E, 20N-60N, i negative and j positive) and checks sampling
// at grid nodes against grib_get_data's values and the area limits.
func TestOpenRegional(t *testing.T) {
	path := filepath.Join(fixtures, "g2_regional.grib2")
	f, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	lat1, lat2, lon1, lon2, global := f.Bounds()
	if lat1 != 20 || lat2 != 60 || lon1 != 140 || lon2 != 200 || global {
		t.Errorf("Bounds = %v %v %v %v %v", lat1, lat2, lon1, lon2, global)
	}
	dump := readDump(t, filepath.Join(fixtures, "g2_regional.txt"))[0]
	for _, p := range dump {
		for _, lon := range []float64{p.lon, p.lon - 360} {
			s, err := f.Sample(p.lat, lon, 25000, t0)
			if err != nil || math.Abs(s.T-p.val) > 1e-4 {
				t.Fatalf("Sample(%g, %g) = %v, %v; grib_get_data %v", p.lat, lon, s.T, err, p.val)
			}
		}
	}
	for _, c := range [][2]float64{{40, 139}, {40, 201}, {19, 170}, {61, 170}, {40, -159}} {
		_, err := f.Sample(c[0], c[1], 25000, t0)
		var re *RangeError
		if !errors.As(err, &re) {
			t.Errorf("Sample(%v) = %v, want RangeError", c, err)
		}
	}
	if _, err := f.Sample(40, -170, 25000, t0); err != nil {
		t.Errorf("Sample at 190E as -170: %v", err)
	}
}

// TestOpenMulti builds a field from the ecCodes fixture with u, v, t and EDR
// at two levels and two times; the stray ensemble member at 500 hPa makes
// it incomplete, which must be reported by name.
func TestOpenMulti(t *testing.T) {
	_, err := Open(filepath.Join(fixtures, "g2_multi.grib2"))
	if err == nil || !strings.Contains(err.Error(), "missing fields") || !strings.Contains(err.Error(), "50000 Pa") {
		t.Fatalf("Open g2_multi: %v, want missing fields at 50000 Pa", err)
	}
	ms := decodeFile(t, "g2_multi.grib2")
	f, err := NewField(ms[:16])
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []Param{ParamU, ParamV, ParamT, ParamEDR} {
		if !f.Has(p) {
			t.Errorf("field lacks %s", p)
		}
	}
	// At a grid node the sample is the value ecCodes dumped (message 11 is
	// t at 300 hPa, step 6 h).
	dump := readDump(t, filepath.Join(fixtures, "g2_multi.txt"))
	for _, k := range []int{0, 10, 15} {
		m := ms[k]
		for _, pt := range dump[k][:50] {
			s, err := f.Sample(pt.lat, pt.lon, m.Level, m.ValidTime)
			if err != nil {
				t.Fatal(err)
			}
			got := map[Param]float64{ParamU: s.U, ParamV: s.V, ParamT: s.T, ParamEDR: s.EDR}[m.Param]
			if math.Abs(got-pt.val) > 1e-5*math.Max(1, math.Abs(pt.val)) {
				t.Fatalf("message %d %s at (%g, %g): %v, ecCodes %v", k+1, m.Param, pt.lat, pt.lon, got, pt.val)
			}
		}
	}
	_, err = NewField(append(ms[:16:16], ms[0]))
	if err == nil || !strings.Contains(err.Error(), "repeats") {
		t.Errorf("duplicate: %v", err)
	}
	other := synthetic(ParamU, []float64{30000}, []int{0}, multilinear)
	other[0].Di, other[0].Ni = 5, 72
	if _, err := NewField(append(ms[:16:16], other[0])); err == nil || !strings.Contains(err.Error(), "grid") {
		t.Errorf("grid mismatch: %v", err)
	}
}
