package chart

import (
	"levelpath/perf"

	"fmt"
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// legendBox is a plot.Legend drawn on an opaque box inside the data area.
// AX and AY place it: the box's point at relative position (AX, AY) (0 =
// left/bottom, 1 = right/top) lies at the same relative position of the
// data area, so (0, 1) is the top-left corner and (0.5, 0) bottom centre.
type legendBox struct {
	plot.Legend
	AX, AY float64
}

// newLegendBox moves p's legend entries into a legendBox, leaving p's own
// legend empty so that they are drawn once.
func newLegendBox(p *plot.Plot, ax, ay float64) *legendBox {
	b := &legendBox{Legend: p.Legend, AX: ax, AY: ay}
	p.Legend = plot.NewLegend()
	return b
}

// Plot implements plot.Plotter.
func (b *legendBox) Plot(c draw.Canvas, _ *plot.Plot) {
	r := b.Legend.Rectangle(c)
	w, h := r.Size().X, r.Size().Y
	pad := vg.Points(5)
	bw, bh := w+2*pad, h+2*pad
	x0 := c.Min.X + (c.Max.X-c.Min.X-bw)*vg.Length(b.AX)
	y0 := c.Min.Y + (c.Max.Y-c.Min.Y-bh)*vg.Length(b.AY)
	box := vg.Rectangle{Min: vg.Point{X: x0, Y: y0}, Max: vg.Point{X: x0 + bw, Y: y0 + bh}}
	c.SetColor(color.NRGBA{R: 0xff, G: 0xff, B: 0xff, A: 0xee})
	c.Fill(box.Path())
	c.SetLineStyle(lineStyle(colGuide, 0.8, nil))
	c.Stroke(box.Path())
	l := b.Legend
	l.Left, l.Top = true, true
	l.XOffs, l.YOffs = 0, 0
	l.Draw(draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
		Min: vg.Point{X: x0 + pad, Y: y0 + pad}, Max: vg.Point{X: x0 + pad + w, Y: y0 + pad + h}}})
}

// legendRow is a one-line legend drawn just above the data area, left to
// right from its left edge, for short panels where a boxed legend would
// hide data.
type legendRow struct {
	Names  []string
	Thumbs []plot.Thumbnailer
	Text   text.Style
}

func (r *legendRow) Add(name string, t plot.Thumbnailer) {
	r.Names = append(r.Names, name)
	r.Thumbs = append(r.Thumbs, t)
}

// Plot implements plot.Plotter.
func (r *legendRow) Plot(c draw.Canvas, _ *plot.Plot) {
	h := r.Text.Rectangle("Mg").Size().Y
	x := c.Min.X
	y := c.Max.Y + vg.Points(3)
	thumbW := vg.Points(26)
	for i, name := range r.Names {
		icon := &draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + thumbW, Y: y + h}}}
		r.Thumbs[i].Thumbnail(icon)
		x += thumbW + vg.Points(4)
		c.FillText(r.Text, vg.Point{X: x, Y: y + h/2}, name)
		x += r.Text.Rectangle(name).Size().X + vg.Points(18)
	}
}

// hLines draws full-width horizontal guides at the given Y values, each
// labelled just right of the data area, without widening the axis range.
type hLines struct {
	Ys     []float64
	Labels []string // beside each guide; "" for none
	Style  draw.LineStyle
	Text   text.Style
}

// Plot implements plot.Plotter.
func (h *hLines) Plot(c draw.Canvas, p *plot.Plot) {
	_, ty := p.Transforms(&c)
	for i, v := range h.Ys {
		if v < p.Y.Min || v > p.Y.Max {
			continue
		}
		y := ty(v)
		c.StrokeLine2(h.Style, c.Min.X, y, c.Max.X, y)
		if i < len(h.Labels) && h.Labels[i] != "" {
			c.FillText(h.Text, vg.Point{X: c.Max.X + vg.Points(4), Y: y}, h.Labels[i])
		}
	}
}

// Thumbnail implements plot.Thumbnailer.
func (h *hLines) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(h.Style, c.Min.X, y, c.Max.X, y)
}

// triangle is a filled triangle glyph (draw.TriangleGlyph is only
// outlined) pointing up for step climbs, or down when Down is set, for
// step descents.
type triangle struct{ Down bool }

// DrawGlyph implements draw.GlyphDrawer.
func (t triangle) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(0.5)})
	r := sty.Radius
	if t.Down {
		r = -r
	}
	var p vg.Path
	p.Move(vg.Point{X: pt.X, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X - sty.Radius*0.866, Y: pt.Y - r/2})
	p.Line(vg.Point{X: pt.X + sty.Radius*0.866, Y: pt.Y - r/2})
	p.Close()
	c.Fill(p)
}

// line returns a plotter.Line through xys in style s.
func line(xys plotter.XYs, s draw.LineStyle) *plotter.Line {
	return &plotter.Line{XYs: xys, LineStyle: s}
}

// scatter returns a plotter.Scatter of xys with glyph g.
func scatter(xys plotter.XYs, g draw.GlyphStyle) *plotter.Scatter {
	return &plotter.Scatter{XYs: xys, GlyphStyle: g}
}

// labels returns a plotter.Labels at xys with one style and an offset.
func labels(xys plotter.XYs, strs []string, sty text.Style, off vg.Point) *plotter.Labels {
	styles := make([]text.Style, len(strs))
	for i := range styles {
		styles[i] = sty
	}
	return &plotter.Labels{XYs: xys, Labels: strs, TextStyle: styles, Offset: off}
}

// flName formats a flight level as "FL370".
// flName prints a level by the one rounding rule, down to the whole FL.
func flName(fl float64) string { return fmt.Sprintf("FL%03.0f", perf.ReportFL(fl)) }

// placedLabels draws a label under each point (above it when Above is
// set), Gap below (above) it and starting just right of it (the side a
// climbing profile leaves free), kept inside the data area. A label that would overlap one already drawn
// moves down a line at a time, up to Rows lines; one that still overlaps
// is left out (its point stays marked), so dense steps do not turn into
// an unreadable heap. Cost O(n²) in the number of labels.
type placedLabels struct {
	XYs    plotter.XYs
	Labels []string
	Text   text.Style // XAlign and YAlign are overridden
	Gap    vg.Length
	Rows   int
	Above  bool
}

// Plot implements plot.Plotter.
func (l *placedLabels) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	sty := l.Text
	sty.XAlign, sty.YAlign = text.XLeft, text.YBottom
	lineH := sty.Rectangle("Mg").Size().Y
	var placed []vg.Rectangle
	for i, xy := range l.XYs {
		if i >= len(l.Labels) {
			break
		}
		w := sty.Rectangle(l.Labels[i]).Size().X
		x := tx(xy.X) + vg.Points(2)
		x = max(c.Min.X, min(x, c.Max.X-w))
		for row := 0; row < max(1, l.Rows); row++ {
			y := ty(xy.Y) - l.Gap - lineH*vg.Length(row+1)
			if l.Above {
				y = ty(xy.Y) + l.Gap + lineH*vg.Length(row)
			}
			y = max(c.Min.Y, min(y, c.Max.Y-lineH))
			r := vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + w, Y: y + lineH}}
			clash := false
			for _, q := range placed {
				if r.Min.X < q.Max.X+vg.Points(3) && q.Min.X < r.Max.X+vg.Points(3) && r.Min.Y < q.Max.Y && q.Min.Y < r.Max.Y {
					clash = true
					break
				}
			}
			if !clash {
				placed = append(placed, r)
				c.FillText(sty, r.Min, l.Labels[i])
				break
			}
		}
	}
}
