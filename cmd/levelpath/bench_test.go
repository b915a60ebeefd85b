package main

import (
	"path/filepath"
	"testing"

	"levelpath/cmd/levelpath/internal/demo"
)

// BenchmarkBatchDay plans a generated day of 1,000 flights (the three demo
// types, 300 to 7,000 NM, one weather set) through the batch command, as
// a user runs it. Run it alone, once:
//
//	go test ./cmd/levelpath -run XXX -bench BatchDay -benchtime 1x
//
// It reports flights per second and the process's peak resident memory.
func BenchmarkBatchDay(b *testing.B) {
	dir := b.TempDir()
	sched, err := demo.Day(dir, 1000, 1)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		out := filepath.Join(dir, "out", string(rune('a'+i%26)), filepath.Base(b.TempDir()))
		var sink discard
		code := run([]string{"batch", "--schedule", sched, "--weather", filepath.Join(dir, "weather.grib2"), "--out", out}, &sink, &sink)
		if code != 0 && code != exitSomeFailed {
			b.Fatalf("batch exit %d", code)
		}
	}
	b.StopTimer()
	b.ReportMetric(1000*float64(b.N)/b.Elapsed().Seconds(), "flights/s")
	b.ReportMetric(float64(peakRSS())/(1<<20), "peak-MiB")
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }
