package route

import (
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
