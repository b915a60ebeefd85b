package batch

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"
)

// Layout of an output directory.
const (
	partsDir         = "parts"
	plansDir         = "plans"
	manifestName     = "manifest.json"
	tmpPrefix        = ".tmp-"
	recordKind       = "result"
	badKind          = "bad_row"
	statusOK         = "ok"         // planned, no warning
	statusWarning    = "warning"    // planned, with warnings
	statusInfeasible = "infeasible" // planned, but a limit is broken (fuel shortfall, landing mass, ...)
	statusFailed     = "failed"     // no plan
)

// record is the per-flight (and per-CI) file in Out/parts/. It is the unit
// of "nothing lost": a record exists on disk only once its plan is written,
// and the final files are assembled from records alone. Numbers are kept
// at full precision (results.parquet holds them so; results.csv rounds them
// for reading, see csvDecimals).
type record struct {
	Kind          string   `json:"kind"` // recordKind or badKind
	Flight        string   `json:"flight"`
	CI            float64  `json:"ci"`
	Status        string   `json:"status,omitempty"` // statusOK, statusWarning, statusInfeasible or statusFailed
	Warnings      []string `json:"warnings,omitempty"`
	Row           int      `json:"row"`
	Departure     string   `json:"departure,omitempty"` // RFC 3339, UTC
	Arrival       string   `json:"arrival,omitempty"`   // departure + time_min, RFC 3339, UTC
	Aircraft      string   `json:"aircraft,omitempty"`
	PerfFactorPct *float64 `json:"perf_factor_pct,omitempty"` // the row's, when not zero
	DistanceNM    *float64 `json:"distance_nm,omitempty"`
	TakeoffMassKg *float64 `json:"takeoff_mass_kg,omitempty"`
	ZFWKg         *float64 `json:"zfw_kg,omitempty"`
	LandingMassKg *float64 `json:"landing_mass_kg,omitempty"`
	FuelKg        *float64 `json:"fuel_kg,omitempty"`
	TimeMin       *float64 `json:"time_min,omitempty"`
	Cost          *float64 `json:"cost,omitempty"`
	CO2Kg         *float64 `json:"co2_kg,omitempty"`
	FloorG        *float64 `json:"floor_g,omitempty"`
	Speed         string   `json:"speed,omitempty"`
	Levels        string   `json:"levels,omitempty"`
	InitialFL     *int     `json:"initial_fl,omitempty"`
	Steps         *int     `json:"steps,omitempty"`
	MinMarginG    *float64 `json:"min_margin_g,omitempty"`
	CostSavingPct *float64 `json:"cost_saving_pct,omitempty"`
	Profile       string   `json:"profile,omitempty"`
	BlockKg       *float64 `json:"block_kg,omitempty"`
	LimitedBy     string   `json:"limited_by,omitempty"`
	// Ensemble plans only (omitted otherwise).
	FuelP10Kg     *float64 `json:"fuel_p10_kg,omitempty"`
	FuelP90Kg     *float64 `json:"fuel_p90_kg,omitempty"`
	MinMarginAllG *float64 `json:"min_margin_all_members_g,omitempty"`
	// Persistent-contrail distances, NM, when the weather holds humidity.
	PersistentNM      *float64 `json:"persistent_contrail_nm,omitempty"`
	PersistentDayNM   *float64 `json:"persistent_contrail_day_nm,omitempty"`
	PersistentNightNM *float64 `json:"persistent_contrail_night_nm,omitempty"`
	Reason            string   `json:"reason,omitempty"`
	// Arrival-target fields, present only for a row with arrive_by.
	ArriveBy     string     `json:"arrive_by,omitempty"`     // RFC 3339, UTC
	ArriveWindow string     `json:"arrive_window,omitempty"` // e.g. "-5m,+10m"
	CIUsed       *float64   `json:"ci_used,omitempty"`       // the cost index flown
	DelayMin     *float64   `json:"delay_min,omitempty"`     // arrival - arrive_by
	DelayCostKg  *float64   `json:"delay_cost_kg,omitempty"` // with a delay cost
	OnTime       *bool      `json:"on_time,omitempty"`       // arrival in the window
	Errors       []RowError `json:"errors,omitempty"`        // bad rows only
	Plan         string     `json:"plan,omitempty"`          // path relative to Out
	PlanSHA256   string     `json:"plan_sha256,omitempty"`   // digest of the plan file, checked on resume
	Input        string     `json:"input"`                   // fingerprint of what was planned
}

// windowText writes an arrival window as the arrive_window column reads
// it, in minutes: "-5m,+10m".
func windowText(early, late time.Duration) string {
	m := func(d time.Duration) string { return strconv.FormatFloat(d.Minutes(), 'f', -1, 64) + "m" }
	sign := func(d time.Duration) string {
		if d >= 0 {
			return "+" + m(d)
		}
		return m(d)
	}
	return sign(early) + "," + sign(late)
}

// ciText formats a cost index for file names and CSV: shortest exact form.
func ciText(ci float64) string { return strconv.FormatFloat(ci, 'f', -1, 64) }

// maxStem bounds the readable part of a file name.
const maxStem = 32

// fileStem maps a flight id to a short readable file-name stem: ASCII
// letters and digits are kept, '-' too except first, every other byte
// becomes '_', and at most maxStem bytes are kept. It is not one-to-one;
// resultName adds a hash for that.
func fileStem(flight string) string {
	var b strings.Builder
	for i := 0; i < len(flight) && b.Len() < maxStem; i++ {
		c := flight[i]
		if c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-' && i > 0 {
			b.WriteByte(c)
		} else {
			b.WriteByte('_')
		}
	}
	return b.String()
}

// resultName is the record (and plan) file name of one flight at one CI:
// the sanitized flight id, '_' and the first 16 hex digits (64 bits) of
// the SHA-256 of the flight id and the CI's bits. No number of the input
// appears in it, so its length is bounded (at most 54 bytes) whatever the
// row holds; two (flight, CI) pairs share a name only on a 64-bit hash
// collision, which Run and Merge detect (the record names its flight and
// CI) rather than overwrite.
func resultName(flight string, ci float64) string {
	h := sha256.New()
	fmt.Fprintf(h, "%d:%s|%016x", len(flight), flight, math.Float64bits(ci))
	return fileStem(flight) + "_" + hex.EncodeToString(h.Sum(nil)[:8]) + ".json"
}

// badName is the record file name of a bad schedule line.
func badName(line int) string { return "line" + strconv.Itoa(line) + ".bad.json" }

// inputKey identifies the input of one plan: every field of the row, the
// CI and the digests of the row's route and aircraft files (set by Run, see
// Row.digests). A resumed run re-plans a flight whose key changed.
func (r *Row) inputKey(ci float64) string {
	return fingerprint(r, ci) + "-" + r.digests
}

// fingerprint identifies a row and CI: every field of the row and the CI.
func fingerprint(r *Row, ci float64) string {
	h := fnv.New64a()
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	fmt.Fprintf(h, "v1|%d|%q|%s|%q|%q|%s|%s|%s|%s|%s|%q|%q",
		r.Line, r.Flight, r.Departure.Format(time.RFC3339Nano), r.Route, r.Aircraft,
		f(r.TOW), f(r.ZFW), f(r.Fuel), f(ci), f(r.Floor), r.Levels, r.Speed)
	if r.PerfFactorPct != 0 {
		// Only when set, so that rows without it keep their keys.
		fmt.Fprintf(h, "|pf=%s", f(r.PerfFactorPct))
	}
	if !r.ArriveBy.IsZero() { // only then, so that other rows keep their fingerprint
		fmt.Fprintf(h, "|arrive:%s|%t|%d|%d", r.ArriveBy.Format(time.RFC3339Nano), r.HasWindow, r.Early, r.Late)
	}
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

// finite reports whether v is neither NaN nor an infinity.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// nmToM is the international nautical mile, exactly 1852 m (ICAO Annex 5,
// table 3-3).
const nmToM = 1852

// maxReason bounds the failure reason kept in a record: a planner error
// may quote the input it could not parse, and results.csv and errors.csv
// must not carry a file's contents.
const maxReason = 300

// resultRecord makes the record of a planned flight, at full precision.
// NaN margin or saving means "none" and is left out. A non-finite total
// makes the flight failed: it would poison every sum. The status is
// statusInfeasible when the plan breaks a limit (res.Violations: fuel
// shortfall, landing mass, any other), statusWarning when it has warnings,
// else statusOK.
func resultRecord(row *Row, ci float64, res Result, planErr error) record {
	rec := record{
		Kind: recordKind, Flight: row.Flight, CI: ci, Row: row.Line,
		Departure: row.Departure.UTC().Format(time.RFC3339), Aircraft: row.Aircraft,
		Input: row.inputKey(ci),
	}
	if row.PerfFactorPct != 0 {
		rec.PerfFactorPct = new(row.PerfFactorPct)
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
	if !row.ArriveBy.IsZero() {
		e, l := row.Window()
		rec.ArriveBy, rec.ArriveWindow = row.ArriveBy.UTC().Format(time.RFC3339), windowText(e, l)
	}
	if planErr != nil {
		rec.Status = statusFailed
		rec.Reason = shortenQuoted(planErr.Error())
		if len(rec.Reason) > maxReason {
			rec.Reason = excerptN(rec.Reason, maxReason)
		}
		return rec
	}
	opt := func(v float64) *float64 {
		if !finite(v) || v == 0 {
			return nil
		}
		return new(v)
	}
	rec.Status = statusOK
	switch {
	case len(res.Violations) > 0:
		rec.Status = statusInfeasible
	case len(res.Warnings) > 0:
		rec.Status = statusWarning
	}
	rec.Warnings = append(slices.Clone(res.Violations), res.Warnings...)
	rec.FuelKg = new(res.Fuel)
	rec.TimeMin = new(res.Time)
	rec.Cost = new(res.Cost)
	rec.CO2Kg = new(res.CO2)
	if d := time.Duration(math.Round(res.Time * 60e9)); finite(res.Time) && math.Abs(res.Time) < 1e6 {
		rec.Arrival = row.Departure.UTC().Add(d).Format(time.RFC3339)
	}
	rec.DistanceNM = opt(res.Distance / nmToM)
	rec.TakeoffMassKg = opt(res.TakeoffMass)
	rec.BlockKg, rec.LimitedBy = opt(res.Block), res.LimitedBy
	rec.ZFWKg = opt(res.ZFW)
	rec.LandingMassKg = opt(res.LandingMass)
	rec.FloorG = opt(res.Floor)
	rec.Speed, rec.Levels = res.Speed, res.Levels
	rec.InitialFL = new(res.InitialFL)
	rec.Profile = res.Profile
	rec.Steps = new(res.Steps)
	if finite(res.MinMargin) {
		rec.MinMarginG = new(res.MinMargin)
	}
	if finite(res.CostSavingPct) {
		rec.CostSavingPct = new(res.CostSavingPct)
	}
	if res.Ensemble {
		rec.FuelP10Kg, rec.FuelP90Kg = opt(res.FuelP10), opt(res.FuelP90)
		if finite(res.MinMarginAll) {
			rec.MinMarginAllG = new(res.MinMarginAll)
		}
	}
	if res.Contrail && finite(res.PersistentNM) && finite(res.PersistentDayNM) && finite(res.PersistentNightNM) {
		rec.PersistentNM, rec.PersistentDayNM, rec.PersistentNightNM = new(res.PersistentNM), new(res.PersistentDayNM), new(res.PersistentNightNM)
	}
	if a := res.Arrival; a != nil && rec.ArriveBy != "" {
		rec.CIUsed, rec.OnTime = new(a.CIUsed), new(a.OnTime)
		if finite(a.DelayMin) {
			rec.DelayMin = new(a.DelayMin)
		}
		if finite(a.DelayCost) {
			rec.DelayCostKg = new(a.DelayCost)
		}
	}
	return rec
}

// atomicWrite writes data to dir/name with WriteFileAtomic.
func atomicWrite(dir, name string, data []byte) error {
	return WriteFileAtomic(filepath.Join(dir, name), func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
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

// shortenQuoted cuts every double-quoted part of msg (a field a parser
// quoted, such as a header line of a file that is not a route) to
// maxExcerpt bytes, so that a failure reason carries a short excerpt of
// the input, never a whole line of a file. Backslash escapes inside the
// quotes are honoured; an unclosed quote runs to the end.
func shortenQuoted(msg string) string {
	var b strings.Builder
	for {
		i := strings.IndexByte(msg, '"')
		if i < 0 {
			b.WriteString(msg)
			return b.String()
		}
		b.WriteString(msg[:i+1])
		msg = msg[i+1:]
		end := len(msg)
		for j := 0; j < len(msg); j++ {
			if msg[j] == '\\' {
				j++
			} else if msg[j] == '"' {
				end = j
				break
			}
		}
		b.WriteString(excerpt(msg[:end]))
		if end == len(msg) {
			return b.String()
		}
		b.WriteByte('"')
		msg = msg[end+1:]
	}
}
