package optimizer

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"levelpath/perf"
	"levelpath/route"
)

// BenchmarkPlanLongHaulDefault is the demo long-haul plan with the CLI's
// defaults: odd-even-magnetic levels and 50 NM segments.
func BenchmarkPlanLongHaulDefault(b *testing.B) {
	wx, ref := demoWeather(b)
	p := &Problem{Track: track(b, longHaulRoute, "odd-even-magnetic", 50), Aircraft: aircraft(b, "demo-widebody"),
		Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
	benchPlan(b, p)
}

// BenchmarkPlanLongHaulTables is BenchmarkPlanLongHaulDefault planned from
// the demo-widebody model's own exported tables (perf.DefaultExportGrid),
// read back with perf.Load: the cost of answering from multilinear tables
// instead of the model. Export and load are outside the timed loop.
func BenchmarkPlanLongHaulTables(b *testing.B) {
	wx, ref := demoWeather(b)
	dir := b.TempDir()
	m := aircraft(b, "demo-widebody")
	if err := m.ExportTables(dir, perf.DefaultExportGrid(m)); err != nil {
		b.Fatal(err)
	}
	a, err := perf.Load(dir)
	if err != nil {
		b.Fatal(err)
	}
	p := &Problem{Track: track(b, longHaulRoute, "odd-even-magnetic", 50), Aircraft: a,
		Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
	benchPlan(b, p)
}

// BenchmarkLoadTables is the time to read and validate the exported
// demo-widebody tables (perf.Load of the directory, about 9 MB of CSV).
func BenchmarkLoadTables(b *testing.B) {
	dir := b.TempDir()
	m := aircraft(b, "demo-widebody")
	if err := m.ExportTables(dir, perf.DefaultExportGrid(m)); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		if _, err := perf.Load(dir); err != nil {
			b.Fatal(err)
		}
	}
}

// scaleTrack is a great-circle route of nm nautical miles (waypoints every 2,000 NM) from 35N 140E
// heading 60 degrees true (across the Pacific in the invented weather),
// cut into 10 NM segments, every 1,000 ft allowed from FL100.
func scaleTrack(b testing.TB, nm float64) *route.Track {
	var pts strings.Builder
	pts.WriteString("35,140")
	for d := 2000.0; ; d += 2000 {
		lat, lon, _ := route.Direct(35, 140, 60, math.Min(d, nm)*nmToM)
		pts.WriteString(fmt.Sprintf(" %.6f,%.6f", lat, route.NormalizeLon(lon)))
		if d >= nm {
			break
		}
	}
	return track(b, pts.String(), "every-1000", 10)
}

// BenchmarkPlanScale plans routes of 500 to 8,000 NM with 10 NM segments
// and every-1000 levels, to measure how nodes and time grow with distance.
// Run alone, once per case, for the peak memory of one case:
//
//	go test ./optimizer -run XXX -bench 'PlanScale/nm=8000' -benchtime 1x
func BenchmarkPlanScale(b *testing.B) {
	wx, ref := demoWeather(b)
	for _, nm := range []float64{500, 1000, 2000, 4000, 8000} {
		b.Run(fmt.Sprintf("nm=%.0f", nm), func(b *testing.B) {
			p := &Problem{Track: scaleTrack(b, nm), Aircraft: aircraft(b, "demo-widebody"),
				Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
			benchPlan(b, p)
		})
	}
}

func benchPlan(b *testing.B, p *Problem) {
	b.ReportAllocs()
	b.ResetTimer()
	cpu0 := cpuTime()
	var plan *Plan
	for i := 0; i < b.N; i++ {
		var err error
		if plan, err = Solve(p); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	b.ReportMetric((cpuTime()-cpu0).Seconds()*1000/float64(b.N), "cpu-ms/op")
	b.ReportMetric(plan.SearchCost, "cost")
	b.ReportMetric(float64(plan.Nodes), "nodes")
	b.ReportMetric(float64(peakRSS())/(1<<20), "peak-MiB")
}
