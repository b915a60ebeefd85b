package route

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
	"time"
)

// TestHorizontalIntensityMagvar checks H against the npm package magvar
// 2.2.0 (testdata/route/make_polar_h.js; magvar rounds H to 0.1 nT) at 34
// points near both dip poles and two far from them, and the zone against
// the WMM2025 report's thresholds applied to magvar's H.
func TestHorizontalIntensityMagvar(t *testing.T) {
	rows := readFixture(t, "wmm_polar_h.txt", 5)
	if len(rows) < 30 {
		t.Fatalf("fixture has %d rows, want >= 30", len(rows))
	}
	for _, r := range rows {
		w, err := wmmAtYear(r[0])
		if err != nil {
			t.Fatal(err)
		}
		x, y, _ := w.field(r[2], r[3], r[1]*1000)
		h := math.Hypot(x, y)
		if math.Abs(h-r[4]) > 0.11 {
			t.Errorf("%v: H = %.2f nT, magvar %.1f", r, h, r[4])
		}
		want := ZoneNone
		switch {
		case r[4] < 2000: // WMM2025 report: blackout zone H < 2000 nT
			want = ZoneBlackout
		case r[4] < 6000: // WMM2025 report: caution zone 2000 <= H < 6000 nT
			want = ZoneCaution
		}
		if z := compassZone(h); z != want && math.Abs(h-2000) > 0.2 && math.Abs(h-6000) > 0.2 {
			t.Errorf("%v: zone %q, want %q", r, z, want)
		}
	}
	// The exported function on a date: 2027-01-01 is 2027.0.
	h, z, err := HorizontalIntensity(84, 120, 11e3, time.Date(2027, 1, 1, 0, 0, 0, 0, time.UTC))
	if err != nil || math.Abs(h-403.1) > 0.11 || z != ZoneBlackout { // magvar row 2027 11 84 120
		t.Errorf("HorizontalIntensity = %v %q %v; magvar 403.1 nT", h, z, err)
	}
	if _, _, err := HorizontalIntensity(math.NaN(), 0, 0, testDate); err == nil {
		t.Error("NaN latitude accepted")
	}
}

// TestPolarLevelRule: on 80N 100E to 88N 170E every segment lies in the
// blackout zone (magvar: H 726-1784 nT along the great circle), the true
// course is eastbound (000-179) while the magnetic variation swings
// through +38 to -168 degrees, so with the default true-track fallback
// every segment gets the odd levels of ICAO Annex 2 Appendix 3 (the
// eastbound semicircle), says so, and the track warns.
func TestPolarLevelRule(t *testing.T) {
	r, err := ParseInline("80,100 88,170")
	if err != nil {
		t.Fatal(err)
	}
	tr, err := Build(r, Options{Date: testDate})
	if err != nil {
		t.Fatal(err)
	}
	eastbound := LevelRule{}.Allowed(90, 90) // odd levels: FL110, 130, ..., 410, 450, 490
	if !slices.Contains(eastbound, 370) || slices.Contains(eastbound, 360) {
		t.Fatalf("eastbound levels %v", eastbound)
	}
	magWest := 0
	for _, sg := range tr.Segments {
		if sg.TrueCourse >= 180 {
			t.Fatalf("segment %d true course %v is not eastbound", sg.Index, sg.TrueCourse)
		}
		if sg.MagCourse >= 180 {
			magWest++
		}
		if sg.Zone != ZoneBlackout || !(sg.HorizontalField > 700 && sg.HorizontalField < 1800) {
			t.Errorf("segment %d: H %.0f nT zone %q, want blackout (magvar 726-1784 nT)", sg.Index, sg.HorizontalField, sg.Zone)
		}
		if sg.LevelCourse != CourseTrue || !slices.Equal(sg.Levels, eastbound) {
			t.Errorf("segment %d: course %q levels %v, want true and %v", sg.Index, sg.LevelCourse, sg.Levels, eastbound)
		}
	}
	if magWest == 0 {
		t.Error("no segment has a westbound magnetic course: the case no longer tests the fallback")
	}
	if len(tr.Warnings) != 1 || !strings.Contains(tr.Warnings[0], "blackout zone") || !strings.Contains(tr.Warnings[0], "true course") {
		t.Errorf("warnings %q", tr.Warnings)
	}

	// The true-course rule is unaffected and names its course.
	tt, err := Build(r, Options{Date: testDate, Levels: LevelRule{Kind: RuleOddEvenTrue}})
	if err != nil {
		t.Fatal(err)
	}
	if len(tt.Warnings) != 0 || tt.Segments[0].LevelCourse != CourseTrue {
		t.Errorf("odd-even-true: warnings %q, course %q", tt.Warnings, tt.Segments[0].LevelCourse)
	}
	// A course-free rule names none.
	te, err := Build(r, Options{Date: testDate, Levels: LevelRule{Kind: RuleEvery1000}})
	if err != nil {
		t.Fatal(err)
	}
	if te.Segments[0].LevelCourse != "" || len(te.Warnings) != 0 {
		t.Errorf("every-1000: course %q warnings %q", te.Segments[0].LevelCourse, te.Warnings)
	}
	// Far from the poles the magnetic rule stays magnetic.
	mid, err := ParseInline("50,-30 50,-20")
	if err != nil {
		t.Fatal(err)
	}
	tm, err := Build(mid, Options{Date: testDate})
	if err != nil {
		t.Fatal(err)
	}
	for _, sg := range tm.Segments {
		if sg.LevelCourse != CourseMagnetic || sg.Zone != ZoneNone {
			t.Errorf("mid-latitude segment %d: %q %q", sg.Index, sg.LevelCourse, sg.Zone)
		}
	}
}

// TestPolarGrid: the grid policy chooses levels on the grid course.
func TestPolarGrid(t *testing.T) {
	r, err := ParseInline("80,100 88,170")
	if err != nil {
		t.Fatal(err)
	}
	tr, err := Build(r, Options{Date: testDate, Polar: PolarGrid})
	if err != nil {
		t.Fatal(err)
	}
	for _, sg := range tr.Segments {
		g := GridCourse(sg.TrueCourse, sg.Mid.Lat, sg.Mid.Lon)
		if sg.LevelCourse != CourseGrid || !slices.Equal(sg.Levels, LevelRule{}.Allowed(g, g)) {
			t.Errorf("segment %d: %q %v; grid course %.1f", sg.Index, sg.LevelCourse, sg.Levels, g)
		}
	}
	if len(tr.Warnings) != 1 || !strings.Contains(tr.Warnings[0], "grid course") {
		t.Errorf("warnings %q", tr.Warnings)
	}
	_, err = Build(r, Options{Date: testDate, Polar: "magnetic"})
	var fe *FormatError
	if !errors.As(err, &fe) {
		t.Errorf("polar policy \"magnetic\": err %v, want *FormatError", err)
	}
}

// TestGridCourse checks the definition of grid north, parallel to the
// Greenwich meridian (north polar: pointing from 0E across the pole to
// 180E; south polar: from the pole out along 0E): a true course along a
// meridian toward north at 0E is grid 000, at 180E grid 180; at 90E true
// north is grid 270 in the north and grid 090 in the south.
func TestGridCourse(t *testing.T) {
	for _, c := range []struct{ tc, lat, lon, want float64 }{
		{0, 80, 0, 0}, {0, 80, 180, 180}, {0, 80, -180, 180}, {0, 80, 90, 270}, {0, 80, -90, 90},
		{0, -80, 90, 90}, {0, -80, -90, 270}, {45, 85, 45, 0}, {90, -70, 0, 90},
	} {
		if g := GridCourse(c.tc, c.lat, c.lon); math.Abs(g-c.want) > 1e-9 {
			t.Errorf("GridCourse(%v, %v, %v) = %v, want %v", c.tc, c.lat, c.lon, g, c.want)
		}
	}
}
