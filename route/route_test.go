package route

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func writeFile(t *testing.T, name, body string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func wantPoints(t *testing.T, r *Route, want []Point) {
	t.Helper()
	if len(r.Points) != len(want) {
		t.Fatalf("%d points, want %d: %+v", len(r.Points), len(want), r.Points)
	}
	for i, p := range r.Points {
		if p != want[i] {
			t.Errorf("point %d = %+v, want %+v", i+1, p, want[i])
		}
	}
}

// The inputs below restate the coordinates they contain; the checks are
// that each format (RFC 7946 GeoJSON order [lon, lat]; CSV by header) is
// read as its specification says.
func TestParseFormats(t *testing.T) {
	want := []Point{{"A", 40.6, -73.8}, {"B", 51.6, -0.5}}
	unnamed := []Point{{"WP1", 40.6, -73.8}, {"WP2", 51.6, -0.5}}
	ls := `{"type":"LineString","coordinates":[[-73.8,40.6],[-0.5,51.6,10000]]}`
	feat := `{"type":"Feature","properties":{},"geometry":` + ls + `}`
	fc := `{"type":"FeatureCollection","features":[
	  {"type":"Feature","properties":{"name":"A"},"geometry":{"type":"Point","coordinates":[-73.8,40.6]}},
	  {"type":"Feature","properties":{"name":"B"},"geometry":{"type":"Point","coordinates":[-0.5,51.6]}}]}`
	for _, c := range []struct {
		name, body string
		want       []Point
	}{{"ls", ls, unnamed}, {"feature", feat, unnamed}, {"points", fc, want},
		{"one-line-fc", `{"type":"FeatureCollection","features":[` + feat + `]}`, unnamed}} {
		r, err := ParseGeoJSON([]byte(c.body), c.name)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		wantPoints(t, r, c.want)
	}
	r, err := ParseCSV(strings.NewReader("# comment\nlon,name,lat\n-73.8,A,40.6\n\n-0.5, B ,51.6\n"), "x.csv")
	if err != nil {
		t.Fatal(err)
	}
	wantPoints(t, r, want)
	r, err = ParseInline("A=40.6,-73.8; 51.6,-0.5")
	if err != nil {
		t.Fatal(err)
	}
	wantPoints(t, r, []Point{{"A", 40.6, -73.8}, {"P2", 51.6, -0.5}})
	// Longitude 180 is stored as -180 ([-180, 180)).
	if r, err := ParseInline("0,179 0,180"); err != nil || r.Points[1].Lon != -180 {
		t.Errorf("lon 180: %+v %v", r, err)
	}
}

func TestLoad(t *testing.T) {
	gj := writeFile(t, "r.geojson", `{"type":"LineString","coordinates":[[-73.8,40.6],[-0.5,51.6]]}`)
	csvp := writeFile(t, "r.csv", "name,lat,lon\nA,40.6,-73.8\nB,51.6,-0.5\n")
	other := writeFile(t, "r.route", `{"type":"LineString","coordinates":[[-73.8,40.6],[-0.5,51.6]]}`)
	for _, p := range []string{gj, csvp, other, "40.6,-73.8 51.6,-0.5"} {
		r, err := Load(p)
		if err != nil || len(r.Points) != 2 || r.Points[1].Lat != 51.6 {
			t.Errorf("Load(%q) = %+v, %v", p, r, err)
		}
	}
	if r, _ := Load(csvp); r.Source != csvp {
		t.Errorf("Source = %q, want %q", r.Source, csvp)
	}
	missing := filepath.Join(t.TempDir(), "nope.csv")
	if _, err := Load(missing); err == nil || !strings.Contains(err.Error(), missing) {
		t.Errorf("Load(missing) error %v does not name the file", err)
	}
	if _, err := Load("nope"); err == nil || !strings.Contains(err.Error(), "nope") {
		t.Errorf("Load(nope) error %v", err)
	}
}

// TestBadInput checks that each invalid input gives a *FormatError (or
// *UnsupportedError) whose message names where the problem is.
func TestBadInput(t *testing.T) {
	cases := []struct {
		name  string
		parse func() (*Route, error)
		want  []string // substrings of the message
	}{
		{"one point", func() (*Route, error) { return ParseInline("10,10") }, []string{"at least two"}},
		{"all duplicates", func() (*Route, error) { return ParseInline("10,10 10,10") }, []string{"at least two", "got 1"}},
		{"lat 91", func() (*Route, error) { return ParseInline("10,10 X=91,10") }, []string{"point 2 (X)", "latitude 91"}},
		{"lon 181", func() (*Route, error) { return ParseInline("10,10 10,181") }, []string{"point 2 (P2)", "longitude 181"}},
		{"NaN", func() (*Route, error) { return ParseInline("10,10 NaN,10") }, []string{"point 2", "not finite"}},
		{"Inf", func() (*Route, error) { return ParseInline("10,10 10,-Inf") }, []string{"point 2", "not finite"}},
		{"not a number", func() (*Route, error) { return ParseInline("10,10 10,abc") }, []string{"point 2", "column lon", `"abc"`}},
		{"not a pair", func() (*Route, error) { return ParseInline("10,10 10") }, []string{"point 2", "not lat,lon"}},
		// 0,0 to 0,100 is 11,131.9 km along the equator (a * 100 degrees).
		{"long leg", func() (*Route, error) { return ParseInline("A=0,0 B=0,100") }, []string{"point 2 (B)", "point 1 (A)", "11132 km", "intermediate waypoint"}},
		{"antipodal", func() (*Route, error) { return ParseInline("A=10,0 B=-10,179") }, []string{"point 2 (B)", "nearly antipodal", "intermediate waypoint"}},
		{"csv bad lat", func() (*Route, error) {
			return ParseCSV(strings.NewReader("name,lat,lon\nA,1,2\nB,1x,2\n"), "r.csv")
		}, []string{"r.csv", "line 3", "column lat", "point 2 (B)", `"1x"`}},
		{"csv range", func() (*Route, error) {
			return ParseCSV(strings.NewReader("name,lat,lon\nA,1,2\nB,-95,2\n"), "r.csv")
		}, []string{"r.csv", "line 3", "point 2 (B)", "latitude -95"}},
		{"csv header", func() (*Route, error) { return ParseCSV(strings.NewReader("name,y,x\nA,1,2\n"), "r.csv") }, []string{"r.csv", "line 1", "lat or lon"}},
		{"csv short row", func() (*Route, error) { return ParseCSV(strings.NewReader("name,lat,lon\nA,1\n"), "r.csv") }, []string{"line 2", "column lon", "point 1 (A)"}},
		{"csv empty", func() (*Route, error) { return ParseCSV(strings.NewReader(""), "r.csv") }, []string{"r.csv", "empty"}},
		{"json syntax", func() (*Route, error) {
			return ParseGeoJSON([]byte("{\"type\":\"LineString\",\n\"coordinates\": [[1,2],,]}"), "r.geojson")
		}, []string{"r.geojson", "line 2"}},
		{"json point feature", func() (*Route, error) {
			return ParseGeoJSON([]byte(`{"type":"FeatureCollection","features":[
			{"type":"Feature","properties":{"name":"A"},"geometry":{"type":"Point","coordinates":[1,2]}},
			{"type":"Feature","properties":{"name":"B"},"geometry":{"type":"Polygon","coordinates":[[[1,2],[3,4],[5,6],[1,2]]]}}]}`), "r.geojson")
		}, []string{"r.geojson", "point 2 (B)", "Polygon"}},
		{"json lat range", func() (*Route, error) {
			return ParseGeoJSON([]byte(`{"type":"LineString","coordinates":[[1,2],[3,-100]]}`), "r.geojson")
		}, []string{"point 2 (WP2)", "latitude -100"}},
		{"json no type", func() (*Route, error) { return ParseGeoJSON([]byte(`{"coordinates":[]}`), "r.geojson") }, []string{"r.geojson", "type"}},
	}
	for _, c := range cases {
		_, err := c.parse()
		var fe *FormatError
		if !errors.As(err, &fe) {
			t.Errorf("%s: err = %v, want *FormatError", c.name, err)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q lacks %q", c.name, err, w)
			}
		}
	}
	_, err := ParseGeoJSON([]byte(`{"type":"Polygon","coordinates":[[[1,2],[3,4],[5,6],[1,2]]]}`), "p.geojson")
	var ue *UnsupportedError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), "p.geojson") {
		t.Errorf("Polygon: %v, want *UnsupportedError naming the file", err)
	}
}

func TestDuplicatesDropped(t *testing.T) {
	r, err := ParseInline("A=10,10 B=10,10 C=11,11 D=11.000000001,11")
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Points) != 2 || r.Points[0].Name != "A" || r.Points[1].Name != "C" {
		t.Errorf("points %+v, want A, C", r.Points)
	}
	if len(r.Warnings) != 2 || !strings.Contains(r.Warnings[0], "point 2 (B)") || !strings.Contains(r.Warnings[1], "point 4 (D)") {
		t.Errorf("warnings %q", r.Warnings)
	}
	// An equatorial leg of a * 89.8 degrees (9,996.5 km) is accepted.
	if _, err := ParseInline("0,0 0,89.8"); err != nil {
		t.Errorf("9996 km leg rejected: %v", err)
	}
}

// FuzzParse feeds arbitrary text to the three parsers: they must return a
// route or an error, never panic, and any route must satisfy the
// documented invariants.
func FuzzParse(f *testing.F) {
	for _, s := range []string{
		`{"type":"LineString","coordinates":[[1],[2,3]]}`,
		`{"type":"LineString","coordinates":[]}`,
		`{"type":"Feature","geometry":null}`,
		`{"type":"FeatureCollection","features":null}`,
		`{"type":"FeatureCollection","features":[null]}`,
		`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":7},"geometry":{"type":"Point","coordinates":[1,2]}}]}`,
		"name,lat,lon\n\"a,1,2\n",
		"lat,lon\n1,2,3\n4,5\n",
		"1,2 3,4;5,6",
		"=1,2 x=,",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		check := func(r *Route, err error) {
			if err != nil {
				return
			}
			if len(r.Points) < 2 {
				t.Fatalf("%q: route of %d points", s, len(r.Points))
			}
			for _, p := range r.Points {
				if !(p.Lat >= -90 && p.Lat <= 90 && p.Lon >= -180 && p.Lon < 180) {
					t.Fatalf("%q: point %+v", s, p)
				}
			}
		}
		check(ParseGeoJSON([]byte(s), "fuzz"))
		check(ParseCSV(strings.NewReader(s), "fuzz"))
		check(ParseInline(s))
	})
}

// BenchmarkParseInline100 measures parsing and validating a 100-waypoint
// inline route (the route100 input).
func BenchmarkParseInline100(b *testing.B) {
	var s strings.Builder
	for _, p := range route100(b).Points {
		fmt.Fprintf(&s, "%s=%.4f,%.4f ", p.Name, p.Lat, p.Lon)
	}
	in := s.String()
	b.ResetTimer()
	for b.Loop() {
		if _, err := ParseInline(in); err != nil {
			b.Fatal(err)
		}
	}
}
