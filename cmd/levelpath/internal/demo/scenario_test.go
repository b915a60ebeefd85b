package demo

import (
	"math"
	"os"
	"path/filepath"
	"testing"
	"time"

	"levelpath/optimizer"
	"levelpath/optimizer/batch"
	"levelpath/route"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// TestWriteScenario writes the scenario and reads every file back with the
// project's own readers: the routes parse and have the lengths the demo
// promises, the weather decodes to the invented field within the 16-bit
// packing step, and the schedule names existing routes.
func TestWriteScenario(t *testing.T) {
	dir := t.TempDir()
	fs, err := Write(dir)
	if err != nil {
		t.Fatal(err)
	}
	r, err := route.Load(fs.Route)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := route.Build(r, route.Options{Date: Ref()})
	if err != nil {
		t.Fatal(err)
	}
	if nm := tr.Total / 1852; nm < 5500 || nm > 6500 {
		t.Errorf("long-haul route is %.0f NM, want 5,500-6,500", nm)
	}
	f, err := winds.Open(fs.Weather)
	if err != nil {
		t.Fatal(err)
	}
	ts := f.Times()
	if span := ts[len(ts)-1].Sub(ts[0]); span < 24*time.Hour {
		t.Errorf("weather spans %v, want at least 24 h", span)
	}
	for _, q := range []struct{ lat, lon, p, h float64 }{{50, -30, 25000, 6}, {30, 40, 20000, 12}, {-20, 100, 30000, 0}} {
		s, err := f.Sample(q.lat, q.lon, q.p, ts[0].Add(time.Duration(q.h)*time.Hour))
		if err != nil {
			t.Fatal(err)
		}
		u, v, tk, _ := synthetic.Point(q.lat, q.lon, q.p, q.h)
		// On grid points the decoded value equals the packed one to within
		// the packing step (range/65535 for 16 bits).
		if math.Abs(s.U-u) > 0.05 || math.Abs(s.V-v) > 0.05 || math.Abs(s.T-tk) > 0.05 {
			t.Errorf("%v: decoded u %.3f v %.3f T %.3f, written %.3f %.3f %.3f", q, s.U, s.V, s.T, u, v, tk)
		}
	}
	for _, fl := range Schedule() {
		if _, err := os.Stat(filepath.Join(dir, fl.Route)); err != nil {
			t.Errorf("flight %s: %v", fl.ID, err)
		}
		if fl.Depart.Before(ts[0]) || fl.Depart.Add(16*time.Hour).After(ts[len(ts)-1]) {
			t.Errorf("flight %s departs %v outside the weather's times", fl.ID, fl.Depart)
		}
	}
	// The arrivals schedule and the delay cost read with the program's
	// own readers, every target after its departure.
	rows, bad, err := batch.ReadSchedule(fs.Arrivals)
	if err != nil || len(bad) > 0 || len(rows) != len(Schedule()) {
		t.Errorf("schedule-arrivals.csv: %d rows, bad %v, %v", len(rows), bad, err)
	}
	targets := 0
	for _, r := range rows {
		if !r.ArriveBy.IsZero() {
			targets++
		}
	}
	if targets != len(Arrivals()) {
		t.Errorf("schedule-arrivals.csv: %d targets, want %d", targets, len(Arrivals()))
	}
	data, err := os.ReadFile(fs.DelayCost)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := optimizer.ParseDelayCost(data, fs.DelayCost); err != nil {
		t.Error(err)
	}
}
