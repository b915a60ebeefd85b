package batch_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"levelpath/optimizer/batch"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// A research program plans a small schedule with the same row-to-problem
// planner as levelpath batch, using only exported API: one flight plans,
// one row is bad (its floor is outside the one range every entry point
// accepts) and lands in errors.csv instead of stopping the run.
func ExampleSchedulePlanner() {
	dir, err := os.MkdirTemp("", "levelpath-example-")
	if err != nil {
		panic(err)
	}
	defer os.RemoveAll(dir)
	route, err := filepath.Abs("../../testdata/demo/route.geojson")
	if err != nil {
		panic(err)
	}
	sched := filepath.Join(dir, "day.csv")
	os.WriteFile(sched, []byte("flight,departure,route,aircraft,tow_kg,ci,floor_g\n"+
		"X1,2026-12-01T20:00:00Z,"+route+",demo-widebody,245000,40,\n"+
		"X2,2026-12-01T21:00:00Z,"+route+",demo-widebody,245000,40,3.0\n"), 0o644)
	rows, bad, err := batch.ReadSchedule(sched)
	if err != nil {
		panic(err)
	}
	wx, err := winds.NewField(synthetic.Weather(time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC)))
	if err != nil {
		panic(err)
	}
	pl := &batch.SchedulePlanner{Weather: wx}
	sum, err := batch.Run(context.Background(), rows, bad, pl.Plan, batch.Options{Out: filepath.Join(dir, "out"), Workers: 1})
	if err != nil {
		panic(err)
	}
	fmt.Println(len(rows), len(bad), sum.Planned, sum.Failed, sum.BadRows)
	// Output: 1 1 1 0 1
}
