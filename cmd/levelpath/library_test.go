package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"

	"levelpath/optimizer"
	"levelpath/optimizer/batch"
	"levelpath/perf"
	"levelpath/winds"
)

// TestLibraryMatchesCLI: a Go program that uses only the exported API
// (batch.ReadSchedule, batch.SchedulePlanner, batch.Run, winds.Options)
// gets plans byte-identical to those of levelpath batch on the demo day.
func TestLibraryMatchesCLI(t *testing.T) {
	fs := demoFiles(t)
	dir := t.TempDir()
	cliOut := filepath.Join(dir, "cli")
	if code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", cliOut); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, errs)
	}
	rows, bad, err := batch.ReadSchedule(fs.Schedule)
	if err != nil {
		t.Fatal(err)
	}
	wx, err := winds.Options{}.OpenBetween(perf.FLToPressure(600), perf.FLToPressure(50), fs.Weather)
	if err != nil {
		t.Fatal(err)
	}
	pl := &batch.SchedulePlanner{Weather: wx, MaxSegment: 50 * perf.NMToM,
		Steps: optimizer.StepRules{MaxChange: 4000 * perf.FtToM, MinDistance: 100 * perf.NMToM}} // the CLI's default step rules
	libOut := filepath.Join(dir, "lib")
	if _, err := batch.Run(context.Background(), rows, bad, pl.Plan, batch.Options{Out: libOut, Workers: 2}); err != nil {
		t.Fatal(err)
	}
	names, err := filepath.Glob(filepath.Join(cliOut, "plans", "*.json"))
	if err != nil || len(names) != len(rows) {
		t.Fatalf("%d CLI plans for %d rows (%v)", len(names), len(rows), err)
	}
	for _, n := range names {
		a, _ := os.ReadFile(n)
		b, err := os.ReadFile(filepath.Join(libOut, "plans", filepath.Base(n)))
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: library plan differs from the CLI's (%v)", filepath.Base(n), err)
		}
	}
}
