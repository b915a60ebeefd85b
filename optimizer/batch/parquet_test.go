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
	Flight        string   `parquet:"flight"`
	CI            float64  `parquet:"ci"`
	Status        string   `parquet:"status"`
	Warnings      string   `parquet:"warnings"`
	Departure     int64    `parquet:"departure_utc"`
	Arrival       *int64   `parquet:"arrival_utc,optional"`
	Aircraft      string   `parquet:"aircraft"`
	Row           int64    `parquet:"row"`
	DistanceNM    *float64 `parquet:"distance_nm,optional"`
	TakeoffMassKg *float64 `parquet:"takeoff_mass_kg,optional"`
	ZFWKg         *float64 `parquet:"zfw_kg,optional"`
	LandingMassKg *float64 `parquet:"landing_mass_kg,optional"`
	FuelKg        *float64 `parquet:"fuel_kg,optional"`
	TimeMin       *float64 `parquet:"time_min,optional"`
	Cost          *float64 `parquet:"cost,optional"`
	CO2Kg         *float64 `parquet:"co2_kg,optional"`
	FloorG        *float64 `parquet:"floor_g,optional"`
	Speed         string   `parquet:"speed"`
	Levels        string   `parquet:"levels"`
	InitialFL     *int64   `parquet:"initial_fl,optional"`
	Steps         *int64   `parquet:"steps,optional"`
	MinMarginG    *float64 `parquet:"min_margin_g,optional"`
	CostSavingPct *float64 `parquet:"cost_saving_pct,optional"`
	Profile       string   `parquet:"profile"`
	BlockKg       *float64 `parquet:"block_kg,optional"`
	LimitedBy     string   `parquet:"limited_by"`
	Error         string   `parquet:"error"`
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
// results.csv with encoding/csv and requires the same rows, cell by cell:
// Parquet at full precision, CSV rounded to its documented decimals (nulls
// as empty cells, timestamps as their RFC 3339 instants). It also reads
// the file's key-value metadata (Apache Parquet FileMetaData).
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
	meta := map[string]string{"version": "test-1", "weather.0.sha256": "abc"}
	if _, err := Run(context.Background(), rows, bad, planner, Options{Out: out, Sweep: []float64{0, 35}, Meta: meta}); err != nil {
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
	f := func(p *float64, dec int) string {
		if p == nil {
			return ""
		}
		return strconv.FormatFloat(round(*p, dec), 'f', -1, 64)
	}
	i := func(p *int64) string {
		if p == nil {
			return ""
		}
		return strconv.FormatInt(*p, 10)
	}
	ts := func(p *int64) string {
		if p == nil {
			return ""
		}
		return time.UnixMilli(*p).UTC().Format(time.RFC3339)
	}
	nulls, finer := 0, 0
	for n, p := range pq {
		c := csvRows[n+1]
		if p.MinMarginG == nil {
			nulls++
		}
		if p.FuelKg != nil && *p.FuelKg != round(*p.FuelKg, 1) {
			finer++
		}
		got := []string{p.Flight, strconv.FormatFloat(p.CI, 'f', -1, 64), p.Status, p.Warnings, ts(&p.Departure), ts(p.Arrival),
			p.Aircraft, strconv.FormatInt(p.Row, 10), f(p.DistanceNM, 1), f(p.TakeoffMassKg, 1), f(p.ZFWKg, 1),
			f(p.LandingMassKg, 1), f(p.FuelKg, 1), f(p.TimeMin, 2), f(p.Cost, 1), f(p.CO2Kg, 1), f(p.FloorG, 3),
			p.Speed, p.Levels, i(p.InitialFL), i(p.Steps), f(p.MinMarginG, 3), f(p.CostSavingPct, 2), p.Profile, f(p.BlockKg, 1), p.LimitedBy, p.Error}
		var want []string
		for _, name := range resultColumns {
			want = append(want, c[col[name]])
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("row %d: parquet %q\ncsv %q", n, got, want)
		}
	}
	if nulls == 0 {
		t.Error("no null min_margin_g in the parquet file: the null path was not exercised")
	}
	if finer == 0 {
		t.Error("every parquet fuel_kg is a multiple of 0.1 kg: not full precision")
	}
	pf, err := os.Open(filepath.Join(out, ResultsParquet))
	if err != nil {
		t.Fatal(err)
	}
	defer pf.Close()
	st, _ := pf.Stat()
	file, err := parquet.OpenFile(pf, st.Size())
	if err != nil {
		t.Fatal(err)
	}
	for k, v := range map[string]string{"levelpath.version": "test-1", "levelpath.weather.0.sha256": "abc",
		"levelpath.fingerprint": runFingerprint(meta, []float64{0, 35})} {
		if got, ok := file.Lookup(k); !ok || got != v {
			t.Errorf("parquet metadata %s = %q, %v; want %q", k, got, ok, v)
		}
	}
}
