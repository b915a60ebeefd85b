package planout

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"text/tabwriter"

	"levelpath/optimizer"
)

// WriteTable writes the dispatcher's view: summary, steps, legs, warnings,
// violations and the caution.
func WriteTable(w io.Writer, p *optimizer.Plan, assessed bool) error {
	d := FromPlan(p, assessed)
	bw := &errWriter{w: w}
	title := "Vertical profile plan"
	if assessed {
		title = "Assessed vertical profile"
	}
	bw.printf("%s: %s, take-off mass %.0f kg, departure %s\n", title, d.Aircraft, d.TakeoffMassKg, d.Depart)
	bw.printf("Route %.0f NM, cost index %g kg/min, speed %s, buffet floor %.2f g\n", d.DistanceNM, d.CI, d.Speed, d.FloorG)
	bw.printf("Profile  %s\n", d.Profile)
	t := d.Totals
	bw.printf("Totals   fuel %.0f kg, time %s, cost %.0f, CO2 %.0f kg, landing mass %.0f kg\n", t.FuelKg, hhmm(t.TimeMin), t.Cost, t.CO2Kg, t.LandingMassKg)
	bw.printf("         (trip from 1,500 ft after take-off to 1,500 ft on approach; taxi, take-off, approach and reserve fuel not included)\n")
	if d.MinMarginG != nil {
		bw.printf("Least buffet margin %.3f g (floor %.2f g)\n", *d.MinMarginG, d.FloorG)
	}
	if b := d.Baseline; b != nil {
		bw.printf("Baseline constant FL%03d: fuel %.0f kg, time %s, cost %.0f; this profile saves %.2f %%\n", b.FL, b.FuelKg, hhmm(b.TimeMin), b.Cost, b.SavingPct)
	} else {
		bw.printf("Baseline: no constant level is feasible along the whole route\n")
	}
	bw.printf("\nSteps\n")
	if len(d.Steps) == 0 {
		bw.printf("  none\n")
	}
	for _, s := range d.Steps {
		bw.printf("  at %6.0f NM  FL%03d -> FL%03d\n", s.AtNM, s.FromFL, s.ToFL)
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
	bw.printf("\nLegs\n")
	tw := tabwriter.NewWriter(bw, 0, 0, 1, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "from NM\tto NM\tphase\tFL\tMach\tTAS kt\twind kt\tGS kt\tISA C\tfuel kg\tmin\tmass kg\tmargin g\tfloor g\t")
	for _, l := range d.Legs {
		margin := "-"
		if l.BuffetMarginG != nil {
			margin = fmt.Sprintf("%.3f", *l.BuffetMarginG)
		}
		fmt.Fprintf(tw, "%.0f\t%.0f\t%s\t%.0f\t%.3f\t%.0f\t%+.0f\t%.0f\t%+.1f\t%.0f\t%.1f\t%.0f\t%s\t%.2f\t\n",
			l.FromNM, l.ToNM, l.Phase, l.FL, l.Mach, l.TASKt, l.WindKt, l.GSKt, l.ISADevC, l.FuelKg, l.TimeMin, l.MassStartKg, margin, l.FloorG)
	}
	tw.Flush()
	if len(d.Warnings) > 0 {
		bw.printf("\nWarnings\n")
		for _, s := range d.Warnings {
			bw.printf("  - %s\n", s)
		}
	}
	if assessed {
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
	bw.printf("\n%s\n", optimizer.Caution)
	return bw.err
}

// WriteCSV writes one row per leg, with the caution as a leading comment
// line.
func WriteCSV(w io.Writer, p *optimizer.Plan, assessed bool) error {
	d := FromPlan(p, assessed)
	if _, err := fmt.Fprintf(w, "# %s\n", optimizer.Caution); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	cw.Write([]string{"from_nm", "to_nm", "phase", "from_fl", "fl", "mach", "tas_kt", "wind_kt", "gs_kt", "isa_dev_c", "fuel_kg", "time_min", "mass_start_kg", "buffet_margin_g", "floor_g", "floor_reason"})
	for _, l := range d.Legs {
		cw.Write([]string{CSVNumber(l.FromNM), CSVNumber(l.ToNM), l.Phase, CSVNumber(l.FromFL), CSVNumber(l.FL), CSVNumber(l.Mach), CSVNumber(l.TASKt), CSVNumber(l.WindKt), CSVNumber(l.GSKt), CSVNumber(l.ISADevC),
			CSVNumber(l.FuelKg), CSVNumber(l.TimeMin), CSVNumber(l.MassStartKg), CSVPointer(l.BuffetMarginG), CSVNumber(l.FloorG), l.FloorReason})
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
