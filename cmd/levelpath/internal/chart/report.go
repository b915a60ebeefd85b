package chart

import (
	"bytes"
	_ "embed"
	"fmt"
	"html/template"
	"io"
	"math"
	"strings"
	"time"

	"levelpath/optimizer"
)

//go:embed report.html.tmpl
var reportSource string

var reportTmpl = template.Must(template.New("report").Parse(reportSource))

// reportView is what the report template shows, already formatted.
type reportView struct {
	Title, Caution string
	// Status is the plan's status (optimizer.Plan.Status) and StatusText
	// its explanation.
	Status, StatusText string
	Fuel               [][2]string // the fuel plan's components; nil without one
	FuelTitle          string
	Summary            [][2]string
	Baseline           [][2]string
	BaselineNote       string // why there is no baseline, when there is none
	Steps              []string
	Legs               []legRow
	Warnings           []string
	Violations         []violationItem
	SVG                template.HTML
	// Contrail summarises the contrail classes (nil without humidity in
	// the weather), with its caution and the cruise legs in persistent
	// conditions.
	Contrail        [][2]string
	ContrailCaution string
	ContrailLegs    []violationItem
}

// legRow is one row of the numbered leg table.
type legRow struct {
	N        int  // index into Plan.Legs, as the CLI's leg table numbers it
	Violated bool // a violation names this leg
	Cells    []string
}

// violationItem is one violation, with the leg it names.
type violationItem struct {
	Leg  int // index into Plan.Legs; -1 when outside the leg table
	Text string
}

// tripLabel defines the trip the plan prices: it does not hold taxi,
// take-off, approach or reserves.
const tripLabel = "Trip fuel (1,500 ft after take-off to 1,500 ft on approach)"

// Report writes the flight report of in.Plan to w: one self-contained HTML
// page (UTF-8, inline CSS, the profile chart as inline SVG; no scripts and
// no external loads) holding, in this order: the caution
// (optimizer.Caution); the plan's status, every violation (each naming
// its leg by the number of the leg table, linked to its row) and every
// warning; the fuel plan's components when Plan.Fuel is set (taxi, trip,
// contingency, alternate, final reserve, additional, extra, block,
// take-off and landing mass); a summary (aircraft, take-off mass, route
// distance, profile string, the floor with the raised floors of
// turbulence, the least buffet margin above each leg's own floor, totals
// with the trip fuel defined as 1,500 ft to 1,500 ft, the constant-level
// baseline and the saving against it); the chart; the step list; and the
// leg table numbered 0.. as Plan.Legs (the CLI's numbering: NM, phase,
// FL, Mach, TAS, wind, GS, ISA deviation, fuel, time, mass, buffet margin
// and floor, and the contrail class when the weather holds humidity);
// when it does, a contrail section before the steps: its caution
// (optimizer.ContrailCaution), the persistent-contrail distance by day
// and night, the short-lived distance and the cruise legs in persistent
// conditions, linked to their rows. Text from the plan is escaped by
// html/template. Values that are NaN show as "–".
//
// It returns a FormatError for a plan that cannot be drawn (see Profile).
func Report(w io.Writer, in ProfileInput) error {
	var svg bytes.Buffer // Profile checks the plan (checkPlan)
	if err := Profile(&svg, "svg", in); err != nil {
		return err
	}
	doc := svg.String()
	// Drop the XML declaration and comment before the root element: the
	// SVG is embedded in HTML.
	i := strings.Index(doc, "<svg")
	if i < 0 {
		return fmt.Errorf("chart: report: the profile SVG has no <svg> element")
	}
	pl := in.Plan
	v := reportView{
		Title:   in.title(),
		Caution: optimizer.Caution,
		// The SVG is this package's own output, its text escaped by vgsvg.
		SVG:    template.HTML(doc[i:]),
		Status: pl.Status(),
	}
	switch v.Status {
	case optimizer.StatusImpossible:
		v.StatusText = "IMPOSSIBLE: the flight cannot be flown as loaded (see the limits broken below)"
	case optimizer.StatusViolations:
		v.StatusText = fmt.Sprintf("VIOLATIONS: the profile breaks %d limit(s) (see below)", len(pl.Violations))
	default:
		v.StatusText = "ok: no limit broken"
	}
	depart := "–"
	if !pl.Depart.IsZero() {
		depart = pl.Depart.UTC().Format(time.RFC3339)
	}
	least := "–"
	if m, at := leastAboveFloor(pl); at >= 0 {
		l := pl.Legs[at]
		least = fmt.Sprintf("%s g on leg %d (margin %s g, floor %s g there)", num(m, 3), at, num(l.BuffetMargin, 3), num(l.Floor, 2))
	}
	v.Summary = [][2]string{
		{"Aircraft", pl.Aircraft},
		{"Departure (UTC)", depart},
		{"Take-off mass", num(pl.TakeoffMass, 0) + " kg"},
		{"Route distance", num(pl.Distance/mPerNM, 0) + " NM"},
		{"Profile", pl.Profile.String()},
		{"Cost index", num(pl.CI, 1) + " kg/min"},
		{"Speed policy", pl.Speed},
		{"Buffet protection floor", floorText(pl, false)},
		{"Least buffet margin above its leg's floor", least},
		{"Least buffet margin anywhere", num(pl.MinMargin(), 3) + " g"},
		{tripLabel, num(pl.Totals.Fuel, 0) + " kg"},
		{"Trip time", hm(pl.Totals.Time) + " (" + num(pl.Totals.Time/60, 1) + " min)"},
		{"Cost (fuel + CI × time)", num(pl.Totals.Cost, 0)},
		{"CO₂ (3.16 × fuel)", num(pl.Totals.CO2, 0) + " kg"},
		{"Landing mass", num(pl.Totals.LandingMass, 0) + " kg"},
	}
	v.FuelTitle, v.Fuel = fuelRows(pl.Fuel)
	if b := pl.Baseline; b != nil {
		v.Baseline = [][2]string{
			{"Best constant level", fmt.Sprintf("FL%03d", b.FL)},
			{"Baseline fuel", num(b.Totals.Fuel, 0) + " kg"},
			{"Baseline time", hm(b.Totals.Time) + " (" + num(b.Totals.Time/60, 1) + " min)"},
			{"Baseline cost", num(b.Totals.Cost, 0)},
			{"Fuel saved", num(b.Totals.Fuel-pl.Totals.Fuel, 0) + " kg"},
			{"Cost saving", num(b.SavingPct, 2) + " %"},
		}
	} else if v.BaselineNote = pl.BaselineNote; v.BaselineNote == "" {
		v.BaselineNote = "no constant level is feasible"
	}
	for _, s := range pl.Steps {
		dir := "climb"
		if s.ToFL < s.FromFL {
			dir = "descent"
		}
		v.Steps = append(v.Steps, fmt.Sprintf("Step %s FL%03d → FL%03d at %s NM", dir, s.FromFL, s.ToFL, num(s.AtDist/mPerNM, 0)))
	}
	violated := map[int]bool{}
	for _, x := range pl.Violations {
		s := fmt.Sprintf("leg %d: %s", x.Leg, x.Limit)
		if x.By != 0 && finite(x.By) {
			s += fmt.Sprintf(" by %s %s", num(x.By, 2), x.Unit)
		}
		if x.Detail != "" {
			s += ": " + x.Detail
		}
		leg := x.Leg
		if leg < 0 || leg >= len(pl.Legs) {
			leg = -1
		}
		violated[leg] = true
		v.Violations = append(v.Violations, violationItem{Leg: leg, Text: s})
	}
	for i, l := range pl.Legs {
		v.Legs = append(v.Legs, legRow{N: i, Violated: violated[i], Cells: []string{
			num(l.FromDist/mPerNM, 0) + "–" + num(l.ToDist/mPerNM, 0),
			string(l.Phase),
			flRange(l.FromFL, l.FL),
			num(l.Mach, 3),
			num(l.TAS/msPerKt, 0),
			signed(l.WindAlong/msPerKt, 0),
			num(l.GS/msPerKt, 0),
			signed(l.ISADev, 1),
			num(l.Fuel, 0),
			num(l.Time/60, 1),
			num(l.MassStart, 0),
			num(l.BuffetMargin, 3),
			num(l.Floor, 2),
		}})
		if pl.Contrail != nil {
			c := string(l.Contrail)
			if c == "" {
				c = "–"
			}
			v.Legs[len(v.Legs)-1].Cells = append(v.Legs[len(v.Legs)-1].Cells, c)
		}
	}
	v.Warnings = pl.Warnings
	if c := pl.Contrail; c != nil {
		v.ContrailCaution = optimizer.ContrailCaution
		v.Contrail = [][2]string{
			{"Persistent contrail conditions", num(c.PersistentNM, 0) + " NM (day " + num(c.DayNM, 0) + ", night " + num(c.NightNM, 0) + ")"},
			{"Short-lived contrails", num(c.ShortLivedNM, 0) + " NM"},
			{"Persistence threshold", num(c.RHiPct, 0) + " % over ice"},
		}
		if c.UnknownNM > 0 {
			v.Contrail = append(v.Contrail, [2]string{"Not classified (no humidity)", num(c.UnknownNM, 0) + " NM"})
		}
		if c.CostPerNM > 0 {
			v.Contrail = append(v.Contrail, [2]string{"Contrail cost", num(c.CostPerNM, 1) + " kg/NM (" + num(c.Cost, 0) + " kg equivalent, not in the cost above)"})
		}
		for i, l := range pl.Legs {
			if l.Contrail == optimizer.ContrailPersistent {
				v.ContrailLegs = append(v.ContrailLegs, violationItem{Leg: i, Text: fmt.Sprintf("leg %d: %s–%s NM at FL%03.0f, persistent (RHi %s %%)",
					i, num(l.FromDist/mPerNM, 0), num(l.ToDist/mPerNM, 0), l.FL, num(l.RHi, 0))})
			}
		}
	}
	return reportTmpl.Execute(w, v)
}

// fuelRows formats the fuel plan's components (ICAO Annex 6 Part I
// 4.3.6.3: taxi, trip, contingency, alternate, final reserve, additional,
// discretionary) and the masses they give; nil for no fuel plan.
func fuelRows(f *optimizer.FuelPlan) (string, [][2]string) {
	if f == nil {
		return "", nil
	}
	kg := func(x float64) string { return num(x, 0) + " kg" }
	cont := kg(f.Contingency)
	if f.ContingencyBasis != "" {
		cont += " (" + f.ContingencyBasis + ")"
	}
	title := "Fuel plan"
	trip := "Trip (1,500 ft after take-off to 1,500 ft on approach)"
	block := "Block fuel"
	if f.InFlight {
		title = "Fuel from here (in-flight re-plan)"
		trip = "Remaining trip (to 1,500 ft on approach)"
		block = "Fuel required now"
	}
	rows := [][2]string{
		{"Taxi", kg(f.Taxi)},
		{trip, kg(f.Trip)},
		{"Contingency", cont},
		{"Alternate", kg(f.Alternate)},
		{"Final reserve", kg(f.FinalReserve)},
		{"Additional", kg(f.Additional)},
		{"Extra (discretionary)", kg(f.Extra)},
		{block, kg(f.Block)},
	}
	if f.InFlight {
		rows = append(rows, [2]string{"Fuel on board", kg(f.FuelOnBoard)}, [2]string{"Expected at destination", kg(f.ExpectedAtDestination)})
	}
	rows = append(rows,
		[2]string{"Zero-fuel mass", kg(f.ZFW)},
		[2]string{"Take-off mass", kg(f.TakeoffMass)},
		[2]string{"Landing mass", kg(f.LandingMass)})
	if len(f.LimitedBy) > 0 {
		rows = append(rows, [2]string{"Limited by", strings.Join(f.LimitedBy, ", ")})
	}
	if f.Binding != "" && finite(f.MaxPayloadZFW) && f.MaxPayloadZFW > 0 {
		rows = append(rows, [2]string{"Largest zero-fuel mass (" + f.Binding + ")", kg(f.MaxPayloadZFW)})
	}
	if f.Iterations > 0 {
		rows = append(rows, [2]string{"Take-off mass iterations", fmt.Sprint(f.Iterations)})
	}
	return title, rows
}

// num formats x with prec decimals, "–" for NaN or infinity.
func num(x float64, prec int) string {
	if !finite(x) {
		return "–"
	}
	if x == 0 {
		x = 0 // no "-0"
	}
	s := fmt.Sprintf("%.*f", prec, x)
	if s == fmt.Sprintf("-%.*f", prec, 0.0) {
		s = s[1:]
	}
	return group(s)
}

// group separates thousands in the integer part of a formatted number
// with a narrow no-break space (U+202F, the SI digit-group separator).
func group(s string) string {
	sign := ""
	if strings.HasPrefix(s, "-") {
		sign, s = "-", s[1:]
	}
	intPart, frac, hasFrac := strings.Cut(s, ".")
	if len(intPart) <= 4 { // SI practice: 4-digit numbers are not split
		return sign + s
	}
	var b strings.Builder
	for i, r := range intPart {
		if i > 0 && (len(intPart)-i)%3 == 0 {
			b.WriteRune('\u202f')
		}
		b.WriteRune(r)
	}
	if hasFrac {
		b.WriteString("." + frac)
	}
	return sign + b.String()
}

// signed is num with a leading "+" for positive values.
func signed(x float64, prec int) string {
	s := num(x, prec)
	if finite(x) && s != "–" && !strings.HasPrefix(s, "-") && strings.Trim(s, "0.") != "" {
		s = "+" + s
	}
	return s
}

// hm formats seconds as "h:mm".
func hm(sec float64) string {
	if !finite(sec) || sec < 0 {
		return "–"
	}
	m := int(math.Round(sec / 60))
	return fmt.Sprintf("%d:%02d", m/60, m%60)
}

// flRange formats a leg's levels: "FL370" when level, "FL350→370" when not.
func flRange(from, to float64) string {
	if math.Round(from) == math.Round(to) {
		return flName(to)
	}
	return fmt.Sprintf("%s→%03.0f", flName(from), to)
}
