package batch

import (
	"context"
	"path/filepath"
	"strconv"
	"testing"
)

// BenchmarkRun1000 measures the orchestration overhead of a 1,000-flight
// run with a planner that does no work: scheduling, two atomic file writes
// per flight (plan and record), reading the records back and writing the
// final CSV and Parquet files.
func BenchmarkRun1000(b *testing.B) {
	dir := b.TempDir()
	rows, bad := mustRead(b, writeSchedule(b, dir, 1000))
	plan := []byte(`{"profile":"FL350"}`)
	trivial := func(_ context.Context, row Row, ci float64) (Result, error) {
		return Result{Fuel: row.TOW / 20, Time: 95, Cost: row.TOW/20 + 95*ci, CO2: 3.16 * row.TOW / 20,
			InitialFL: 350, MinMargin: 1.4, CostSavingPct: 1, PlanJSON: plan}, nil
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		out := filepath.Join(dir, "run"+strconv.Itoa(i))
		i++
		if _, err := Run(context.Background(), rows, bad, trivial, Options{Out: out}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/1000, "ns/flight")
}
