package chart

import (
	"bytes"
	"encoding/xml"
	"errors"
	"image"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"levelpath/optimizer"
)

// keep writes b to $LEVELPATH_CHART_DIR/name when that variable is set, so
// that a person can look at the charts the tests drew.
func keep(t *testing.T, name string, b []byte) {
	t.Helper()
	if dir := os.Getenv("LEVELPATH_CHART_DIR"); dir != "" {
		if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// charts draws each chart kind in format.
var charts = []struct {
	name string
	draw func(w io.Writer, format string) error
	// legend texts the SVG must hold
	legend []string
}{
	{"profile", func(w io.Writer, f string) error {
		return Profile(w, f, ProfileInput{Plan: samplePlan(), Levels: sampleLevels()})
	}, []string{"planned profile", "level change (new level)", "buffet-limited max level (floor 1.30 g, 1.40 g in turbulence)",
		"thrust-limited max level (300 ft/min)", "allowed levels", "along-track wind (tailwind +)",
		"protection floor", "buffet margin at leg start", "distance from departure (NM)", "wind (kt)", "margin (g)",
		"FL370 at 1100 NM", "FL390 at 2000 NM"}},
	{"envelope", func(w io.Writer, f string) error { return Envelope(w, f, sampleEnvelope()) },
		[]string{"buffet onset at 1 g", "buffet onset at 1.30 g (floor)", "MMO 0.82", "coffin corner at 1.30 g",
			"max level FL398 (thrust limit)", "optimum level FL371", "Mach", "flight level"}},
	{"sweep", func(w io.Writer, f string) error { return Sweep(w, f, sampleSweep(), "Cost-index sweep") },
		[]string{"CI 0", "CI 20", "CI 60", "CI 150", "total time (min)", "total fuel (kg)"}},
	{"tradeoff", func(w io.Writer, f string) error {
		// Invented shape: more contrail cost, more fuel, more distance avoided.
		return Tradeoff(w, f, []TradeoffPoint{{0, 0, 0}, {5, 0.4, 80}, {20, 0.7, 97}}, "Caution: uncertain (poorly forecast): for studies.")
	}, []string{"0 kg/NM", "5 kg/NM", "20 kg/NM", "extra fuel (% of the lowest cost's)", "persistent contrail distance avoided (%)", "Caution: uncertain (poorly forecast):"}},
	{"profile with contrails", func(w io.Writer, f string) error {
		return Profile(w, f, ProfileInput{Plan: samplePlan(), Levels: sampleLevels(), Contrail: []optimizer.ContrailCell{{FromDist: 500 * mPerNM, ToDist: 600 * mPerNM, FL: 350}}})
	}, []string{"persistent contrail conditions (forecast humidity; uncertain)", "planned profile"}},
}

func sampleSweep() []SweepPoint {
	// Invented shape: more CI, less time, more fuel.
	return []SweepPoint{{CI: 0, FuelKg: 15210, TimeMin: 352, Flights: 1}, {CI: 20, FuelKg: 15290, TimeMin: 344, Flights: 1},
		{CI: 60, FuelKg: 15520, TimeMin: 336, Flights: 1}, {CI: 150, FuelKg: 16100, TimeMin: 329, Flights: 1}}
}

// svgTexts parses an SVG document with encoding/xml (strict) and returns
// the character data of its <text> elements and the number of <path>
// elements.
func svgTexts(t *testing.T, b []byte) (texts []string, paths int) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	var inText bool
	var cur strings.Builder
	root := ""
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG does not parse as XML: %v", err)
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = tk.Name.Local
			}
			switch tk.Name.Local {
			case "text":
				inText = true
				cur.Reset()
			case "path":
				paths++
			}
		case xml.CharData:
			if inText {
				cur.Write(tk)
			}
		case xml.EndElement:
			if tk.Name.Local == "text" {
				inText = false
				texts = append(texts, cur.String())
			}
		}
	}
	if root != "svg" {
		t.Fatalf("root element %q, want svg", root)
	}
	return texts, paths
}

// drawChart draws a chart in format, failing the test on an error, and
// keeps it as name.format (see keep).
func drawChart(t *testing.T, name string, draw func(io.Writer, string) error, format string) *bytes.Buffer {
	t.Helper()
	var b bytes.Buffer
	if err := draw(&b, format); err != nil {
		t.Fatal(err)
	}
	keep(t, name+"."+format, b.Bytes())
	return &b
}

func TestSVG(t *testing.T) {
	for _, c := range charts {
		t.Run(c.name, func(t *testing.T) {
			b := drawChart(t, c.name, c.draw, "svg")
			texts, paths := svgTexts(t, b.Bytes())
			have := map[string]bool{}
			for _, s := range texts {
				have[strings.TrimSpace(s)] = true
			}
			for _, want := range c.legend {
				if !have[want] {
					t.Errorf("no text %q in the SVG; texts: %q", want, texts)
				}
			}
			if paths < 10 {
				t.Errorf("%d <path> elements, want the series drawn", paths)
			}
		})
	}
}

func TestPNGSize(t *testing.T) {
	for _, c := range charts {
		t.Run(c.name, func(t *testing.T) {
			b := drawChart(t, c.name, c.draw, "png")
			img, err := png.Decode(bytes.NewReader(b.Bytes()))
			if err != nil {
				t.Fatal(err)
			}
			if got := img.Bounds().Size(); got != (image.Point{X: 1200, Y: 700}) {
				t.Errorf("size %v, want 1200x700", got)
			}
			if n := distinctColours(img, 1000); n < 8 {
				t.Errorf("%d distinct colours, want a drawn chart", n)
			}
		})
	}
}

// distinctColours counts distinct colours in img, up to limit.
func distinctColours(img image.Image, limit int) int {
	seen := map[[4]uint32]bool{}
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bl, a := img.At(x, y).RGBA()
			seen[[4]uint32{r, g, bl, a}] = true
			if len(seen) >= limit {
				return len(seen)
			}
		}
	}
	return len(seen)
}

func TestPDF(t *testing.T) {
	for _, c := range charts {
		t.Run(c.name, func(t *testing.T) {
			b := drawChart(t, c.name, c.draw, "pdf")
			// PDF files begin with the header "%PDF-" (ISO 32000-1, 7.5.2).
			if !bytes.HasPrefix(b.Bytes(), []byte("%PDF-")) {
				t.Errorf("PDF begins %q", b.Bytes()[:min(16, b.Len())])
			}
			if !bytes.Contains(b.Bytes()[max(0, b.Len()-64):], []byte("%%EOF")) {
				t.Error("PDF lacks the end-of-file marker \"%%\"+\"EOF\" (ISO 32000-1, 7.5.5)")
			}
		})
	}
}

func TestFormatOf(t *testing.T) {
	for _, c := range []struct {
		path, want string
		ok         bool
	}{
		{"a/b/profile.svg", "svg", true},
		{"x.PNG", "png", true},
		{"report.pdf", "pdf", true},
		{"chart.jpg", "", false},
		{"noext", "", false},
		{"dir.svg/file.txt", "", false},
	} {
		got, err := FormatOf(c.path)
		if (err == nil) != c.ok || got != c.want {
			t.Errorf("FormatOf(%q) = %q, %v; want %q, ok=%v", c.path, got, err, c.want, c.ok)
		}
		if err != nil {
			var ue UnsupportedError
			if !errors.As(err, &ue) {
				t.Errorf("FormatOf(%q): error %T, want UnsupportedError", c.path, err)
			}
			if !strings.Contains(err.Error(), c.path) {
				t.Errorf("FormatOf(%q): error %q does not name the file", c.path, err)
			}
		}
	}
}

func TestWriteFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "p.png")
	if err := WriteFile(path, func(w io.Writer, f string) error {
		return Profile(w, f, ProfileInput{Plan: samplePlan()})
	}); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil || cfg.Width != 1200 || cfg.Height != 700 {
		t.Fatalf("written PNG: %v, %dx%d", err, cfg.Width, cfg.Height)
	}

	// A failing draw leaves the old file and no temporary file behind.
	boom := errors.New("boom")
	err = WriteFile(path, func(w io.Writer, f string) error {
		io.WriteString(w, "partial")
		return boom
	})
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), path) {
		t.Errorf("error %v, want boom naming %s", err, path)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("directory holds %d entries after a failed write, want 1", len(ents))
	}
	if b, _ := os.ReadFile(path); !bytes.HasPrefix(b, []byte("\x89PNG")) {
		t.Error("failed write replaced the old file")
	}
	if err := WriteFile(filepath.Join(dir, "p.gif"), nil); err == nil || !strings.Contains(err.Error(), "p.gif") {
		t.Errorf("WriteFile(.gif) = %v, want an error naming the file", err)
	}
}
