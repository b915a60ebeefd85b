package route

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Point is a waypoint: geodetic WGS-84 latitude and longitude in degrees,
// the longitude reduced to [-180, 180).
type Point struct {
	Name     string
	Lat, Lon float64
}

// Route is a validated lateral route of at least two waypoints.
type Route struct {
	Source   string   // file name, or "inline"
	Points   []Point  // in flight order, no consecutive duplicates
	Warnings []string // non-fatal findings (e.g. dropped duplicates)
}

// FormatError reports invalid route input. Line, Point and Column are zero
// or empty when not known; Point is 1-based in flight order as written in
// the input.
type FormatError struct {
	Source string // file name or "inline"
	Line   int    // 1-based input line
	Column string // CSV column or GeoJSON member
	Point  int    // 1-based point number
	Name   string // point name, if any
	Msg    string
}

func (e *FormatError) Error() string {
	var b strings.Builder
	b.WriteString("route: ")
	b.WriteString(clipName(e.Source))
	if e.Line > 0 {
		fmt.Fprintf(&b, ": line %d", e.Line)
	}
	if e.Column != "" {
		fmt.Fprintf(&b, ": column %s", e.Column)
	}
	if e.Point > 0 {
		fmt.Fprintf(&b, ": point %d", e.Point)
		if e.Name != "" {
			fmt.Fprintf(&b, " (%s)", clipName(e.Name))
		}
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

// UnsupportedError reports input that is valid but that this package does
// not handle (e.g. a GeoJSON Polygon, or a file larger than MaxFileSize).
type UnsupportedError struct {
	Source string
	Msg    string
}

func (e *UnsupportedError) Error() string {
	return "route: " + clipName(e.Source) + ": unsupported: " + e.Msg
}

// maxExcerpt is the most bytes of input text an error quotes.
const maxExcerpt = 24

// clip quotes at most maxExcerpt bytes of s (cut on a rune boundary, "..."
// marking a cut), so that an error about a file it could not parse never
// echoes more of that file than a short excerpt of the offending field.
func clip(s string) string {
	if len(s) <= maxExcerpt {
		return strconv.Quote(s)
	}
	n := maxExcerpt
	for n > 0 && !utf8.RuneStart(s[n]) {
		n--
	}
	return strconv.Quote(s[:n]) + "..."
}

// clipName is clip for names printed bare: a short printable name stays
// as written, anything else is clipped and quoted.
func clipName(s string) string {
	if len(s) <= 2*maxExcerpt && strconv.CanBackquote(s) && !strings.ContainsAny(s, "`") {
		return s
	}
	return clip(s)
}

// Limits applied to every input.
const (
	MaxFileSize = 4 << 20 // bytes read from a route file
	// MaxPoints bounds the waypoints of one route (checked while parsing,
	// before the route is built); a flight plan's route has a few hundred.
	MaxPoints = 5000
	MaxLeg    = 10_000e3 // m; longer legs must be split by the user
	// MaxLegAngle is the largest great-circle angle (degrees) of a leg;
	// beyond it the shortest path is nearly antipodal and ill-determined.
	MaxLegAngle = 170.0
	dupTol      = 1.0 // m; consecutive points closer than this are duplicates
)

// Load reads a route. If arg names an existing file it is parsed by its
// extension: .geojson or .json as GeoJSON, .csv as CSV, anything else by
// content (a leading '{' means GeoJSON). Otherwise, if arg looks like an
// inline route ("lat,lon lat,lon ..."), it is parsed with ParseInline; if
// not, the error names the missing file.
func Load(arg string) (*Route, error) {
	fi, err := os.Stat(arg)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) && looksInline(arg) {
			return ParseInline(arg)
		}
		return nil, fmt.Errorf("route: %w", err)
	}
	if !fi.Mode().IsRegular() {
		return nil, &FormatError{Source: arg, Msg: fmt.Sprintf("is %s, not a regular file: a route must be a file", fileKind(fi.Mode()))}
	}
	if fi.Size() > MaxFileSize {
		return nil, &UnsupportedError{Source: arg, Msg: fmt.Sprintf("file is %d bytes, more than %d", fi.Size(), MaxFileSize)}
	}
	f, err := os.Open(arg)
	if err != nil {
		return nil, fmt.Errorf("route: %w", err)
	}
	defer f.Close()
	// The name may have been replaced since Stat: check what was opened.
	if fi, err := f.Stat(); err != nil || !fi.Mode().IsRegular() {
		return nil, &FormatError{Source: arg, Msg: "is not a regular file: a route must be a file"}
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxFileSize+1))
	if err != nil {
		return nil, fmt.Errorf("route: %s: %w", arg, err)
	}
	if len(data) > MaxFileSize {
		return nil, &UnsupportedError{Source: arg, Msg: fmt.Sprintf("file is more than %d bytes", MaxFileSize)}
	}
	switch strings.ToLower(filepath.Ext(arg)) {
	case ".geojson", ".json":
		return ParseGeoJSON(data, arg)
	case ".csv":
		return ParseCSV(bytes.NewReader(data), arg)
	}
	if t := bytes.TrimSpace(data); len(t) > 0 && t[0] == '{' {
		return ParseGeoJSON(data, arg)
	}
	return ParseCSV(bytes.NewReader(data), arg)
}

// fileKind names the type of a file that is not regular.
func fileKind(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a directory"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe (FIFO)"
	case m&fs.ModeCharDevice != 0:
		return "a character device"
	case m&fs.ModeDevice != 0:
		return "a device"
	case m&fs.ModeSocket != 0:
		return "a socket"
	}
	return "not a regular file"
}

// looksInline reports whether s reads as an inline route rather than a
// file name: it holds a comma, no path separator, and does not end in a
// route-file extension.
func looksInline(s string) bool {
	if !strings.Contains(s, ",") || strings.ContainsAny(s, `/\`) {
		return false
	}
	switch strings.ToLower(filepath.Ext(s)) {
	case ".csv", ".json", ".geojson":
		return false
	}
	return true
}

// ParseInline parses a route written as waypoints separated by spaces or
// semicolons, each "lat,lon" in decimal degrees with an optional name
// prefix "NAME=lat,lon", e.g. "40.6,-73.8 AVALON=44.6,-74.2". Unnamed
// points are called P1, P2, ... by position.
func ParseInline(s string) (*Route, error) {
	const src = "inline"
	fields := strings.FieldsFunc(s, func(r rune) bool { return r == ' ' || r == ';' || r == '\t' || r == '\n' })
	if len(fields) > MaxPoints {
		return nil, &UnsupportedError{Source: src, Msg: fmt.Sprintf("%d points, more than the limit of %d", len(fields), MaxPoints)}
	}
	pts := make([]Point, 0, len(fields))
	for i, f := range fields {
		name := ""
		if before, after, ok := strings.Cut(f, "="); ok {
			name, f = before, after
		}
		if name == "" {
			name = "P" + strconv.Itoa(i+1)
		}
		la, lo, ok := strings.Cut(f, ",")
		if !ok || strings.Contains(lo, ",") {
			return nil, &FormatError{Source: src, Point: i + 1, Name: name, Msg: fmt.Sprintf("%s is not lat,lon", clip(f))}
		}
		lat, err := parseDeg(la)
		if err != nil {
			return nil, &FormatError{Source: src, Point: i + 1, Name: name, Column: "lat", Msg: err.Error()}
		}
		lon, err := parseDeg(lo)
		if err != nil {
			return nil, &FormatError{Source: src, Point: i + 1, Name: name, Column: "lon", Msg: err.Error()}
		}
		pts = append(pts, Point{Name: name, Lat: lat, Lon: lon})
	}
	return newRoute(src, pts, nil)
}

func parseDeg(s string) (float64, error) {
	s = strings.TrimSpace(s)
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, fmt.Errorf("%s is not a number of degrees", clip(s))
	}
	return v, nil
}

// newRoute validates pts (lines[i], if given, is the input line of pts[i])
// and builds the Route. Cost O(n).
func newRoute(src string, pts []Point, lines []int) (*Route, error) {
	line := func(i int) int {
		if lines == nil {
			return 0
		}
		return lines[i]
	}
	ferr := func(i int, col, msg string) error {
		return &FormatError{Source: src, Line: line(i), Column: col, Point: i + 1, Name: pts[i].Name, Msg: msg}
	}
	for i := range pts {
		p := &pts[i]
		switch {
		case math.IsNaN(p.Lat) || math.IsInf(p.Lat, 0):
			return nil, ferr(i, "lat", fmt.Sprintf("latitude %v is not finite", p.Lat))
		case math.IsNaN(p.Lon) || math.IsInf(p.Lon, 0):
			return nil, ferr(i, "lon", fmt.Sprintf("longitude %v is not finite", p.Lon))
		case p.Lat < -90 || p.Lat > 90:
			return nil, ferr(i, "lat", fmt.Sprintf("latitude %v is outside [-90, 90]", p.Lat))
		case p.Lon < -180 || p.Lon > 180:
			return nil, ferr(i, "lon", fmt.Sprintf("longitude %v is outside [-180, 180]", p.Lon))
		}
		p.Lon = NormalizeLon(p.Lon)
	}
	r := &Route{Source: src}
	out := make([]Point, 0, len(pts))
	idx := make([]int, 0, len(pts)) // input index of each kept point
	dist := make([]float64, 0, len(pts))
	for i, p := range pts {
		d := 0.0 // length of the leg ending at p; the first point has none
		if n := len(out); n > 0 {
			prev := out[n-1]
			if d, _, _ = Inverse(prev.Lat, prev.Lon, p.Lat, p.Lon); d < dupTol {
				r.Warnings = append(r.Warnings, fmt.Sprintf("%s: point %d (%s) repeats point %d (%s); dropped",
					src, i+1, clipName(p.Name), idx[n-1]+1, clipName(prev.Name)))
				continue
			}
		}
		out = append(out, p)
		idx = append(idx, i)
		dist = append(dist, d)
	}
	if len(out) < 2 {
		return nil, &FormatError{Source: src, Msg: fmt.Sprintf("a route needs at least two distinct points, got %d", len(out))}
	}
	for k := 1; k < len(out); k++ {
		a, b := out[k-1], out[k]
		i, j := idx[k-1], idx[k]
		if ang := centralAngle(a, b); ang > MaxLegAngle {
			return nil, ferr(j, "", fmt.Sprintf("leg from point %d (%s) is nearly antipodal (%.1f degrees of arc); the shortest path is ill-determined: add an intermediate waypoint", i+1, clipName(a.Name), ang))
		}
		if d := dist[k]; d > MaxLeg {
			return nil, ferr(j, "", fmt.Sprintf("leg from point %d (%s) is %.0f km, longer than %.0f km: add an intermediate waypoint", i+1, clipName(a.Name), d/1e3, MaxLeg/1e3))
		}
	}
	r.Points = out
	return r, nil
}

// centralAngle is the great-circle angle in degrees between a and b on the
// unit sphere (geodetic coordinates used as spherical; ample for the
// antipodal screen).
func centralAngle(a, b Point) float64 {
	return ll(a).Distance(ll(b)).Degrees()
}
