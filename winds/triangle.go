package winds

import (
	"fmt"
	"math"
)

// AlongAcross resolves the wind (u eastward, v northward, any speed unit)
// along a true course (degrees clockwise from north). along is the
// component in the direction of the course: positive is a tailwind. across
// is the component to the right of the course: positive when the wind
// blows from the left of the track towards its right.
func AlongAcross(u, v, courseDeg float64) (along, across float64) {
	s, c := math.Sincos(courseDeg * math.Pi / 180)
	return u*s + v*c, u*c - v*s
}

// GroundSpeed solves the wind triangle for an aircraft that holds true
// course courseDeg at true airspeed tas in wind (u, v), all speeds in one
// unit: the heading is turned into the wind so the air vector's component
// across the track cancels the wind's, tas sin(WCA) = across, and
// gs = tas cos(WCA) + along. driftDeg = course - heading, positive when the
// wind blows from the left (the aircraft heads left of its track). It is an
// error when the crosswind is at least tas or the headwind leaves no
// ground speed. The relation is the vector sum air + wind = ground of the
// navigation wind triangle (e.g. FAA-H-8083-25, Pilot's Handbook of
// Aeronautical Knowledge, chapter on navigation).
func GroundSpeed(tas, courseDeg, u, v float64) (gs, driftDeg float64, err error) {
	if !(tas > 0) {
		return 0, 0, fmt.Errorf("winds: true airspeed %g must be positive", tas)
	}
	along, across := AlongAcross(u, v, courseDeg)
	if math.Abs(across) >= tas || math.IsNaN(across) {
		return 0, 0, fmt.Errorf("winds: crosswind %g is not less than true airspeed %g", math.Abs(across), tas)
	}
	wca := math.Asin(across / tas)
	gs = tas*math.Cos(wca) + along
	if gs <= 0 {
		return 0, 0, fmt.Errorf("winds: headwind %g leaves no ground speed at true airspeed %g", -along, tas)
	}
	return gs, wca * 180 / math.Pi, nil
}
