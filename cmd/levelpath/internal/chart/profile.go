package chart

import (
	"fmt"
	"io"
	"math"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"levelpath/optimizer"
)

// ProfileInput is what the profile chart and the report show.
type ProfileInput struct {
	Plan   *optimizer.Plan
	Levels []int  // allowed flight levels, drawn as faint guides
	Title  string // chart and page title; a default names the aircraft and CI
	// Contrail is the cross-section of persistent-contrail conditions
	// (optimizer.ContrailSection), shaded on the profile panel; nil: none
	// shown.
	Contrail []optimizer.ContrailCell
}

// ProfileFor is what the command line and the service draw for plan on
// problem pr: the levels the route allows from FL250 up as guides, and the
// aircraft and profile as title; when the plan has contrail figures, the
// persistent-contrail cross-section (optimizer.ContrailSection) to shade.
func ProfileFor(plan *optimizer.Plan, pr *optimizer.Problem) ProfileInput {
	set := map[int]bool{}
	var levels []int
	for _, s := range pr.Track.Segments {
		for _, l := range s.Levels {
			if !set[l] && l >= 250 {
				set[l] = true
				levels = append(levels, l)
			}
		}
	}
	in := ProfileInput{Plan: plan, Levels: levels, Title: plan.Aircraft + " " + plan.Profile.String()}
	if plan.Contrail != nil {
		// A view of the plan's own inputs: the problem was just planned,
		// so it normalises again and the section cannot fail in
		// practice; if it did, the chart draws without shading.
		in.Contrail, _ = optimizer.ContrailSection(pr, plan)
	}
	return in
}

// checkPlan returns a FormatError for a plan that cannot be drawn: nil, no
// legs, a leg with a non-finite or decreasing distance or level, or a level
// guide outside FL000..FL999.
func checkPlan(in ProfileInput) error {
	p := in.Plan
	if p == nil {
		return FormatError("profile: no plan")
	}
	if len(p.Legs) == 0 {
		return FormatError("profile: the plan has no legs")
	}
	for i, l := range p.Legs {
		if !finite(l.FromDist, l.ToDist, l.FromFL, l.FL) {
			return FormatError(fmt.Sprintf("profile: leg %d: non-finite distance or level (from %g m to %g m, FL%g to FL%g)", i, l.FromDist, l.ToDist, l.FromFL, l.FL))
		}
		if l.ToDist < l.FromDist {
			return FormatError(fmt.Sprintf("profile: leg %d: ends at %g m before it starts at %g m", i, l.ToDist, l.FromDist))
		}
	}
	for _, s := range p.Steps {
		if !finite(s.AtDist) {
			return FormatError(fmt.Sprintf("profile: step FL%03d to FL%03d: non-finite distance %g", s.FromFL, s.ToFL, s.AtDist))
		}
	}
	for _, lv := range in.Levels {
		if lv < 0 || lv > 999 {
			return FormatError(fmt.Sprintf("profile: allowed level %d outside FL000..FL999", lv))
		}
	}
	return nil
}

func (in ProfileInput) title() string {
	if in.Title != "" {
		return in.Title
	}
	return fmt.Sprintf("Vertical profile: %s, CI %g kg/min, buffet floor %s", in.Plan.Aircraft, in.Plan.CI, floorText(in.Plan, true))
}

// Profile draws the plan's vertical profile in format ("svg", "png" or
// "pdf") to w: three panels sharing the distance axis (NM from departure).
//
//   - top: flight level of the planned profile (each leg from FromFL at
//     FromDist to FL at ToDist) over the shaded persistent-contrail
//     conditions of in.Contrail (each cell FL-5..FL+5 over its
//     distances), the step climbs and descents marked and
//     labelled with their new level, the buffet-limited and thrust-limited
//     maximum levels at each cruise leg's start mass (NaN values skipped),
//     and the allowed levels as faint guides labelled at the right;
//   - middle: the along-track wind in kt (tailwind positive), per leg;
//   - bottom: the buffet margin in g at each cruise leg's start against the
//     protection floor that applied to the leg.
//
// Each violation (Plan.Violations) is marked in red on the top panel at
// its leg, labelled "leg N: limit" (runs of one limit on consecutive legs
// as "legs N-M: limit"), N the index into Plan.Legs that the report's and
// the CLI's leg tables print. The legend's floor names the raised floors
// of turbulence where legs had them.
//
// The chart is 1200 x 700 px. It returns a FormatError for a plan that
// cannot be drawn and an UnsupportedError for an unknown format. Cost is
// linear in the number of legs.
func Profile(w io.Writer, format string, in ProfileInput) error {
	if err := checkPlan(in); err != nil {
		return err
	}
	if err := checkFormat(format); err != nil {
		return err
	}
	top, mid, bot := profilePanels(in)
	return render(w, format, func(dc draw.Canvas) {
		dc = draw.Crop(dc, vg.Points(8), -vg.Points(44), vg.Points(6), -vg.Points(8))
		stack(dc, []*plot.Plot{top, mid, bot}, []float64{0.58, 0.19, 0.23}, vg.Points(20))
	})
}

// profilePanels builds the three panels of the profile chart.
func profilePanels(in ProfileInput) (top, mid, bot *plot.Plot) {
	pl := in.Plan
	legs := pl.Legs
	xmax := pl.Distance / mPerNM
	for _, l := range legs {
		xmax = math.Max(xmax, l.ToDist/mPerNM)
	}

	// Top: the profile.
	top = newPlot(in.title(), "", "flight level")
	profile := legRuns(legs, func(l optimizer.Leg) (float64, float64, bool) { return l.FromFL, l.FL, true })
	ymax := 0.0
	for _, l := range legs {
		ymax = math.Max(ymax, math.Max(l.FromFL, l.FL))
	}
	cruiseTop := ymax
	var buf, thr plotter.XYs
	for _, l := range legs {
		if l.Phase != optimizer.PhaseCruise {
			continue
		}
		x := l.FromDist / mPerNM
		if finite(l.MaxFLBuffet) {
			buf = append(buf, plotter.XY{X: x, Y: l.MaxFLBuffet})
			ymax = math.Max(ymax, l.MaxFLBuffet)
		}
		if finite(l.MaxFLThrust) {
			thr = append(thr, plotter.XY{X: x, Y: l.MaxFLThrust})
			ymax = math.Max(ymax, l.MaxFLThrust)
		}
	}
	// Limits far above the cruise (a bisection that stopped at its top)
	// would squash the profile: show at most 120 FL above it.
	ymax = math.Min(ymax, cruiseTop+120)
	ymax = math.Ceil((ymax+15)/50) * 50

	guides := &hLines{Style: lineStyle(colGuide, 0.7, nil), Text: textStyle(8, rgb(0x8a, 0x96, 0xa3), text.XLeft, text.YCenter)}
	lastLabel := math.Inf(-1)
	for _, lv := range in.Levels {
		guides.Ys = append(guides.Ys, float64(lv))
	}
	sort.Float64s(guides.Ys)
	for _, v := range guides.Ys {
		lab := ""
		if v-lastLabel >= 20 { // keep labels ~15 px apart at 1200 x 700
			lab, lastLabel = flName(v), v
		}
		guides.Labels = append(guides.Labels, lab)
	}
	top.Add(newGrid(false))
	if shade := contrailShade(in.Contrail); shade != nil {
		top.Add(shade)
		top.Legend.Add("persistent contrail conditions (forecast humidity; uncertain)", shade)
	}
	if len(guides.Ys) > 0 {
		top.Add(guides)
	}
	var bufLine, thrLine *plotter.Line
	if len(buf) > 0 {
		bufLine = line(buf, lineStyle(colBuffet, 1.8, dashed))
		top.Add(bufLine)
	}
	if len(thr) > 0 {
		thrLine = line(thr, lineStyle(colThrust, 1.8, dashDot))
		top.Add(thrLine)
	}
	var first *plotter.Line
	for _, r := range profile {
		l := line(r, lineStyle(colProfile, 2.6, nil))
		top.Add(l)
		if first == nil {
			first = l
		}
	}
	top.Legend.Add("planned profile", first)
	if len(pl.Steps) > 0 {
		var up, down, at plotter.XYs
		var names []string
		for _, s := range pl.Steps {
			pt := plotter.XY{X: s.AtDist / mPerNM, Y: float64(s.FromFL)}
			if s.ToFL >= s.FromFL {
				up = append(up, pt)
			} else {
				down = append(down, pt)
			}
			at = append(at, plotter.XY{X: pt.X, Y: math.Min(float64(s.FromFL), float64(s.ToFL))})
			names = append(names, fmt.Sprintf("%s at %.0f NM", flName(float64(s.ToFL)), pt.X))
		}
		g := draw.GlyphStyle{Color: colStep, Radius: vg.Points(5), Shape: triangle{}}
		var thumb *plotter.Scatter
		if len(up) > 0 {
			thumb = scatter(up, g)
			top.Add(thumb)
		}
		if len(down) > 0 {
			gd := g
			gd.Shape = triangle{Down: true}
			s := scatter(down, gd)
			top.Add(s)
			if thumb == nil {
				thumb = s
			}
		}
		top.Add(&placedLabels{XYs: at, Labels: names, Text: textStyle(9, stepText, text.XCenter, text.YTop), Gap: vg.Points(8), Rows: 4})
		top.Legend.Add("level change (new level)", thumb)
	}
	if runs := violationRuns(pl); len(runs) > 0 {
		var at plotter.XYs
		var names []string
		for _, r := range runs {
			a, b := legs[r.first], legs[r.last]
			y := 0.0
			for _, l := range legs[r.first : r.last+1] {
				y = math.Max(y, math.Max(l.FromFL, l.FL))
			}
			at = append(at, plotter.XY{X: (a.FromDist + b.ToDist) / 2 / mPerNM, Y: y})
			names = append(names, r.where()+": "+string(r.limit))
		}
		marks := scatter(at, draw.GlyphStyle{Color: colViolation, Radius: vg.Points(5), Shape: boldCross{}})
		top.Add(marks)
		top.Add(&placedLabels{XYs: at, Labels: names, Text: textStyle(9, colViolation, text.XLeft, text.YBottom), Gap: vg.Points(7), Rows: 4, Above: true})
		top.Legend.Add("limit broken (leg numbers of the leg table)", marks)
	}
	if bufLine != nil {
		top.Legend.Add("buffet-limited max level (floor "+floorText(pl, true)+")", bufLine)
	}
	if thrLine != nil {
		top.Legend.Add("thrust-limited max level (300 ft/min)", thrLine)
	}
	if len(guides.Ys) > 0 {
		top.Legend.Add("allowed levels", guides)
	}
	top.X.Min, top.X.Max = 0, xmax
	top.Y.Min, top.Y.Max = 0, ymax
	top.Y.Tick.Marker = flTicks{step: 50}
	top.X.Tick.Marker = blankLabels{niceTicks{N: 10}}
	top.Add(newLegendBox(top, 0.5, 0.04))

	// Middle: along-track wind.
	mid = newPlot("", "", "wind (kt)")
	midLegend := &legendRow{Text: textStyle(10, colInk, text.XLeft, text.YCenter)}
	zero := &hLines{Ys: []float64{0}, Labels: []string{""}, Style: lineStyle(colMMO, 0.8, nil)}
	mid.Add(newGrid(true))
	wind := legRuns(legs, func(l optimizer.Leg) (float64, float64, bool) {
		v := l.WindAlong / msPerKt
		return v, v, finite(v)
	})
	wlo, whi := addRuns(mid, midLegend, "along-track wind (tailwind +)", wind, lineStyle(colWind, 2, nil), 0, 0)
	mid.Add(zero)
	pad := math.Max(5, 0.15*(whi-wlo))
	mid.X.Min, mid.X.Max = 0, xmax
	mid.Y.Min, mid.Y.Max = math.Floor((wlo-pad)/10)*10, math.Ceil((whi+pad)/10)*10
	mid.X.Tick.Marker = blankLabels{niceTicks{N: 10}}
	mid.Add(midLegend)

	// Bottom: buffet margin against the floor.
	bot = newPlot("", "distance from departure (NM)", "margin (g)")
	botLegend := &legendRow{Text: textStyle(10, colInk, text.XLeft, text.YCenter)}
	bot.Add(newGrid(true))
	margin := legRuns(legs, func(l optimizer.Leg) (float64, float64, bool) {
		return l.BuffetMargin, l.BuffetMargin, finite(l.BuffetMargin)
	})
	floor := legRuns(legs, func(l optimizer.Leg) (float64, float64, bool) {
		return l.Floor, l.Floor, finite(l.Floor) && l.Floor > 0
	})
	glo, ghi := addRuns(bot, botLegend, "protection floor", floor, lineStyle(colBuffet, 1.6, dashed), math.Inf(1), math.Inf(-1))
	glo, ghi = addRuns(bot, botLegend, "buffet margin at leg start", margin, lineStyle(colMargin, 2.2, nil), glo, ghi)
	if !finite(glo, ghi) {
		glo, ghi = 1, 1.5
	}
	gpad := math.Max(0.03, 0.12*(ghi-glo))
	bot.X.Min, bot.X.Max = 0, xmax
	bot.X.Tick.Marker = niceTicks{N: 10}
	bot.Y.Min, bot.Y.Max = math.Floor((glo-gpad)*20)/20, math.Ceil((ghi+gpad)*20)/20
	bot.Add(botLegend)
	return top, mid, bot
}

// addRuns adds each run to p as a line in style s, enters the first in leg
// under name, and returns lo and hi widened to the runs' least and
// greatest y.
func addRuns(p *plot.Plot, leg *legendRow, name string, runs []plotter.XYs, s draw.LineStyle, lo, hi float64) (float64, float64) {
	for i, r := range runs {
		l := line(r, s)
		p.Add(l)
		if i == 0 {
			leg.Add(name, l)
		}
		for _, q := range r {
			lo, hi = math.Min(lo, q.Y), math.Max(hi, q.Y)
		}
	}
	return lo, hi
}

// legRuns returns, for the legs where v reports ok, the polyline from
// (FromDist, a) to (ToDist, b) in NM, joined into one run while the legs
// are contiguous and split where a leg is skipped or a gap opens.
func legRuns(legs []optimizer.Leg, v func(optimizer.Leg) (a, b float64, ok bool)) []plotter.XYs {
	var runs []plotter.XYs
	var cur plotter.XYs
	prevEnd := math.NaN()
	for _, l := range legs {
		a, b, ok := v(l)
		if !ok || !finite(a, b) {
			if len(cur) > 0 {
				runs = append(runs, cur)
			}
			cur, prevEnd = nil, math.NaN()
			continue
		}
		if len(cur) > 0 && math.Abs(l.FromDist-prevEnd) > 1 {
			runs = append(runs, cur)
			cur = nil
		}
		cur = append(cur, plotter.XY{X: l.FromDist / mPerNM, Y: a}, plotter.XY{X: l.ToDist / mPerNM, Y: b})
		prevEnd = l.ToDist
	}
	if len(cur) > 0 {
		runs = append(runs, cur)
	}
	return runs
}
