package route

import (
	"errors"
	"math"
	"testing"
	"time"
)

// TestWMMOfficialTestValues checks the declination column of NOAA NCEI's
// WMM2025_TEST_VALUES.txt (the 12 main-field rows, rounded to 0.01 degree;
// quoted from a public repository's test, and reproduced here by the npm
// package magvar 2.2.0). Heights are km above the WGS-84 ellipsoid.
func TestWMMOfficialTestValues(t *testing.T) {
	cases := []struct{ year, altKm, lat, lon, decl float64 }{
		{2025, 0, 80, 0, 1.28}, {2025, 0, 0, 120, -0.16}, {2025, 0, -80, 240, 68.78},
		{2025, 100, 80, 0, 0.85}, {2025, 100, 0, 120, -0.15}, {2025, 100, -80, 240, 68.21},
		{2027.5, 0, 80, 0, 2.59}, {2027.5, 0, 0, 120, -0.24}, {2027.5, 0, -80, 240, 68.49},
		{2027.5, 100, 80, 0, 2.16}, {2027.5, 100, 0, 120, -0.23}, {2027.5, 100, -80, 240, 67.93},
	}
	for _, c := range cases {
		w, err := wmmAtYear(c.year)
		if err != nil {
			t.Fatal(err)
		}
		got := w.declination(c.lat, c.lon, c.altKm*1000)
		// 0.005 is the rounding of the published value; allow 0.006.
		if math.Abs(got-c.decl) > 0.006 {
			t.Errorf("WMM2025 %v: D = %.4f, NOAA test value %.2f", c, got, c.decl)
		}
	}
}

// TestWMMMagvarFixture checks 88 points against the npm package magvar
// 2.2.0 (testdata/route/make_wmm.js): declination to 0.01 degree (magvar
// rounds it to 0.01) and the X, Y, Z components to 0.1 nT (it rounds them
// to 0.1 nT).
func TestWMMMagvarFixture(t *testing.T) {
	rows := readFixture(t, "wmm_magvar.txt", 8)
	if len(rows) < 50 {
		t.Fatalf("fixture has %d rows, want >= 50", len(rows))
	}
	for _, r := range rows {
		w, err := wmmAtYear(r[0])
		if err != nil {
			t.Fatal(err)
		}
		d := w.declination(r[2], r[3], r[1]*1000)
		x, y, z := w.field(r[2], r[3], r[1]*1000)
		if math.Abs(d-r[4]) > 0.01 || math.Abs(x-r[5]) > 0.1 || math.Abs(y-r[6]) > 0.1 || math.Abs(z-r[7]) > 0.1 {
			t.Errorf("%v: got D %.4f X %.2f Y %.2f Z %.2f", r, d, x, y, z)
		}
	}
}

// TestMagneticVariationDates checks the exported function's date handling:
// decimal years as the WMM software counts them (magvar's dateToDecimalYear
// gives 2027.5 for 2027-07-02T12:00Z) and an error outside 2025.0-2030.0.
func TestMagneticVariationDates(t *testing.T) {
	// 2027 has 365 days; 2027.5 is 182.5 days after 1 January: 2 July 12:00 UTC.
	d, err := MagneticVariation(80, 0, 0, time.Date(2027, 7, 2, 12, 0, 0, 0, time.UTC))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(d-2.59) > 0.006 { // NOAA WMM2025 test value, 2027.5, h=0, 80N 0E
		t.Errorf("D = %.4f, NOAA test value 2.59", d)
	}
	for _, tm := range []time.Time{
		time.Date(2024, 12, 31, 23, 59, 0, 0, time.UTC),
		time.Date(2030, 1, 1, 0, 0, 0, 0, time.UTC),
	} {
		_, err := MagneticVariation(0, 0, 0, tm)
		var ue *UnsupportedError
		if !errors.As(err, &ue) {
			t.Errorf("%v: err = %v, want *UnsupportedError", tm, err)
		}
	}
	if _, err := MagneticVariation(91, 0, 0, time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)); err == nil {
		t.Error("latitude 91 accepted")
	}
	// At the pole the result is finite (the limit along the meridian).
	if d, err := MagneticVariation(90, 10, 0, time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)); err != nil || math.IsNaN(d) {
		t.Errorf("pole: %v %v", d, err)
	}
}

func BenchmarkMagneticVariation(b *testing.B) {
	w, _ := wmmAtYear(2026.5)
	var sink float64
	for i := 0; b.Loop(); i++ {
		sink += w.declination(51.5, float64(i&63), 11000)
	}
	_ = sink
}
