package chart

import (
	"math"
	"time"

	"levelpath/optimizer"
	"levelpath/perf"
)

// samplePlan is an invented, physically plausible plan for rendering tests
// (not a physics check): a 2,600 NM flight climbing to FL350, stepping to
// FL370 and FL390 as fuel burns off, then descending. The buffet- and
// thrust-limited levels rise as mass falls; the wind swings from head- to
// tailwind; one stretch carries a raised (turbulence) floor.
func samplePlan() *optimizer.Plan {
	const nm = 1852.0
	const kt = 1852.0 / 3600
	nan := math.NaN()
	total := 2600 * nm
	p := &optimizer.Plan{
		Aircraft: "Demo Twin 300", CI: 30, Floor: 1.3, Speed: "ci",
		Depart:      time.Date(2026, 3, 14, 9, 30, 0, 0, time.UTC),
		TakeoffMass: 72000, Distance: total,
	}
	mass := 72000.0
	x := 0.0
	fl := 0.0
	add := func(ph optimizer.Phase, g, to float64) {
		wind := 45*math.Sin(x/total*2*math.Pi*1.3) - 10
		tas := 470 * kt
		if ph != optimizer.PhaseCruise {
			tas = 400 * kt
		}
		gs := tas + wind*kt
		t := g / gs
		fuel := 2400.0 / 3600 * t
		l := optimizer.Leg{Phase: ph, FromDist: x, ToDist: x + g, FromFL: fl, FL: to, Mach: 0.78, TAS: tas,
			WindAlong: wind * kt, GS: gs, ISADev: 5, EDR: nan, Fuel: fuel, Time: t, MassStart: mass,
			BuffetMargin: nan, Floor: 1.3, FloorReason: "problem", MaxFLBuffet: nan, MaxFLThrust: nan, ResidualClimb: nan}
		if ph == optimizer.PhaseCruise {
			// Lighter is higher: ~ +1 FL per 250 kg burnt.
			l.MaxFLBuffet = 372 + (72000-mass)/250
			l.MaxFLThrust = 380 + (72000-mass)/260
			l.BuffetMargin = 1.3 + 0.004*(l.MaxFLBuffet-to)
			l.ResidualClimb = 2.5
			if x > 1500*nm && x < 1800*nm {
				l.Floor, l.FloorReason = 1.4, "turbulence"
			}
		}
		if ph == optimizer.PhaseStep {
			p.Steps = append(p.Steps, optimizer.Step{AtDist: x, FromFL: int(fl), ToFL: int(to)})
		}
		p.Legs = append(p.Legs, l)
		mass -= fuel
		x += g
		fl = to
	}
	add(optimizer.PhaseClimb, 140*nm, 350)
	for x < 1100*nm {
		add(optimizer.PhaseCruise, math.Min(200*nm, 1100*nm-x), 350)
	}
	add(optimizer.PhaseStep, 30*nm, 370)
	for x < 2000*nm {
		add(optimizer.PhaseCruise, math.Min(180*nm, 2000*nm-x), 370)
	}
	add(optimizer.PhaseStep, 30*nm, 390)
	for x < total-130*nm {
		add(optimizer.PhaseCruise, math.Min(200*nm, total-130*nm-x), 390)
	}
	add(optimizer.PhaseDescent, total-x, 15)
	var fuel, tm float64
	for _, l := range p.Legs {
		fuel += l.Fuel
		tm += l.Time
	}
	p.Totals = optimizer.Totals{Fuel: fuel, Time: tm, Cost: fuel + p.CI*tm/60, CO2: 3.16 * fuel, LandingMass: mass}
	p.Profile = optimizer.Profile{Initial: 350, Changes: []optimizer.Change{{AtDist: 1100 * nm, FL: 370}, {AtDist: 2000 * nm, FL: 390}}}
	bf := fuel * 1.02
	bt := tm * 1.005
	p.Baseline = &optimizer.Baseline{FL: 370, Totals: optimizer.Totals{Fuel: bf, Time: bt, Cost: bf + p.CI*bt/60, CO2: 3.16 * bf, LandingMass: 72000 - bf}}
	p.Baseline.SavingPct = (p.Baseline.Totals.Cost - p.Totals.Cost) / p.Baseline.Totals.Cost * 100
	p.Warnings = []string{"2 legs within 0.05 g of the floor", "a <tag> & an \"ampersand\" must be escaped"}
	return p
}

// sampleLevels are eastbound-style odd levels (invented policy).
func sampleLevels() []int {
	var lv []int
	for fl := 290; fl <= 410; fl += 20 {
		lv = append(lv, fl)
	}
	return lv
}

// sampleEnvelope is an invented, plausible envelope: the 1 g buffet band
// narrows with height, the floor band (1.3 g) closes near FL415, MMO 0.82.
func sampleEnvelope() perf.Envelope {
	nan := math.NaN()
	e := perf.Envelope{Aircraft: "Demo Twin 300", Mass: 65000, ISADev: 0, Floor: 1.3,
		MaxFLCertified: 410, MaxFLThrust: 398.4, MaxFLBuffet: 414.2}
	e.MaxFL = math.Min(e.MaxFLCertified, math.Min(e.MaxFLBuffet, e.MaxFLThrust))
	e.OptimumFL = 371.6
	// Half-width and centre of the band at load factor n: the band closes
	// where n x (pressure ratio at 1 g close) reaches 1.
	band := func(fl, n float64) (lo, hi float64) {
		p := perf.FLToPressure(fl)
		pc := perf.FLToPressure(452) // 1 g band closes near FL452
		r := n * pc / p
		if r >= 1 {
			return nan, nan
		}
		hw := 0.34 * math.Sqrt(1-r)
		return 0.76 - hw, 0.76 + hw*0.5
	}
	for fl := 100.0; fl <= 430; fl += 10 {
		lo1, hi1 := band(fl, 1)
		lof, hif := band(fl, 1.3)
		row := perf.EnvelopeRow{FL: fl, Pressure: perf.FLToPressure(fl), LowBuffet1g: lo1, HighBuffet1g: hi1,
			LowBuffetFloor: lof, HighBuffetFloor: hif, MMO: 0.82, LRCMach: nan, ResidualClimb: nan}
		if finite(lof) {
			row.LRCMach = math.Min(0.79, (lof+hif)/2)
		}
		e.Rows = append(e.Rows, row)
	}
	return e
}
