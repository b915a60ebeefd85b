package perf

import "math"

// Cruiser evaluates one aircraft's cruise speed searches (MachBand,
// EconMach, LRCMach), Point, Climb and Descent, keeping what repeats
// between calls: the buffet-onset Machs, which depend on mass, pressure
// and load factor alone (so a search that asks at a few masses and levels
// on many route segments finds them again); per pressure the ISA
// temperature and the Mach of VMO; and, for the climb and descent
// integration, whose step heights are the same for every transition
// between the same two pressures, the standard pressure and temperature
// and the Mach of the schedule's CAS at each height. Every result equals
// the Aircraft method's bit for bit: the same operations on the same
// values in the same order, only not repeated (TestCruiserMatchesAircraft,
// TestCruiserTransitions).
//
// The speed caches are direct-mapped tables of fixed size (an entry is
// replaced when another key hashes to its slot), and at most
// cruiserProfiles transition profiles are kept, so a Cruiser's memory is
// bounded (under 1 MB for the speeds, 24 bytes a height for the
// profiles) however many calls it serves. A Cruiser is not safe for
// concurrent use; the Aircraft must not change while it is used.
type Cruiser struct {
	a      *Aircraft
	cosL   float64
	buffet []buffetSlot // 1<<cruiserBuffetBits slots once used
	press  []pressSlot  // 1<<cruiserPressBits slots once used
	// profiles are the transitions' heights, at most cruiserProfiles.
	profiles map[profileKey]*climbProfile
}

const (
	cruiserBuffetBits = 13
	cruiserPressBits  = 8
	// cruiserProfiles caps the transition profiles kept.
	cruiserProfiles = 1024
)

// profileKey names the heights a transition integrates over (from h1 to
// h2) and the CAS limits of its schedule.
type profileKey struct {
	h1, h2, casLow, cas uint64 // float64 bits
}

// climbProfile holds, for each height transition asks in turn, the
// standard pressure and temperature and the Mach of the schedule's CAS.
type climbProfile struct {
	nodes []profileNode
}

type profileNode struct {
	p, tisa, casMach float64
}

// profile returns the kept profile for a transition from h1 to h2 on
// schedule s, nil when c is nil or the cap is reached.
func (c *Cruiser) profile(h1, h2 float64, s *Schedule) *climbProfile {
	if c == nil {
		return nil
	}
	k := profileKey{math.Float64bits(h1), math.Float64bits(h2), math.Float64bits(s.CASLow), math.Float64bits(s.CAS)}
	if pr, ok := c.profiles[k]; ok {
		return pr
	}
	if len(c.profiles) >= cruiserProfiles {
		return nil
	}
	if c.profiles == nil {
		c.profiles = make(map[profileKey]*climbProfile)
	}
	// One height to start, then two a step (end and midpoint), the steps
	// at most maxSubStep apart plus one for the split at 10,000 ft.
	pr := &climbProfile{nodes: make([]profileNode, 0, 2*int(math.Abs(h2-h1)/maxSubStep+2)+1)}
	c.profiles[k] = pr
	return pr
}

// Climb is Aircraft.Climb.
func (c *Cruiser) Climb(mass, fromP, toP, isaDev float64, s Schedule) (Transition, error) {
	return c.a.climb(c, mass, fromP, toP, isaDev, s)
}

// Descent is Aircraft.Descent.
func (c *Cruiser) Descent(mass, fromP, toP, isaDev float64, s Schedule) (Transition, error) {
	return c.a.descent(c, mass, fromP, toP, isaDev, s)
}

type buffetSlot struct {
	mass, p, n float64
	used       bool
	v          buffetBand
}

type pressSlot struct {
	p, tisa, vmoMach float64
	used             bool
}

// NewCruiser returns a Cruiser for a.
func NewCruiser(a *Aircraft) *Cruiser {
	return &Cruiser{a: a, cosL: math.Cos(a.Sweep)}
}

// Aircraft returns the aircraft c evaluates.
func (c *Cruiser) Aircraft() *Aircraft { return c.a }

// eq reports whether x and y are the same float64 bit for bit (so that
// -0 and +0 are different keys).
func eq(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) }

// hash3 mixes the bits of three floats into a slot index below 2^bits
// (a multiplicative hash, Knuth, TAOCP vol. 3, 6.4).
func hash3(x, y, z float64, bits uint) uint64 {
	h := math.Float64bits(x)*0x9E3779B97F4A7C15 ^ math.Float64bits(y)*0xC2B2AE3D27D4EB4F ^ math.Float64bits(z)*0x165667B19E3779F9
	return (h ^ h>>29) * 0x9E3779B97F4A7C15 >> (64 - bits)
}

// buffetMachs is Aircraft.buffetMachs, kept. Keys that are not positive
// (NaN among them) are not kept.
func (c *Cruiser) buffetMachs(mass, p, n float64) buffetBand {
	if !(mass > 0 && p > 0 && n > 0) {
		var bf buffetBand
		bf.lo, bf.hi, bf.beyond, bf.ok = c.a.buffetMachs(mass, p, n)
		return bf
	}
	if c.buffet == nil {
		c.buffet = make([]buffetSlot, 1<<cruiserBuffetBits)
	}
	e := &c.buffet[hash3(mass, p, n, cruiserBuffetBits)]
	if e.used && eq(e.mass, mass) && eq(e.p, p) && eq(e.n, n) {
		return e.v
	}
	var bf buffetBand
	bf.lo, bf.hi, bf.beyond, bf.ok = c.a.buffetMachs(mass, p, n)
	*e = buffetSlot{mass: mass, p: p, n: n, used: true, v: bf}
	return bf
}

// atPressure returns the ISA temperature and the Mach of VMO at p, kept.
func (c *Cruiser) atPressure(p float64) (tisa, vmoMach float64) {
	if !(p > 0) {
		return isaTemperatureAtPressure(p), CASToMach(c.a.VMO, p)
	}
	if c.press == nil {
		c.press = make([]pressSlot, 1<<cruiserPressBits)
	}
	e := &c.press[hash3(p, 0, 0, cruiserPressBits)]
	if e.used && eq(e.p, p) {
		return e.tisa, e.vmoMach
	}
	tisa, vmoMach = isaTemperatureAtPressure(p), CASToMach(c.a.VMO, p)
	*e = pressSlot{p: p, tisa: tisa, vmoMach: vmoMach, used: true}
	return tisa, vmoMach
}

// SpeedBand is Aircraft.SpeedBand.
func (c *Cruiser) SpeedBand(mass, p, isaDev, floor float64) (Band, bool) {
	tisa, vmo := c.atPressure(p)
	return c.a.speedBand(mass, p, isaDev, tisa, vmo, c.buffetMachs(mass, p, floor))
}

// MachBand is Aircraft.MachBand.
func (c *Cruiser) MachBand(mass, p, isaDev, floor float64) (lo, hi float64, ok bool) {
	b, ok := c.SpeedBand(mass, p, isaDev, floor)
	return b.Lo, b.Hi, ok
}

// BuffetMachs is Aircraft.BuffetMachs.
func (c *Cruiser) BuffetMachs(mass, p, n float64) (lo, hi float64, ok bool) {
	bf := c.buffetMachs(mass, p, n)
	return bf.lo, bf.hi, bf.ok
}

// EconMach is Aircraft.EconMach.
func (c *Cruiser) EconMach(mass, p, isaDev, floor, ci, windAlong float64) (float64, bool) {
	lo, hi, ok := c.MachBand(mass, p, isaDev, floor)
	if !ok || math.IsNaN(ci) || math.IsNaN(windAlong) {
		return math.NaN(), false
	}
	tisa, _ := c.atPressure(p)
	return c.a.econMachIn(mass, p, tisa+isaDev, tisa, lo, hi, ci/60, windAlong), true
}

// LRCMach is Aircraft.LRCMach.
func (c *Cruiser) LRCMach(mass, p, isaDev, floor float64) (float64, bool) {
	lo, hi, ok := c.MachBand(mass, p, isaDev, floor)
	if !ok {
		return math.NaN(), false
	}
	tisa, _ := c.atPressure(p)
	m, _ := c.a.lrcIn(mass, p, tisa+isaDev, tisa, lo, hi)
	return m, true
}

// Point is Aircraft.Point.
func (c *Cruiser) Point(s State) Point {
	tisa, _ := c.atPressure(s.Pressure)
	return c.a.point(s, tisa, c.cosL, true)
}

// PointNoCAS is Point with CAS left NaN, one power less, for callers that
// do not read it; every other field is Point's.
func (c *Cruiser) PointNoCAS(s State) Point {
	tisa, _ := c.atPressure(s.Pressure)
	return c.a.point(s, tisa, c.cosL, false)
}
