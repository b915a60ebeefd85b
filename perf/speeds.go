package perf

import "math"

// machSearchMin is the lowest Mach the buffet search considers.
const machSearchMin = 0.05

// BuffetMachs returns the low- and high-speed buffet-onset Mach numbers at
// load factor n for mass (kg) at static pressure p (Pa): the two roots of
// CL_buffet(M) = CL(M, n) = 2 n m g/(γ p M² S). ok is false when no Mach is
// free of buffet (the "coffin corner" is passed) or the inputs are not
// positive.
//
// Method: the roots are those of M²·CL_buffet(M) = 2 n m g/(γ p S); on each
// table segment the left side is a cubic, whose peak is found in closed form
// and whose crossings are bracketed and bisected to 1e-12. Validation
// guarantees a single peak. Beyond the table the boundary is unknown: the
// search ends at the last table Mach, which is returned as hi when that
// Mach is still buffet-free (the table reaches at least MMO; see
// HighBuffetBeyondData to tell that case from an onset). Cost: O(rows).
func (a *Aircraft) BuffetMachs(mass, p, n float64) (lo, hi float64, ok bool) {
	lo, hi, _, ok = a.buffetMachs(mass, p, n)
	return lo, hi, ok
}

// HighBuffetBeyondData reports whether BuffetMachs(mass, p, n) returns as
// hi the last Mach of the buffet table rather than a buffet onset: the
// boundary is not known beyond the data, so hi is then the end of the data,
// not a physical limit, and outputs must say so.
func (a *Aircraft) HighBuffetBeyondData(mass, p, n float64) bool {
	_, _, beyond, ok := a.buffetMachs(mass, p, n)
	return ok && beyond
}

// buffetMachs is BuffetMachs, with beyond true when hi is the end of the
// table (no high-speed onset within the data).
func (a *Aircraft) buffetMachs(mass, p, n float64) (lo, hi float64, beyond, ok bool) {
	b := a.Buffet
	if !(mass > 0 && p > 0 && n > 0) || len(b) < 2 {
		return math.NaN(), math.NaN(), false, false
	}
	c := 2 * n * mass * G0 / (Gamma * p * a.WingArea)
	// Segments: [machSearchMin, b0] with flat CL, then table segments.
	nseg := len(b)
	seg := func(j int) (x0, y0, x1, y1 float64) {
		if j == 0 {
			return machSearchMin, b[0].CL, b[0].Mach, b[0].CL
		}
		return b[j-1].Mach, b[j-1].CL, b[j].Mach, b[j].CL
	}
	// Peak of h(M) = M² CL(M).
	peakM, peakH, peakSeg := machSearchMin, -1.0, 0
	for j := range nseg {
		x0, y0, x1, y1 := seg(j)
		if x1 <= x0 {
			continue
		}
		for _, x := range [3]float64{x0, x1, segPeak(x0, y0, x1, y1)} {
			if x >= x0 && x <= x1 {
				if h := x * x * lerp(x0, y0, x1, y1, x); h > peakH {
					peakM, peakH, peakSeg = x, h, j
				}
			}
		}
	}
	if peakH < c {
		return math.NaN(), math.NaN(), false, false
	}
	// Low root: first segment up to the peak where h crosses c.
	lo = machSearchMin
	if machSearchMin*machSearchMin*b[0].CL < c {
		for j := 0; j <= peakSeg; j++ {
			x0, y0, x1, y1 := seg(j)
			xe := x1
			if j == peakSeg {
				xe = peakM
			}
			if xe*xe*lerp(x0, y0, x1, y1, xe) >= c {
				lo = bisectSeg(x0, y0, x1, y1, math.Max(x0, machSearchMin), xe, c)
				break
			}
		}
	}
	// High root: first segment from the peak where h falls below c.
	hi, beyond = b[len(b)-1].Mach, true
	for j := peakSeg; j < nseg; j++ {
		x0, y0, x1, y1 := seg(j)
		xs := x0
		if j == peakSeg {
			xs = peakM
		}
		if x1*x1*y1 < c {
			hi, beyond = bisectSeg(x0, y0, x1, y1, xs, x1, c), false
			break
		}
	}
	return lo, hi, beyond, lo < hi
}

func lerp(x0, y0, x1, y1, x float64) float64 {
	if x1 == x0 {
		return y0
	}
	return y0 + (y1-y0)*(x-x0)/(x1-x0)
}

// segPeak returns the stationary point of M²(α + βM) on a linear segment,
// M = -2α/(3β), or NaN when there is none (β >= 0).
func segPeak(x0, y0, x1, y1 float64) float64 {
	if x1 == x0 {
		return math.NaN()
	}
	beta := (y1 - y0) / (x1 - x0)
	if beta >= 0 {
		return math.NaN()
	}
	alpha := y0 - beta*x0
	return -2 * alpha / (3 * beta)
}

// bisectSeg finds x in [xa, xb] with x² CL(x) = c on one segment, the sign
// of h - c differing at the ends.
func bisectSeg(x0, y0, x1, y1, xa, xb, c float64) float64 {
	fa := xa*xa*lerp(x0, y0, x1, y1, xa) - c
	for i := 0; i < 60 && xb-xa > 1e-12; i++ {
		xm := 0.5 * (xa + xb)
		fm := xm*xm*lerp(x0, y0, x1, y1, xm) - c
		if (fm < 0) == (fa < 0) {
			xa, fa = xm, fm
		} else {
			xb = xm
		}
	}
	return 0.5 * (xa + xb)
}

// excessThrust returns max cruise thrust minus level-flight drag (N).
// For a table aircraft it is the residual climb at max cruise thrust
// (m/s), which has the same sign.
func (a *Aircraft) excessThrust(mass, p, t, tisa, mach, cosL float64) float64 {
	if a.tab != nil {
		return at4(a.tab.ROCCruise, mass, PressureToFL(p), mach, t-tisa)
	}
	d, _, _ := a.drag(mass, p, mach, cosL)
	return a.climbThrust(p, t, tisa, mach)*a.Engines.CruiseRatio - d
}

// machTol is the Mach resolution of the speed searches.
const machTol = 1e-7

// invPhi is 1/φ, the golden-section ratio (Kiefer, "Sequential minimax
// search for a maximum", Proc. AMS 4, 1953).
var invPhi = (math.Sqrt(5) - 1) / 2

// golden is the state of a golden-section search: the bracket x0 < x3 and
// its inner points x1 < x2 with their values f1, f2.
type golden struct {
	x0, x1, x2, x3, f1, f2 float64
}

// goldenMax narrows [x0, x3] about the maximum of f, assumed unimodal there,
// by golden-section search (Kiefer 1953): one evaluation of f per step,
// until the bracket is no longer than tol or an inner value reaches stopAt
// (NaN for never). Cost: 2 + log(tol/(x3-x0))/log(invPhi) evaluations.
func goldenMax(x0, x3, tol, stopAt float64, f func(float64) float64) golden {
	g := golden{x0: x0, x3: x3}
	g.x1 = x3 - invPhi*(x3-x0)
	g.x2 = x0 + invPhi*(x3-x0)
	g.f1, g.f2 = f(g.x1), f(g.x2)
	for g.x3-g.x0 > tol && !(g.f1 >= stopAt || g.f2 >= stopAt) {
		if g.f1 > g.f2 {
			g.x3, g.x2, g.f2 = g.x2, g.x1, g.f1
			g.x1 = g.x3 - invPhi*(g.x3-g.x0)
			g.f1 = f(g.x1)
		} else {
			g.x0, g.x1, g.f1 = g.x1, g.x2, g.f2
			g.x2 = g.x0 + invPhi*(g.x3-g.x0)
			g.f2 = f(g.x2)
		}
	}
	return g
}

// bisectEdge returns the edge between good, where ok holds, and bad, where
// it fails, by bisection until the two are within tol; the result is the
// last point found where ok holds (good itself if none). ok is assumed to
// change once between them.
func bisectEdge(good, bad, tol float64, ok func(float64) bool) float64 {
	for math.Abs(bad-good) > tol {
		m := 0.5 * (good + bad)
		if ok(m) {
			good = m
		} else {
			bad = m
		}
	}
	return good
}

// Names of the limits that bound a Mach band (Band.LoLimit, Band.HiLimit).
const (
	LimitBuffet = "buffet"      // buffet onset at the protection floor
	LimitThrust = "thrust"      // drag exceeds max cruise thrust
	LimitMMO    = "mmo"         // maximum operating Mach
	LimitVMO    = "vmo"         // maximum operating speed (CAS)
	LimitData   = "buffet-data" // end of the buffet table: boundary unknown beyond it
	LimitTable  = "table-data"  // end of an operator table's Mach axis (table aircraft)
)

// Band is the Mach band usable in level flight and the limit that sets
// each end: Lo by LimitBuffet or LimitThrust; Hi by LimitBuffet, LimitMMO,
// LimitVMO, LimitThrust or LimitData (the buffet table ends before any
// onset and before MMO and VMO, which validation normally prevents).
type Band struct {
	Lo, Hi           float64
	LoLimit, HiLimit string
	VMOMach          float64 // Mach of VMO at this pressure
}

// MachBand returns the Mach range usable in level flight: buffet-free at
// load factor floor (g), at most MMO and the Mach of VMO (CAS), and with
// drag no more than max cruise thrust. ok is false when the range is empty.
// SpeedBand also names the limit at each end.
//
// The thrust test assumes excess thrust is unimodal in Mach (drag is
// U-shaped, thrust smooth): the ends are tested first; if either fails,
// the maximum is found by golden-section search and the feasible ends by
// the Illinois method to 1e-7 Mach (see rootEdge). Cost: 2 to about 50
// drag evaluations.
func (a *Aircraft) MachBand(mass, p, isaDev, floor float64) (lo, hi float64, ok bool) {
	b, ok := a.SpeedBand(mass, p, isaDev, floor)
	return b.Lo, b.Hi, ok
}

// SpeedBand is MachBand with the limit that sets each end named (see Band).
// When ok is false the band is empty and HiLimit names the limit that
// closed it: LimitBuffet when no Mach is free of buffet at the floor (or
// the buffet band lies above MMO or VMO: then LimitMMO or LimitVMO), else
// LimitThrust. No allocation.
func (a *Aircraft) SpeedBand(mass, p, isaDev, floor float64) (Band, bool) {
	var bf buffetBand
	bf.lo, bf.hi, bf.beyond, bf.ok = a.buffetMachs(mass, p, floor)
	return a.speedBand(mass, p, isaDev, isaTemperatureAtPressure(p), CASToMach(a.VMO, p), bf)
}

// buffetBand is what buffetMachs returns.
type buffetBand struct {
	lo, hi     float64
	beyond, ok bool
}

// speedBand is SpeedBand from the buffet Machs at the floor, the ISA
// temperature at p and the Mach of VMO at p.
func (a *Aircraft) speedBand(mass, p, isaDev, tisa, vmoMach float64, bf buffetBand) (Band, bool) {
	nan := math.NaN()
	b := Band{Lo: nan, Hi: nan, VMOMach: vmoMach}
	lo, hi, beyond, ok := bf.lo, bf.hi, bf.beyond, bf.ok
	if !ok || math.IsNaN(isaDev) {
		b.HiLimit = LimitBuffet
		return b, false
	}
	b.LoLimit, b.HiLimit = LimitBuffet, LimitBuffet
	if beyond {
		b.HiLimit = LimitData
	}
	if a.MMO <= hi {
		hi, b.HiLimit = a.MMO, LimitMMO
	}
	if mv := b.VMOMach; mv < hi {
		hi, b.HiLimit = mv, LimitVMO
	}
	if a.tab != nil {
		// Tables are not extrapolated: the band ends where the Mach
		// axis of the cruise or the thrust table does.
		mf, mt := a.tab.CruiseFuelFlow.Axes[2].Values, a.tab.ROCCruise.Axes[2].Values
		if m0 := math.Max(mf[0], mt[0]); lo < m0 {
			lo, b.LoLimit = m0, LimitTable
		}
		if m1 := math.Min(mf[len(mf)-1], mt[len(mt)-1]); hi > m1 {
			hi, b.HiLimit = m1, LimitTable
		}
	}
	if !(lo < hi) {
		return b, false
	}
	t := tisa + isaDev
	cosL := math.Cos(a.Sweep)
	excess := func(m float64) float64 { return a.excessThrust(mass, p, t, tisa, m, cosL) }
	if a.tab != nil {
		excess = a.tableExcessFn(mass, p, t, tisa)
	}
	elo, ehi := excess(lo), excess(hi)
	if math.IsNaN(elo) || math.IsNaN(ehi) {
		// Only a table aircraft queried outside its thrust table.
		b.HiLimit = LimitTable
		return b, false
	}
	if elo >= 0 && ehi >= 0 {
		b.Lo, b.Hi = lo, hi
		return b, true
	}
	// The maximum excess thrust, or any Mach with some to spare.
	g := goldenMax(lo, hi, 1e-5, 0, excess)
	xm, em := g.x1, g.f1
	if g.f2 > g.f1 {
		xm, em = g.x2, g.f2
	}
	if em < 0 {
		b.HiLimit = LimitThrust
		return b, false
	}
	if elo < 0 {
		lo, b.LoLimit = rootEdge(xm, lo, em, elo, machTol, excess), LimitThrust
	}
	if ehi < 0 {
		hi, b.HiLimit = rootEdge(xm, hi, em, ehi, machTol, excess), LimitThrust
	}
	b.Lo, b.Hi = lo, hi
	return b, lo <= hi
}

// econCost returns (fuel flow + ci/60)/(TAS + wind) in kg per metre of
// ground distance, +Inf when the ground speed is not positive.
func (a *Aircraft) econCost(mass, p, t, tisa, mach, cosL, ciPerS, wind float64) float64 {
	gs := mach*SpeedOfSound(t) + wind
	if !(gs > 0) {
		return math.Inf(1)
	}
	if a.tab != nil {
		return (a.tableFF(mass, PressureToFL(p), mach, t-tisa) + ciPerS) / gs
	}
	d, _, _ := a.drag(mass, p, mach, cosL)
	return (a.fuelFlow(d, a.climbThrust(p, t, tisa, mach), t, mach) + ciPerS) / gs
}

// EconMach returns the Mach within MachBand that minimises the cost per
// ground distance (FuelFlow + ci/60)/(TAS + windAlong), ci the cost index in
// kg/min and windAlong the tailwind component (m/s). With ci = 0 and no
// wind it is MaxRangeMach. Method: Brent's minimisation (see brentMin) to
// 1e-7 Mach, typically 10-15 evaluations, assuming the cost is unimodal in
// Mach; the band ends are compared too so a boundary optimum is exact.
func (a *Aircraft) EconMach(mass, p, isaDev, floor, ci, windAlong float64) (float64, bool) {
	lo, hi, ok := a.MachBand(mass, p, isaDev, floor)
	if !ok || math.IsNaN(ci) || math.IsNaN(windAlong) {
		return math.NaN(), false
	}
	tisa := isaTemperatureAtPressure(p)
	return a.econMachIn(mass, p, tisa+isaDev, tisa, lo, hi, ci/60, windAlong), true
}

func (a *Aircraft) econMachIn(mass, p, t, tisa, lo, hi, ciPerS, wind float64) float64 {
	cosL := math.Cos(a.Sweep)
	if a.tab != nil {
		return a.tableEconMach(mass, p, t, tisa, lo, hi, ciPerS, wind)
	}
	f := func(m float64) float64 { return a.econCost(mass, p, t, tisa, m, cosL, ciPerS, wind) }
	best, fb := brentMin(lo, hi, machTol, f)
	if fl := f(lo); fl < fb {
		best, fb = lo, fl
	}
	if fh := f(hi); fh < fb {
		best = hi
	}
	return best
}

// MaxRangeMach returns the Mach of greatest specific range within
// MachBand (EconMach with no cost index and no wind).
func (a *Aircraft) MaxRangeMach(mass, p, isaDev, floor float64) (float64, bool) {
	return a.EconMach(mass, p, isaDev, floor, 0, 0)
}

// specificRange returns TAS/fuel flow (m/kg) at level flight.
func (a *Aircraft) specificRange(mass, p, t, tisa, mach, cosL float64) float64 {
	if a.tab != nil {
		return mach * SpeedOfSound(t) / a.tableFF(mass, PressureToFL(p), mach, t-tisa)
	}
	d, _, _ := a.drag(mass, p, mach, cosL)
	return mach * SpeedOfSound(t) / a.fuelFlow(d, a.climbThrust(p, t, tisa, mach), t, mach)
}

// LRCMach returns the long-range cruise Mach: the Mach above MaxRangeMach
// where specific range has fallen to 99 % of its maximum (common
// practice), found by the Illinois method to 1e-7 Mach (see rootEdge); the
// top of MachBand if the
// range is still above 99 % there.
func (a *Aircraft) LRCMach(mass, p, isaDev, floor float64) (float64, bool) {
	lo, hi, ok := a.MachBand(mass, p, isaDev, floor)
	if !ok {
		return math.NaN(), false
	}
	tisa := isaTemperatureAtPressure(p)
	m, _ := a.lrcIn(mass, p, tisa+isaDev, tisa, lo, hi)
	return m, true
}

// lrcIn returns LRC Mach and the max-range Mach within [lo, hi].
func (a *Aircraft) lrcIn(mass, p, t, tisa, lo, hi float64) (lrc, mr float64) {
	cosL := math.Cos(a.Sweep)
	mr = a.econMachIn(mass, p, t, tisa, lo, hi, 0, 0)
	sr := func(m float64) float64 { return a.specificRange(mass, p, t, tisa, m, cosL) }
	if a.tab != nil {
		sr = a.tableSRFn(mass, p, t, tisa)
	}
	target := 0.99 * sr(mr)
	if sr(hi) >= target {
		return hi, mr
	}
	excess := func(m float64) float64 { return sr(m) - target }
	return rootEdge(mr, hi, excess(mr), excess(hi), machTol, excess), mr
}
