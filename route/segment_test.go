package route

import (
	"bufio"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

var testDate = time.Date(2026, 6, 1, 0, 0, 0, 0, time.UTC)

// checkTrack verifies the structural promises of Build against the
// GeodSolve-verified Inverse: segment ends lie on the leg geodesic at the
// stated distance and azimuth, waypoints are boundaries, segments are
// equal within a leg and no longer than maxSeg, midpoints halve them, and
// the magnetic quantities agree with MagneticVariation.
func checkTrack(t *testing.T, tr *Track, maxSeg float64) {
	t.Helper()
	r := tr.Route
	if len(tr.Legs) != len(r.Points)-1 {
		t.Fatalf("%d legs for %d points", len(tr.Legs), len(r.Points))
	}
	var total, prevTo float64
	si := 0
	for i, leg := range tr.Legs {
		s12, azi1, _ := Inverse(leg.From.Lat, leg.From.Lon, leg.To.Lat, leg.To.Lon)
		if leg.From != r.Points[i] || leg.To != r.Points[i+1] || leg.Length != s12 || leg.InitialCourse != course360(azi1) {
			t.Fatalf("leg %d = %+v; Inverse %v %v", i, leg, s12, azi1)
		}
		total += s12
		first := true
		for ; si < len(tr.Segments) && tr.Segments[si].Leg == i; si++ {
			sg := tr.Segments[si]
			if sg.Index != si || sg.Length > maxSeg*(1+1e-12) || math.Abs(sg.Length-s12/math.Round(s12/sg.Length)) > 1e-6 {
				t.Errorf("segment %d: index %d length %v (leg %v)", si, sg.Index, sg.Length, s12)
			}
			if first && sg.Start != leg.From {
				t.Errorf("segment %d does not start at waypoint %+v", si, leg.From)
			}
			first = false
			if math.Abs(sg.FromDist-prevTo) > 1e-6 || sg.ToDist <= sg.FromDist {
				t.Errorf("segment %d: distances %v..%v after %v", si, sg.FromDist, sg.ToDist, prevTo)
			}
			prevTo = sg.ToDist
			// End on the geodesic: distance and azimuth from the leg start.
			d, a, _ := Inverse(leg.From.Lat, leg.From.Lon, sg.End.Lat, sg.End.Lon)
			if math.Abs(d-(sg.ToDist-leg.StartDist)) > 1e-3 || (d < s12-1 && angErr(a, leg.InitialCourse) > 1e-6) {
				t.Errorf("segment %d end off the geodesic: %v m at %v, want %v m at %v", si, d, a, sg.ToDist-leg.StartDist, leg.InitialCourse)
			}
			h1, _, _ := Inverse(sg.Start.Lat, sg.Start.Lon, sg.Mid.Lat, sg.Mid.Lon)
			h2, _, _ := Inverse(sg.Mid.Lat, sg.Mid.Lon, sg.End.Lat, sg.End.Lon)
			if math.Abs(h1-sg.Length/2) > 1e-3 || math.Abs(h2-sg.Length/2) > 1e-3 {
				t.Errorf("segment %d mid splits it %v + %v, want %v each", si, h1, h2, sg.Length/2)
			}
			mv, err := MagneticVariation(sg.Mid.Lat, sg.Mid.Lon, 0, testDate)
			if err != nil || mv != sg.MagVar || sg.MagCourse != course360(sg.TrueCourse-mv) {
				t.Errorf("segment %d magnetic %v %v vs %v %v", si, sg.MagVar, sg.MagCourse, mv, err)
			}
			if sg.TrueCourse < 0 || sg.TrueCourse >= 360 || sg.MagCourse < 0 || sg.MagCourse >= 360 {
				t.Errorf("segment %d courses %v %v", si, sg.TrueCourse, sg.MagCourse)
			}
			// The default rule is magnetic except in the WMM compass zones,
			// where it falls back to the true course.
			h, zone, err := HorizontalIntensity(sg.Mid.Lat, sg.Mid.Lon, 0, testDate)
			ruleCourse, wantRef := sg.MagCourse, CourseMagnetic
			if h < WMMCautionH {
				ruleCourse, wantRef = sg.TrueCourse, CourseTrue
			}
			if err != nil || h != sg.HorizontalField || zone != sg.Zone || sg.LevelCourse != wantRef {
				t.Errorf("segment %d: H %v zone %q course %q; want %v %q %q (%v)", si, sg.HorizontalField, sg.Zone, sg.LevelCourse, h, zone, wantRef, err)
			}
			if !slices.Equal(sg.Levels, LevelRule{}.Allowed(sg.TrueCourse, ruleCourse)) {
				t.Errorf("segment %d levels %v", si, sg.Levels)
			}
			if len(sg.Samples) != 3 || sg.Samples[0] != sg.Start || sg.Samples[1] != sg.Mid || sg.Samples[2] != sg.End {
				t.Errorf("segment %d samples %v", si, sg.Samples)
			}
			for _, p := range sg.Samples {
				if !(p.Lat >= -90 && p.Lat <= 90 && p.Lon >= -180 && p.Lon < 180) {
					t.Errorf("segment %d sample %+v out of range", si, p)
				}
			}
		}
		if tr.Segments[si-1].End != leg.To || math.Abs(tr.Segments[si-1].ToDist-total) > 1e-6 {
			t.Errorf("leg %d does not end at waypoint %+v", i, leg.To)
		}
	}
	if si != len(tr.Segments) || math.Abs(tr.Total-total) > 1e-6 {
		t.Errorf("total %v, want %v; %d of %d segments visited", tr.Total, total, si, len(tr.Segments))
	}
}

// TestBuildTwoWaypoints uses a GeographicLib worked example (GeodSolve
// 2.1.2: 5551759.400319 m, initial azimuth 51.198883).
func TestBuildTwoWaypoints(t *testing.T) {
	r, err := ParseInline("A=40.6,-73.8 B=51.6,-0.5")
	if err != nil {
		t.Fatal(err)
	}
	tr, err := Build(r, Options{Date: testDate})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(tr.Total-5551759.400319) > 1e-3 || math.Abs(tr.Legs[0].InitialCourse-51.198883) > 1e-6 {
		t.Errorf("total %.6f, course %.6f", tr.Total, tr.Legs[0].InitialCourse)
	}
	// ceil(5551759.4 / 92600) = 60 segments of 50 NM or less.
	if len(tr.Segments) != 60 {
		t.Errorf("%d segments, want 60", len(tr.Segments))
	}
	checkTrack(t, tr, DefaultMaxSegment)
	// The final segment's midpoint course is close to the final azimuth
	// 107.821777 (GeodSolve 2.1.2) less the turn over half a segment.
	if c := tr.Segments[59].TrueCourse; c < 106 || c > 107.821777 {
		t.Errorf("last segment course %v", c)
	}
}

// legRows reads testdata/route/geodesic_legs.txt grouped by leg name.
func legRows(t *testing.T) map[string][][]float64 {
	t.Helper()
	f, err := os.Open("../testdata/route/geodesic_legs.txt")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	out := map[string][][]float64{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) == 0 || strings.HasPrefix(fs[0], "#") {
			continue
		}
		if len(fs) != 9 {
			t.Fatalf("bad fixture line %q", sc.Text())
		}
		row := make([]float64, 8)
		for i, v := range fs[1:] {
			if row[i], err = strconv.ParseFloat(v, 64); err != nil {
				t.Fatal(err)
			}
		}
		out[fs[0]] = append(out[fs[0]], row)
	}
	return out
}

// TestTrackAlongGeodSolve builds single-leg tracks across the antimeridian,
// over the North Pole (85N 40W to 85N 140E) and near it, and compares
// Track.PointAt with GeodSolve -L every 250 km (testdata/route/
// geodesic_legs.txt): 5 mm in position, 1e-6 degree in course.
func TestTrackAlongGeodSolve(t *testing.T) {
	legs := legRows(t)
	for _, name := range []string{"antimeridian", "transpolar", "polar"} {
		rows := legs[name]
		if len(rows) < 3 {
			t.Fatalf("%s: %d fixture rows", name, len(rows))
		}
		r0 := rows[0]
		r, err := ParseInline(fmt.Sprintf("%v,%v %v,%v", r0[0], r0[1], r0[2], r0[3]))
		if err != nil {
			t.Fatal(err)
		}
		tr, err := Build(r, Options{Date: testDate})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		checkTrack(t, tr, DefaultMaxSegment)
		for _, row := range rows {
			p, c := tr.PointAt(row[4])
			d, _, _ := Inverse(p.Lat, p.Lon, row[5], row[6])
			if d > tolDist || (row[4] > 0 && angErr(c, row[7]) > tolAzi) {
				t.Errorf("%s at %v m: %+v course %v; GeodSolve %v %v %v (%.4f m off)", name, row[4], p, c, row[5], row[6], row[7], d)
			}
		}
		crossed := false
		for _, sg := range tr.Segments {
			if math.Abs(sg.Start.Lon-sg.End.Lon) > 180 {
				crossed = true
			}
		}
		if name == "antimeridian" && !crossed {
			t.Errorf("antimeridian leg never crossed 180")
		}
		if name == "transpolar" {
			top := -90.0
			for _, sg := range tr.Segments {
				top = max(top, sg.Start.Lat, sg.Mid.Lat, sg.End.Lat)
			}
			if top < 89.5 {
				t.Errorf("transpolar leg reached only %v N", top)
			}
		}
	}
}

// TestBuildPast85N: a three-leg route with waypoints at 85N whose middle
// leg crosses the pole; every segment must be complete and finite.
func TestBuildPast85N(t *testing.T) {
	r, err := ParseInline("A=64,-22 B=85,-40 C=85,140 D=65,150")
	if err != nil {
		t.Fatal(err)
	}
	tr, err := Build(r, Options{Date: testDate, MaxSegment: 100e3})
	if err != nil {
		t.Fatal(err)
	}
	checkTrack(t, tr, 100e3)
	for _, sg := range tr.Segments {
		if math.IsNaN(sg.MagVar) || len(sg.Levels) == 0 {
			t.Errorf("segment %d: %+v", sg.Index, sg)
		}
	}
}

// route100 is a deterministic 100-waypoint route wandering eastward round
// the northern hemisphere (inputs only; no value below is a check value).
func route100(t testing.TB) *Route {
	var b strings.Builder
	for k := range 100 {
		lat := 45 + 15*math.Sin(float64(k)/6)
		lon := -170 + 3.5*float64(k)
		fmt.Fprintf(&b, "W%d=%.4f,%.4f ", k, lat, NormalizeLon(lon))
	}
	r, err := ParseInline(b.String())
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestBuild100Waypoints(t *testing.T) {
	r := route100(t)
	tr, err := Build(r, Options{Date: testDate})
	if err != nil {
		t.Fatal(err)
	}
	checkTrack(t, tr, DefaultMaxSegment)
	// Custom segment length and level rule are honoured.
	rule, _ := ParseLevelRule("list:330,350")
	tr, err = Build(r, Options{Date: testDate, MaxSegment: 20e3, Levels: rule})
	if err != nil {
		t.Fatal(err)
	}
	for _, sg := range tr.Segments {
		if sg.Length > 20e3 || !slices.Equal(sg.Levels, []int{330, 350}) {
			t.Fatalf("segment %+v", sg)
		}
	}
}

func TestBuildOptionErrors(t *testing.T) {
	r, _ := ParseInline("10,10 11,11")
	for _, o := range []Options{
		{MaxSegment: -1, Date: testDate},
		{MaxSegment: math.NaN(), Date: testDate},
		{Date: time.Date(2031, 1, 1, 0, 0, 0, 0, time.UTC)}, // beyond WMM2025 validity
		{Date: testDate, Levels: LevelRule{Kind: "bogus"}},
		{Date: testDate, Levels: LevelRule{Kind: RuleList}},
		{Date: testDate, MaxSegment: 1e-3},   // too many segments
		{Date: testDate, MaxSegment: 1e-300}, // count beyond int range
		{Date: testDate, MaxSegment: 5e-324},
	} {
		if _, err := Build(r, o); err == nil {
			t.Errorf("Build accepted %+v", o)
		}
	}
	if _, err := Build(&Route{}, Options{}); err == nil {
		t.Error("Build accepted an empty route")
	}
	// Routes built by hand, bypassing the parsers' validation.
	for _, pts := range [][]Point{
		{{"A", 10, 10}, {"B", 95, 10}},
		{{"A", 10, 10}, {"B", math.NaN(), 10}},
		{{"A", 10, math.Inf(1)}, {"B", 10, 10}},
	} {
		_, err := Build(&Route{Source: "hand", Points: pts}, Options{Date: testDate})
		var fe *FormatError
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), "point 2 (B)") {
			t.Errorf("Build(%v) error %v, want a *FormatError naming point 2 (B)", pts, err)
		}
	}
}

// TestCrossTrack offsets points perpendicular to a leg with Direct
// (GeodSolve-verified) and checks the spherical (s2) cross-track distance
// within its stated 0.5 % error.
func TestCrossTrack(t *testing.T) {
	r, _ := ParseInline("40.6,-73.8 51.6,-0.5")
	tr, err := Build(r, Options{Date: testDate})
	if err != nil {
		t.Fatal(err)
	}
	for _, sg := range []Segment{tr.Segments[5], tr.Segments[30], tr.Segments[55]} {
		for _, off := range []float64{20e3, -35e3} {
			la, lo, _ := Direct(sg.Mid.Lat, sg.Mid.Lon, sg.TrueCourse+90, off)
			got := CrossTrack(tr, Point{Lat: la, Lon: lo})
			if math.Abs(got-off) > 0.005*math.Abs(off) {
				t.Errorf("offset %v m at segment %d: CrossTrack %v", off, sg.Index, got)
			}
		}
	}
}

func BenchmarkBuild100(b *testing.B) {
	r := route100(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := Build(r, Options{Date: testDate}); err != nil {
			b.Fatal(err)
		}
	}
}
