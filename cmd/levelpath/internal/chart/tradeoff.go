package chart

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// TradeoffPoint is the outcome of planning a schedule at one contrail
// cost (kg of fuel per NM): the extra fuel and the persistent-contrail
// distance avoided, each in percent of the sweep's reference (its lowest
// cost).
type TradeoffPoint struct {
	CostPerNM, ExtraFuelPct, AvoidedPct float64
}

// Tradeoff draws contrail distance avoided (%) against extra fuel (%) in
// format to w, one point per contrail cost labelled "n kg/NM", joined in
// order of cost; caution, when not empty, is printed under the title. The
// chart is 1200 x 700 px. It returns a FormatError for no points or a
// non-finite value, and an UnsupportedError for an unknown format.
func Tradeoff(w io.Writer, format string, pts []TradeoffPoint, caution string) error {
	if len(pts) == 0 {
		return FormatError("tradeoff: no points")
	}
	for i, s := range pts {
		if !finite(s.CostPerNM, s.ExtraFuelPct, s.AvoidedPct) {
			return FormatError(fmt.Sprintf("tradeoff: point %d: cost %g kg/NM, extra fuel %g %%, avoided %g %%: want finite values", i, s.CostPerNM, s.ExtraFuelPct, s.AvoidedPct))
		}
	}
	if err := checkFormat(format); err != nil {
		return err
	}
	sorted := append([]TradeoffPoint(nil), pts...)
	sort.SliceStable(sorted, func(i, j int) bool { return sorted[i].CostPerNM < sorted[j].CostPerNM })
	title := "Contrail cost sweep: persistent contrail distance avoided against extra fuel"
	if caution != "" {
		title += "\n" + strings.Replace(caution, "): ", "):\n", 1) // two lines fit the width
	}
	p := newPlot(title, "extra fuel (% of the lowest cost's)", "persistent contrail distance avoided (%)")
	p.Add(newGrid(true))
	xys := make(plotter.XYs, len(sorted))
	names := make([]string, len(sorted))
	xlo, xhi, ylo, yhi := 0.0, 0.0, 0.0, 0.0
	for i, s := range sorted {
		xys[i] = plotter.XY{X: s.ExtraFuelPct, Y: s.AvoidedPct}
		names[i] = fmt.Sprintf("%g kg/NM", s.CostPerNM)
		xlo, xhi = math.Min(xlo, s.ExtraFuelPct), math.Max(xhi, s.ExtraFuelPct)
		ylo, yhi = math.Min(ylo, s.AvoidedPct), math.Max(yhi, s.AvoidedPct)
	}
	if len(xys) > 1 {
		p.Add(line(xys, lineStyle(colGuide, 1.4, nil)))
	}
	p.Add(scatter(xys, draw.GlyphStyle{Color: colProfile, Radius: vg.Points(5), Shape: draw.CircleGlyph{}}))
	p.Add(labels(xys, names, textStyle(10, colInk, text.XLeft, text.YBottom), vg.Point{X: vg.Points(7), Y: vg.Points(5)}))
	dx := math.Max(0.05, 0.08*(xhi-xlo))
	dy := math.Max(1, 0.08*(yhi-ylo))
	p.X.Tick.Marker = niceTicks{N: 8}
	p.Y.Tick.Marker = niceTicks{N: 8}
	p.X.Min, p.X.Max = xlo-dx, xhi+2*dx
	p.Y.Min, p.Y.Max = ylo-dy, yhi+2*dy
	return render(w, format, func(dc draw.Canvas) {
		p.Draw(draw.Crop(dc, vg.Points(8), -vg.Points(16), vg.Points(6), -vg.Points(8)))
	})
}
