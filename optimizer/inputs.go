package optimizer

import (
	"fmt"
	"math"

	"levelpath/perf"
)

// The accepted ranges of the planning inputs. Every entry point (the
// command line, a schedule row, a library caller) is judged by these.
const (
	// MinFloor and MaxFloor bound the buffet protection floor, g: 1.0 g
	// is no protection beyond level flight (allowed, for studies); over
	// 2.5 g no transport aircraft has a usable band.
	MinFloor = 1.0
	MaxFloor = 2.5
	// DefaultFloor is the floor when none is given, g (common practice:
	// 1.3 g, a 40° bank to buffet onset).
	DefaultFloor = 1.3
	// MaxCI is the largest cost index accepted, kg/min.
	MaxCI = 10000.0
)

// CheckFloor returns an error unless floor (g) lies in MinFloor..MaxFloor.
func CheckFloor(floor float64) error {
	if !(floor >= MinFloor && floor <= MaxFloor) {
		return fmt.Errorf("protection floor %v g must lie in %.1f..%.1f", floor, MinFloor, MaxFloor)
	}
	return nil
}

// CheckCI returns an error unless ci (kg/min) is 0 or a normal number in
// (0, MaxCI]: not negative, not NaN or infinite, and not a subnormal
// (a value under 2.2e-308 is a typing or conversion error, never a cost
// index).
func CheckCI(ci float64) error {
	if !(ci >= 0 && ci <= MaxCI) || (ci != 0 && ci < 0x1p-1022) {
		return fmt.Errorf("cost index %v kg/min must be 0 or a number in 0..%g", ci, MaxCI)
	}
	return nil
}

// Loading is how a flight's take-off mass is given: the take-off mass
// alone, or the zero-fuel mass and the fuel on board at take-off. A zero
// field is "not given".
type Loading struct {
	TakeoffMass float64 // kg
	ZFW         float64 // kg
	Fuel        float64 // kg, on board at take-off
}

// Resolve checks the loading against the aircraft's limits and returns
// the take-off mass and the zero-fuel mass (0 when not given). It is the
// one loading check of every entry point: the take-off mass, or ZFW with
// fuel, or all three when they agree within 1 kg (as a load sheet gives
// them); every given mass finite and positive; ZFW within
// MZFW; fuel within capacity; the take-off mass within OEW..MTOW. Errors
// are *InputError naming the Problem field (TakeoffMass or ZFW) with the
// limit broken.
func (l Loading) Resolve(a *perf.Aircraft) (tow, zfw float64, err error) {
	for _, v := range []struct {
		field string
		x     float64
	}{{"TakeoffMass", l.TakeoffMass}, {"ZFW", l.ZFW}, {"Fuel", l.Fuel}} {
		if math.IsNaN(v.x) || math.IsInf(v.x, 0) || v.x < 0 {
			return 0, 0, inputErrorf(v.field, "%v kg is not a positive number", v.x)
		}
	}
	switch {
	case l.TakeoffMass > 0 && l.ZFW > 0 && l.Fuel > 0 && math.Abs(l.ZFW+l.Fuel-l.TakeoffMass) > 1:
		return 0, 0, inputErrorf("TakeoffMass", "take-off mass %.0f kg differs from zero-fuel mass %.0f kg plus fuel %.0f kg", l.TakeoffMass, l.ZFW, l.Fuel)
	case l.TakeoffMass > 0 && (l.ZFW > 0) != (l.Fuel > 0):
		return 0, 0, inputErrorf("TakeoffMass", "give the take-off mass, or the zero-fuel mass with the fuel on board, or all three")
	case l.TakeoffMass > 0 && l.ZFW == 0:
		tow = l.TakeoffMass
	case l.ZFW > 0 && l.Fuel > 0:
		if l.ZFW > a.MZFW {
			return 0, 0, inputErrorf("ZFW", "zero-fuel mass %.0f kg is over MZFW %.0f kg of %s", l.ZFW, a.MZFW, a.Name)
		}
		if l.Fuel > a.FuelCapacity {
			return 0, 0, inputErrorf("Fuel", "fuel %.0f kg is over the fuel capacity %.0f kg of %s", l.Fuel, a.FuelCapacity, a.Name)
		}
		tow, zfw = l.ZFW+l.Fuel, l.ZFW
	default:
		return 0, 0, inputErrorf("TakeoffMass", "no take-off mass: give it, or the zero-fuel mass and the fuel on board")
	}
	if tow > a.MTOW {
		return 0, 0, inputErrorf("TakeoffMass", "take-off mass %.0f kg is over MTOW %.0f kg of %s", tow, a.MTOW, a.Name)
	}
	if err := a.CheckMass(tow); err != nil {
		return 0, 0, &InputError{Field: "TakeoffMass", Msg: err.Error(), Err: err}
	}
	return tow, zfw, nil
}
