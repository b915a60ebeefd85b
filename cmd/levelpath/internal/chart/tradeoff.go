package chart

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"gonum.org/v1/plot/plotter"
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
	for i, s := range sorted {
		xys[i] = plotter.XY{X: s.ExtraFuelPct, Y: s.AvoidedPct}
		names[i] = fmt.Sprintf("%g kg/NM", s.CostPerNM)
	}
	return renderLabelledCurve(w, format, p, xys, names, 0.05, 1, true)
}
