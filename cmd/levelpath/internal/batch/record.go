package batch

import (
	"encoding/json"
	"fmt"
	"hash/fnv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// Layout of an output directory.
const (
	partsDir     = "parts"
	plansDir     = "plans"
	manifestName = "manifest.json"
	tmpPrefix    = ".tmp-"
	recordKind   = "result"
	badKind      = "bad_row"
	statusOK     = "ok"
	statusFailed = "failed"
)

// record is the per-flight (and per-CI) file in Out/parts/. It is the unit
// of "nothing lost": a record exists on disk only once its plan is written,
// and the final files are assembled from records alone. Numbers are rounded
// when the record is made (see roundResult) so that results.csv and
// results.parquet hold exactly the same values.
type record struct {
	Kind              string     `json:"kind"` // recordKind or badKind
	Flight            string     `json:"flight"`
	CI                float64    `json:"ci"`
	Status            string     `json:"status,omitempty"` // statusOK or statusFailed
	Row               int        `json:"row"`
	Departure         string     `json:"departure,omitempty"`
	Aircraft          string     `json:"aircraft,omitempty"`
	FuelKg            *float64   `json:"fuel_kg,omitempty"`
	TimeMin           *float64   `json:"time_min,omitempty"`
	Cost              *float64   `json:"cost,omitempty"`
	CO2Kg             *float64   `json:"co2_kg,omitempty"`
	InitialFL         *int       `json:"initial_fl,omitempty"`
	Steps             *int       `json:"steps,omitempty"`
	MinMarginG        *float64   `json:"min_margin_g,omitempty"`
	BaselineSavingPct *float64   `json:"baseline_saving_pct,omitempty"`
	LandingMassKg     *float64   `json:"landing_mass_kg,omitempty"`
	Profile           string     `json:"profile,omitempty"`
	Reason            string     `json:"reason,omitempty"`
	Errors            []RowError `json:"errors,omitempty"` // bad rows only
	Plan              string     `json:"plan,omitempty"`   // path relative to Out
	Input             string     `json:"input"`            // fingerprint of what was planned
}

// ciText formats a cost index for file names and CSV: shortest exact form.
func ciText(ci float64) string { return strconv.FormatFloat(ci, 'f', -1, 64) }

// fileStem maps a flight id to a file-name-safe stem: ASCII letters,
// digits, '-', '_' and inner '.' are kept, every other byte becomes %XX, so
// the mapping is one-to-one.
func fileStem(flight string) string {
	var b strings.Builder
	for i := 0; i < len(flight); i++ {
		c := flight[i]
		ok := c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' ||
			c == '-' || c == '_' || (c == '.' && i > 0)
		if ok {
			b.WriteByte(c)
		} else {
			fmt.Fprintf(&b, "%%%02X", c)
		}
	}
	return b.String()
}

// resultName is the record (and plan) file name of one flight at one CI.
// The "_ci<number>" suffix cannot occur inside a number, so names are unique.
func resultName(flight string, ci float64) string {
	return fileStem(flight) + "_ci" + ciText(ci) + ".json"
}

// badName is the record file name of a bad schedule line.
func badName(line int) string { return "line" + strconv.Itoa(line) + ".bad.json" }

// fingerprint identifies the input of one plan: every field of the row and
// the CI. A resumed run re-plans a flight whose fingerprint changed.
func fingerprint(r *Row, ci float64) string {
	h := fnv.New64a()
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	fmt.Fprintf(h, "v1|%d|%q|%s|%q|%q|%s|%s|%s|%s|%s|%q|%q",
		r.Line, r.Flight, r.Departure.Format(time.RFC3339Nano), r.Route, r.Aircraft,
		f(r.TOW), f(r.ZFW), f(r.Fuel), f(ci), f(r.Floor), r.Levels, r.Speed)
	return strconv.FormatUint(h.Sum64(), 16)
}

func round(v float64, decimals int) float64 {
	p := math.Pow10(decimals)
	r := math.Round(v*p) / p
	if r == 0 {
		r = 0 // no "-0" in the files
	}
	return r
}

func ptr[T any](v T) *T { return &v }

// finite reports whether v is neither NaN nor an infinity.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// resultRecord makes the record of a planned flight. Fuel, cost and CO2
// are rounded to 0.1, time to 0.01 min, the margin to 0.001 g and the
// saving to 0.01 %; NaN margin or saving means "none" and is left out.
// A non-finite total makes the flight failed: it would poison every sum.
func resultRecord(row *Row, ci float64, res Result, planErr error) record {
	rec := record{
		Kind: recordKind, Flight: row.Flight, CI: ci, Row: row.Line,
		Departure: row.Departure.Format(time.RFC3339), Aircraft: row.Aircraft,
		Input: fingerprint(row, ci),
	}
	if planErr == nil {
		for _, c := range []struct {
			name string
			v    float64
		}{{"fuel", res.Fuel}, {"time", res.Time}, {"cost", res.Cost}, {"CO2", res.CO2}} {
			if !finite(c.v) {
				planErr = fmt.Errorf("internal error: planner returned %s %v", c.name, c.v)
				break
			}
		}
	}
	if planErr != nil {
		rec.Status = statusFailed
		rec.Reason = planErr.Error()
		return rec
	}
	rec.Status = statusOK
	rec.FuelKg = ptr(round(res.Fuel, 1))
	rec.TimeMin = ptr(round(res.Time, 2))
	rec.Cost = ptr(round(res.Cost, 1))
	rec.CO2Kg = ptr(round(res.CO2, 1))
	rec.InitialFL = ptr(res.InitialFL)
	rec.Profile = res.Profile
	if finite(res.LandingMass) && res.LandingMass > 0 {
		rec.LandingMassKg = ptr(round(res.LandingMass, 1))
	}
	rec.Steps = ptr(res.Steps)
	if finite(res.MinMargin) {
		rec.MinMarginG = ptr(round(res.MinMargin, 3))
	}
	if finite(res.BaselineSavingPct) {
		rec.BaselineSavingPct = ptr(round(res.BaselineSavingPct, 2))
	}
	return rec
}

// atomicWrite writes data to dir/name through a temporary file in the same
// directory and a rename, so a reader (or a resumed run) sees the old file
// or the whole new one, never a torn one. It does not fsync: a process kill
// or Ctrl-C loses nothing, while after a power loss a record may be empty
// and a resumed run then re-plans that flight (unreadable records count as
// missing).
func atomicWrite(dir, name string, data []byte) error {
	f, err := os.CreateTemp(dir, tmpPrefix+"*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	_, err = f.Write(data)
	if err == nil {
		err = f.Chmod(0o644)
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp, filepath.Join(dir, name))
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", filepath.Join(dir, name), err)
	}
	return nil
}

// planPath is the Plan field of the record file name: the plan's path
// relative to Out, slash-separated.
func planPath(name string) string { return plansDir + "/" + name }

func writeRecord(out string, name string, rec *record) error {
	data, err := json.Marshal(rec)
	if err != nil {
		return err
	}
	return atomicWrite(filepath.Join(out, partsDir), name, append(data, '\n'))
}

// maxRecordBytes bounds a record file read back (records are < 1 kB;
// bad-row records with many errors stay far below this).
const maxRecordBytes = 1 << 20

func readRecord(path string) (record, error) {
	var rec record
	st, err := os.Stat(path)
	if err != nil {
		return rec, err
	}
	if st.Size() > maxRecordBytes {
		return rec, &FormatError{File: path, Msg: fmt.Sprintf("record is %d bytes, more than %d", st.Size(), maxRecordBytes)}
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return rec, err
	}
	if err := json.Unmarshal(data, &rec); err != nil {
		return rec, &FormatError{File: path, Msg: "corrupt record: " + err.Error()}
	}
	if rec.Kind != recordKind && rec.Kind != badKind {
		return rec, &FormatError{File: path, Msg: fmt.Sprintf("unknown record kind %q", rec.Kind)}
	}
	// Merge links (after removing) the file rec.Plan names: it must be this
	// record's own plan, never a path of the reader's choosing.
	if p, ok := strings.CutPrefix(rec.Plan, plansDir+"/"); rec.Plan != "" && (!ok || p != filepath.Base(path)) {
		return rec, &FormatError{File: path, Msg: fmt.Sprintf("plan %q, want %q", rec.Plan, planPath(filepath.Base(path)))}
	}
	return rec, nil
}
