package route

import (
	"fmt"
	"math"
	"slices"
	"testing"
)

// FuzzParseLevelRule: ParseLevelRule never panics; a rule it accepts
// passes Build's check, and Allowed gives ascending, distinct levels that
// are positive multiples of 10 up to FL990, inside the band, and, under
// a semicircular rule, all in the course's semicircle (ICAO Annex 2
// Appendix 3: odd thousands eastbound, even westbound, below FL290).
// Seeds in testdata/fuzz/FuzzParseLevelRule.
func FuzzParseLevelRule(f *testing.F) {
	f.Add("odd-even-magnetic")
	f.Add("every-1000:FL290-FL410")
	f.Add("list:310,330,350")
	f.Fuzz(func(t *testing.T, s string) {
		r, err := ParseLevelRule(s)
		if err != nil {
			return
		}
		if err := r.check(); err != nil {
			t.Fatalf("%q parsed to %+v, which check refuses: %v", s, r, err)
		}
		for _, course := range []float64{45, 225} {
			lv := r.Allowed(course, course)
			if !slices.IsSorted(lv) || len(slices.Compact(slices.Clone(lv))) != len(lv) {
				t.Fatalf("%q: levels %v not ascending and distinct", s, lv)
			}
			lo, hi := r.band()
			for _, fl := range lv {
				if fl <= 0 || fl > 990 || fl%10 != 0 {
					t.Fatalf("%q: level %d", s, fl)
				}
				if r.Kind != RuleList && (fl < lo || fl > hi) {
					t.Fatalf("%q: level %d outside FL%d-FL%d", s, fl, lo, hi)
				}
				if cls := r.class(course, course); cls >= 0 && fl < 290 && (fl/10)%2 != 1-cls {
					t.Fatalf("%q: course %v got FL%d", s, course, fl)
				}
			}
		}
	})
}

// FuzzBuild builds a two-point route from arbitrary numbers with an
// arbitrary segment length and magnetic height: Build must return a track
// or an error, never panic, and a track must respect MaxSegments, its
// segment length and the level-course contract.
func FuzzBuild(f *testing.F) {
	f.Add(80.0, 100.0, 88.0, 170.0, 92600.0, 0.0)
	f.Add(0.0, 0.0, 0.0, 89.0, 500.0, 11000.0)
	f.Add(-70.0, 10.0, -89.0, -170.0, 1e-300, -1e3)
	f.Fuzz(func(t *testing.T, lat1, lon1, lat2, lon2, maxSeg, alt float64) {
		r, err := ParseInline(fmt.Sprintf("%v,%v %v,%v", lat1, lon1, lat2, lon2))
		if err != nil {
			return
		}
		tr, err := Build(r, Options{Date: testDate, MaxSegment: maxSeg, MagAltitude: alt})
		if err != nil {
			return
		}
		if len(tr.Segments) == 0 || len(tr.Segments) > MaxSegments {
			t.Fatalf("%d segments", len(tr.Segments))
		}
		for _, sg := range tr.Segments {
			if maxSeg > 0 && sg.Length > maxSeg*(1+1e-9) || math.IsNaN(sg.TrueCourse) || math.IsNaN(sg.HorizontalField) {
				t.Fatalf("segment %+v (max %v)", sg, maxSeg)
			}
			if want := CourseMagnetic; sg.Zone != ZoneNone && sg.LevelCourse != CourseTrue || sg.Zone == ZoneNone && sg.LevelCourse != want {
				t.Fatalf("segment %d zone %q course %q", sg.Index, sg.Zone, sg.LevelCourse)
			}
		}
	})
}
