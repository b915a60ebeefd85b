package chart

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"

	"levelpath/optimizer"
)

// colBand is the fill of the ensemble's P10-P90 band (the fuel hue,
// translucent).
var colBand = color.NRGBA{R: 0xe0, G: 0x8a, B: 0x00, A: 0x50}

// fuelPanel is the profile chart's fourth panel for a plan against an
// ensemble (nil otherwise): the members' P10-P90 band of fuel remaining
// (fuel on board less fuel used, when the plan knows the fuel on board;
// else of fuel used) shaded, and the control member's, both as the
// difference from the members' median at each point (kg), since the
// spread is a few per cent of the fuel. Linear in the waypoints.
func fuelPanel(pl *optimizer.Plan, xmax float64) *plot.Plot {
	e := pl.Ensemble
	if e == nil || len(e.FuelBand) < 2 || len(pl.Waypoints) != len(e.FuelBand) {
		return nil
	}
	sign, what := 1.0, "fuel used"
	if w := pl.Waypoints[0]; finite(w.FuelRemaining) {
		sign, what = -1, "fuel remaining" // remaining = on board - used
	}
	p := newPlot("", "distance from departure (NM)", "fuel (kg)") // a longer label would not fit the panel's height
	leg := &legendRow{Text: textStyle(10, colInk, text.XLeft, text.YCenter)}
	p.Add(newGrid(true))
	var lo, hi, ctrl plotter.XYs
	for i, b := range e.FuelBand {
		u, w := b.Used, pl.Waypoints[i]
		if !finite(u.P10, u.P50, u.P90, w.FuelUsed) {
			continue
		}
		x := b.Dist / mPerNM
		a, c := sign*(u.P10-u.P50), sign*(u.P90-u.P50)
		lo = append(lo, plotter.XY{X: x, Y: math.Min(a, c)})
		hi = append(hi, plotter.XY{X: x, Y: math.Max(a, c)})
		ctrl = append(ctrl, plotter.XY{X: x, Y: sign * (w.FuelUsed - u.P50)})
	}
	if len(lo) < 2 {
		return nil
	}
	ring := append(plotter.XYs(nil), lo...)
	for i := len(hi) - 1; i >= 0; i-- {
		ring = append(ring, hi[i])
	}
	band, err := plotter.NewPolygon(ring)
	if err != nil {
		return nil
	}
	band.Color = colBand
	band.LineStyle.Width = 0
	p.Add(band)
	leg.Add("members' P10-P90 "+what+", less their median", band)
	ymin, ymax := 0.0, 0.0
	for _, xy := range append(append(append(plotter.XYs(nil), lo...), hi...), ctrl...) {
		ymin, ymax = math.Min(ymin, xy.Y), math.Max(ymax, xy.Y)
	}
	l := line(ctrl, lineStyle(colStep, 2, nil))
	p.Add(l)
	leg.Add("control member's, less the median", l)
	pad := math.Max(20, 0.25*(ymax-ymin)) // room for the legend row
	p.X.Min, p.X.Max = 0, xmax
	p.X.Tick.Marker = niceTicks{N: 10}
	p.Y.Min, p.Y.Max = math.Floor((ymin-pad)/100)*100, math.Ceil((ymax+pad)/100)*100
	p.Add(leg)
	return p
}
