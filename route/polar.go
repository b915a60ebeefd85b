package route

import (
	"fmt"
	"math"
	"time"
)

// Compass zones of the World Magnetic Model 2025.
//
// Source: A. Chulliat et al., "The US/UK World Magnetic Model for
// 2025-2030: Technical Report", NOAA NCEI / BGS (2025), section on
// blackout zones: where the horizontal intensity H is under 6000 nT a
// magnetic compass is in the caution zone (its heading degrades), and under
// 2000 nT in the blackout, or unreliable, zone (the WMM declination there
// must not be relied on for navigation). The thresholds are those the
// report states for WMM2020 and WMM2025 (quoted here, not re-derived).
const (
	WMMCautionH  = 6000.0 // nT
	WMMBlackoutH = 2000.0 // nT
)

// CompassZone classifies a position by the WMM2025 horizontal intensity.
type CompassZone string

// Values of CompassZone.
const (
	ZoneNone     CompassZone = ""         // H >= WMMCautionH: the compass is usable
	ZoneCaution  CompassZone = "caution"  // WMMBlackoutH <= H < WMMCautionH
	ZoneBlackout CompassZone = "blackout" // H < WMMBlackoutH (or H not finite)
)

// compassZone returns the zone of horizontal intensity h (nT).
func compassZone(h float64) CompassZone {
	switch {
	case h >= WMMCautionH:
		return ZoneNone
	case h >= WMMBlackoutH:
		return ZoneCaution
	}
	return ZoneBlackout // also NaN: never trust a field we could not compute
}

// HorizontalIntensity returns the WMM2025 horizontal intensity H (nT) at
// geodetic lat, lon (degrees) and altM metres above the WGS-84 ellipsoid on
// date t, and its compass zone. Errors as MagneticVariation.
func HorizontalIntensity(lat, lon, altM float64, t time.Time) (float64, CompassZone, error) {
	if _, err := MagneticVariation(lat, lon, altM, t); err != nil {
		return 0, ZoneNone, err
	}
	w, _ := wmmAt(t)
	x, y, _ := w.field(lat, lon, altM)
	h := math.Hypot(x, y)
	return h, compassZone(h), nil
}

// course returns the course kind the rule chooses levels on, or "" when
// it ignores the course.
func (r LevelRule) course() string {
	switch r.Kind {
	case "", RuleOddEvenMagnetic:
		return CourseMagnetic
	case RuleOddEvenTrue:
		return CourseTrue
	}
	return ""
}

// polarTally collects, per zone, the segments where the magnetic rule
// fell back to another course.
type polarTally struct {
	n          [2]int
	from, to   [2]float64 // m
	hMin, hMax [2]float64 // nT
}

func (p *polarTally) add(z CompassZone, from, to, h float64) {
	i := 0
	if z == ZoneBlackout {
		i = 1
	}
	if p.n[i] == 0 {
		p.from[i], p.hMin[i], p.hMax[i] = from, h, h
	}
	p.n[i]++
	p.to[i] = to
	p.hMin[i] = math.Min(p.hMin[i], h)
	p.hMax[i] = math.Max(p.hMax[i], h)
}

// warnings returns one warning per zone that holds segments.
func (p *polarTally) warnings(course string) []string {
	var out []string
	for i, name := range []string{"caution zone (H under 6000 nT)", "blackout zone (H under 2000 nT)"} {
		if p.n[i] == 0 {
			continue
		}
		out = append(out, fmt.Sprintf("%d segment(s) between %.0f and %.0f NM lie in the WMM2025 compass %s, H %.0f-%.0f nT: the magnetic level rule uses the %s course there",
			p.n[i], p.from[i]/1852, p.to[i]/1852, name, p.hMin[i], p.hMax[i], course))
	}
	return out
}
