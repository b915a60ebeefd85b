package perf

import "math"

// EnvelopeRow is the envelope at one flight level.
type EnvelopeRow struct {
	FL, Pressure, OAT, SoundSpeed float64 // FL, Pa, K, m/s

	// Buffet-onset Mach numbers at 1 g and at the protection floor; NaN
	// where no Mach is free of buffet.
	LowBuffet1g, HighBuffet1g, LowBuffetFloor, HighBuffetFloor float64

	// HighBuffet1gBeyondData and HighBuffetFloorBeyondData are true when
	// the high-speed value is the last Mach of the buffet table, not an
	// onset: the boundary lies beyond the data and must be shown as such.
	HighBuffet1gBeyondData, HighBuffetFloorBeyondData bool

	MMO     float64
	VMOMach float64 // Mach of VMO at this level

	// Band is the usable Mach band at the floor (SpeedBand): bounded by
	// buffet, MMO, VMO and thrust, with the limit at each end named; NaN
	// ends where it is empty.
	Band Band

	LRCMach       float64 // NaN if MachBand is empty
	ResidualClimb float64 // m/s of pressure altitude at LRC, NaN if none
}

// Envelope is the cruise envelope for one mass, temperature and buffet
// protection floor. Levels are continuous flight levels; NaN where a limit
// does not exist within the search range.
type Envelope struct {
	Aircraft            string
	Mass, ISADev, Floor float64 // kg, K, g
	Rows                []EnvelopeRow
	MaxFLBuffet         float64 // highest level with a buffet-free band at Floor below MMO
	MaxFLThrust         float64 // highest level with residual climb >= 300 ft/min at LRC
	// MaxFLThrustAtTableTop is true for a table aircraft whose thrust
	// ceiling search reached the top level of its thrust table: the
	// ceiling is then at least MaxFLThrust, not at it.
	MaxFLThrustAtTableTop bool
	MaxFLCertified        float64
	MaxFL                 float64 // least of the three
	OptimumFL             float64 // level of best specific range at the max-range Mach, at most MaxFL
}

const (
	minResidualClimb = 300 * FtToM / 60 // m/s; thrust-limited ceiling criterion (common practice)
	envelopeLowFL    = 100
	levelSearchTopFL = 650   // the search for buffet and thrust ceilings stops here (~19.8 km)
	levelTol         = 0.001 // FL, i.e. 0.1 ft
)

// Envelope returns the envelope at mass (kg), temperature ISA + isaDev (K)
// and buffet protection floor (g, >= 1): rows from FL100 to the certified
// ceiling plus 2,000 ft in 1,000 ft steps, and the ceilings as continuous
// levels found by bisection to 0.1 ft between the grid rows (the grid is
// extended above the table up to FL650 when a limit lies higher):
//
//   - MaxFLBuffet: highest level where BuffetMachs at the floor has a band
//     whose low end is below MMO;
//   - MaxFLThrust: highest level where the residual climb at LRC Mach is at
//     least 300 ft/min (common practice); LRC here is taken within the 1 g
//     MachBand, so the thrust limit does not depend on the buffet floor;
//   - MaxFLCertified: the certified ceiling; MaxFL: the least of them;
//   - OptimumFL: the level of best specific range at the max-range Mach,
//     searched at or below MaxFL by golden-section search about the best row.
//
// It returns a *RangeError for a mass outside OEW..MTOW, a floor below 1 g
// or a non-finite argument. Cost: a few milliseconds at most.
func (a *Aircraft) Envelope(mass, isaDev, floor float64) (Envelope, error) {
	if err := a.CheckMass(mass); err != nil {
		return Envelope{}, err
	}
	if !(floor >= 1 && floor <= 3) {
		return Envelope{}, &RangeError{Quantity: "buffet floor", Value: floor, Min: 1, Max: 3, Unit: "g", Aircraft: a.Name}
	}
	if err := a.checkISADev(isaDev); err != nil {
		return Envelope{}, err
	}
	nan := math.NaN()
	env := Envelope{Aircraft: a.Name, Mass: mass, ISADev: isaDev, Floor: floor}
	env.MaxFLCertified = math.Round(a.CertifiedCeiling/(100*FtToM)*1e6) / 1e6 // undo ft/m rounding
	top := math.Floor(env.MaxFLCertified/10+1e-9)*10 + 20
	nrows := int((top-envelopeLowFL)/10) + 1
	env.Rows = make([]EnvelopeRow, 0, nrows)
	bestRow, bestSR := -1, math.Inf(-1)
	cosL := math.Cos(a.Sweep)
	for i := range nrows {
		fl := envelopeLowFL + 10*float64(i)
		p := FLToPressure(fl)
		tisa := isaTemperatureAtPressure(p)
		t := tisa + isaDev
		r := EnvelopeRow{FL: fl, Pressure: p, OAT: t, SoundSpeed: SpeedOfSound(t), MMO: a.MMO,
			LowBuffet1g: nan, HighBuffet1g: nan, LowBuffetFloor: nan, HighBuffetFloor: nan, LRCMach: nan, ResidualClimb: nan}
		if lo, hi, beyond, ok := a.buffetMachs(mass, p, 1); ok {
			r.LowBuffet1g, r.HighBuffet1g, r.HighBuffet1gBeyondData = lo, hi, beyond
		}
		if lo, hi, beyond, ok := a.buffetMachs(mass, p, floor); ok {
			r.LowBuffetFloor, r.HighBuffetFloor, r.HighBuffetFloorBeyondData = lo, hi, beyond
		}
		band, ok := a.SpeedBand(mass, p, isaDev, floor)
		r.Band, r.VMOMach = band, band.VMOMach
		if ok {
			lo, hi := band.Lo, band.Hi
			lrc, mr := a.lrcIn(mass, p, t, tisa, lo, hi)
			r.LRCMach = lrc
			r.ResidualClimb = a.residualClimb(mass, p, isaDev, lrc)
			if sr := a.specificRange(mass, p, t, tisa, mr, cosL); sr > bestSR {
				bestRow, bestSR = i, sr
			}
		}
		env.Rows = append(env.Rows, r)
	}
	env.MaxFLBuffet = a.MaxFLBuffet(mass, floor)
	env.MaxFLThrust = a.MaxFLThrust(mass, isaDev)
	env.MaxFLThrustAtTableTop = a.tab != nil && env.MaxFLThrust >= a.thrustSearchTop()
	env.MaxFL = math.Min(env.MaxFLCertified, math.Min(env.MaxFLBuffet, env.MaxFLThrust))
	env.OptimumFL = nan
	if bestRow >= 0 && !math.IsNaN(env.MaxFL) {
		env.OptimumFL, _ = a.optimumLevel(mass, isaDev, floor, env.Rows[bestRow].FL, env.MaxFL)
	}
	return env, nil
}

// MaxFLBuffet is the highest level (continuous FL) at which BuffetMachs at
// load factor floor gives a band whose low end is below MMO, at mass (kg):
// the buffet-limited ceiling of Envelope. It is NaN when there is none at
// FL100 and FL650 when the limit lies higher. Cost: a scan in 1,000 ft
// steps from FL100, then bisection to 0.1 ft (about 40 BuffetMachs calls).
func (a *Aircraft) MaxFLBuffet(mass, floor float64) float64 {
	return highestLevel(func(fl float64) bool {
		lo, _, ok := a.BuffetMachs(mass, FLToPressure(fl), floor)
		return ok && lo < a.MMO
	}, envelopeLowFL, levelSearchTopFL)
}

// thrustSearchTop is the level where the thrust ceiling search ends:
// FL650, or the top of a table aircraft's thrust table (never
// extrapolated; Envelope.MaxFLThrustAtTableTop says when it is reached).
func (a *Aircraft) thrustSearchTop() float64 {
	if a.tab != nil {
		fls := a.tab.ROCClimb.Axes[1].Values
		return fls[len(fls)-1]
	}
	return levelSearchTopFL
}

// thrustSearchBottom is where it starts: FL100, or a table aircraft's
// lowest level when that is higher.
func (a *Aircraft) thrustSearchBottom() float64 {
	if a.tab != nil {
		return math.Max(envelopeLowFL, a.tab.ROCClimb.Axes[1].Values[0])
	}
	return envelopeLowFL
}

// MaxFLThrust is the highest level (continuous FL) at which the residual
// climb at maximum climb thrust and the long-range cruise Mach is at least
// 300 ft/min (common practice), at mass (kg) and ISA + isaDev (K): the
// thrust-limited ceiling of Envelope. LRC is taken within the 1 g MachBand,
// so the limit does not depend on the buffet floor. NaN when there is none
// at FL100, FL650 (or a table aircraft's top level) when the limit lies
// higher. Cost: as MaxFLBuffet, with an
// LRC search (a few dozen specific-range evaluations) per level tried.
func (a *Aircraft) MaxFLThrust(mass, isaDev float64) float64 {
	return highestLevel(func(fl float64) bool {
		p := FLToPressure(fl)
		lo, hi, ok := a.MachBand(mass, p, isaDev, 1)
		if !ok {
			return false
		}
		tisa := isaTemperatureAtPressure(p)
		lrc, _ := a.lrcIn(mass, p, tisa+isaDev, tisa, lo, hi)
		return a.residualClimb(mass, p, isaDev, lrc) >= minResidualClimb
	}, a.thrustSearchBottom(), a.thrustSearchTop())
}

// ReportFL is the one rounding rule for printing a continuous level (a
// ceiling or the optimum of an Envelope) as a whole flight level: round
// down, so a maximum level is never overstated, and the same rule for every
// level so tables and charts agree. NaN stays NaN.
func ReportFL(fl float64) float64 { return math.Floor(fl + 1e-9) }

// residualClimb is Point's ResidualClimb at Mach m.
func (a *Aircraft) residualClimb(mass, p, isaDev, m float64) float64 {
	if a.tab != nil {
		return at4(a.tab.ROCClimb, mass, PressureToFL(p), m, isaDev)
	}
	tisa := isaTemperatureAtPressure(p)
	t := tisa + isaDev
	d, _, _ := a.drag(mass, p, m, math.Cos(a.Sweep))
	return climbRate(a.climbThrust(p, t, tisa, m), d, m*SpeedOfSound(t), mass, tisa, t)
}

// highestLevel returns the highest flight level in [bottom, top] where ok
// holds, assuming ok holds below some level and fails above it: a scan in
// 1,000 ft steps, then bisection to 0.1 ft. NaN if ok fails at bottom, top
// if it holds there.
func highestLevel(ok func(fl float64) bool, bottom, top float64) float64 {
	if !ok(bottom) {
		return math.NaN()
	}
	lo := bottom
	for lo+10 <= top && ok(lo+10) {
		lo += 10
	}
	if lo >= top {
		return top
	}
	hi := math.Min(lo+10, top)
	if hi < lo+10 && ok(hi) {
		return hi
	}
	return bisectEdge(lo, hi, levelTol, ok)
}

// optimumLevel maximises the specific range at the max-range Mach over the
// level, by golden-section search in [near-10, min(near+10, maxFL)].
func (a *Aircraft) optimumLevel(mass, isaDev, floor, near, maxFL float64) (fl, sr float64) {
	cosL := math.Cos(a.Sweep)
	f := func(fl float64) float64 {
		p := FLToPressure(fl)
		lo, hi, ok := a.MachBand(mass, p, isaDev, floor)
		if !ok {
			return math.Inf(-1)
		}
		tisa := isaTemperatureAtPressure(p)
		t := tisa + isaDev
		m := a.econMachIn(mass, p, t, tisa, lo, hi, 0, 0)
		return a.specificRange(mass, p, t, tisa, m, cosL)
	}
	x0, x3 := near-10, math.Min(near+10, maxFL)
	if x3 <= x0 {
		return x3, f(x3)
	}
	g := goldenMax(x0, x3, levelTol, math.NaN(), f)
	fl = 0.5 * (g.x0 + g.x3)
	sr = f(fl)
	if fm := f(maxFL); maxFL <= near+10 && fm > sr {
		fl, sr = maxFL, fm
	}
	return fl, sr
}
