package winds

import (
	"math"
	"testing"
)

// TestGroundSpeedHandbook: the wind-triangle example of the FAA Pilot's
// Handbook of Aeronautical Knowledge (FAA-H-8083-25, navigation chapter),
// from memory: true course 090, TAS 120 kt, wind from 360 at 40 kt; the
// handbook's plotted solution is a true heading of about 071 and a ground
// speed of about 113 kt (read off a drawing, hence the 1 kt / 1 degree
// tolerance).
func TestGroundSpeedHandbook(t *testing.T) {
	u, v := 0.0, -40.0 // from the north: blowing towards the south
	gs, drift, err := GroundSpeed(120, 90, u, v)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(gs-113) > 1 || math.Abs((90-drift)-71) > 1 {
		t.Errorf("gs %.2f kt, heading %.2f, want about 113 kt and 071", gs, 90-drift)
	}
}

// TestGroundSpeedVector checks GroundSpeed against the exact vector
// relation it inverts, ground = air + wind: for a chosen heading and TAS
// the ground vector is computed directly, and GroundSpeed given its course
// must return its length and course - heading.
func TestGroundSpeedVector(t *testing.T) {
	for _, c := range []struct{ hdg, tas, u, v float64 }{
		{45, 230, 30, -10},
		{270, 240, -60, 5},   // headwind
		{10, 250, -40, 70},   // tailwind, from the left
		{181, 200, 55, 0.5},  // from the right
		{359, 220, 0.1, 0.1}, // near calm
	} {
		s, co := math.Sincos(c.hdg * math.Pi / 180)
		ge, gn := c.tas*s+c.u, c.tas*co+c.v
		course := math.Mod(math.Atan2(ge, gn)*180/math.Pi+360, 360)
		gs, drift, err := GroundSpeed(c.tas, course, c.u, c.v)
		if err != nil {
			t.Fatal(err)
		}
		wantDrift := math.Remainder(course-c.hdg, 360)
		if math.Abs(gs-math.Hypot(ge, gn)) > 1e-9 || math.Abs(drift-wantDrift) > 1e-9 {
			t.Errorf("%+v: gs %.9f drift %.9f, want %.9f %.9f", c, gs, drift, math.Hypot(ge, gn), wantDrift)
		}
	}
}

// TestAlongAcross: components of a wind vector on a course by the
// definition of the projection (exact for the axis-aligned cases).
func TestAlongAcross(t *testing.T) {
	for _, c := range []struct{ u, v, course, along, across float64 }{
		{0, 10, 0, 10, 0},    // southerly wind, northbound: tailwind
		{10, 0, 0, 0, 10},    // westerly, northbound: from the left
		{-10, 0, 0, 0, -10},  // easterly, northbound: from the right
		{10, 0, 90, 10, 0},   // westerly, eastbound: tailwind
		{0, 10, 90, 0, -10},  // southerly, eastbound: from the right
		{0, -20, 180, 20, 0}, // northerly, southbound: tailwind
		{3, 4, 36.8698976, 5, 0},
	} {
		a, x := AlongAcross(c.u, c.v, c.course)
		if math.Abs(a-c.along) > 1e-6 || math.Abs(x-c.across) > 1e-6 {
			t.Errorf("AlongAcross(%v, %v, %v) = %v, %v, want %v, %v", c.u, c.v, c.course, a, x, c.along, c.across)
		}
	}
}

func TestGroundSpeedErrors(t *testing.T) {
	for _, c := range []struct{ tas, course, u, v float64 }{
		{100, 0, 100, 0},  // crosswind equal to TAS
		{100, 0, -150, 0}, // crosswind above TAS
		{100, 0, 0, -120}, // headwind above TAS
		{0, 0, 0, 0},
		{100, 0, math.NaN(), 0},
	} {
		if _, _, err := GroundSpeed(c.tas, c.course, c.u, c.v); err == nil {
			t.Errorf("GroundSpeed(%v) gave no error", c)
		}
	}
}
