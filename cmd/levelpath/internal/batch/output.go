package batch

import (
	"bytes"
	"cmp"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"hash/fnv"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"time"

	"github.com/parquet-go/parquet-go"
)

// Final file names in an output directory.
const (
	ResultsCSV     = "results.csv"
	ResultsParquet = "results.parquet"
	ErrorsCSV      = "errors.csv"
	SummaryCSV     = "summary.csv"
)

// manifest.json is written last by a run that made every plan; Merge
// requires it, so an unfinished shard cannot be merged by mistake.
type manifest struct {
	Version  int       `json:"version"`
	Shard    int       `json:"shard"`
	Shards   int       `json:"shards"`
	Sweep    []float64 `json:"sweep"`    // nil: each row's own CI
	Schedule string    `json:"schedule"` // fingerprint of all rows and bad rows
	Records  []string  `json:"records"`  // file names in parts/
}

// scheduleFingerprint identifies the whole schedule (all shards see the
// same one), so Merge can refuse shards run on different schedules.
func scheduleFingerprint(rows []Row, bad []RowError) string {
	h := fnv.New64a()
	for i := range rows {
		fmt.Fprintln(h, fingerprint(&rows[i], rows[i].CI), rows[i].HasCI)
	}
	for _, b := range bad {
		fmt.Fprintln(h, b.Error())
	}
	return strconv.FormatUint(h.Sum64(), 16)
}

// resultColumns are the columns of results.csv, in order.
var resultColumns = []string{"flight", "ci", "status", "departure", "aircraft", "row",
	"fuel_kg", "time_min", "cost", "co2_kg", "initial_fl", "steps", "min_margin_g",
	"baseline_saving_pct", "landing_mass_kg", "profile", "error"}

// parquetRow is one row of results.parquet: the same columns as
// results.csv, departure as a UTC timestamp in milliseconds, absent values
// (failed flights, no margin, no baseline) as nulls.
type parquetRow struct {
	Flight            string   `parquet:"flight,dict"`
	CI                float64  `parquet:"ci"`
	Status            string   `parquet:"status,dict"`
	Departure         int64    `parquet:"departure,timestamp(millisecond)"`
	Aircraft          string   `parquet:"aircraft,dict"`
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

// assemble reads the records named by man from out/parts and writes the
// final files and then the manifest.
func assemble(out string, man manifest) (Summary, error) {
	recs := make([]record, 0, len(man.Records))
	for _, name := range man.Records {
		rec, err := readRecord(filepath.Join(out, partsDir, name))
		if err != nil {
			return Summary{}, fmt.Errorf("batch: assembling results: %w", err)
		}
		recs = append(recs, rec)
	}
	return writeFinal(out, man, recs)
}

// writeFinal writes the final files of out from recs (the records named by
// man, in any order; recs is reordered) and then the manifest.
func writeFinal(out string, man manifest, recs []record) (Summary, error) {
	var bads []record
	results := recs[:0] // filtered in place
	for _, rec := range recs {
		if rec.Kind == badKind {
			bads = append(bads, rec)
		} else {
			results = append(results, rec)
		}
	}
	slices.SortFunc(results, func(a, b record) int {
		return cmp.Or(cmp.Compare(a.Flight, b.Flight), cmp.Compare(a.CI, b.CI))
	})
	slices.SortFunc(bads, func(a, b record) int {
		return cmp.Or(cmp.Compare(a.Flight, b.Flight), cmp.Compare(a.Row, b.Row))
	})
	sum := summarize(results)
	sum.BadRows = len(bads)

	type outFile struct {
		name string
		make func() ([]byte, error)
	}
	files := []outFile{
		{ResultsCSV, func() ([]byte, error) { return resultsCSV(results) }},
		{ResultsParquet, func() ([]byte, error) { return resultsParquet(results) }},
		{ErrorsCSV, func() ([]byte, error) { return errorsCSV(results, bads) }},
	}
	if man.Sweep != nil {
		files = append(files, outFile{SummaryCSV, func() ([]byte, error) { return summaryCSV(sum.ByCI) }})
	}
	for _, f := range files {
		data, err := f.make()
		if err != nil {
			return sum, fmt.Errorf("batch: %s: %w", f.name, err)
		}
		if err := atomicWrite(out, f.name, data); err != nil {
			return sum, fmt.Errorf("batch: %w", err)
		}
	}
	data, err := json.MarshalIndent(man, "", " ")
	if err != nil {
		return sum, err
	}
	if err := atomicWrite(out, manifestName, append(data, '\n')); err != nil {
		return sum, fmt.Errorf("batch: %w", err)
	}
	return sum, nil
}

// summarize counts results sorted by (flight, ci) and totals them per CI in
// that order, so that sums are reproducible to the last bit.
func summarize(results []record) Summary {
	var sum Summary
	by := map[float64]*CISummary{}
	for _, r := range results {
		c := by[r.CI]
		if c == nil {
			c = &CISummary{CI: r.CI}
			by[r.CI] = c
		}
		if r.Status != statusOK {
			sum.Failed++
			c.Failed++
			continue
		}
		sum.Planned++
		c.Flights++
		c.Fuel += *r.FuelKg
		c.Time += *r.TimeMin
		c.Cost += *r.Cost
		c.CO2 += *r.CO2Kg
	}
	for _, c := range by {
		c.Fuel, c.Time, c.Cost, c.CO2 = round(c.Fuel, 1), round(c.Time, 2), round(c.Cost, 1), round(c.CO2, 1)
		sum.ByCI = append(sum.ByCI, *c)
	}
	slices.SortFunc(sum.ByCI, func(a, b CISummary) int { return cmp.Compare(a.CI, b.CI) })
	return sum
}

// fmtNum formats a number for the CSV files: shortest exact form.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

func fmtF(p *float64) string {
	if p == nil {
		return ""
	}
	return fmtNum(*p)
}

func fmtI(p *int) string {
	if p == nil {
		return ""
	}
	return strconv.Itoa(*p)
}

func writeCSV(records [][]string) ([]byte, error) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	if err := w.WriteAll(records); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

func resultsCSV(results []record) ([]byte, error) {
	recs := [][]string{resultColumns}
	for _, r := range results {
		recs = append(recs, []string{r.Flight, ciText(r.CI), r.Status, r.Departure, r.Aircraft,
			strconv.Itoa(r.Row), fmtF(r.FuelKg), fmtF(r.TimeMin), fmtF(r.Cost), fmtF(r.CO2Kg),
			fmtI(r.InitialFL), fmtI(r.Steps), fmtF(r.MinMarginG), fmtF(r.BaselineSavingPct), fmtF(r.LandingMassKg), r.Profile, r.Reason})
	}
	return writeCSV(recs)
}

func resultsParquet(results []record) ([]byte, error) {
	i64 := func(p *int) *int64 {
		if p == nil {
			return nil
		}
		return ptr(int64(*p))
	}
	rows := make([]parquetRow, len(results))
	for i, r := range results {
		dep, err := time.Parse(time.RFC3339, r.Departure)
		if err != nil {
			return nil, fmt.Errorf("record of flight %s: departure %q: %w", r.Flight, r.Departure, err)
		}
		rows[i] = parquetRow{Flight: r.Flight, CI: r.CI, Status: r.Status, Departure: dep.UnixMilli(),
			Aircraft: r.Aircraft, Row: int64(r.Row), FuelKg: r.FuelKg, TimeMin: r.TimeMin, Cost: r.Cost,
			CO2Kg: r.CO2Kg, InitialFL: i64(r.InitialFL), Steps: i64(r.Steps), MinMarginG: r.MinMarginG,
			BaselineSavingPct: r.BaselineSavingPct, LandingMassKg: r.LandingMassKg, Profile: r.Profile, Error: r.Reason}
	}
	var buf bytes.Buffer
	if err := parquet.Write(&buf, rows); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// errorsCSV lists bad schedule rows (empty ci) and failed plans, sorted by
// flight, then bad rows before plans, then ci and row.
func errorsCSV(results, bads []record) ([]byte, error) {
	type line struct {
		flight string
		hasCI  bool
		ci     float64
		row    int
		reason string
	}
	var lines []line
	for _, b := range bads {
		for _, e := range b.Errors {
			lines = append(lines, line{flight: b.Flight, row: b.Row, reason: e.Error()})
		}
	}
	for _, r := range results {
		if r.Status != statusOK {
			lines = append(lines, line{flight: r.Flight, hasCI: true, ci: r.CI, row: r.Row, reason: r.Reason})
		}
	}
	slices.SortStableFunc(lines, func(a, b line) int {
		bc := func(v bool) int {
			if v {
				return 1
			}
			return 0
		}
		return cmp.Or(cmp.Compare(a.flight, b.flight), cmp.Compare(bc(a.hasCI), bc(b.hasCI)),
			cmp.Compare(a.ci, b.ci), cmp.Compare(a.row, b.row))
	})
	recs := [][]string{{"flight", "row", "reason", "ci"}}
	for _, l := range lines {
		ci := ""
		if l.hasCI {
			ci = ciText(l.ci)
		}
		recs = append(recs, []string{l.flight, strconv.Itoa(l.row), l.reason, ci})
	}
	return writeCSV(recs)
}

func summaryCSV(by []CISummary) ([]byte, error) {
	recs := [][]string{{"ci", "flights", "fuel_kg", "time_min", "cost", "co2_kg", "failed"}}
	for _, c := range by {
		recs = append(recs, []string{ciText(c.CI), strconv.Itoa(c.Flights), fmtNum(c.Fuel), fmtNum(c.Time),
			fmtNum(c.Cost), fmtNum(c.CO2), strconv.Itoa(c.Failed)})
	}
	return writeCSV(recs)
}

// readManifest reads dir/manifest.json.
func readManifest(dir string) (manifest, error) {
	var m manifest
	data, err := os.ReadFile(filepath.Join(dir, manifestName))
	if err != nil {
		if os.IsNotExist(err) {
			return m, fmt.Errorf("%s: no %s: the run there did not finish; complete it with --resume first", dir, manifestName)
		}
		return m, err
	}
	if err := json.Unmarshal(data, &m); err != nil {
		return m, &FormatError{File: filepath.Join(dir, manifestName), Msg: "corrupt manifest: " + err.Error()}
	}
	if m.Version != 1 {
		return m, &FormatError{File: filepath.Join(dir, manifestName), Msg: fmt.Sprintf("unsupported manifest version %d", m.Version)}
	}
	return m, nil
}
