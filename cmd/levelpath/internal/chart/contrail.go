package chart

import (
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"levelpath/optimizer"
)

// colContrail shades persistent-contrail conditions: a light violet that
// stays readable under the profile's blue and the limits' dashes.
var colContrail = color.NRGBA{R: 0x9c, G: 0x6a, B: 0xd6, A: 0x55}

// cellShade draws contrail cells as filled rectangles in data
// coordinates; it is also its own legend thumbnail.
type cellShade struct {
	cells []optimizer.ContrailCell
}

func contrailShade(cells []optimizer.ContrailCell) *cellShade {
	if len(cells) == 0 {
		return nil
	}
	return &cellShade{cells: cells}
}

// Plot implements plot.Plotter.
func (c *cellShade) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	for _, cell := range c.cells {
		x0, x1 := tx(cell.FromDist/mPerNM), tx(cell.ToDist/mPerNM)
		y0, y1 := ty(float64(cell.FL)-5), ty(float64(cell.FL)+5)
		pts := []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}
		dc.FillPolygon(colContrail, dc.ClipPolygonXY(pts))
	}
}

// Thumbnail implements plot.Thumbnailer.
func (c *cellShade) Thumbnail(dc *draw.Canvas) {
	pts := []vg.Point{{X: dc.Min.X, Y: dc.Min.Y}, {X: dc.Max.X, Y: dc.Min.Y}, {X: dc.Max.X, Y: dc.Max.Y}, {X: dc.Min.X, Y: dc.Max.Y}}
	dc.FillPolygon(colContrail, pts)
}
