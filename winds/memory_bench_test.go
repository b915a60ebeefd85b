package winds

import (
	"bufio"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"syscall"
	"testing"
	"time"
)

// BenchmarkOpenQuarterDegree builds the memory case on disk, a
// 0.25-degree global set of 12 levels x 3 variables x 5 valid times (one
// GRIB2 file per time, simple packing, about 360 MB in all), opens it with
// Open and reports the field's live heap and the process's peak resident
// memory. The goal is a field under 1 GiB. Run it alone:
//
//	go test ./winds -run XXX -bench OpenQuarterDegree -benchtime 1x
func BenchmarkOpenQuarterDegree(b *testing.B) {
	dir := os.Getenv("LEVELPATH_Q025_DIR") // keep the files there, to time other tools on them
	if dir == "" {
		dir = b.TempDir()
	}
	const ni, nj = 1440, 721
	ref := time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)
	levels := []float64{100000, 92500, 85000, 70000, 50000, 40000, 30000, 25000, 20000, 15000, 10000, 7000}
	vals := make([]float32, ni*nj)
	var paths []string
	for h := range 5 {
		p := filepath.Join(dir, fmt.Sprintf("t%d.grib2", h))
		f, err := os.Create(p)
		if err != nil {
			b.Fatal(err)
		}
		w := bufio.NewWriter(f)
		for _, lv := range levels {
			for _, v := range []struct {
				c, n int
				par  Param
			}{{2, 2, ParamU}, {2, 3, ParamV}, {0, 0, ParamT}} {
				for i := range vals {
					vals[i] = float32(200 + 50*math.Sin(float64(i)*1e-4+lv*1e-5+float64(h)))
				}
				m := Message{Category: v.c, Number: v.n, Param: v.par, LevelType: 100, Level: lv, RefTime: ref,
					ValidTime: ref.Add(time.Duration(6*h) * time.Hour), Ni: ni, Nj: nj, Lat1: 90, Lon1: 0, Lat2: -90,
					Lon2: 359.75, Di: 0.25, Dj: 0.25, Ensemble: -1, Values: vals}
				if err := WriteGRIB2(w, []Message{m}); err != nil {
					b.Fatal(err)
				}
			}
		}
		if err := w.Flush(); err != nil {
			b.Fatal(err)
		}
		f.Close()
		paths = append(paths, p)
	}
	vals = nil
	runtime.GC()
	var before runtime.MemStats
	runtime.ReadMemStats(&before)
	b.ResetTimer()
	var fld *Field
	for i := 0; i < b.N; i++ {
		fld = nil
		runtime.GC()
		var err error
		if fld, err = Open(paths...); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	runtime.GC()
	var after runtime.MemStats
	runtime.ReadMemStats(&after)
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	b.ReportMetric(float64(after.HeapInuse)/(1<<20), "heap-MiB")
	b.ReportMetric(float64(ru.Maxrss)/1024, "peak-RSS-MiB")
	if _, err := fld.Sample(45, 10, 26000, ref.Add(3*time.Hour)); err != nil {
		b.Fatal(err)
	}
}
