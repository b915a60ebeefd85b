package route

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// ParseGeoJSON parses an RFC 7946 GeoJSON route (decoded with
// github.com/paulmach/orb/geojson): a LineString geometry, a Feature whose
// geometry is a LineString, or a FeatureCollection whose features are all
// Points (in flight order) or that holds exactly one LineString feature.
// A Point feature's "name" property, if a string, names the waypoint;
// other points are called WP1, WP2, ... by position. Positions are
// [lon, lat] as RFC 7946 requires; an altitude is ignored.
func ParseGeoJSON(data []byte, source string) (*Route, error) {
	var head struct {
		Type string `json:"type"`
	}
	if err := json.Unmarshal(data, &head); err != nil {
		return nil, jsonError(data, source, err)
	}
	switch head.Type {
	case "LineString":
		g, err := geojson.UnmarshalGeometry(data)
		if err != nil {
			return nil, jsonError(data, source, err)
		}
		return lineRoute(source, g.Geometry())
	case "Feature":
		f, err := geojson.UnmarshalFeature(data)
		if err != nil {
			return nil, jsonError(data, source, err)
		}
		return lineRoute(source, f.Geometry)
	case "FeatureCollection":
		fc, err := geojson.UnmarshalFeatureCollection(data)
		if err != nil {
			return nil, jsonError(data, source, err)
		}
		return collectionRoute(source, fc)
	case "":
		return nil, &FormatError{Source: source, Column: "type", Msg: "no GeoJSON \"type\" member"}
	case "Point", "MultiPoint", "MultiLineString", "Polygon", "MultiPolygon", "GeometryCollection":
		return nil, &UnsupportedError{Source: source, Msg: fmt.Sprintf("GeoJSON %s; want a LineString, a Feature holding one, or a FeatureCollection of Points", head.Type)}
	default:
		return nil, &FormatError{Source: source, Column: "type", Msg: fmt.Sprintf("%s is not a GeoJSON type", clip(head.Type))}
	}
}

func lineRoute(source string, g orb.Geometry) (*Route, error) {
	ls, ok := g.(orb.LineString)
	if !ok {
		if g == nil {
			return nil, &FormatError{Source: source, Column: "geometry", Msg: "feature has no geometry"}
		}
		return nil, &UnsupportedError{Source: source, Msg: fmt.Sprintf("geometry %s; want a LineString", g.GeoJSONType())}
	}
	if len(ls) > MaxPoints {
		return nil, &UnsupportedError{Source: source, Msg: fmt.Sprintf("%d points, more than the limit of %d", len(ls), MaxPoints)}
	}
	pts := make([]Point, len(ls))
	for i, p := range ls {
		pts[i] = Point{Name: "WP" + strconv.Itoa(i+1), Lat: p.Lat(), Lon: p.Lon()}
	}
	return newRoute(source, pts, nil)
}

func collectionRoute(source string, fc *geojson.FeatureCollection) (*Route, error) {
	for i, f := range fc.Features {
		if f == nil {
			return nil, &FormatError{Source: source, Point: i + 1, Column: "features", Msg: "feature is null"}
		}
	}
	if len(fc.Features) == 1 {
		if _, ok := fc.Features[0].Geometry.(orb.LineString); ok {
			return lineRoute(source, fc.Features[0].Geometry)
		}
	}
	if len(fc.Features) > MaxPoints {
		return nil, &UnsupportedError{Source: source, Msg: fmt.Sprintf("%d features, more than the limit of %d", len(fc.Features), MaxPoints)}
	}
	pts := make([]Point, len(fc.Features))
	for i, f := range fc.Features {
		name := "WP" + strconv.Itoa(i+1)
		if s, ok := f.Properties["name"].(string); ok && strings.TrimSpace(s) != "" {
			name = strings.TrimSpace(s)
		}
		p, ok := f.Geometry.(orb.Point)
		if !ok {
			typ := "no geometry"
			if f.Geometry != nil {
				typ = f.Geometry.GeoJSONType()
			}
			return nil, &FormatError{Source: source, Point: i + 1, Name: name, Column: "geometry",
				Msg: fmt.Sprintf("feature is %s; a FeatureCollection route must hold only Point features (or one LineString)", typ)}
		}
		pts[i] = Point{Name: name, Lat: p.Lat(), Lon: p.Lon()}
	}
	return newRoute(source, pts, nil)
}

// jsonError turns a decoding error into a FormatError with the line of the
// offending byte when encoding/json reports one.
func jsonError(data []byte, source string, err error) error {
	msg := err.Error()
	if len(msg) > 120 { // a decoder may quote the input; keep it short
		msg = msg[:120] + "..."
	}
	fe := &FormatError{Source: source, Msg: "invalid GeoJSON: " + strings.ToValidUTF8(msg, "?")}
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		fe.Line = lineOf(data, se.Offset)
	case errors.As(err, &te):
		fe.Line = lineOf(data, te.Offset)
		fe.Column = te.Field
	}
	return fe
}

func lineOf(data []byte, off int64) int {
	if off < 0 || off > int64(len(data)) {
		return 0
	}
	return 1 + bytes.Count(data[:off], []byte{'\n'})
}

// ParseCSV parses a route table with a header row naming the columns
// "name", "lat" and "lon" (any order, case-insensitive; "name" optional,
// "latitude"/"longitude" accepted; other columns ignored), one waypoint
// per row in decimal degrees. Blank lines and lines starting with '#' are
// skipped. Errors name the line and column.
func ParseCSV(r io.Reader, source string) (*Route, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &FormatError{Source: source, Msg: "empty file; want a header name,lat,lon and one row per waypoint"}
	}
	if err != nil {
		return nil, csvError(source, err)
	}
	iName, iLat, iLon := -1, -1, -1
	for i, h := range header {
		switch strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))) {
		case "name":
			iName = i
		case "lat", "latitude", "lat_deg":
			iLat = i
		case "lon", "lng", "longitude", "lon_deg":
			iLon = i
		}
	}
	hl, _ := cr.FieldPos(0)
	if iLat < 0 || iLon < 0 {
		return nil, &FormatError{Source: source, Line: hl, Msg: fmt.Sprintf("header of %d field(s), the first %s, lacks a lat or lon column; want name,lat,lon", len(header), clip(header[0]))}
	}
	var pts []Point
	var lines []int
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvError(source, err)
		}
		line, _ := cr.FieldPos(0)
		if len(pts) >= MaxPoints {
			return nil, &UnsupportedError{Source: source, Msg: fmt.Sprintf("line %d: more than the limit of %d points", line, MaxPoints)}
		}
		n := len(pts) + 1
		name := "WP" + strconv.Itoa(n)
		if iName >= 0 && iName < len(rec) && strings.TrimSpace(rec[iName]) != "" {
			name = strings.TrimSpace(rec[iName])
		}
		get := func(i int, col string) (float64, error) {
			if i >= len(rec) {
				return 0, &FormatError{Source: source, Line: line, Column: col, Point: n, Name: name, Msg: fmt.Sprintf("row has %d fields, no %s", len(rec), col)}
			}
			v, err := parseDeg(rec[i])
			if err != nil {
				return 0, &FormatError{Source: source, Line: line, Column: col, Point: n, Name: name, Msg: err.Error()}
			}
			return v, nil
		}
		lat, err := get(iLat, "lat")
		if err != nil {
			return nil, err
		}
		lon, err := get(iLon, "lon")
		if err != nil {
			return nil, err
		}
		pts = append(pts, Point{Name: name, Lat: lat, Lon: lon})
		lines = append(lines, line)
	}
	return newRoute(source, pts, lines)
}

func csvError(source string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &FormatError{Source: source, Line: pe.Line, Column: strconv.Itoa(pe.Column), Msg: pe.Err.Error()}
	}
	return fmt.Errorf("route: %s: %w", source, err)
}
