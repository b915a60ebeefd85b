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
	Summary        [][2]string
	Baseline       [][2]string
	NoBaseline     bool
	Steps          []string
	Legs           [][]string
	Warnings       []string
	Violations     []string
	SVG            template.HTML
}

// Report writes the flight report of in.Plan to w: one self-contained HTML
// page (UTF-8, inline CSS, the profile chart as inline SVG; no scripts and
// no external loads) holding the caution (optimizer.Caution) at the top,
// a summary (aircraft, take-off mass, route distance, profile string,
// totals, the constant-level baseline and the saving against it), the
// chart, the step list, the leg table (NM, phase, FL, Mach, TAS, wind,
// GS, ISA deviation, fuel, time, mass, buffet margin and floor), the
// warnings and violations. Text from the plan is escaped by html/template.
// Values that are NaN show as "–".
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
		SVG: template.HTML(doc[i:]),
	}
	depart := "–"
	if !pl.Depart.IsZero() {
		depart = pl.Depart.UTC().Format(time.RFC3339)
	}
	mm := pl.MinMargin()
	v.Summary = [][2]string{
		{"Aircraft", pl.Aircraft},
		{"Departure (UTC)", depart},
		{"Take-off mass", num(pl.TakeoffMass, 0) + " kg"},
		{"Route distance", num(pl.Distance/mPerNM, 0) + " NM"},
		{"Profile", pl.Profile.String()},
		{"Cost index", num(pl.CI, 1) + " kg/min"},
		{"Speed policy", pl.Speed},
		{"Buffet protection floor", num(pl.Floor, 2) + " g"},
		{"Least buffet margin", num(mm, 3) + " g"},
		{"Trip fuel", num(pl.Totals.Fuel, 0) + " kg"},
		{"Trip time", hm(pl.Totals.Time) + " (" + num(pl.Totals.Time/60, 1) + " min)"},
		{"Cost (fuel + CI × time)", num(pl.Totals.Cost, 0)},
		{"CO₂ (3.16 × fuel)", num(pl.Totals.CO2, 0) + " kg"},
		{"Landing mass", num(pl.Totals.LandingMass, 0) + " kg"},
	}
	if b := pl.Baseline; b != nil {
		v.Baseline = [][2]string{
			{"Best constant level", fmt.Sprintf("FL%03d", b.FL)},
			{"Baseline fuel", num(b.Totals.Fuel, 0) + " kg"},
			{"Baseline time", hm(b.Totals.Time) + " (" + num(b.Totals.Time/60, 1) + " min)"},
			{"Baseline cost", num(b.Totals.Cost, 0)},
			{"Fuel saved", num(b.Totals.Fuel-pl.Totals.Fuel, 0) + " kg"},
			{"Cost saving", num(b.SavingPct, 2) + " %"},
		}
	} else {
		v.NoBaseline = true
	}
	for _, s := range pl.Steps {
		dir := "climb"
		if s.ToFL < s.FromFL {
			dir = "descent"
		}
		v.Steps = append(v.Steps, fmt.Sprintf("Step %s FL%03d → FL%03d at %s NM", dir, s.FromFL, s.ToFL, num(s.AtDist/mPerNM, 0)))
	}
	for _, l := range pl.Legs {
		v.Legs = append(v.Legs, []string{
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
		})
	}
	v.Warnings = pl.Warnings
	for _, x := range pl.Violations {
		s := fmt.Sprintf("leg %d: %s", x.Leg, x.Limit)
		if x.By != 0 && finite(x.By) {
			s += fmt.Sprintf(" by %s %s", num(x.By, 2), x.Unit)
		}
		if x.Detail != "" {
			s += ": " + x.Detail
		}
		v.Violations = append(v.Violations, s)
	}
	return reportTmpl.Execute(w, v)
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
