// Package chart draws levelpath's charts (the vertical profile of a plan,
// the cruise envelope, a cost-index sweep) with gonum.org/v1/plot and
// writes the self-contained HTML flight report.
//
// Every chart is 1200 x 700 px: 900 x 525 pt, i.e. 12.5 x 7.29 in at
// 96 dpi. Formats are "svg", "png" (rendered at 96 dpi, so exactly
// 1200 x 700 pixels) and "pdf". Inputs are in the optimizer's and perf's SI
// units; the charts show trade units (NM, kt, FL, min, kg, g).
package chart

import (
	"fmt"
	"image/color"
	"io"
	"levelpath/optimizer/batch"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"

	"levelpath/perf"
)

// Unit conversions at the edge, perf's exact definitions (1 NM = 1852 m,
// 1 kt = 1 NM/h).
const (
	mPerNM  = perf.NMToM
	msPerKt = perf.KtToMS
)

// Chart size: 1200 x 700 px at 96 dpi.
const (
	WidthPx  = 1200
	HeightPx = 700
	DPI      = 96
)

var (
	chartW = vg.Length(WidthPx) * vg.Inch / DPI
	chartH = vg.Length(HeightPx) * vg.Inch / DPI
)

// FormatError reports input that cannot be drawn (a nil plan, no legs, a
// non-finite distance, an empty envelope, ...), in the style of image/png.
type FormatError string

func (e FormatError) Error() string { return "chart: invalid input: " + string(e) }

// UnsupportedError reports a request that is valid but not supported: an
// output format with no canvas, in the style of image/png.
type UnsupportedError string

func (e UnsupportedError) Error() string { return "chart: unsupported: " + string(e) }

// FormatOf returns the chart format named by path's extension, compared
// without regard to case: "svg", "png" or "pdf". Any other extension gives
// an UnsupportedError naming the file.
func FormatOf(path string) (string, error) {
	ext := strings.ToLower(filepath.Ext(path))
	switch ext {
	case ".svg", ".png", ".pdf":
		return ext[1:], nil
	}
	if ext == "" {
		return "", UnsupportedError(fmt.Sprintf("%s: no file extension; want .svg, .png or .pdf", path))
	}
	return "", UnsupportedError(fmt.Sprintf("%s: format %q not supported; want .svg, .png or .pdf", path, ext))
}

// WriteFile renders with draw into path in the format its extension names
// (see FormatOf). It writes a temporary file in path's directory and
// renames it over path only when draw and every write succeeded, so a
// reader never sees a half-written chart; on failure the temporary file is
// removed and path is left as it was. Errors name the file.
func WriteFile(path string, draw func(w io.Writer, format string) error) (err error) {
	format, err := FormatOf(path)
	if err != nil {
		return err
	}
	return writeAtomic(path, format, draw)
}

// WriteReportFile writes the HTML flight report (see Report) to path, which
// must end in .html or .htm, atomically like WriteFile.
func WriteReportFile(path string, in ProfileInput) error {
	if err := CheckReportPath(path); err != nil {
		return err
	}
	return writeAtomic(path, "html", func(w io.Writer, _ string) error { return Report(w, in) })
}

// CheckReportPath reports whether path names an HTML file (.html or
// .htm), as WriteReportFile requires.
func CheckReportPath(path string) error {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".html", ".htm":
		return nil
	}
	return UnsupportedError(fmt.Sprintf("%s: a report is HTML; name the file .html", path))
}

// writeAtomic draws into path with batch.WriteFileAtomic (synced, renamed
// into place, never torn).
func writeAtomic(path, format string, draw func(w io.Writer, format string) error) error {
	if err := batch.WriteFileAtomic(path, func(w io.Writer) error { return draw(w, format) }); err != nil {
		return fmt.Errorf("chart: %w", err)
	}
	return nil
}

// checkFormat returns an UnsupportedError unless format is "svg", "png" or
// "pdf". It allocates nothing, so the drawing functions can reject a bad
// format before building their plots.
func checkFormat(format string) error {
	switch format {
	case "svg", "png", "pdf":
		return nil
	}
	return unsupportedFormat(format)
}

func unsupportedFormat(format string) error {
	return UnsupportedError(fmt.Sprintf("format %q; want svg, png or pdf", format))
}

// newCanvas returns a chart-sized canvas for format (see checkFormat).
func newCanvas(format string) (vg.CanvasWriterTo, error) {
	switch format {
	case "svg":
		return vgsvg.New(chartW, chartH), nil
	case "png":
		return vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(chartW, chartH), vgimg.UseDPI(DPI),
			vgimg.UseBackgroundColor(color.White))}, nil
	case "pdf":
		return vgpdf.New(chartW, chartH), nil
	}
	return nil, unsupportedFormat(format)
}

// render draws fn on a fresh canvas for format and writes it to w. A panic
// inside the plotting library (its canvases panic on some font and path
// errors) is returned as an error rather than passed on.
func render(w io.Writer, format string, fn func(dc draw.Canvas)) (err error) {
	c, err := newCanvas(format)
	if err != nil {
		return err
	}
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("chart: drawing %s: %v", format, r)
		}
	}()
	dc := draw.New(c)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	fn(dc)
	_, err = c.WriteTo(w)
	return err
}

// The palette: ink for text and axes, one hue per quantity.
var (
	colInk     = rgb(0x26, 0x2b, 0x33)
	colGrid    = rgb(0xe3, 0xe6, 0xea)
	colGuide   = rgb(0xc9, 0xd1, 0xdb)
	colProfile = rgb(0x0b, 0x4f, 0x8a) // deep blue
	colStep    = rgb(0xe0, 0x8a, 0x00) // amber
	stepText   = rgb(0x9a, 0x5b, 0x00) // darker amber, readable on white
	colBuffet  = rgb(0xc6, 0x28, 0x28) // red
	colThrust  = rgb(0x6a, 0x3d, 0x9a) // violet
	colWind    = rgb(0x00, 0x83, 0x8f) // teal
	colMargin  = rgb(0x2e, 0x7d, 0x32) // green
	colMMO     = rgb(0x55, 0x55, 0x55)
	colOptimum = rgb(0x2e, 0x7d, 0x32)
	colCorner  = rgb(0x11, 0x11, 0x11)
)

func rgb(r, g, b uint8) color.Color { return color.NRGBA{R: r, G: g, B: b, A: 0xff} }

var (
	dashed  = []vg.Length{vg.Points(6), vg.Points(3)}
	dotted  = []vg.Length{vg.Points(1.5), vg.Points(2.5)}
	dashDot = []vg.Length{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)}
)

func sans(size vg.Length) font.Font {
	return font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
}

// newPlot returns a plot in the package's look: sans-serif text, light
// grid, no top padding beyond the title.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = sans(15) // regular: vgpdf v0.17 fails on bold faces
	p.Title.TextStyle.Color = colInk
	p.Title.Padding = vg.Points(6)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = sans(11)
		ax.Label.TextStyle.Color = colInk
		ax.Tick.Label.Font = sans(10)
		ax.Tick.Label.Color = colInk
		ax.Color = colInk
		ax.Tick.Color = colInk
		ax.Padding = vg.Points(2)
	}
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.Legend.TextStyle.Font = sans(10)
	p.Legend.TextStyle.Color = colInk
	p.Legend.ThumbnailWidth = vg.Points(26)
	p.Legend.Padding = vg.Points(1.5)
	return p
}

// newGrid returns the package's light grid: vertical lines always,
// horizontal lines too when horizontal is set.
func newGrid(horizontal bool) *plotter.Grid {
	g := plotter.NewGrid()
	g.Vertical = lineStyle(colGrid, 0.6, nil)
	if horizontal {
		g.Horizontal = lineStyle(colGrid, 0.6, nil)
	} else {
		g.Horizontal.Width = 0
	}
	return g
}

// textStyle returns a label style in the package's look.
func textStyle(size vg.Length, c color.Color, xa text.XAlignment, ya text.YAlignment) text.Style {
	return text.Style{Color: c, Font: sans(size), XAlign: xa, YAlign: ya, Handler: plot.DefaultTextHandler}
}

// lineStyle returns a stroke of width pt points.
func lineStyle(c color.Color, pt float64, dashes []vg.Length) draw.LineStyle {
	return draw.LineStyle{Color: c, Width: vg.Points(pt), Dashes: dashes}
}

// stack draws plots one above the other in dc with the given relative
// heights, aligning their data areas horizontally in the manner of
// plot.Align (which only tiles evenly): each plot's canvas is narrowed so
// that every data area spans the same x range. gap is the vertical space
// between neighbours.
func stack(dc draw.Canvas, plots []*plot.Plot, weights []float64, gap vg.Length) {
	var left, right vg.Length
	pads := make([][2]vg.Length, len(plots))
	for i, p := range plots {
		da := p.DataCanvas(dc)
		pads[i] = [2]vg.Length{da.Min.X - dc.Min.X, dc.Max.X - da.Max.X}
		left = max(left, pads[i][0])
		right = max(right, pads[i][1])
	}
	var total float64
	for _, w := range weights {
		total += w
	}
	h := dc.Max.Y - dc.Min.Y - gap*vg.Length(len(plots)-1)
	top := dc.Max.Y
	for i, p := range plots {
		ph := h * vg.Length(weights[i]/total)
		c := dc
		c.Min.X = dc.Min.X + left - pads[i][0]
		c.Max.X = dc.Max.X - (right - pads[i][1])
		c.Max.Y = top
		c.Min.Y = top - ph
		p.Draw(c)
		top -= ph + gap
	}
}

// finite reports whether every x is neither NaN nor infinite.
func finite(xs ...float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// blankLabels is a plot.Ticker that keeps the ticks of T but drops their
// labels, for the x axes of the upper panels of a stack.
type blankLabels struct{ T plot.Ticker }

func (b blankLabels) Ticks(min, max float64) []plot.Tick {
	ts := b.T.Ticks(min, max)
	for i := range ts {
		ts[i].Label = ""
	}
	return ts
}

// flTicks labels flight levels every step FL ("FL350"), with minor ticks
// every 10 FL.
type flTicks struct{ step float64 }

func (f flTicks) Ticks(min, max float64) []plot.Tick {
	var ts []plot.Tick
	for v := math.Ceil(min/10) * 10; v <= max+1e-9; v += 10 {
		t := plot.Tick{Value: v}
		if math.Mod(v, f.step) == 0 {
			t.Label = fmt.Sprintf("FL%03.0f", v)
		}
		ts = append(ts, t)
	}
	return ts
}

// color4 returns c with alpha a (non-premultiplied).
func color4(c color.Color, a uint8) color.Color {
	n := color.NRGBAModel.Convert(c).(color.NRGBA)
	n.A = a
	return n
}

// niceTicks marks round values (1, 2 or 5 x 10^k apart) aiming at about N
// labelled ticks, with four unlabelled minor ticks between neighbours
// where they fit, labelled without trailing zeros.
type niceTicks struct{ N int }

func (n niceTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) || !finite(min, max) {
		return nil
	}
	target := float64(n.N)
	if target < 2 {
		target = 6
	}
	raw := (max - min) / target
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	minor := step / 5
	if step == 2*mag {
		minor = step / 4
	}
	dec := 0
	if l := math.Floor(math.Log10(step) + 1e-9); l < 0 {
		dec = int(-l)
	}
	var ts []plot.Tick
	for k := math.Ceil(min / minor); k*minor <= max+1e-9*step; k++ {
		v := k * minor
		t := plot.Tick{Value: v}
		if r := v / step; math.Abs(r-math.Round(r)) < 1e-6 {
			t.Label = strconv.FormatFloat(math.Round(r)*step, 'f', dec, 64)
		}
		ts = append(ts, t)
	}
	return ts
}
