package planjson

import (
	"strconv"
	"strings"

	"levelpath/optimizer"
	"levelpath/perf"
)

// Fuel is the JSON form of the dispatch fuel plan (ICAO Annex 6 Part I
// 4.3.6.3 components), kg unless the suffix says otherwise.
type Fuel struct {
	Policy          string      `json:"policy"`
	TaxiKg          float64     `json:"taxi_kg"`
	TripKg          float64     `json:"trip_kg"`
	ContingencyKg   float64     `json:"contingency_kg"`
	ContingencyRule string      `json:"contingency_basis"`
	AlternateKg     float64     `json:"alternate_kg"`
	FinalReserveKg  float64     `json:"final_reserve_kg"`
	AdditionalKg    float64     `json:"additional_kg"`
	ExtraKg         float64     `json:"extra_kg"`
	BlockKg         float64     `json:"block_kg"`
	ZFWKg           float64     `json:"zfw_kg"`
	TakeoffMassKg   float64     `json:"takeoff_mass_kg"`
	LandingMassKg   float64     `json:"landing_mass_kg"`
	AlternateMassKg float64     `json:"alternate_mass_kg"`
	LimitedBy       string      `json:"limited_by"`
	BindingLimit    string      `json:"binding_limit"`
	MaxPayloadZFWKg *float64    `json:"max_payload_zfw_kg"`
	Iterations      int         `json:"iterations"`
	TOWHistoryKg    []float64   `json:"takeoff_mass_history_kg"`
	ContingencyHold Hold        `json:"contingency_hold"`
	FinalHold       Hold        `json:"final_reserve_hold"`
	Alternate       *Alternate  `json:"alternate"`
	PolicyValues    PolicyValue `json:"policy_values"`
	// In-flight re-plan only: block_kg is then the fuel required from
	// the re-planning point.
	InFlight              bool     `json:"in_flight"`
	FuelOnBoardKg         *float64 `json:"fuel_on_board_kg,omitempty"`
	ExpectedAtDestination *float64 `json:"expected_at_destination_kg,omitempty"`
}

// Hold is a holding speed and fuel flow.
type Hold struct {
	CASKt         float64 `json:"cas_kt"`
	Mach          float64 `json:"mach"`
	FuelFlowKgH   float64 `json:"fuel_flow_kg_h"`
	LeastFuelFlow bool    `json:"least_fuel_flow"`
}

// Alternate summarises the plan of the alternate route.
type Alternate struct {
	Profile    string  `json:"profile"`
	DistanceNM float64 `json:"distance_nm"`
	TimeMin    float64 `json:"time_min"`
	FuelKg     float64 `json:"fuel_kg"`
}

// PolicyValue is the policy applied.
type PolicyValue struct {
	ContingencyPct         float64 `json:"contingency_percent"`
	ContingencyMinMinutes  float64 `json:"contingency_min_minutes"`
	FinalReserveMinutes    float64 `json:"final_reserve_minutes"`
	HoldingSpeedKt         float64 `json:"holding_speed_kt"`
	HoldingHeightFt        float64 `json:"holding_height_ft"`
	DestinationElevationFt float64 `json:"destination_elevation_ft"`
	AlternateElevationFt   float64 `json:"alternate_elevation_ft"`
}

func fuelDoc(f *optimizer.FuelPlan) *Fuel {
	if f == nil {
		return nil
	}
	lim := "none"
	if len(f.LimitedBy) > 0 {
		lim = strings.Join(f.LimitedBy, ", ")
	}
	pol := f.Policy
	d := &Fuel{Policy: pol.Source, TaxiKg: f.Taxi, TripKg: f.Trip, ContingencyKg: f.Contingency, ContingencyRule: f.ContingencyBasis,
		AlternateKg: f.Alternate, FinalReserveKg: f.FinalReserve, AdditionalKg: f.Additional, ExtraKg: f.Extra, BlockKg: f.Block,
		ZFWKg: f.ZFW, TakeoffMassKg: f.TakeoffMass, LandingMassKg: f.LandingMass, AlternateMassKg: f.AlternateMass,
		LimitedBy: lim, BindingLimit: f.Binding, MaxPayloadZFWKg: Number(f.MaxPayloadZFW), Iterations: f.Iterations,
		TOWHistoryKg: append([]float64{}, f.History...), ContingencyHold: hold(f.ContingencyHold), FinalHold: hold(f.FinalHold),
		PolicyValues: PolicyValue{ContingencyPct: pol.ContingencyPct, ContingencyMinMinutes: pol.ContingencyMinMinutes,
			FinalReserveMinutes: pol.FinalReserveMinutes, HoldingSpeedKt: pol.HoldingSpeedKt, HoldingHeightFt: pol.HoldingHeightFt,
			DestinationElevationFt: pol.DestinationElevationFt, AlternateElevationFt: pol.AlternateElevationFt}}
	if f.InFlight {
		d.InFlight = true
		d.FuelOnBoardKg, d.ExpectedAtDestination = Number(f.FuelOnBoard), Number(f.ExpectedAtDestination)
	}
	if ap := f.AlternatePlan; ap != nil {
		d.Alternate = &Alternate{Profile: ap.Profile.String(), DistanceNM: ap.Distance / mPerNM, TimeMin: ap.Totals.Time / 60, FuelKg: ap.Totals.Fuel}
	}
	return d
}

func hold(h perf.Hold) Hold {
	return Hold{CASKt: h.CAS / msPerKt, Mach: h.Mach, FuelFlowKgH: h.FuelFlow * 3600, LeastFuelFlow: h.LeastFuelFlow}
}

// writeFuel writes the fuel block of the table: one line per component,
// in the order of ICAO Annex 6 Part I 4.3.6.3, then the masses and limits.
func writeFuel(bw *errWriter, d *Doc) {
	f := d.Fuel
	if f == nil {
		return
	}
	bw.printf("\nFuel plan (%s; ICAO Annex 6 Part I 4.3.6.3 components)\n", f.Policy)
	bw.printf("  Taxi           %8.0f kg\n", f.TaxiKg)
	if f.InFlight {
		bw.printf("  Trip           %8.0f kg  %s, the present position to 1,500 ft on approach\n", f.TripKg, hhmm(d.Totals.TimeMin))
	} else {
		bw.printf("  Trip           %8.0f kg  %s, 1,500 ft after take-off to 1,500 ft on approach\n", f.TripKg, hhmm(d.Totals.TimeMin))
	}
	bw.printf("  Contingency    %8.0f kg  %s\n", f.ContingencyKg, f.ContingencyRule)
	if a := f.Alternate; a != nil {
		bw.printf("  Alternate      %8.0f kg  %.0f NM, %s, %s\n", f.AlternateKg, a.DistanceNM, a.Profile, hhmm(a.TimeMin))
	} else {
		bw.printf("  Alternate      %8.0f kg  none given\n", f.AlternateKg)
	}
	where := "alternate"
	if f.Alternate == nil {
		where = "destination"
	}
	bw.printf("  Final reserve  %8.0f kg  %g min holding at %.0f ft above the %s, %.0f kt CAS, %.0f kg/h\n", f.FinalReserveKg, f.PolicyValues.FinalReserveMinutes, f.PolicyValues.HoldingHeightFt, where, f.FinalHold.CASKt, f.FinalHold.FuelFlowKgH)
	bw.printf("  Additional     %8.0f kg\n", f.AdditionalKg)
	bw.printf("  Extra          %8.0f kg\n", f.ExtraKg)
	if f.InFlight {
		bw.printf("  REQUIRED NOW   %8.0f kg  from the present position\n", f.BlockKg)
		bw.printf("  On board %.0f kg (mass %.0f - ZFW %.0f): %+.0f kg against the required; expected at the destination %.0f kg (alternate + final reserve %.0f kg)\n",
			*f.FuelOnBoardKg, f.TakeoffMassKg, f.ZFWKg, *f.FuelOnBoardKg-f.BlockKg, *f.ExpectedAtDestination, f.AlternateKg+f.FinalReserveKg)
		return
	}
	bw.printf("  BLOCK          %8.0f kg\n", f.BlockKg)
	bw.printf("  ZFW %.0f kg, take-off mass %.0f kg, landing mass %.0f kg (fixed point in %d iterations)\n", f.ZFWKg, f.TakeoffMassKg, f.LandingMassKg, f.Iterations)
	maxZ := "-"
	if f.MaxPayloadZFWKg != nil {
		maxZ = strconv.FormatFloat(*f.MaxPayloadZFWKg, 'f', 0, 64) + " kg"
	}
	bw.printf("  Limited by: %s; largest ZFW that fits %s (%s binds)\n", f.LimitedBy, maxZ, f.BindingLimit)
}
