package planjson

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"text/tabwriter"

	"levelpath/optimizer"
)

// WriteTable writes the dispatcher's view: summary, status, violations and
// warnings first, then the fuel block (when a fuel plan was made), steps,
// the numbered legs (the numbers violations refer to) and the caution.
func WriteTable(w io.Writer, p *optimizer.Plan, assessed bool) error {
	return WriteTableBrief(w, p, assessed, false)
}

// WriteTableBrief is WriteTable; brief leaves out the waypoint and leg
// tables (one screen: summary, status, fuel block, violations, warnings,
// steps and the caution).
func WriteTableBrief(w io.Writer, p *optimizer.Plan, assessed, brief bool) error {
	d := FromPlan(p, assessed)
	bw := &errWriter{w: w}
	title := "Vertical profile plan"
	if assessed {
		title = "Assessed vertical profile"
	}
	if d.Fuel != nil && d.Fuel.InFlight || len(d.Waypoints) > 0 && d.Waypoints[0].Kind == optimizer.WaypointStart {
		w := d.Waypoints[0]
		bw.printf("In-flight re-plan: %s, from %.0f NM at FL%03.0f, mass %.0f kg, at %s\n", d.Aircraft, w.DistanceNM, w.FL, d.TakeoffMassKg, d.Depart)
	} else {
		bw.printf("%s: %s, take-off mass %.0f kg, departure %s\n", title, d.Aircraft, d.TakeoffMassKg, d.Depart)
	}
	bw.printf("Route %.0f NM, cost index %g kg/min, speed %s, buffet floor %.2f g\n", d.DistanceNM, d.CI, d.Speed, d.FloorG)
	bw.printf("Profile  %s\n", d.Profile)
	t := d.Totals
	bw.printf("Totals   fuel %.0f kg, time %s, cost %.0f, CO2 %.0f kg, landing mass %.0f kg\n", t.FuelKg, hhmm(t.TimeMin), t.Cost, t.CO2Kg, t.LandingMassKg)
	if d.Fuel == nil {
		bw.printf("         (trip from 1,500 ft after take-off to 1,500 ft on approach; taxi, take-off, approach and reserve fuel not included)\n")
	} else {
		bw.printf("         (the trip fuel of the fuel plan below: 1,500 ft after take-off to 1,500 ft on approach; take-off and approach are not modelled)\n")
	}
	if d.MinMarginG != nil {
		// Judged against each leg's own floor (turbulence raises it).
		least, at := math.Inf(1), -1
		for i, l := range d.Legs {
			if l.BuffetMarginG != nil && *l.BuffetMarginG-l.FloorG < least {
				least, at = *l.BuffetMarginG-l.FloorG, i
			}
		}
		l := d.Legs[at]
		if least < 0 && least > -5e-4 {
			least = 0 // on the floor within the search's tolerance: not "-0.000"
		}
		bw.printf("Least buffet margin above its floor: %.3f g on leg %d (margin %.3f g, floor %.2f g there); least margin anywhere %.3f g\n", least, at, *l.BuffetMarginG, l.FloorG, *d.MinMarginG)
	}
	if b := d.Baseline; b != nil {
		bw.printf("Baseline constant FL%03d: fuel %.0f kg, time %s, cost %.0f; this profile saves %.2f %%\n", b.FL, b.FuelKg, hhmm(b.TimeMin), b.Cost, math.Round(b.SavingPct*100)/100+0) // rounded, +0: never "-0.00"
	} else if d.BaselineNote != "" {
		bw.printf("Baseline: %s\n", d.BaselineNote)
	} else {
		bw.printf("Baseline: no constant level is feasible along the whole route\n")
	}
	if c := d.Contrail; c != nil {
		bw.printf("Contrails persistent %.0f NM (day %.0f, night %.0f), short-lived %.0f NM", c.PersistentNM, c.PersistentDayNM, c.PersistentNightNM, c.ShortLivedNM)
		if c.UnclassifiedNM > 0 {
			bw.printf(", not classified %.0f NM", c.UnclassifiedNM)
		}
		if c.CostPerNMKg > 0 {
			bw.printf("; contrail cost %g kg/NM (%.0f kg equivalent, not in the cost above)", c.CostPerNMKg, c.CostKg)
		}
		bw.printf("\n         %s\n", c.Caution)
	}
	writeArrival(bw, d)
	bw.printf("Status   %s\n", statusText(d))
	writeFuel(bw, d)
	writeViolations(bw, d, assessed)
	if len(d.Warnings) > 0 {
		bw.printf("\nWarnings\n")
		for _, s := range d.Warnings {
			bw.printf("  - %s\n", s)
		}
	}
	bw.printf("\nSteps\n")
	if len(d.Steps) == 0 {
		bw.printf("  none\n")
	}
	for _, s := range d.Steps {
		where := ""
		for _, w := range d.Waypoints {
			if w.Kind == optimizer.WaypointStep && math.Abs(w.DistanceNM-s.AtNM) < 1e-9 {
				where = "  (" + w.Name + ")"
			}
		}
		bw.printf("  at %6.0f NM  FL%03d -> FL%03d%s\n", s.AtNM, s.FromFL, s.ToFL, where)
	}
	if len(d.Alternatives) > 0 {
		bw.printf("\nAlternatives (next-cheapest profiles, priced exactly)\n")
		for i, a := range d.Alternatives {
			margin := "-"
			if a.MinMarginG != nil {
				margin = fmt.Sprintf("%.3f g", *a.MinMarginG)
			}
			bw.printf("  %d. %s: cost %+.1f, fuel %.0f kg, time %s, least margin %s\n", i+1, a.Profile, a.CostDelta, a.FuelKg, hhmm(a.TimeMin), margin)
		}
	}
	if brief {
		bw.printf("\n(waypoints and legs: without --brief)\n\n%s\n", optimizer.Caution)
		return bw.err
	}
	writeWaypoints(bw, d)
	bw.printf("\nLegs\n")
	tw := tabwriter.NewWriter(bw, 0, 0, 1, ' ', tabwriter.AlignRight)
	head := "leg\tfrom NM\tto NM\tphase\tFL\tMach\tTAS kt\twind kt\tGS kt\tISA dev C\tfuel kg\ttime min\tstart mass kg\tmargin g\tfloor g\tstarts at\t"
	if d.Contrail != nil {
		head += "contrail\t"
	}
	fmt.Fprintln(tw, head)
	for i, l := range d.Legs {
		at := ""
		for _, w := range d.Waypoints {
			if (w.Kind == optimizer.WaypointRoute || w.Kind == optimizer.WaypointStart) && math.Abs(w.DistanceNM-l.FromNM) < 0.5 {
				at = w.Name
			}
		}
		if at == "" {
			at = "-"
		}
		margin := "-"
		if l.BuffetMarginG != nil {
			margin = fmt.Sprintf("%.3f", *l.BuffetMarginG)
		}
		fmt.Fprintf(tw, "%d\t%.0f\t%.0f\t%s\t%.0f\t%.3f\t%.0f\t%+.0f\t%.0f\t%+.1f\t%.0f\t%.1f\t%.0f\t%s\t%.2f\t%s\t",
			i, l.FromNM, l.ToNM, l.Phase, l.FL, l.Mach, l.TASKt, l.WindKt, l.GSKt, l.ISADevC, l.FuelKg, l.TimeMin, l.MassStartKg, margin, l.FloorG, at)
		if d.Contrail != nil {
			c := l.Contrail
			if c == "" {
				c = "-"
			}
			fmt.Fprintf(tw, "%s\t", c)
		}
		fmt.Fprintln(tw)
	}
	tw.Flush()
	bw.printf("\n%s\n", optimizer.Caution)
	return bw.err
}

// statusText explains the plan's status in a line.
func statusText(d *Doc) string {
	switch d.Status {
	case optimizer.StatusImpossible:
		return "IMPOSSIBLE: the flight cannot be flown as loaded (see violations)"
	case optimizer.StatusViolations:
		return fmt.Sprintf("VIOLATIONS: the profile breaks %d limit(s) (see violations)", len(d.Violations))
	}
	return "ok: no limit broken"
}

// writeViolations lists the violations grouped by stretch of route, first
// in the table; an assessed plan lists them even when there is none.
func writeViolations(bw *errWriter, d *Doc, assessed bool) {
	if !assessed && len(d.Violations) == 0 {
		return
	}
	bw.printf("\nViolations: %d\n", len(d.Violations))
	for _, g := range groupViolations(d) {
		where := fmt.Sprintf("leg %d", g.first)
		if g.last != g.first {
			where = fmt.Sprintf("legs %d-%d (%d legs)", g.first, g.last, g.count)
		}
		if g.unit != "" {
			bw.printf("  - %s: %s, worst by %s %s: %s\n", where, g.limit, strconv.FormatFloat(g.worst, 'f', 3, 64), g.unit, g.detail)
		} else {
			bw.printf("  - %s: %s: %s\n", where, g.limit, g.detail)
		}
	}
	if len(d.Violations) > 0 {
		bw.printf("  (every violation, leg by leg: --format json)\n")
	}
}

// WriteCSV writes one row per leg, with the caution in a column of its own
// (a plain CSV that pandas and DuckDB read with their defaults). When the
// weather holds humidity, contrail, rhi_pct and contrail_caution columns
// follow (the contrail class, empty where not classified).
func WriteCSV(w io.Writer, p *optimizer.Plan, assessed bool) error {
	d := FromPlan(p, assessed)
	cw := csv.NewWriter(w)
	// A plan made for an arrival window or a delay cost repeats its
	// target and choice on every row, before the caution; the contrail
	// columns follow it when the weather holds humidity.
	extraHead, extra := arrivalCSV(d)
	head := []string{"from_nm", "to_nm", "phase", "from_fl", "fl", "mach", "tas_kt", "wind_kt", "gs_kt", "isa_dev_c", "fuel_kg", "time_min", "mass_start_kg", "buffet_margin_g", "floor_g", "floor_reason"}
	head = append(append(head, extraHead...), "caution")
	if d.Contrail != nil {
		head = append(head, "contrail", "rhi_pct", "contrail_caution")
	}
	cw.Write(head)
	for _, l := range d.Legs {
		row := []string{CSVNumber(l.FromNM), CSVNumber(l.ToNM), l.Phase, CSVNumber(l.FromFL), CSVNumber(l.FL), CSVNumber(l.Mach), CSVNumber(l.TASKt), CSVNumber(l.WindKt), CSVNumber(l.GSKt), CSVNumber(l.ISADevC),
			CSVNumber(l.FuelKg), CSVNumber(l.TimeMin), CSVNumber(l.MassStartKg), CSVPointer(l.BuffetMarginG), CSVNumber(l.FloorG), l.FloorReason}
		row = append(append(row, extra...), optimizer.Caution)
		if d.Contrail != nil {
			row = append(row, l.Contrail, CSVPointer(l.RHiPct), optimizer.ContrailCaution)
		}
		cw.Write(row)
	}
	cw.Flush()
	return cw.Error()
}

// CSVNumber formats x for CSV: the shortest form that reads back exactly.
func CSVNumber(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// CSVPointer formats an optional number for CSV, empty when absent.
func CSVPointer(x *float64) string {
	if x == nil {
		return ""
	}
	return CSVNumber(*x)
}

func hhmm(min float64) string {
	m := int(math.Round(min))
	return fmt.Sprintf("%d:%02d", m/60, m%60)
}

// errWriter keeps the first write error.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(b []byte) (int, error) {
	if e.err != nil {
		return 0, e.err
	}
	n, err := e.w.Write(b)
	e.err = err
	return n, err
}

func (e *errWriter) printf(format string, args ...any) {
	fmt.Fprintf(e, format, args...)
}

// violationGroup is a run of violations of one limit on consecutive legs.
type violationGroup struct {
	limit, unit, detail string
	first, last, count  int
	worst               float64
}

// groupViolations merges violations of the same limit on consecutive legs,
// keeping the detail of the worst one, so that a dispatcher reads one line
// per stretch of route instead of one per leg.
func groupViolations(d *Doc) []violationGroup {
	var out []violationGroup
	open := map[string]int{} // limit -> index in out of its latest group
	for _, v := range d.Violations {
		if i, ok := open[v.Limit]; ok && v.Leg <= out[i].last+1 {
			g := &out[i]
			if v.Leg != g.last {
				g.count++
			}
			g.last = v.Leg
			if v.By > g.worst {
				g.worst, g.detail = v.By, v.Detail
			}
			continue
		}
		open[v.Limit] = len(out)
		out = append(out, violationGroup{limit: v.Limit, unit: v.Unit, detail: v.Detail, first: v.Leg, last: v.Leg, count: 1, worst: v.By})
	}
	return out
}
