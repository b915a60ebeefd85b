package route

import (
	"fmt"
	"math"
	"sort"
	"time"

	"github.com/golang/geo/s2"
)

// DefaultMaxSegment is the default longest segment: 50 NM in metres.
const DefaultMaxSegment = 50 * 1852.0

// MaxSegments bounds the number of segments Build makes: 10,000 segments
// hold a 10,000 NM route cut at 1 NM (the CLI's finest --max-seg-nm), and
// the planner's memory grows with the segment count (about 120 KiB per
// segment measured with levelpath plan), so a route needing more is refused
// with an *UnsupportedError before anything is allocated for it.
const MaxSegments = 10_000

// MeanRadius is the IUGG mean Earth radius R1 = (2a+b)/3 for WGS-84, m
// (Moritz, "Geodetic Reference System 1980", Bull. Géod. 54, 1980), used
// by the spherical helpers.
const MeanRadius = 6371008.8

// Leg is the geodesic between two consecutive waypoints.
type Leg struct {
	Index         int
	From, To      Point
	Length        float64 // m, ellipsoidal
	InitialCourse float64 // degrees true at From, [0, 360)
	FinalCourse   float64 // degrees true at To, [0, 360)
	StartDist     float64 // m from departure to From
}

// Segment is a piece of a leg over which the planner treats course, wind
// and level choice as constant.
type Segment struct {
	Index, Leg               int
	FromDist, ToDist, Length float64 // m from departure; Length = ToDist - FromDist
	Start, End, Mid          Point   // Mid is the geodesic midpoint
	TrueCourse               float64 // degrees true at Mid, [0, 360)
	MagVar, MagCourse        float64 // degrees, east positive; MagCourse = TrueCourse - MagVar in [0, 360)
	Samples                  []Point // weather sample points: Start, Mid, End
	Levels                   []int   // allowed flight levels, ascending; shared between segments, do not modify

	// HorizontalField is the WMM2025 horizontal intensity H (nT) at Mid
	// and Options.MagAltitude; Zone says whether it lies in the model's
	// compass caution or blackout zone (see CompassZone).
	HorizontalField float64
	Zone            CompassZone
	// LevelCourse names the course Levels were chosen on: CourseMagnetic,
	// CourseTrue, CourseGrid, or "" for a rule that ignores the course.
	// Under the magnetic rule it is the polar policy's course (true by
	// default) wherever Zone is not ZoneNone.
	LevelCourse string
}

// Track is a route cut into legs and segments.
type Track struct {
	Route    *Route
	Legs     []Leg
	Segments []Segment
	Total    float64 // m, sum of leg lengths
	// Warnings are Build's non-fatal findings (segments where the
	// magnetic level rule fell back to another course); the route's own
	// are in Route.Warnings.
	Warnings []string
}

// Options control Build.
type Options struct {
	MaxSegment  float64   // m; 0 means DefaultMaxSegment
	Date        time.Time // date for magnetic variation (required; no wall-clock default)
	Levels      LevelRule // zero value means the default rule (see ParseLevelRule)
	MagAltitude float64   // m above the ellipsoid at which variation is taken; 0 = surface, as charted
	// Polar is the course the magnetic level rule uses where the compass
	// is unreliable (Segment.Zone not ZoneNone): PolarTrue ("" means it)
	// or PolarGrid. Other rules ignore it.
	Polar string
}

// Polar policies of Options.Polar.
const (
	PolarTrue = "true" // true course, as ICAO Annex 2 lets states prescribe in polar areas
	PolarGrid = "grid" // grid course, grid north parallel to the Greenwich meridian
)

// Courses named by Segment.LevelCourse.
const (
	CourseMagnetic = "magnetic"
	CourseTrue     = "true"
	CourseGrid     = "grid"
)

// GridCourse returns the grid course in [0, 360) of true course tc
// (degrees) at latitude lat and longitude lon, grid north being parallel
// to the Greenwich meridian, pointing from it toward the pole of lat's
// hemisphere and beyond: G = T - lon in the northern hemisphere and
// G = T + lon in the southern one (lon east positive). On the equator it
// uses the northern form.
func GridCourse(tc, lat, lon float64) float64 {
	if lat < 0 {
		return course360(tc + lon)
	}
	return course360(tc - lon)
}

// Build cuts every leg of r into the fewest equal segments no longer than
// opt.MaxSegment, so waypoints stay segment boundaries. Leg lengths and
// courses are ellipsoidal (Inverse); segment points are found with a
// geodesic line from the leg start along its initial azimuth (the direct
// problem), so they lie on the true geodesic. Each segment gets the true
// course at its midpoint, the WMM2025 magnetic variation there (computed
// once per segment) and the flight levels opt.Levels allows.
// A hand-built route with a point that has no geodesic (latitude outside
// [-90, 90], a NaN or infinite coordinate) gives a *FormatError; more than
// MaxSegments segments an *UnsupportedError.
//
// Polar areas: where the WMM2025 horizontal intensity H at a segment's
// midpoint is in the compass caution or blackout zone (H under
// WMMCautionH), a compass cannot give the magnetic course, so the
// odd-even-magnetic rule uses the course opt.Polar names there (true by
// default), sets Segment.LevelCourse accordingly and adds a warning to
// Track.Warnings. Cost O(number of segments).
func Build(r *Route, opt Options) (*Track, error) {
	if r == nil || len(r.Points) < 2 {
		return nil, fmt.Errorf("route: Build needs a route of at least two points")
	}
	maxSeg := opt.MaxSegment
	if maxSeg == 0 {
		maxSeg = DefaultMaxSegment
	}
	if !(maxSeg > 0) || math.IsInf(maxSeg, 0) {
		return nil, fmt.Errorf("route: maximum segment length %v m is not a positive finite number", opt.MaxSegment)
	}
	// WMM2025 report, Sec. 1: the model is valid from 1 km below the
	// surface to 850 km above it.
	if !(opt.MagAltitude >= -1e3 && opt.MagAltitude <= 850e3) {
		return nil, &FormatError{Source: "route options", Msg: fmt.Sprintf("magnetic-variation height %v m is outside WMM2025's -1000 to 850000 m", opt.MagAltitude)}
	}
	date := opt.Date
	if date.IsZero() {
		return nil, fmt.Errorf("route: Options.Date is required: the magnetic variation and so the level rule depend on it")
	}
	wmm, err := wmmAt(date)
	if err != nil {
		return nil, err
	}
	rule := opt.Levels
	if err := rule.check(); err != nil {
		return nil, err
	}
	polarCourse := CourseTrue
	switch opt.Polar {
	case "", PolarTrue:
	case PolarGrid:
		polarCourse = CourseGrid
	default:
		return nil, &FormatError{Source: "polar policy", Msg: fmt.Sprintf("%s is not a polar policy; want %q or %q", clip(opt.Polar), PolarTrue, PolarGrid)}
	}
	var levelCache [3][]int

	t := &Track{Route: r, Legs: make([]Leg, len(r.Points)-1)}
	nseg := 0
	counts := make([]int, len(t.Legs))
	for i := range t.Legs {
		a, b := r.Points[i], r.Points[i+1]
		s12, azi1, azi2 := Inverse(a.Lat, a.Lon, b.Lat, b.Lon)
		if math.IsNaN(s12) {
			// Only a Route built by hand gets here; the parsers validate.
			return nil, &FormatError{Source: r.Source, Point: i + 2, Name: b.Name, Msg: fmt.Sprintf("leg from point %d (%s) has no geodesic: (%v, %v) to (%v, %v) are not valid positions", i+1, a.Name, a.Lat, a.Lon, b.Lat, b.Lon)}
		}
		t.Legs[i] = Leg{Index: i, From: a, To: b, Length: s12, InitialCourse: course360(azi1), FinalCourse: course360(azi2), StartDist: t.Total}
		t.Total += s12
		// Bound the count as a float: converting a huge quotient (a tiny
		// maxSeg) to int is implementation-defined in Go.
		c := max(1, math.Ceil(s12/maxSeg*(1-1e-12)))
		if c > float64(MaxSegments-nseg) {
			return nil, &UnsupportedError{Source: r.Source, Msg: fmt.Sprintf("the route needs more than %d segments (the limit) of at most %.0f m each, by leg %d of %d: use longer segments or a shorter route", MaxSegments, maxSeg, i+1, len(t.Legs))}
		}
		counts[i] = int(c)
		nseg += counts[i]
	}
	t.Segments = make([]Segment, 0, nseg)
	var polar polarTally
	samples := make([]Point, 3*nseg)
	var line geoLine
	for i, leg := range t.Legs {
		n := counts[i]
		line.init(leg.From.Lat, leg.From.Lon, leg.InitialCourse)
		step := leg.Length / float64(n)
		start := leg.From
		for k := range n {
			s0, s1 := float64(k)*step, float64(k+1)*step
			end := leg.To
			if k < n-1 {
				la, lo, _ := line.position(s1)
				end = Point{Lat: la, Lon: lo}
			}
			mla, mlo, mazi := line.position((s0 + s1) / 2)
			mid := Point{Lat: mla, Lon: mlo}
			tc := course360(mazi)
			fx, fy, _ := wmm.field(mla, mlo, opt.MagAltitude)
			mv := math.Atan2(fy, fx) * (180 / math.Pi)
			h := math.Hypot(fx, fy)
			zone := compassZone(h)
			mc := course360(tc - mv)
			ruleMC, used := mc, rule.course()
			if used == CourseMagnetic && zone != ZoneNone {
				used = polarCourse
				ruleMC = tc
				if used == CourseGrid {
					ruleMC = GridCourse(tc, mla, mlo)
				}
				polar.add(zone, leg.StartDist+s0, leg.StartDist+s1, h)
			}
			cls := rule.class(tc, ruleMC)
			if levelCache[cls+1] == nil {
				levelCache[cls+1] = rule.Allowed(tc, ruleMC)
			}
			j := len(t.Segments)
			smp := samples[3*j : 3*j+3 : 3*j+3]
			smp[0], smp[1], smp[2] = start, mid, end
			t.Segments = append(t.Segments, Segment{
				Index: j, Leg: i,
				FromDist: leg.StartDist + s0, ToDist: leg.StartDist + s1, Length: step,
				Start: start, End: end, Mid: mid,
				TrueCourse: tc, MagVar: mv, MagCourse: mc,
				Samples: smp, Levels: levelCache[cls+1],
				HorizontalField: h, Zone: zone, LevelCourse: used,
			})
			start = end
		}
		// Pin the leg end exactly to the leg's cumulative length.
		t.Segments[len(t.Segments)-1].ToDist = leg.StartDist + leg.Length
	}
	t.Warnings = polar.warnings(polarCourse)
	return t, nil
}

// course360 reduces an azimuth in degrees to [0, 360).
func course360(x float64) float64 {
	y := math.Mod(x, 360)
	if y < 0 {
		y += 360
	}
	if y >= 360 {
		y = 0
	}
	return y + 0
}

// PointAt returns the point at distance s metres from departure along the
// track (clamped to [0, Total]) and the true course there in [0, 360).
// It finds the leg by binary search and solves the direct problem from the
// leg start: O(log legs).
func (t *Track) PointAt(s float64) (Point, float64) {
	s = math.Max(0, math.Min(s, t.Total))
	i := sort.Search(len(t.Legs), func(i int) bool { return t.Legs[i].StartDist+t.Legs[i].Length >= s })
	if i == len(t.Legs) {
		i = len(t.Legs) - 1
	}
	leg := t.Legs[i]
	la, lo, azi := Direct(leg.From.Lat, leg.From.Lon, leg.InitialCourse, s-leg.StartDist)
	return Point{Lat: la, Lon: lo}, course360(azi)
}

func ll(p Point) s2.LatLng { return s2.LatLngFromDegrees(p.Lat, p.Lon) }

// CrossTrack returns the distance in metres from p to the nearest part of
// the track, positive when p lies right of the direction of flight and
// negative when left. The track is taken as the great-circle arcs between
// consecutive segment boundaries (which lie on the ellipsoidal geodesic,
// so with segments of 50 NM the arcs stray from it by metres), or between
// waypoints if the track has no segments, on a sphere of radius
// MeanRadius, using github.com/golang/geo/s2. It is a spherical
// approximation (error up to about 0.5 % of the distance) meant for checks
// and display, not for lengths. Cost O(segments).
func CrossTrack(track *Track, p Point) float64 {
	x := s2.PointFromLatLng(ll(p))
	best := math.Inf(1)
	sign := 1.0
	try := func(from, to Point) {
		a := s2.PointFromLatLng(ll(from))
		b := s2.PointFromLatLng(ll(to))
		d := s2.DistanceFromSegment(x, a, b).Radians()
		if d < best {
			best = d
			// a x b points to the left of travel from a to b.
			if x.Dot(a.Cross(b.Vector)) > 0 {
				sign = -1
			} else {
				sign = 1
			}
		}
	}
	if len(track.Segments) > 0 {
		for _, sg := range track.Segments {
			try(sg.Start, sg.End)
		}
	} else {
		for _, leg := range track.Legs {
			try(leg.From, leg.To)
		}
	}
	return sign * best * MeanRadius
}
