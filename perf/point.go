package perf

import "math"

// State is a flight condition for point performance.
type State struct {
	Mass       float64 // kg
	Pressure   float64 // static pressure, Pa
	Mach       float64
	ISADev     float64 // K added to the standard temperature
	LoadFactor float64 // g for the reported CL; 0 means 1
}

// Point is the performance at one State. Drag, fuel flow and specific
// range are for steady level flight (n = 1, thrust = drag); CL is at the
// State's load factor.
type Point struct {
	Temperature, TAS, CAS float64 // K, m/s, m/s

	CL   float64 // lift coefficient at State.LoadFactor
	CD   float64 // drag coefficient at n = 1
	Drag float64 // N, n = 1

	FuelFlow      float64 // kg/s, all engines, thrust = drag
	SpecificRange float64 // m of air distance per kg of fuel

	BuffetCL     float64 // buffet-onset CL at this Mach
	BuffetMargin float64 // g to buffet onset: BuffetCL / CL(n=1)

	MaxClimbThrust, MaxCruiseThrust float64 // N, all engines

	// ResidualClimb is the rate of climb (m/s of pressure altitude) at max
	// climb thrust, holding Mach: (T-D) V/(m g) × T_ISA/T. The energy
	// assumption is that all excess power goes into potential energy (no
	// acceleration term), exact at constant TAS (constant Mach in the
	// isothermal layer) and slightly conservative below the tropopause,
	// where a constant-Mach climb slows down. The factor T_ISA/T converts
	// geometric to pressure-altitude rate (hydrostatic equation), so a hot
	// day lowers it.
	ResidualClimb float64

	ThrustLimited bool // drag exceeds max cruise thrust
}

// dragCoeff returns CD = CD0 + K CL² + K6 CL⁶ + ΔCD_wave.
//
// The CL⁶ term is the lift-dependent drag rise of the clean-configuration
// drag polynomial of EUROCONTROL's BADA 4 (user manual, aerodynamic model:
// terms in CL⁰, CL² and CL⁶, each with Mach-dependent coefficients; the
// form is recalled from memory, the manual's section not checked here);
// here its coefficient is one per-aircraft constant, a simplification. It makes
// drag rise faster than the parabola as CL approaches buffet onset, which
// gives specific range its curvature about the optimum level.
//
// The wave drag is from the Korn equation with Lock's fourth-power law
// (Malone and Mason, "Multidisciplinary optimization in aircraft design
// using analytic technology models", J. Aircraft 32(2), 1995):
//
//	Mdd = κ/cosΛ - (t/c)/cos²Λ - CL/(10 cos³Λ)
//	Mcrit = Mdd - (0.1/80)^(1/3),  ΔCD = 20 (M - Mcrit)^4 for M > Mcrit.
func (a *Aircraft) dragCoeff(cl, mach, cosL float64) float64 {
	cl2 := cl * cl
	cd := a.CD0 + cl2*(a.K+a.K6*cl2*cl2)
	mdd := a.KornKappa/cosL - a.ThicknessRatio/(cosL*cosL) - cl/(10*cosL*cosL*cosL)
	if d := mach - (mdd - lockOffset); d > 0 {
		d2 := d * d
		cd += 20 * d2 * d2
	}
	return cd
}

// lockOffset is (0.1/80)^(1/3).
var lockOffset = math.Cbrt(0.1 / 80)

// drag returns the level-flight (n = 1) drag (N), CL and CD.
func (a *Aircraft) drag(mass, p, mach, cosL float64) (d, cl, cd float64) {
	qs := 0.5 * Gamma * p * mach * mach * a.WingArea
	cl = mass * G0 / qs
	cd = a.dragCoeff(cl, mach, cosL)
	return cd * qs, cl, cd
}

// ramRatios returns the total-pressure and total-temperature ratios of
// Mattingly's correlations (see Engines): δ0 = (p/P0)(1+0.2M²)^3.5 and
// θ0 = (T/T0)(1+0.2M²).
func ramRatios(p, t, mach float64) (d0, th0 float64) {
	x := 1 + 0.2*mach*mach
	return p / P0 * x * x * x * math.Sqrt(x), t / T0 * x
}

// maxFlatLoss is the largest fraction of thrust the flat-rating term may
// remove (the bound 0 <= ΔT_eff C_Tc5 <= 0.4 of the BADA 3 climb-thrust
// temperature correction, see Engines).
const maxFlatLoss = 0.4

// thrustLapse returns the lapse α of the max climb rating, see Engines:
// Mattingly's δ0 (1 - LapseMach √M) less the larger of Mattingly's θ0-break
// loss and the flat-rating loss above FlatRatingISADev (isaDev in K).
func (e *Engines) thrustLapse(p, t, isaDev, mach float64) float64 {
	d0, th0 := ramRatios(p, t, mach)
	f := 1 - e.LapseMach*math.Sqrt(mach)
	var loss float64
	if th0 > e.ThrottleRatio {
		loss = e.LapseTheta * (th0 - e.ThrottleRatio) / (1.5 + mach)
	}
	if dt := isaDev - e.FlatRatingISADev; dt > 0 {
		if lb := f * math.Min(e.FlatRatingLapse*dt, maxFlatLoss); lb > loss {
			loss = lb
		}
	}
	f -= loss
	if f < 0 {
		return 0
	}
	return d0 * f
}

// climbThrust returns the max climb thrust of all engines (N) at static
// pressure p, temperature t and Mach; tisa is the standard temperature at p.
func (a *Aircraft) climbThrust(p, t, tisa, mach float64) float64 {
	e := &a.Engines
	return float64(e.Count) * e.StaticThrust * e.ClimbRating * e.thrustLapse(p, t, t-tisa, mach)
}

// fuelFlow returns the fuel flow (kg/s) of all engines giving thrust (N)
// when max climb thrust is maxThrust (N): TSFC × thrust, with TSFC as on
// Engines (part-power factor at the setting thrust/maxThrust) times the
// performance factor.
func (a *Aircraft) fuelFlow(thrust, maxThrust, t, mach float64) float64 {
	e := &a.Engines
	u := thrust/(maxThrust*e.PartPowerBucket) - 1
	return (e.TSFCA + e.TSFCB*mach) * math.Sqrt(t/T0) * (1 + e.PartPower*u*u) * a.fuelFactor() * thrust
}

// fuelFactor returns 1 + PerfFactorPct/100.
func (a *Aircraft) fuelFactor() float64 { return 1 + a.PerfFactorPct/100 }

// idle returns idle thrust (N) and idle fuel flow (kg/s), all engines; the
// fuel flow is the sea-level static value scaled by δ0 √θ0 (corrected fuel
// flow held constant) and by the performance factor.
//
// Idle thrust is IdleFraction of the max climb thrust without the
// flat-rating loss (idle is not a flat-rated setting), as before that term
// was added.
func (a *Aircraft) idle(p, t, tisa, mach float64) (thrust, ff float64) {
	e := a.Engines
	e.FlatRatingLapse = 0
	d0, th0 := ramRatios(p, t, mach)
	thrust = e.IdleFraction * float64(e.Count) * e.StaticThrust * e.ClimbRating * e.thrustLapse(p, t, t-tisa, mach)
	return thrust, float64(e.Count) * e.IdleFuelFlow * d0 * math.Sqrt(th0) * a.fuelFactor()
}

// climbRate returns the residual rate of climb (m/s of pressure altitude)
// defined on Point.ResidualClimb, from all-engine thrust and drag (N), true
// airspeed (m/s), mass (kg), and the standard and actual temperatures (K).
func climbRate(thrust, drag, tas, mass, tisa, t float64) float64 {
	return (thrust - drag) * tas / (mass * G0) * tisa / t
}

// buffetCL returns the buffet-onset CL at mach: linear in the table,
// flat beyond its ends.
func (a *Aircraft) buffetCL(mach float64) float64 {
	b := a.Buffet
	if len(b) == 0 {
		return math.NaN()
	}
	if mach <= b[0].Mach {
		return b[0].CL
	}
	for i := 1; i < len(b); i++ {
		if mach <= b[i].Mach {
			u := (mach - b[i-1].Mach) / (b[i].Mach - b[i-1].Mach)
			return b[i-1].CL + u*(b[i].CL-b[i-1].CL)
		}
	}
	return b[len(b)-1].CL
}

// Point returns the performance at s. It does not allocate; the cost is a
// few hundred floating-point operations. Out-of-range inputs (non-positive
// pressure or Mach, Mach >= 1) give NaN fields. For a table aircraft the
// fuel flow and residual climb are the tables' (NaN outside them, with
// ThrustLimited true), Drag and CD those of the optional thrust column
// (else NaN), and the max thrusts NaN.
func (a *Aircraft) Point(s State) Point {
	return a.point(s, isaTemperatureAtPressure(s.Pressure), math.Cos(a.Sweep), true)
}

// point is Point with the ISA temperature at s.Pressure and the cosine of
// the sweep given; without cas, CAS is left NaN.
func (a *Aircraft) point(s State, tisa, cosL float64, cas bool) Point {
	if a.tab != nil {
		return a.tablePoint(s, tisa, cas)
	}
	n := s.LoadFactor
	if n == 0 {
		n = 1
	}
	var pt Point
	t := tisa + s.ISADev
	pt.Temperature = t
	pt.TAS = s.Mach * SpeedOfSound(t)
	pt.CAS = math.NaN()
	if cas {
		pt.CAS = MachToCAS(s.Mach, s.Pressure)
	}
	d, cl1, cd := a.drag(s.Mass, s.Pressure, s.Mach, cosL)
	pt.CL = cl1 * n
	pt.CD = cd
	pt.Drag = d
	pt.MaxClimbThrust = a.climbThrust(s.Pressure, t, tisa, s.Mach)
	pt.FuelFlow = a.fuelFlow(d, pt.MaxClimbThrust, t, s.Mach)
	pt.SpecificRange = pt.TAS / pt.FuelFlow
	pt.BuffetCL = a.buffetCL(s.Mach)
	pt.BuffetMargin = pt.BuffetCL / cl1
	pt.MaxCruiseThrust = pt.MaxClimbThrust * a.Engines.CruiseRatio
	pt.ResidualClimb = climbRate(pt.MaxClimbThrust, d, pt.TAS, s.Mass, tisa, t)
	pt.ThrustLimited = d > pt.MaxCruiseThrust
	return pt
}
