// Package demo writes the invented demonstration scenario: routes, a
// synthetic weather file (synthetic.Weather) and a day's schedule.
// Everything in it is invented for demonstration; none of it is a check
// value.
package demo

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"levelpath/route"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// Ref returns the reference time of the demo weather, 2026-12-01 18:00 UTC.
func Ref() time.Time { return time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC) }

// City is an invented airport.
type City struct {
	Name     string
	Lat, Lon float64
}

// Invented airports (the coordinates are arbitrary points; the names are
// made up for the demo). Constant after package initialisation: the
// package's exported functions return copies.
var (
	avalon   = City{"AVALON", 44.6, -74.2}
	meridia  = City{"MERIDIA", 25.3, 55.8}
	corvale  = City{"CORVALE", 51.0, -1.0}
	sunhaven = City{"SUNHAVEN", 25.8, -80.3}
	lakeport = City{"LAKEPORT", 42.0, -87.8}
)

// RouteFile is one demo route.
type RouteFile struct {
	File     string
	From, To City
	Via      int // intermediate waypoints on the geodesic
}

var routes = [...]RouteFile{
	{"route.geojson", avalon, meridia, 7},
	{"route-corvale.geojson", avalon, corvale, 4},
	{"route-sunhaven.geojson", avalon, sunhaven, 2},
	{"route-lakeport.geojson", avalon, lakeport, 1},
}

// Routes returns the demo routes, the long haul first (a copy).
func Routes() []RouteFile { return append([]RouteFile(nil), routes[:]...) }

// Flight is a schedule line.
type Flight struct {
	ID       string
	Depart   time.Time
	Route    string
	Aircraft string
	TOW, CI  float64
}

// Schedule is the demo day.
func Schedule() []Flight {
	d := func(h, m int) time.Time { return Ref().Add(time.Duration(h)*time.Hour + time.Duration(m)*time.Minute) }
	return []Flight{
		{"DEMO101", d(2, 0), "route.geojson", "demo-widebody", 245000, 40},
		{"DEMO103", d(4, 30), "route.geojson", "demo-widebody", 238000, 80},
		{"DEMO201", d(2, 45), "route-corvale.geojson", "demo-widebody", 205000, 30},
		{"DEMO203", d(6, 15), "route-corvale.geojson", "demo-widebody", 198000, 60},
		{"DEMO301", d(3, 0), "route-sunhaven.geojson", "demo-narrowbody", 72000, 20},
		{"DEMO303", d(5, 0), "route-sunhaven.geojson", "demo-narrowbody", 69500, 35},
		{"DEMO305", d(9, 40), "route-sunhaven.geojson", "demo-narrowbody", 71000, 10},
		{"DEMO401", d(2, 20), "route-lakeport.geojson", "demo-regional", 36500, 15},
		{"DEMO403", d(7, 10), "route-lakeport.geojson", "demo-regional", 35000, 25},
		{"DEMO405", d(11, 0), "route-lakeport.geojson", "demo-regional", 38000, 0},
	}
}

// Arrival is an invented arrival target of a demo flight: arrive by At,
// inside the window Window ("-10m,+5m").
type Arrival struct {
	At     time.Time
	Window string
}

// Arrivals returns the invented arrival targets of some demo flights, by
// flight id (schedule-arrivals.csv).
func Arrivals() map[string]Arrival {
	d := func(h, m int) time.Time { return Ref().Add(time.Duration(h)*time.Hour + time.Duration(m)*time.Minute) }
	return map[string]Arrival{
		"DEMO101": {d(13, 15), "-10m,+5m"},
		"DEMO201": {d(8, 15), "-10m,+5m"},
		"DEMO301": {d(5, 42), "-10m,+5m"},
		"DEMO401": {d(4, 0), "-10m,+5m"},
	}
}

// DelayCostCSV is the invented delay cost of the demo
// (delay-cost.csv), in the format optimizer.ParseDelayCost reads.
const DelayCostCSV = `# Invented demo delay cost: kg of fuel-equivalent by minutes after the
# scheduled arrival (no cost in the first 5 minutes, then steeper).
minutes_late,cost_kg
0,0
5,0
30,2500
90,15000
`

// RouteGeoJSON returns a demo route as a FeatureCollection of named Points
// along the WGS-84 geodesic.
func RouteGeoJSON(r RouteFile) ([]byte, error) {
	s12, azi1, _ := route.Inverse(r.From.Lat, r.From.Lon, r.To.Lat, r.To.Lon)
	fc := geojson.NewFeatureCollection()
	add := func(name string, lat, lon float64) {
		f := geojson.NewFeature(orb.Point{lon, lat})
		f.Properties["name"] = name
		fc.Append(f)
	}
	add(r.From.Name, r.From.Lat, r.From.Lon)
	for i := 1; i <= r.Via; i++ {
		lat, lon, _ := route.Direct(r.From.Lat, r.From.Lon, azi1, s12*float64(i)/float64(r.Via+1))
		add(fmt.Sprintf("WPT%02d", i), lat, lon)
	}
	add(r.To.Name, r.To.Lat, r.To.Lon)
	fc.ExtraMembers = geojson.Properties{"description": "Invented demo route for levelpath; not a real flight."}
	return json.MarshalIndent(fc, "", "  ")
}

// Files lists what Write produced.
type Files struct {
	Dir, Route, Weather, Schedule string
	Routes                        []string
	// Arrivals is the schedule with arrival targets (arrive_by,
	// arrive_window), DelayCost the delay-cost file.
	Arrivals, DelayCost string
}

// Write writes the scenario into dir.
func Write(dir string) (Files, error) {
	fs := Files{Dir: dir}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fs, err
	}
	for _, r := range Routes() {
		b, err := RouteGeoJSON(r)
		if err != nil {
			return fs, err
		}
		p := filepath.Join(dir, r.File)
		if err := os.WriteFile(p, append(b, '\n'), 0o644); err != nil {
			return fs, err
		}
		fs.Routes = append(fs.Routes, p)
	}
	fs.Route = fs.Routes[0]
	var buf bytes.Buffer
	if err := winds.WriteGRIB2(&buf, synthetic.Weather(Ref())); err != nil {
		return fs, err
	}
	fs.Weather = filepath.Join(dir, "weather.grib2")
	if err := os.WriteFile(fs.Weather, buf.Bytes(), 0o644); err != nil {
		return fs, err
	}
	var sb bytes.Buffer
	sb.WriteString("flight,departure,route,aircraft,tow_kg,ci\n")
	for _, f := range Schedule() {
		fmt.Fprintf(&sb, "%s,%s,%s,%s,%.0f,%g\n", f.ID, f.Depart.Format(time.RFC3339), f.Route, f.Aircraft, f.TOW, f.CI)
	}
	fs.Schedule = filepath.Join(dir, "schedule.csv")
	if err := os.WriteFile(fs.Schedule, sb.Bytes(), 0o644); err != nil {
		return fs, err
	}
	sb.Reset()
	sb.WriteString("flight,departure,route,aircraft,tow_kg,ci,arrive_by,arrive_window\n")
	arr := Arrivals()
	for _, f := range Schedule() {
		by, win := "", ""
		if a, ok := arr[f.ID]; ok {
			by, win = a.At.Format(time.RFC3339), `"`+a.Window+`"`
		}
		fmt.Fprintf(&sb, "%s,%s,%s,%s,%.0f,%g,%s,%s\n", f.ID, f.Depart.Format(time.RFC3339), f.Route, f.Aircraft, f.TOW, f.CI, by, win)
	}
	fs.Arrivals = filepath.Join(dir, "schedule-arrivals.csv")
	if err := os.WriteFile(fs.Arrivals, sb.Bytes(), 0o644); err != nil {
		return fs, err
	}
	fs.DelayCost = filepath.Join(dir, "delay-cost.csv")
	if err := os.WriteFile(fs.DelayCost, []byte(DelayCostCSV), 0o644); err != nil {
		return fs, err
	}
	readme := "Invented levelpath demo scenario: invented airports, aircraft, flights and weather.\nNot real data; do not use for operations.\n"
	return fs, os.WriteFile(filepath.Join(dir, "README.txt"), []byte(readme), 0o644)
}
