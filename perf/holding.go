package perf

import (
	"fmt"
	"math"
)

// Hold is steady level flight in a holding pattern, flown straight at
// n = 1 for fuel (the turns' extra drag is not modelled; see Holding).
type Hold struct {
	Mach, CAS, TAS float64 // m/s for CAS and TAS
	FuelFlow       float64 // kg/s, all engines
	// BuffetMargin is the margin to low-speed buffet onset at this speed,
	// in g (BuffetCL/CL at n = 1).
	BuffetMargin float64
	// LeastFuelFlow is true when the speed was chosen as the speed of
	// least fuel flow, false when the CAS was given.
	LeastFuelFlow bool
}

// DefaultHoldingMargin is the least margin to low-speed buffet, in g, at
// which Holding looks for the speed of least fuel flow: 1.3 g, the margin
// of a 1.3 V_s-type minimum manoeuvre speed (common practice).
const DefaultHoldingMargin = 1.3

// Holding returns the holding performance at mass (kg), static pressure p
// (Pa) and ISA deviation isaDev (K). With cas = 0 the speed is the speed
// of least fuel flow (common practice for holding) between the lowest
// speed that keeps margin g to low-speed buffet and the lesser of VMO and
// MMO; with cas > 0 that calibrated airspeed (m/s) is flown, and its
// margin reported.
//
// Method: fuel flow is Point's (thrust = drag, n = 1); the least is found
// by golden-section search over Mach to 1e-5 (Kiefer 1953), assuming one
// minimum on the interval (fuel flow = TSFC x drag, with drag's single
// minimum at the minimum-drag speed and TSFC rising with Mach). Deviation:
// the pattern is priced as straight level flight; a 25° bank turn raises
// the load factor to 1.10 for about half the time, which real holding
// tables include and this does not.
//
// It returns a *RangeError for a mass outside OEW..MTOW, a pressure or
// ISA deviation out of range, and an error when no speed keeps the margin
// under VMO/MMO.
func (a *Aircraft) Holding(mass, p, isaDev, margin, cas float64) (Hold, error) {
	if err := a.CheckMass(mass); err != nil {
		return Hold{}, err
	}
	if !(p > 0 && p <= 2*P0) {
		return Hold{}, &RangeError{Quantity: "pressure", Value: p, Min: 0, Max: 2 * P0, Unit: "Pa", Aircraft: a.Name}
	}
	if math.IsNaN(isaDev) || math.Abs(isaDev) > 60 {
		return Hold{}, &RangeError{Quantity: "ISA deviation", Value: isaDev, Min: -60, Max: 60, Unit: "K", Aircraft: a.Name}
	}
	if margin == 0 {
		margin = DefaultHoldingMargin
	}
	if !(margin >= 1 && margin <= 2.5) {
		return Hold{}, &RangeError{Quantity: "holding buffet margin", Value: margin, Min: 1, Max: 2.5, Unit: "g", Aircraft: a.Name}
	}
	hi := math.Min(a.MMO, CASToMach(a.VMO, p))
	at := func(m float64) Hold {
		pt := a.Point(State{Mass: mass, Pressure: p, Mach: m, ISADev: isaDev, LoadFactor: 1})
		return Hold{Mach: m, CAS: pt.CAS, TAS: pt.TAS, FuelFlow: pt.FuelFlow, BuffetMargin: pt.BuffetMargin}
	}
	if cas > 0 {
		m := CASToMach(cas, p)
		if !(m > 0) || m > hi+1e-9 {
			return Hold{}, fmt.Errorf("perf: %s: holding speed %.0f kt CAS is above VMO/MMO or not subsonic", a.Name, cas/KtToMS)
		}
		if a.tab != nil {
			if _, err := a.tab.CruiseFuelFlow.At(mass, PressureToFL(p), m, isaDev); err != nil {
				return Hold{}, fmt.Errorf("perf: %s: holding at %.0f kt CAS, FL%.0f: %w", a.Name, cas/KtToMS, PressureToFL(p), err)
			}
		}
		return at(m), nil
	}
	lo, bhi, ok := a.BuffetMachs(mass, p, margin)
	if !ok || lo >= math.Min(hi, bhi) {
		return Hold{}, fmt.Errorf("perf: %s: no speed under VMO/MMO keeps %.2f g to buffet at %.0f kg, FL%.0f", a.Name, margin, mass, PressureToFL(p))
	}
	hi = math.Min(hi, bhi)
	if a.tab != nil {
		// Both ends must lie in the cruise table (never extrapolated).
		for _, m := range [2]float64{lo, hi} {
			if _, err := a.tab.CruiseFuelFlow.At(mass, PressureToFL(p), m, isaDev); err != nil {
				return Hold{}, fmt.Errorf("perf: %s: holding at FL%.0f between Mach %.3f and %.3f: %w", a.Name, PressureToFL(p), lo, hi, err)
			}
		}
	}
	ff := func(m float64) float64 { return at(m).FuelFlow }
	const r = 0.6180339887498949 // (√5 - 1)/2
	x0, x3 := lo, hi
	x1, x2 := x3-r*(x3-x0), x0+r*(x3-x0)
	f1, f2 := ff(x1), ff(x2)
	for x3-x0 > 1e-5 {
		if f1 <= f2 {
			x3, x2, f2 = x2, x1, f1
			x1 = x3 - r*(x3-x0)
			f1 = ff(x1)
		} else {
			x0, x1, f1 = x1, x2, f2
			x2 = x0 + r*(x3-x0)
			f2 = ff(x2)
		}
	}
	best := (x0 + x3) / 2
	// The interval's ends when the minimum lies on them (margin-limited).
	for _, m := range [2]float64{lo, hi} {
		if ff(m) < ff(best) {
			best = m
		}
	}
	h := at(best)
	h.LeastFuelFlow = true
	return h, nil
}
