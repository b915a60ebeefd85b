package chart

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"levelpath/optimizer"
)

// violationRun is a run of violations of one limit on consecutive legs;
// first and last are indices into Plan.Legs, the numbers the CLI's leg
// table prints as "leg".
type violationRun struct {
	limit       optimizer.Limit
	first, last int
}

// where names the run's legs: "leg 4" or "legs 4-9".
func (r violationRun) where() string {
	if r.first == r.last {
		return fmt.Sprintf("leg %d", r.first)
	}
	return fmt.Sprintf("legs %d-%d", r.first, r.last)
}

// violationRuns merges the plan's violations of one limit on consecutive
// legs (in the order they are listed), so that the chart marks a stretch
// of route once. Violations naming no leg of the plan (out of range) are
// put on the nearest leg, so that none is left unmarked. Cost O(n) in the
// number of violations.
func violationRuns(pl *optimizer.Plan) []violationRun {
	var out []violationRun
	open := map[optimizer.Limit]int{} // limit -> index in out of its latest run
	for _, v := range pl.Violations {
		i := min(max(v.Leg, 0), len(pl.Legs)-1)
		if k, ok := open[v.Limit]; ok && i >= out[k].first && i <= out[k].last+1 {
			out[k].last = max(out[k].last, i)
			continue
		}
		open[v.Limit] = len(out)
		out = append(out, violationRun{limit: v.Limit, first: i, last: i})
	}
	return out
}

// raisedFloors returns the distinct leg floors above the plan's own floor
// (those the turbulence rule raised), ascending.
func raisedFloors(pl *optimizer.Plan) []float64 {
	seen := map[string]bool{}
	var out []float64
	for _, l := range pl.Legs {
		if finite(l.Floor) && l.Floor > pl.Floor+5e-4 {
			k := fmt.Sprintf("%.2f", l.Floor)
			if !seen[k] {
				seen[k] = true
				out = append(out, l.Floor)
			}
		}
	}
	sort.Float64s(out)
	return out
}

// floorText describes the protection floor as it applied: "1.30 g", or
// "1.30 g (1.50 g in turbulence)" when the turbulence rule raised it on
// some legs; with inner set (for use inside parentheses) "1.30 g, 1.50 g
// in turbulence".
func floorText(pl *optimizer.Plan, inner bool) string {
	s := fmt.Sprintf("%.2f g", pl.Floor)
	if up := raisedFloors(pl); len(up) > 0 {
		parts := make([]string, len(up))
		for i, f := range up {
			parts[i] = fmt.Sprintf("%.2f g", f)
		}
		if inner {
			s += fmt.Sprintf(", %s in turbulence", strings.Join(parts, " / "))
		} else {
			s += fmt.Sprintf(" (%s in turbulence)", strings.Join(parts, " / "))
		}
	}
	return s
}

// leastAboveFloor returns the least buffet margin above the leg's own
// floor (margin - leg.Floor) over the legs that have a margin, and that
// leg's index; at is -1 when no leg has one. A value within the search's
// tolerance under zero (-5e-4 g) is reported as 0.
func leastAboveFloor(pl *optimizer.Plan) (least float64, at int) {
	least, at = math.Inf(1), -1
	for i, l := range pl.Legs {
		if finite(l.BuffetMargin, l.Floor) && l.BuffetMargin-l.Floor < least {
			least, at = l.BuffetMargin-l.Floor, i
		}
	}
	if least < 0 && least > -5e-4 {
		least = 0
	}
	return least, at
}

// colViolation marks broken limits on the charts.
var colViolation = rgb(0xb7, 0x1c, 0x1c)

// boldCross is an "×" glyph drawn with strokes twice as wide as
// draw.CrossGlyph's, to read at a glance among the series.
type boldCross struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (boldCross) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(2)})
	r := sty.Radius
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r})
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y - r})
	c.Stroke(p)
}
