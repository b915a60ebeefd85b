package batch

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"testing"
	"time"

	"github.com/parquet-go/parquet-go"
)

// readBack is declared here, apart from the writer's parquetRow, so that
// reading the file with parquet-go checks the column names and types the
// file really has.
type readBack struct {
	Flight            string   `parquet:"flight"`
	CI                float64  `parquet:"ci"`
	Status            string   `parquet:"status"`
	Departure         int64    `parquet:"departure"`
	Aircraft          string   `parquet:"aircraft"`
	Row               int64    `parquet:"row"`
	FuelKg            *float64 `parquet:"fuel_kg,optional"`
	TimeMin           *float64 `parquet:"time_min,optional"`
	Cost              *float64 `parquet:"cost,optional"`
	CO2Kg             *float64 `parquet:"co2_kg,optional"`
	InitialFL         *int64   `parquet:"initial_fl,optional"`
	Steps             *int64   `parquet:"steps,optional"`
	MinMarginG        *float64 `parquet:"min_margin_g,optional"`
	BaselineSavingPct *float64 `parquet:"baseline_saving_pct,optional"`
	LandingMassKg     *float64 `parquet:"landing_mass_kg,optional"`
	Profile           string   `parquet:"profile"`
	Error             string   `parquet:"error"`
}

func readParquet(t testing.TB, path string) []readBack {
	t.Helper()
	rows, err := parquet.ReadFile[readBack](path)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return rows
}

func equalParquetRows(t testing.TB, a, b string) bool {
	t.Helper()
	return reflect.DeepEqual(readParquet(t, a), readParquet(t, b))
}

func writeManifestForTest(t testing.TB, dir string, m manifest) {
	t.Helper()
	data, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, manifestName), data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestParquetMatchesCSV reads results.parquet back with parquet-go and
// results.csv with encoding/csv and requires the same rows, cell by cell
// (nulls as empty cells, the departure timestamp as its RFC 3339 instant).
func TestParquetMatchesCSV(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 30))
	planner := func(ctx context.Context, row Row, ci float64) (Result, error) {
		if row.Flight == "T0005" {
			return Result{}, os.ErrInvalid // a failed row: nulls in parquet
		}
		return fakePlan(ctx, row, ci)
	}
	out := filepath.Join(dir, "out")
	if _, err := Run(context.Background(), rows, bad, planner, Options{Out: out, Sweep: []float64{0, 35}}); err != nil {
		t.Fatal(err)
	}
	csvRows := readCSV(t, filepath.Join(out, ResultsCSV))
	pq := readParquet(t, filepath.Join(out, ResultsParquet))
	if len(pq) != len(csvRows)-1 || len(pq) != 60 {
		t.Fatalf("parquet has %d rows, csv %d data rows, want 60", len(pq), len(csvRows)-1)
	}
	col := map[string]int{}
	for i, c := range csvRows[0] {
		col[c] = i
	}
	f := func(p *float64) string {
		if p == nil {
			return ""
		}
		return strconv.FormatFloat(*p, 'f', -1, 64)
	}
	i := func(p *int64) string {
		if p == nil {
			return ""
		}
		return strconv.FormatInt(*p, 10)
	}
	nulls := 0
	for n, p := range pq {
		c := csvRows[n+1]
		dep, err := time.Parse(time.RFC3339, c[col["departure"]])
		if err != nil {
			t.Fatal(err)
		}
		if p.MinMarginG == nil {
			nulls++
		}
		got := []string{p.Flight, strconv.FormatFloat(p.CI, 'f', -1, 64), p.Status, p.Aircraft,
			strconv.FormatInt(p.Row, 10), f(p.FuelKg), f(p.TimeMin), f(p.Cost), f(p.CO2Kg),
			i(p.InitialFL), i(p.Steps), f(p.MinMarginG), f(p.BaselineSavingPct), f(p.LandingMassKg), p.Profile, p.Error}
		want := []string{c[col["flight"]], c[col["ci"]], c[col["status"]], c[col["aircraft"]],
			c[col["row"]], c[col["fuel_kg"]], c[col["time_min"]], c[col["cost"]], c[col["co2_kg"]],
			c[col["initial_fl"]], c[col["steps"]], c[col["min_margin_g"]], c[col["baseline_saving_pct"]], c[col["landing_mass_kg"]], c[col["profile"]], c[col["error"]]}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("row %d: parquet %q\ncsv %q", n, got, want)
		}
		if p.Departure != dep.UnixMilli() {
			t.Errorf("row %d: parquet departure %d ms, csv %s", n, p.Departure, dep)
		}
	}
	if nulls == 0 {
		t.Error("no null min_margin_g in the parquet file: the null path was not exercised")
	}
}
