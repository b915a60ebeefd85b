package chart

import (
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"levelpath/perf"
)

// Envelope draws the cruise envelope e in format to w: flight level
// against Mach with the low- and high-speed buffet-onset boundaries at 1 g
// and at the protection floor (each drawn as one curve up the low-speed
// side and down the high-speed side, the band at the floor tinted), the
// long-range cruise Mach, the MMO line, the coffin corner at the floor
// (see coffinCorner) and horizontal lines at the maximum level (MaxFL,
// named after the limit that sets it) and the optimum level (OptimumFL);
// NaN values are left out. The chart is 1200 x 700 px.
//
// It returns a FormatError for an envelope with no rows or a row with a
// non-finite level, and an UnsupportedError for an unknown format.
func Envelope(w io.Writer, format string, e perf.Envelope) error {
	if len(e.Rows) == 0 {
		return FormatError(fmt.Sprintf("envelope %q: no rows", e.Aircraft))
	}
	for i, r := range e.Rows {
		if !finite(r.FL) {
			return FormatError(fmt.Sprintf("envelope %q: row %d: non-finite level %g", e.Aircraft, i, r.FL))
		}
		if i > 0 && r.FL <= e.Rows[i-1].FL {
			return FormatError(fmt.Sprintf("envelope %q: row %d: level FL%g does not increase", e.Aircraft, i, r.FL))
		}
	}
	if err := checkFormat(format); err != nil {
		return err
	}
	p := newPlot(fmt.Sprintf("Cruise envelope: %s, %.0f kg, ISA%+.0f °C, buffet floor %.2f g", e.Aircraft, e.Mass, e.ISADev, e.Floor),
		"Mach", "flight level")
	p.Add(newGrid(true))

	xlo, xhi := math.Inf(1), math.Inf(-1)
	widen := func(xs ...float64) {
		for _, x := range xs {
			if finite(x) {
				xlo, xhi = math.Min(xlo, x), math.Max(xhi, x)
			}
		}
	}
	// band returns the boundary curves of a buffet band, up the low-speed
	// side and down the high-speed side of each run of rows with a band
	// (the topmost run through its apex when the band closes; as two
	// curves when it is still open at the top row), and the closed areas.
	band := func(lo, hi func(perf.EnvelopeRow) float64) (out, areas []plotter.XYs) {
		var l, h plotter.XYs
		m, f, ok := bandApex(e.Rows, func(r perf.EnvelopeRow) (float64, float64) { return lo(r), hi(r) })
		topFL := math.NaN() // the level of the highest row with a band
		for _, r := range e.Rows {
			if a, b := lo(r), hi(r); finite(a, b) && b >= a {
				topFL = r.FL
			}
		}
		flush := func() {
			if len(l) > 0 {
				run := append(plotter.XYs{}, l...)
				split := false
				if ok && l[len(l)-1].Y == topFL && f > topFL {
					run = append(run, plotter.XY{X: m, Y: f})
				} else if l[len(l)-1].Y == e.Rows[len(e.Rows)-1].FL {
					split = true
				}
				area := append(plotter.XYs{}, run...)
				if split {
					out = append(out, run)
					run = nil
				}
				for i := len(h) - 1; i >= 0; i-- {
					run = append(run, h[i])
					area = append(area, h[i])
				}
				out = append(out, run)
				areas = append(areas, area)
			}
			l, h = nil, nil
		}
		for _, r := range e.Rows {
			a, b := lo(r), hi(r)
			if !finite(a, b) {
				flush()
				continue
			}
			widen(a, b)
			l = append(l, plotter.XY{X: a, Y: r.FL})
			h = append(h, plotter.XY{X: b, Y: r.FL})
		}
		flush()
		return out, areas
	}
	oneG, _ := band(func(r perf.EnvelopeRow) float64 { return r.LowBuffet1g }, func(r perf.EnvelopeRow) float64 { return r.HighBuffet1g })
	atFloor, floorAreas := band(func(r perf.EnvelopeRow) float64 { return r.LowBuffetFloor }, func(r perf.EnvelopeRow) float64 { return r.HighBuffetFloor })
	for _, run := range floorAreas {
		if len(run) >= 3 {
			if poly, err := plotter.NewPolygon(run); err == nil {
				poly.Color = color4(colMargin, 0x22)
				poly.LineStyle.Width = 0
				p.Add(poly)
			}
		}
	}
	for i, run := range oneG {
		l := line(run, lineStyle(colBuffet, 2.2, nil))
		p.Add(l)
		if i == 0 {
			p.Legend.Add("buffet onset at 1 g", l)
		}
	}
	for i, run := range atFloor {
		l := line(run, lineStyle(colBuffet, 1.8, dashed))
		p.Add(l)
		if i == 0 {
			p.Legend.Add(fmt.Sprintf("buffet onset at %.2f g (floor)", e.Floor), l)
		}
	}
	var lrc, mmo plotter.XYs
	mmoConst := true
	for _, r := range e.Rows {
		if finite(r.LRCMach) {
			lrc = append(lrc, plotter.XY{X: r.LRCMach, Y: r.FL})
			widen(r.LRCMach)
		}
		if finite(r.MMO) {
			if len(mmo) > 0 && r.MMO != mmo[0].X {
				mmoConst = false
			}
			mmo = append(mmo, plotter.XY{X: r.MMO, Y: r.FL})
			widen(r.MMO)
		}
	}
	if len(lrc) > 1 {
		l := line(lrc, lineStyle(colProfile, 1.8, dotted))
		p.Add(l)
		p.Legend.Add("long-range cruise Mach", l)
	}
	if len(mmo) > 1 {
		l := line(mmo, lineStyle(colMMO, 2, dashDot))
		p.Add(l)
		name := "MMO"
		if mmoConst {
			name = fmt.Sprintf("MMO %.2f", mmo[0].X)
		}
		p.Legend.Add(name, l)
	}
	ylo, yhi := e.Rows[0].FL, e.Rows[len(e.Rows)-1].FL
	if !finite(xlo, xhi) {
		xlo, xhi = 0.4, 0.9
	}
	xlo = math.Floor((xlo-0.03)*20) / 20
	xhi = math.Ceil((xhi+0.03)*20) / 20
	p.X.Min, p.X.Max = xlo, xhi
	p.Y.Min, p.Y.Max = ylo, yhi+10
	p.Y.Tick.Marker = flTicks{step: 50}

	if m, fl, ok := coffinCorner(e.Rows); ok {
		pt := plotter.XYs{{X: m, Y: fl}}
		s := scatter(pt, draw.GlyphStyle{Color: colCorner, Radius: vg.Points(5), Shape: draw.CircleGlyph{}})
		p.Add(s)
		p.Add(labels(pt, []string{fmt.Sprintf("%s, M%.3f", flName(fl), m)}, textStyle(9, colCorner, text.XCenter, text.YBottom), vg.Point{Y: vg.Points(8)}))
		p.Legend.Add(fmt.Sprintf("coffin corner at %.2f g", e.Floor), s)
	}
	if finite(e.MaxFL) {
		h := &hLines{Ys: []float64{e.MaxFL}, Labels: []string{flName(e.MaxFL)}, Style: lineStyle(colInk, 1.4, nil),
			Text: textStyle(9, colInk, text.XLeft, text.YCenter)}
		p.Add(h)
		p.Legend.Add(fmt.Sprintf("max level %s (%s)", flName(e.MaxFL), maxFLReason(e)), h)
	}
	if finite(e.OptimumFL) {
		h := &hLines{Ys: []float64{e.OptimumFL}, Labels: []string{flName(e.OptimumFL)}, Style: lineStyle(colOptimum, 1.4, dashed),
			Text: textStyle(9, colOptimum, text.XLeft, text.YCenter)}
		p.Add(h)
		p.Legend.Add(fmt.Sprintf("optimum level %s", flName(e.OptimumFL)), h)
	}
	p.X.Tick.Marker = niceTicks{N: 10}
	leg := newLegendBox(p, 0, 1)
	return render(w, format, func(dc draw.Canvas) {
		legW := vg.Points(230)
		pc := draw.Crop(dc, vg.Points(8), -(legW + vg.Points(40)), vg.Points(6), -vg.Points(8))
		p.Draw(pc)
		side := p.DataCanvas(pc)
		side.Min.X, side.Max.X = dc.Max.X-legW-vg.Points(4), dc.Max.X-vg.Points(4)
		leg.Plot(side, p)
	})
}

// maxFLReason names the limit that sets e.MaxFL.
func maxFLReason(e perf.Envelope) string {
	switch {
	case e.MaxFL == e.MaxFLThrust:
		return "thrust limit"
	case e.MaxFL == e.MaxFLBuffet:
		return "buffet limit"
	case e.MaxFL == e.MaxFLCertified:
		return "certified ceiling"
	}
	return "least limit"
}

// coffinCorner returns where the buffet-free band at the floor closes
// (see bandApex), from the low- and high-speed floor boundaries.
func coffinCorner(rows []perf.EnvelopeRow) (mach, fl float64, ok bool) {
	return bandApex(rows, func(r perf.EnvelopeRow) (float64, float64) { return r.LowBuffetFloor, r.HighBuffetFloor })
}

// bandApex returns the level and Mach where a buffet band closes. At the
// highest row i with a finite band, if row i+1 exists (band closed) and
// row i-1 has a band too, the closing level is extrapolated from rows i-1
// and i: the two buffet Machs are the roots of CL_buffet(M) = CL(M, n),
// which merge in a double root as the level rises, so near the closure the
// band width w goes as the square root of the distance to it and w² is
// close to linear in level. The level where that line of w² reaches zero,
// limited to [FL_i, FL_i+1], is the apex, and its Mach is the band centre
// extrapolated linearly. Otherwise (the band open at the top row, or a
// single-row band) the apex is the centre of row i. ok is false when no
// row has a band. Cost O(len(rows)). This extrapolation is our method.
func bandApex(rows []perf.EnvelopeRow, band func(perf.EnvelopeRow) (lo, hi float64)) (mach, fl float64, ok bool) {
	i := -1
	for k, r := range rows {
		if lo, hi := band(r); finite(lo, hi) && hi >= lo {
			i = k
		}
	}
	if i < 0 {
		return 0, 0, false
	}
	lo, hi := band(rows[i])
	c, w := (lo+hi)/2, hi-lo
	if i == len(rows)-1 || i == 0 {
		return c, rows[i].FL, true
	}
	qlo, qhi := band(rows[i-1])
	if !finite(qlo, qhi) || qhi < qlo {
		return c, rows[i].FL, true
	}
	dfl := rows[i].FL - rows[i-1].FL
	qc, qw := (qlo+qhi)/2, qhi-qlo
	f := rows[i+1].FL
	if d := qw*qw - w*w; d > 0 {
		f = math.Min(f, rows[i].FL+w*w/d*dfl)
	}
	return c + (c-qc)/dfl*(f-rows[i].FL), f, true
}
