package chart

import (
	"bytes"
	"context"
	"errors"
	"image/png"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"golang.org/x/net/html"
	"golang.org/x/net/html/atom"

	"levelpath/optimizer"
	"levelpath/perf"
)

func reportBytes(t *testing.T, in ProfileInput) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := Report(&b, in); err != nil {
		t.Fatal(err)
	}
	keep(t, "report.html", b.Bytes())
	return b.Bytes()
}

// voidElements have no end tag (HTML Living Standard, 13.1.2 "Elements":
// void elements).
var voidElements = map[string]bool{"area": true, "base": true, "br": true, "col": true, "embed": true,
	"hr": true, "img": true, "input": true, "link": true, "meta": true, "source": true, "track": true, "wbr": true}

// TestReportWellFormed tokenizes the page with golang.org/x/net/html and
// checks that every start tag is closed in order (void elements and
// self-closing SVG elements aside), then parses it and checks what it
// loads and holds.
func TestReportWellFormed(t *testing.T) {
	pl := samplePlan()
	b := reportBytes(t, ProfileInput{Plan: pl, Levels: sampleLevels()})

	z := html.NewTokenizer(bytes.NewReader(b))
	var stack []string
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			if !errors.Is(z.Err(), io.EOF) {
				t.Fatalf("tokenizer: %v", z.Err())
			}
			break
		}
		tok := z.Token()
		switch tt {
		case html.StartTagToken:
			if !voidElements[tok.Data] {
				stack = append(stack, tok.Data)
			}
		case html.EndTagToken:
			if len(stack) == 0 || stack[len(stack)-1] != tok.Data {
				t.Fatalf("end tag </%s> does not close the open element (open: %v)", tok.Data, stack)
			}
			stack = stack[:len(stack)-1]
		}
	}
	if len(stack) != 0 {
		t.Fatalf("unclosed elements at the end: %v", stack)
	}

	doc, err := html.Parse(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	var (
		svgs, legRows, headCells, stepItems int
		text                                strings.Builder
	)
	var walk func(n *html.Node, inLegs bool)
	walk = func(n *html.Node, inLegs bool) {
		if n.Type == html.TextNode {
			text.WriteString(n.Data)
			text.WriteByte(' ')
		}
		if n.Type == html.ElementNode {
			switch n.DataAtom {
			case atom.Script, atom.Link, atom.Iframe, atom.Object, atom.Embed:
				t.Errorf("page holds a <%s> element", n.Data)
			case atom.Svg:
				svgs++
			case atom.Table:
				for _, a := range n.Attr {
					if a.Key == "class" && a.Val == "legs" {
						inLegs = true
					}
				}
			case atom.Tr:
				if inLegs && n.Parent != nil && n.Parent.DataAtom == atom.Tbody {
					legRows++
				}
			case atom.Th:
				if inLegs {
					headCells++
				}
			case atom.Li:
				if strings.HasPrefix(strings.TrimSpace(nodeText(n)), "Step ") {
					stepItems++
				}
			}
			if n.Data == "tag" {
				t.Error("a warning's text became an element: not escaped")
			}
			for _, a := range n.Attr {
				k := strings.ToLower(a.Key)
				v := strings.ToLower(strings.TrimSpace(a.Val))
				if k == "src" || k == "href" || strings.HasSuffix(k, ":href") || a.Namespace != "" && a.Key == "href" {
					if strings.HasPrefix(v, "http:") || strings.HasPrefix(v, "https:") || strings.HasPrefix(v, "//") {
						t.Errorf("<%s %s=%q> loads from the network", n.Data, a.Key, a.Val)
					}
				}
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c, inLegs)
		}
	}
	walk(doc, false)
	if svgs != 1 {
		t.Errorf("%d inline <svg> elements, want 1", svgs)
	}
	if legRows != len(pl.Legs) {
		t.Errorf("%d leg rows, want %d", legRows, len(pl.Legs))
	}
	if headCells != 14 {
		t.Errorf("%d leg table columns, want 14", headCells)
	}
	if stepItems != len(pl.Steps) {
		t.Errorf("%d step items, want %d", stepItems, len(pl.Steps))
	}
	all := text.String()
	for _, want := range []string{optimizer.Caution, pl.Profile.String(), pl.Aircraft, "a <tag> & an \"ampersand\" must be escaped",
		"Step climb FL350 → FL370 at 1100 NM", "planned profile", "Cost saving"} {
		if !strings.Contains(all, want) {
			t.Errorf("page text lacks %q", want)
		}
	}
	if bytes.Contains(b, []byte("<?xml")) {
		t.Error("the XML declaration of the SVG is left inside the HTML")
	}
}

func nodeText(n *html.Node) string {
	var b strings.Builder
	var f func(*html.Node)
	f = func(n *html.Node) {
		if n.Type == html.TextNode {
			b.WriteString(n.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			f(c)
		}
	}
	f(n)
	return b.String()
}

// TestReportUnits checks the leg table's unit conversions against the
// definitions 1 NM = 1852 m and 1 kt = 1852 m/h (international nautical
// mile, BIPM SI Brochure table 8) on one hand-made leg.
func TestReportUnits(t *testing.T) {
	nan := math.NaN()
	pl := &optimizer.Plan{Aircraft: "x", Distance: 185200, TakeoffMass: 60000, Floor: 1.3,
		Legs: []optimizer.Leg{{Phase: optimizer.PhaseCruise, FromDist: 0, ToDist: 185200, FromFL: 350, FL: 350,
			Mach: 0.78, TAS: 231.5, WindAlong: -12.86, GS: 218.64, ISADev: -3, Fuel: 900, Time: 1800,
			MassStart: 60000, BuffetMargin: nan, Floor: 1.3, MaxFLBuffet: nan, MaxFLThrust: nan}}}
	b := string(reportBytes(t, ProfileInput{Plan: pl}))
	// 185200 m = 100 NM; 231.5 m/s = 450 kt; -12.86 m/s = -25 kt;
	// 218.64 m/s = 425 kt; 1800 s = 30.0 min.
	for _, want := range []string{"<td>0–100</td>", "<td>450</td>", "<td>-25</td>", "<td>425</td>", "<td>30.0</td>", "<td>–</td>", "100 NM"} {
		if !strings.Contains(b, want) {
			t.Errorf("report lacks %q", want)
		}
	}
}

func TestBadInput(t *testing.T) {
	nan := math.NaN()
	good := samplePlan()
	bad := *good
	bad.Legs = append([]optimizer.Leg(nil), good.Legs...)
	bad.Legs[3].ToDist = nan
	for _, c := range []struct {
		name string
		err  error
		want string
	}{
		{"nil plan", Profile(io.Discard, "svg", ProfileInput{}), "no plan"},
		{"no legs", Profile(io.Discard, "svg", ProfileInput{Plan: &optimizer.Plan{}}), "no legs"},
		{"NaN leg", Profile(io.Discard, "png", ProfileInput{Plan: &bad}), "leg 3"},
		{"bad level", Profile(io.Discard, "svg", ProfileInput{Plan: good, Levels: []int{-10}}), "level -10"},
		{"report nil", Report(io.Discard, ProfileInput{}), "no plan"},
		{"empty envelope", Envelope(io.Discard, "svg", perf.Envelope{Aircraft: "x"}), "no rows"},
		{"sweep empty", Sweep(io.Discard, "svg", nil, ""), "no points"},
		{"sweep NaN", Sweep(io.Discard, "svg", []SweepPoint{{CI: 1, FuelKg: nan, TimeMin: 3}}, ""), "point 0"},
		{"tradeoff empty", Tradeoff(io.Discard, "svg", nil, ""), "no points"},
		{"tradeoff NaN", Tradeoff(io.Discard, "svg", []TradeoffPoint{{0, 0, 0}, {5, nan, 3}}, ""), "point 1"},
	} {
		var fe FormatError
		if !errors.As(c.err, &fe) || !strings.Contains(c.err.Error(), c.want) {
			t.Errorf("%s: error %v, want a FormatError naming %q", c.name, c.err, c.want)
		}
	}
	err := Profile(io.Discard, "gif", ProfileInput{Plan: good})
	var ue UnsupportedError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), "gif") {
		t.Errorf("format gif: error %v, want an UnsupportedError naming it", err)
	}
}

// TestReportScreenshot renders the page in headless Chromium (Debian's
// chromium package) and checks that the screenshot decodes and is not
// blank. It runs only where /usr/bin/chromium exists.
func TestReportScreenshot(t *testing.T) {
	const bin = "/usr/bin/chromium"
	if _, err := os.Stat(bin); err != nil {
		t.Skip("no " + bin)
	}
	if testing.Short() {
		t.Skip("short mode")
	}
	dir := t.TempDir()
	page := filepath.Join(dir, "report.html")
	if err := os.WriteFile(page, reportBytes(t, ProfileInput{Plan: samplePlan(), Levels: sampleLevels()}), 0o644); err != nil {
		t.Fatal(err)
	}
	shot := filepath.Join(dir, "out.png")
	ctx, cancel := context.WithTimeout(context.Background(), 45*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+filepath.Join(dir, "profile"), "--screenshot="+shot, "--window-size=1200,1600", "file://"+page)
	cmd.Dir = dir
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, out)
	}
	b, err := os.ReadFile(shot)
	if err != nil {
		t.Fatal(err)
	}
	keep(t, "report-screenshot.png", b)
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if sz := img.Bounds().Size(); sz.X != 1200 || sz.Y != 1600 {
		t.Errorf("screenshot %v, want 1200x1600", sz)
	}
	if n := distinctColours(img, 200); n < 50 {
		t.Errorf("screenshot has %d distinct colours: blank page?", n)
	}
}
