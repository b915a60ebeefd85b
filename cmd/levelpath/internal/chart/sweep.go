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
)

// SweepPoint is the outcome of planning at one cost index: the total fuel
// (kg) and time (min) summed over Flights flights.
type SweepPoint struct {
	CI, FuelKg, TimeMin float64
	Flights             int
}

// Sweep draws total fuel (kg) against total time (min) in format to w, one
// point per cost index labelled "CI n", joined in order of CI so that the
// trade-off reads as a curve. An empty title gives a default. The chart is
// 1200 x 700 px.
//
// It returns a FormatError for no points or a point with a non-finite or
// negative value, and an UnsupportedError for an unknown format.
func Sweep(w io.Writer, format string, pts []SweepPoint, title string) error {
	if len(pts) == 0 {
		return FormatError("sweep: no points")
	}
	for i, s := range pts {
		if !finite(s.CI, s.FuelKg, s.TimeMin) || s.CI < 0 || s.FuelKg < 0 || s.TimeMin < 0 || s.Flights < 0 {
			return FormatError(fmt.Sprintf("sweep: point %d: CI %g, fuel %g kg, time %g min, %d flights: want finite, non-negative values", i, s.CI, s.FuelKg, s.TimeMin, s.Flights))
		}
	}
	if err := checkFormat(format); err != nil {
		return err
	}
	sorted := append([]SweepPoint(nil), pts...)
	sort.SliceStable(sorted, func(i, j int) bool { return sorted[i].CI < sorted[j].CI })
	if title == "" {
		title = "Cost-index sweep: total fuel against total time"
	}
	flights := sorted[0].Flights
	for _, s := range sorted {
		if s.Flights != flights {
			flights = -1
		}
	}
	if flights > 1 {
		title += fmt.Sprintf(" (%d flights)", flights)
	}
	p := newPlot(title, "total time (min)", "total fuel (kg)")
	p.Add(newGrid(true))
	xys := make(plotter.XYs, len(sorted))
	names := make([]string, len(sorted))
	for i, s := range sorted {
		xys[i] = plotter.XY{X: s.TimeMin, Y: s.FuelKg}
		names[i] = fmt.Sprintf("CI %g", s.CI)
	}
	// Room for the labels: at least 1 min and 1 kg.
	return renderLabelledCurve(w, format, p, xys, names, 1, 1, false)
}

// renderLabelledCurve draws xys joined by a line, each point labelled
// with its name, on p and renders it: axes from the points' range (and
// the origin when withOrigin) with room for the labels, 8 % of the range
// each side (at least minDX and minDY) and twice that after the last.
func renderLabelledCurve(w io.Writer, format string, p *plot.Plot, xys plotter.XYs, names []string, minDX, minDY float64, withOrigin bool) error {
	xlo, xhi, ylo, yhi := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	if withOrigin {
		xlo, xhi, ylo, yhi = 0, 0, 0, 0
	}
	for _, q := range xys {
		xlo, xhi = math.Min(xlo, q.X), math.Max(xhi, q.X)
		ylo, yhi = math.Min(ylo, q.Y), math.Max(yhi, q.Y)
	}
	if len(xys) > 1 {
		p.Add(line(xys, lineStyle(colGuide, 1.4, nil)))
	}
	p.Add(scatter(xys, draw.GlyphStyle{Color: colProfile, Radius: vg.Points(5), Shape: draw.CircleGlyph{}}))
	p.Add(labels(xys, names, textStyle(10, colInk, text.XLeft, text.YBottom), vg.Point{X: vg.Points(7), Y: vg.Points(5)}))
	dx := math.Max(minDX, 0.08*(xhi-xlo))
	dy := math.Max(minDY, 0.08*(yhi-ylo))
	p.X.Tick.Marker = niceTicks{N: 8}
	p.Y.Tick.Marker = niceTicks{N: 8}
	p.X.Min, p.X.Max = xlo-dx, xhi+2*dx
	p.Y.Min, p.Y.Max = ylo-dy, yhi+2*dy
	return render(w, format, func(dc draw.Canvas) {
		p.Draw(draw.Crop(dc, vg.Points(8), -vg.Points(16), vg.Points(6), -vg.Points(8)))
	})
}
