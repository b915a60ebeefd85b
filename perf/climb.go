package perf

import (
	"fmt"
	"math"
)

// Schedule is a climb or descent speed schedule: CASLow (m/s CAS) below
// 10,000 ft pressure altitude, CAS (m/s) above it, and Mach above the
// crossover altitude where that CAS reaches Mach. At each level the
// aircraft flies the least Mach the applicable limits give. A zero field
// (or a CAS at or above the sea-level speed of sound) sets no limit; at
// least one must apply at every level. For a step climb at cruise Mach pass
// Schedule{CAS: large, Mach: cruise}.
type Schedule struct {
	CASLow, CAS, Mach float64
}

// Transition is the cost of a climb or descent.
type Transition struct {
	Fuel     float64 // kg
	Time     float64 // s
	Distance float64 // air distance, m
}

const (
	lowSpeedAltitude = 10000 * FtToM    // below it CASLow applies
	minClimbRate     = 100 * FtToM / 60 // m/s; a climb slower than this fails
	maxSubStep       = 500 * FtToM      // integration step, m of pressure altitude
)

// mach returns the scheduled Mach at pressure altitude h and pressure p.
func (s *Schedule) mach(h, p float64) float64 { return s.machFrom(s.casMach(h, p)) }

// casMach returns the Mach of the CAS that applies at pressure altitude h
// and pressure p, +Inf when none limits (no CAS, a CAS at or above a0, or
// one that is supersonic here).
func (s *Schedule) casMach(h, p float64) float64 {
	m := math.Inf(1)
	cas := s.CAS
	if h < lowSpeedAltitude && s.CASLow > 0 {
		cas = s.CASLow
	}
	if cas > 0 && cas < a0 { // a CAS at or above a0 sets no limit
		// NaN means the CAS is supersonic here: no limit.
		if cm := CASToMach(cas, p); cm < m {
			m = cm
		}
	}
	return m
}

// machFrom returns the scheduled Mach given casMach's m: the Mach limit
// when lower, NaN when nothing limits.
func (s *Schedule) machFrom(m float64) float64 {
	if s.Mach > 0 && s.Mach < m {
		m = s.Mach
	}
	if math.IsInf(m, 1) {
		return math.NaN()
	}
	return m
}

// Climb integrates a climb at max climb thrust from static pressure fromP
// to toP (toP < fromP), starting at mass kg, on speed schedule s, with
// temperature ISA + isaDev.
//
// Method: the total-energy equation (T - D) V = m d/dt (g z + V²/2),
// integrated in steps of at most 500 ft of pressure altitude (midpoint
// thrust, drag, speed and fuel flow; mass held over a step and updated after
// it). Geometric height follows from pressure altitude by the hydrostatic
// relation dz = dh T/T_ISA, and the kinetic-energy change of the schedule
// (including the acceleration at 10,000 ft, flown as a climbing
// acceleration) takes its share of the energy. Drag is for n = 1. Cost: a
// few hundred floating-point operations per step, no allocation.
//
// It returns a *LimitError naming the level when the rate of climb falls
// below 100 ft/min or drag exceeds thrust, and a *RangeError for bad inputs.
//
// A table aircraft (Tables.Aircraft) reads the climb table instead, on the
// tables' own schedule (s is checked but not used; see tableTransition),
// and returns an *OutOfTableError outside it and a *LimitError where the
// table marks the level as not reached.
func (a *Aircraft) Climb(mass, fromP, toP, isaDev float64, s Schedule) (Transition, error) {
	return a.climb(nil, mass, fromP, toP, isaDev, s)
}

func (a *Aircraft) climb(c *Cruiser, mass, fromP, toP, isaDev float64, s Schedule) (Transition, error) {
	if err := a.checkTransition(mass, fromP, toP, isaDev, &s); err != nil {
		return Transition{}, err
	}
	if toP > fromP {
		return Transition{}, fmt.Errorf("perf: climb from FL%.0f to FL%.0f goes down", PressureToFL(fromP), PressureToFL(toP))
	}
	if a.tab != nil {
		return a.tableTransition(mass, fromP, toP, isaDev, true)
	}
	return a.transition(c, mass, fromP, toP, isaDev, &s, true)
}

// Descent integrates an idle-thrust descent from fromP to toP (toP > fromP)
// by the same method as Climb. The idle fuel flow is Engines.IdleFuelFlow
// scaled by δ0 √θ0. It returns a *LimitError where idle thrust exceeds drag
// (no descent on the schedule is possible).
func (a *Aircraft) Descent(mass, fromP, toP, isaDev float64, s Schedule) (Transition, error) {
	return a.descent(nil, mass, fromP, toP, isaDev, s)
}

func (a *Aircraft) descent(c *Cruiser, mass, fromP, toP, isaDev float64, s Schedule) (Transition, error) {
	if err := a.checkTransition(mass, fromP, toP, isaDev, &s); err != nil {
		return Transition{}, err
	}
	if toP < fromP {
		return Transition{}, fmt.Errorf("perf: descent from FL%.0f to FL%.0f goes up", PressureToFL(fromP), PressureToFL(toP))
	}
	if a.tab != nil {
		return a.tableTransition(mass, fromP, toP, isaDev, false)
	}
	return a.transition(c, mass, fromP, toP, isaDev, &s, false)
}

func (a *Aircraft) checkTransition(mass, fromP, toP, isaDev float64, s *Schedule) error {
	if err := a.CheckMass(mass); err != nil {
		return err
	}
	for _, p := range [2]float64{fromP, toP} {
		if !(p > 0 && p <= 2*P0) {
			return &RangeError{Quantity: "pressure", Value: p, Min: 0, Max: 2 * P0, Unit: "Pa", Aircraft: a.Name}
		}
	}
	if err := a.checkISADev(isaDev); err != nil {
		return err
	}
	if !(s.CASLow >= 0 && s.CAS >= 0 && s.Mach >= 0) || (s.CAS == 0 && s.Mach == 0) {
		return fmt.Errorf("perf: schedule %+v sets no speed above 10,000 ft (or a negative one)", *s)
	}
	return nil
}

// transition integrates a climb or descent; c, when not nil, supplies the
// standard atmosphere and the CAS schedule's Mach from its caches (the
// same values).
func (a *Aircraft) transition(c *Cruiser, mass, fromP, toP, isaDev float64, s *Schedule, climb bool) (Transition, error) {
	var tr Transition
	h1, h2 := AltitudeAt(fromP), AltitudeAt(toP)
	if h1 == h2 {
		return tr, nil
	}
	phase := "descent"
	if climb {
		phase = "climb"
	}
	cosL := math.Cos(a.Sweep)
	m := mass
	// The heights below are the same for every transition between h1 and
	// h2, so c (when not nil) keeps the atmosphere and the CAS's Mach at
	// each, in the order they are asked.
	prof := c.profile(h1, h2, s)
	node := 0
	speed := func(h float64) (v, mach, p, t, tisa float64) {
		var cm float64
		if prof != nil && node < len(prof.nodes) {
			n := &prof.nodes[node]
			p, tisa, cm = n.p, n.tisa, n.casMach
		} else {
			p = PressureAt(h)
			tisa = ISATemperature(h)
			cm = s.casMach(h, p)
			if prof != nil {
				prof.nodes = append(prof.nodes, profileNode{p: p, tisa: tisa, casMach: cm})
			}
		}
		node++
		t = tisa + isaDev
		mach = s.machFrom(cm)
		return mach * SpeedOfSound(t), mach, p, t, tisa
	}
	va, _, _, _, _ := speed(h1)
	// Pieces split at 10,000 ft so the schedule change falls on a step end.
	pieces := [3]float64{h1, h2, h2}
	np := 1
	if (h1-lowSpeedAltitude)*(h2-lowSpeedAltitude) < 0 {
		pieces[1] = lowSpeedAltitude
		np = 2
	}
	for k := 0; k < np; k++ {
		ha0, hb0 := pieces[k], pieces[k+1]
		n := max(int(math.Ceil(math.Abs(hb0-ha0)/maxSubStep)), 1)
		dh := (hb0 - ha0) / float64(n)
		for i := 0; i < n; i++ {
			ha := ha0 + float64(i)*dh
			hb := ha + dh
			if i == n-1 {
				hb = hb0
			}
			vb, _, _, _, _ := speed(hb)
			hm := 0.5 * (ha + hb)
			vm, mm, pm, tm, tisam := speed(hm)
			if math.IsNaN(vm) || math.IsNaN(vb) || math.IsNaN(va) {
				return tr, &LimitError{Aircraft: a.Name, Phase: phase, FL: hm / (100 * FtToM), Reason: "the schedule gives no subsonic Mach"}
			}
			d, _, _ := a.drag(m, pm, mm, cosL)
			var thrust, ff float64
			if climb {
				thrust = a.climbThrust(pm, tm, tisam, mm)
				ff = a.fuelFlow(thrust, thrust, tm, mm)
			} else {
				thrust, ff = a.idle(pm, tm, tisam, mm)
			}
			power := (thrust - d) * vm
			de := G0*(hb-ha)*tm/tisam + 0.5*(vb*vb-va*va)
			dt := m * de / power
			fl := hm / (100 * FtToM)
			if climb {
				if power <= 0 {
					return tr, &LimitError{Aircraft: a.Name, Phase: phase, FL: fl, Reason: fmt.Sprintf("drag %.1f kN exceeds max climb thrust %.1f kN at Mach %.3f", d/1000, thrust/1000, mm)}
				}
				if rate := (hb - ha) / dt; rate < minClimbRate {
					return tr, &LimitError{Aircraft: a.Name, Phase: phase, FL: fl, Reason: fmt.Sprintf("rate of climb %.0f ft/min is below 100 ft/min (thrust %.1f kN, drag %.1f kN, Mach %.3f)", rate/FtToM*60, thrust/1000, d/1000, mm)}
				}
			} else if !(dt > 0) {
				return tr, &LimitError{Aircraft: a.Name, Phase: phase, FL: fl, Reason: fmt.Sprintf("idle thrust %.1f kN is not below drag %.1f kN at Mach %.3f", thrust/1000, d/1000, mm)}
			}
			fuel := ff * dt
			tr.Fuel += fuel
			tr.Time += dt
			tr.Distance += vm * dt
			m -= fuel
			va = vb
		}
	}
	return tr, nil
}
