package route_test

import (
	"fmt"
	"time"

	"levelpath/route"
)

// The WGS-84 inverse problem, checked against GeographicLib's GeodSolve
// 2.1.2 (`echo "40.6 -73.8 51.6 -0.5" | GeodSolve -i -p 6`: s12 =
// 5551759.400319 m, azi1 = 51.198883°, azi2 = 107.821777°;
// GeographicLib).
func ExampleInverse() {
	s12, azi1, azi2 := route.Inverse(40.6, -73.8, 51.6, -0.5)
	fmt.Printf("%.6f m, %.6f°, %.6f°\n", s12, azi1, azi2)
	// Output: 5551759.400319 m, 51.198883°, 107.821777°
}

// The ICAO Annex 2 Appendix 3 semicircular rule: an eastbound course gets
// the odd levels, a westbound one the even levels (ICAO Annex 2,
// Appendix 3).
func ExampleLevelRule_Allowed() {
	rule, err := route.ParseLevelRule("odd-even-magnetic:290-410")
	if err != nil {
		panic(err)
	}
	fmt.Println(rule.Allowed(90, 95))
	fmt.Println(rule.Allowed(270, 265))
	// Output:
	// [290 310 330 350 370 390 410]
	// [300 320 340 360 380 400]
}

// A route given inline, cut into segments of at most 100 NM with the
// levels allowed on each. GeodSolve 2.1.2 gives the leg as 5555408.658 m
// (2999.7 NM) with an initial azimuth of -72.01° (288°); the first
// segment's course is taken at its midpoint.
func ExampleBuild() {
	r, err := route.ParseInline("51.47,-0.45 40.64,-73.78")
	if err != nil {
		panic(err)
	}
	tr, err := route.Build(r, route.Options{MaxSegment: 100 * 1852, Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)})
	if err != nil {
		panic(err)
	}
	first := tr.Segments[0]
	fmt.Printf("%.0f NM in %d segments; first true course %.0f°, levels %d..%d\n",
		tr.Total/1852, len(tr.Segments), first.TrueCourse, first.Levels[0], first.Levels[len(first.Levels)-1])
	// Output: 3000 NM in 30 segments; first true course 287°, levels 100..510
}
