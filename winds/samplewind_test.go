package winds

import (
	"math"
	"path/filepath"
	"testing"
	"time"
)

// TestSampleWind checks that SampleWind gives Sample's wind, temperature
// and EDR bit for bit, and Sample's errors, with NaN humidity, on the
// humidity fixtures (made with ecCodes grib_set, see testdata/winds/
// humidity/README.md: RH on the winds' grid, from the NCEP centre, q only)
// and a file without humidity, at points inside and outside their grids,
// levels and times.
func TestSampleWind(t *testing.T) {
	same := func(x, y float64) bool {
		return math.Float64bits(x) == math.Float64bits(y) || math.IsNaN(x) && math.IsNaN(y)
	}
	files := []string{filepath.Join(humidityFixtures, "g2_humid.grib2"), filepath.Join(humidityFixtures, "g2_humid_ncep.grib2"),
		filepath.Join(humidityFixtures, "g2_q_only.grib2"), filepath.Join(humidityFixtures, "g1_humid.grib1"), filepath.Join(fixtures, "g1_wmo.grib1")}
	n, errs := 0, 0
	for _, path := range files {
		f, err := Open(path)
		if err != nil {
			t.Fatal(err)
		}
		times := f.Times()
		for _, tm := range []time.Time{times[0], times[len(times)-1], times[0].Add(-48 * time.Hour)} {
			for lat := -95.0; lat <= 95; lat += 19 {
				for lon := -200.0; lon < 400; lon += 47 {
					for _, p := range []float64{100000, 30000, 24000, 20000, 100} {
						s, err := f.Sample(lat, lon, p, tm)
						w, werr := f.SampleWind(lat, lon, p, tm)
						if (err == nil) != (werr == nil) || err != nil && err.Error() != werr.Error() {
							t.Fatalf("%s (%g, %g, %g Pa): Sample error %v, SampleWind %v", path, lat, lon, p, err, werr)
						}
						if err != nil {
							errs++
							continue
						}
						n++
						if !same(s.U, w.U) || !same(s.V, w.V) || !same(s.T, w.T) || !same(s.EDR, w.EDR) {
							t.Fatalf("%s (%g, %g, %g Pa): Sample %+v, SampleWind %+v", path, lat, lon, p, s, w)
						}
						if !math.IsNaN(w.RH) || !math.IsNaN(w.RHi) || !math.IsNaN(w.Q) {
							t.Fatalf("%s: SampleWind gives humidity %+v", path, w)
						}
					}
				}
			}
		}
	}
	if n == 0 || errs == 0 {
		t.Errorf("%d samples and %d errors compared; the grid should give both", n, errs)
	}
}
