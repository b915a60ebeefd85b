package batch

import (
	"bytes"
	"cmp"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"hash/fnv"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
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
	// Fingerprint identifies the run's inputs and options (see
	// runFingerprint); Meta lists them, and becomes results.parquet's
	// key-value metadata.
	Fingerprint string            `json:"fingerprint"`
	Meta        map[string]string `json:"meta,omitempty"`
	Records     []string          `json:"records"` // file names in parts/
}

// parquetMeta is the key-value metadata of results.parquet: the run's
// Meta (program version, weather digests, options, as the caller gave
// them) and the fingerprint, keys prefixed "levelpath.".
func (m *manifest) parquetMeta() map[string]string {
	out := map[string]string{"levelpath.fingerprint": m.Fingerprint}
	for k, v := range m.Meta {
		out["levelpath."+k] = v
	}
	return out
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

// resultColumns are the columns of results.csv, in order (results.parquet
// has the same names; see the README's table of columns).
var resultColumns = []string{"flight", "ci", "status", "warnings", "departure_utc", "arrival_utc",
	"aircraft", "row", "distance_nm", "takeoff_mass_kg", "zfw_kg", "landing_mass_kg",
	"fuel_kg", "time_min", "cost", "co2_kg", "floor_g", "speed", "levels",
	"initial_fl", "steps", "min_margin_g", "cost_saving_pct", "profile", "block_kg", "limited_by", "error"}

// parquetRow is one row of results.parquet: the same columns as
// results.csv at full precision, times as UTC timestamps in milliseconds,
// absent values (failed flights, no margin, no baseline) as nulls.
type parquetRow struct {
	Flight        string   `parquet:"flight,dict"`
	CI            float64  `parquet:"ci"`
	Status        string   `parquet:"status,dict"`
	Warnings      string   `parquet:"warnings"`
	Departure     int64    `parquet:"departure_utc,timestamp(millisecond)"`
	Arrival       *int64   `parquet:"arrival_utc,optional,timestamp(millisecond)"`
	Aircraft      string   `parquet:"aircraft,dict"`
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

// parquetRowPF and parquetArrivalRowPF add the perf_factor_pct column,
// written when some flight of the run has a performance factor (as in
// results.csv), so that other runs keep their schema.
type parquetRowPF struct {
	parquetRow
	PerfFactorPct float64 `parquet:"perf_factor_pct"`
}

type parquetArrivalRowPF struct {
	parquetArrivalRow
	PerfFactorPct float64 `parquet:"perf_factor_pct"`
}

// hasPerfFactor reports whether some flight has a performance factor.
func hasPerfFactor(results []record) bool {
	return slices.ContainsFunc(results, func(r record) bool { return r.PerfFactorPct != nil })
}

// perfFactorOf is r's performance factor, 0 for none.
func perfFactorOf(r *record) float64 {
	if r.PerfFactorPct == nil {
		return 0
	}
	return *r.PerfFactorPct
}

// writeParquet writes rows to a new buffer.
func writeParquet[T any](rows []T, opts []parquet.WriterOption) ([]byte, error) {
	var buf bytes.Buffer
	if err := parquet.Write(&buf, rows, opts...); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// parquetArrivalRow is parquetRow with the arrival columns, written when
// the run had arrival targets (see hasTargets).
type parquetArrivalRow struct {
	parquetRow
	ArriveBy     *int64   `parquet:"arrive_by_utc,optional,timestamp(millisecond)"`
	ArriveWindow string   `parquet:"arrive_window"`
	CIUsed       *float64 `parquet:"ci_used,optional"`
	DelayMin     *float64 `parquet:"delay_min,optional"`
	DelayCostKg  *float64 `parquet:"delay_cost_kg,optional"`
	OnTime       *bool    `parquet:"on_time,optional"`
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
		{ResultsParquet, func() ([]byte, error) { return resultsParquet(results, man.parquetMeta()) }},
		{ErrorsCSV, func() ([]byte, error) { return errorsCSV(results, bads) }},
	}
	if man.Sweep != nil {
		files = append(files, outFile{SummaryCSV, func() ([]byte, error) { return summaryCSV(sum.ByCI, hasTargets(results)) }})
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
// that order, so that sums are reproducible to the last bit. Totals cover
// the ok and warning plans; infeasible plans are counted apart.
func summarize(results []record) Summary {
	var sum Summary
	by := map[float64]*CISummary{}
	for _, r := range results {
		c := by[r.CI]
		if c == nil {
			c = &CISummary{CI: r.CI}
			by[r.CI] = c
		}
		if r.ArriveBy != "" && r.Status != statusFailed {
			sum.Targets = true
			c.WithTarget++
			if r.OnTime != nil && *r.OnTime {
				c.OnTime++
			}
		}
		switch r.Status {
		case statusFailed:
			sum.Failed++
			c.Failed++
			continue
		case statusInfeasible:
			sum.Infeasible++
			c.Infeasible++
			continue
		}
		sum.Planned++
		c.Flights++
		c.Fuel += *r.FuelKg
		c.Time += *r.TimeMin
		c.Cost += *r.Cost
		c.CO2 += *r.CO2Kg
		if r.PersistentNM != nil && r.PersistentDayNM != nil && r.PersistentNightNM != nil {
			c.ContrailFlights++
			c.PersistentNM += *r.PersistentNM
			c.DayNM += *r.PersistentDayNM
			c.NightNM += *r.PersistentNightNM
		}
	}
	for _, c := range by {
		sum.ByCI = append(sum.ByCI, *c)
	}
	slices.SortFunc(sum.ByCI, func(a, b CISummary) int { return cmp.Compare(a.CI, b.CI) })
	return sum
}

// csvDecimals are the decimals results.csv and summary.csv keep (the
// records and results.parquet keep full precision): 0.1 kg, 0.01 min,
// 0.001 g, 0.01 %, 0.1 NM.
const (
	decKg, decMin, decG, decPct, decNM = 1, 2, 3, 2, 1
)

// fmtNum formats a number for the CSV files: shortest exact form.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// fmtR formats p rounded to dec decimals; nil is an empty cell.
func fmtR(p *float64, dec int) string {
	if p == nil {
		return ""
	}
	return fmtNum(round(*p, dec))
}

func fmtI(p *int) string {
	if p == nil {
		return ""
	}
	return strconv.Itoa(*p)
}

// safeCell defuses a text cell that a spreadsheet would run as a formula:
// one starting with '=', '+', '-', '@', a tab or a carriage return gets a
// leading single quote (OWASP, "CSV Injection": prepend a single quote to
// cells beginning with those characters, and keep the cell quoted). It is
// applied to the text cells that come from input or from error messages
// (flight, aircraft, warnings, speed, levels, profile, error, reason);
// numbers written by the program are left alone, a negative number being
// data, not a formula.
func safeCell(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return "'" + s
	}
	return s
}

func writeCSV(records [][]string) ([]byte, error) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	if err := w.WriteAll(records); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// warningSep joins a plan's warnings in one cell.
const warningSep = "; "

func resultsCSV(results []record) ([]byte, error) {
	targets, ens, withPF := hasTargets(results), hasEnsemble(results), hasPerfFactor(results)
	head := resultColumns
	if targets {
		head = append(slices.Clip(head), arrivalColumns...)
	}
	if ens {
		head = append(slices.Clip(head), ensembleNames...)
	}
	pfAt := slices.Index(resultColumns, "aircraft") + 1 // perf_factor_pct after aircraft
	if withPF {
		head = slices.Insert(slices.Clone(head), pfAt, "perf_factor_pct")
	}
	recs := [][]string{head}
	for _, r := range results {
		row := []string{safeCell(r.Flight), ciText(r.CI), r.Status,
			safeCell(strings.Join(r.Warnings, warningSep)), r.Departure, r.Arrival, safeCell(r.Aircraft),
			strconv.Itoa(r.Row), fmtR(r.DistanceNM, decNM), fmtR(r.TakeoffMassKg, decKg), fmtR(r.ZFWKg, decKg),
			fmtR(r.LandingMassKg, decKg), fmtR(r.FuelKg, decKg), fmtR(r.TimeMin, decMin), fmtR(r.Cost, decKg),
			fmtR(r.CO2Kg, decKg), fmtR(r.FloorG, decG), safeCell(r.Speed), safeCell(r.Levels),
			fmtI(r.InitialFL), fmtI(r.Steps), fmtR(r.MinMarginG, decG), fmtR(r.CostSavingPct, decPct),
			safeCell(r.Profile), fmtR(r.BlockKg, decKg), safeCell(r.LimitedBy), safeCell(r.Reason)}
		if targets {
			row = append(row, r.ArriveBy, r.ArriveWindow, fmtR(ciUsed(&r), 6), fmtR(r.DelayMin, decMin), fmtR(r.DelayCostKg, decKg), fmtB(r.OnTime))
		}
		if ens {
			row = append(row, ensembleCells(r)...)
		}
		if withPF {
			row = slices.Insert(row, pfAt, strconv.FormatFloat(perfFactorOf(&r), 'g', -1, 64))
		}
		recs = append(recs, row)
	}
	return writeCSV(recs)
}

// resultsParquet writes results at full precision with meta as the
// file's key-value metadata (Apache Parquet format, FileMetaData
// key_value_metadata).
func resultsParquet(results []record, meta map[string]string) ([]byte, error) {
	i64 := func(p *int) *int64 {
		if p == nil {
			return nil
		}
		return new(int64(*p))
	}
	rows := make([]parquetRow, len(results))
	for i, r := range results {
		dep, err := time.Parse(time.RFC3339, r.Departure)
		if err != nil {
			return nil, fmt.Errorf("record of flight %s: departure %q: %w", r.Flight, r.Departure, err)
		}
		var arr *int64
		if r.Arrival != "" {
			a, err := time.Parse(time.RFC3339, r.Arrival)
			if err != nil {
				return nil, fmt.Errorf("record of flight %s: arrival %q: %w", r.Flight, r.Arrival, err)
			}
			arr = new(a.UnixMilli())
		}
		rows[i] = parquetRow{Flight: r.Flight, CI: r.CI, Status: r.Status, Warnings: strings.Join(r.Warnings, warningSep),
			Departure: dep.UnixMilli(), Arrival: arr, Aircraft: r.Aircraft, Row: int64(r.Row),
			DistanceNM: r.DistanceNM, TakeoffMassKg: r.TakeoffMassKg, ZFWKg: r.ZFWKg, LandingMassKg: r.LandingMassKg,
			FuelKg: r.FuelKg, TimeMin: r.TimeMin, Cost: r.Cost, CO2Kg: r.CO2Kg, FloorG: r.FloorG,
			Speed: r.Speed, Levels: r.Levels, InitialFL: i64(r.InitialFL), Steps: i64(r.Steps),
			MinMarginG: r.MinMarginG, CostSavingPct: r.CostSavingPct, Profile: r.Profile, BlockKg: r.BlockKg, LimitedBy: r.LimitedBy, Error: r.Reason}
	}
	keys := slices.Sorted(maps.Keys(meta))
	var opts []parquet.WriterOption
	for _, k := range keys {
		opts = append(opts, parquet.KeyValueMetadata(k, meta[k]))
	}
	withPF := hasPerfFactor(results)
	if !hasTargets(results) {
		if hasEnsemble(results) {
			return ensembleParquet(rows, nil, results, opts, withPF)
		}
		if withPF {
			pf := make([]parquetRowPF, len(rows))
			for i := range results {
				pf[i] = parquetRowPF{parquetRow: rows[i], PerfFactorPct: perfFactorOf(&results[i])}
			}
			return writeParquet(pf, opts)
		}
		return writeParquet(rows, opts)
	}
	arows := make([]parquetArrivalRow, len(rows))
	for i := range results {
		r := &results[i]
		a := parquetArrivalRow{parquetRow: rows[i], ArriveWindow: r.ArriveWindow, CIUsed: ciUsed(r), DelayMin: r.DelayMin, DelayCostKg: r.DelayCostKg, OnTime: r.OnTime}
		if r.ArriveBy != "" {
			t, err := time.Parse(time.RFC3339, r.ArriveBy)
			if err != nil {
				return nil, fmt.Errorf("record of flight %s: arrive_by %q: %w", r.Flight, r.ArriveBy, err)
			}
			a.ArriveBy = new(t.UnixMilli())
		}
		arows[i] = a
	}
	if hasEnsemble(results) {
		return ensembleParquet(nil, arows, results, opts, withPF)
	}
	if withPF {
		pf := make([]parquetArrivalRowPF, len(arows))
		for i := range results {
			pf[i] = parquetArrivalRowPF{parquetArrivalRow: arows[i], PerfFactorPct: perfFactorOf(&results[i])}
		}
		return writeParquet(pf, opts)
	}
	return writeParquet(arows, opts)
}

// errorsCSV lists bad schedule rows (empty ci), failed plans and
// infeasible plans (with the limits they break), sorted by
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
		switch r.Status {
		case statusFailed:
			lines = append(lines, line{flight: r.Flight, hasCI: true, ci: r.CI, row: r.Row, reason: r.Reason})
		case statusInfeasible:
			lines = append(lines, line{flight: r.Flight, hasCI: true, ci: r.CI, row: r.Row,
				reason: "infeasible: " + strings.Join(r.Warnings, warningSep)})
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
		recs = append(recs, []string{safeCell(l.flight), strconv.Itoa(l.row), safeCell(l.reason), ci})
	}
	return writeCSV(recs)
}

// summaryCSV writes the per-CI table; with targets (some flight had an
// arrive_by time) it adds with_arrive_by, on_time and on_time_pct, the
// share of those flights' plans at that CI arriving in their window
// (empty when none).
func summaryCSV(by []CISummary, targets bool) ([]byte, error) {
	head := []string{"ci", "flights", "fuel_kg", "time_min", "cost", "co2_kg", "failed", "infeasible"}
	if targets {
		head = append(head, "with_arrive_by", "on_time", "on_time_pct")
	}
	recs := [][]string{head}
	for _, c := range by {
		rec := []string{ciText(c.CI), strconv.Itoa(c.Flights), fmtNum(round(c.Fuel, decKg)),
			fmtNum(round(c.Time, decMin)), fmtNum(round(c.Cost, decKg)), fmtNum(round(c.CO2, decKg)),
			strconv.Itoa(c.Failed), strconv.Itoa(c.Infeasible)}
		if targets {
			pct := ""
			if c.WithTarget > 0 {
				pct = fmtNum(round(100*float64(c.OnTime)/float64(c.WithTarget), decPct))
			}
			rec = append(rec, strconv.Itoa(c.WithTarget), strconv.Itoa(c.OnTime), pct)
		}
		recs = append(recs, rec)
	}
	return writeCSV(recs)
}

// hasTargets reports whether some result had an arrival target: then
// results.csv, results.parquet and summary.csv carry the arrival columns
// (and only then, so that other runs keep their files byte for byte).
func hasTargets(results []record) bool {
	for _, r := range results {
		if r.ArriveBy != "" {
			return true
		}
	}
	return false
}

// arrivalColumns are the columns results.csv and results.parquet add
// after resultColumns when the run had arrival targets.
var arrivalColumns = []string{"arrive_by_utc", "arrive_window", "ci_used", "delay_min", "delay_cost_kg", "on_time"}

// ciUsed is the cost index a result flew: its arrival search's, or its
// own CI for any other plan; nil for a failed one.
func ciUsed(r *record) *float64 {
	switch {
	case r.CIUsed != nil:
		return r.CIUsed
	case r.Status != statusFailed:
		return new(r.CI)
	}
	return nil
}

func fmtB(b *bool) string {
	if b == nil {
		return ""
	}
	return strconv.FormatBool(*b)
}

// manifestVersion is the layout version of manifest.json and run.json;
// 2 added the fingerprint, the digests of plans and hashed file names.
const manifestVersion = 2

// checkRecordName returns an error unless name is a plain record file name:
// no directory part, no "..", no leading '.', ending in ".json".
func checkRecordName(name string) error {
	if name == "" || name != filepath.Base(name) || strings.ContainsAny(name, `/\`) ||
		strings.HasPrefix(name, ".") || !strings.HasSuffix(name, ".json") || len(name) > 255 {
		return fmt.Errorf("record name %q leaves the parts directory or is not a record file name", excerpt(name))
	}
	return nil
}

// readManifest reads dir/manifest.json.
func readManifest(dir string) (manifest, error) {
	var m manifest
	data, err := os.ReadFile(filepath.Join(dir, manifestName))
	if err != nil {
		if os.IsNotExist(err) {
			return m, fmt.Errorf("%s: no %s: the run there did not finish; complete it first (resume it: Options.Resume)", dir, manifestName)
		}
		return m, err
	}
	if err := json.Unmarshal(data, &m); err != nil {
		return m, &FormatError{File: filepath.Join(dir, manifestName), Msg: "corrupt manifest: " + err.Error()}
	}
	if m.Version != manifestVersion {
		return m, &FormatError{File: filepath.Join(dir, manifestName), Msg: fmt.Sprintf("unsupported manifest version %d (this program writes %d)", m.Version, manifestVersion)}
	}
	// Merge reads dir/parts/NAME for each name: a name must stay inside
	// parts/, so it must be a plain file name of a record.
	for _, name := range m.Records {
		if err := checkRecordName(name); err != nil {
			return m, &FormatError{File: filepath.Join(dir, manifestName), Msg: err.Error()}
		}
	}
	if m.Shards < 1 || m.Shards > MaxShards || m.Shard < 0 || m.Shard >= m.Shards {
		return m, &FormatError{File: filepath.Join(dir, manifestName), Msg: fmt.Sprintf("shard %d/%d is not a shard", m.Shard, m.Shards)}
	}
	return m, nil
}
