// Package batch plans every flight of a schedule file unattended: a pool of
// workers calls an injected [Planner] for each flight (and each cost index
// of a sweep), writes each result atomically as it finishes so that nothing
// is lost when one flight fails or the run is stopped, resumes stopped runs,
// splits a schedule into shards for cluster schedulers and merges the shard
// outputs, and assembles results.csv, results.parquet, errors.csv and
// summary.csv sorted by (flight, ci) so that runs are comparable.
//
// An output directory holds run.json (shard, fingerprint of the inputs
// and options), parts/ (one record per flight and CI, named by a sanitized
// flight id and a hash), plans/ (the plan documents), the final files and
// manifest.json; a flock on its .lock file keeps two runs apart.
//
// The package knows nothing of the physics: the planner is a function value
// supplied by the caller (the CLI closes it over one decoded weather field),
// so the orchestration is tested with a fake planner.
package batch

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"
	"unicode"

	"levelpath/optimizer"
	"levelpath/perf"
	"levelpath/route"
)

// Row is one schedule line. Masses are in kg, CI in kg/min (cost = fuel_kg +
// CI × time_min). Zero Floor, empty Levels and empty Speed mean "planner
// default".
type Row struct {
	Line      int       // 1-based line of the schedule file
	Flight    string    // flight id, unique within a schedule
	Departure time.Time // off-block time as written (RFC 3339, offset kept)
	Route     string    // absolute path of the route file
	RouteRaw  string    // route as written in the schedule
	Aircraft  string
	TOW       float64 // take-off mass; ZFW+Fuel when tow_kg was empty; 0 for a fuel-plan row
	// FuelPlan marks a row that gives zfw_kg alone: the planner makes the
	// dispatch fuel plan and solves the take-off mass from it.
	FuelPlan bool
	// Policy is the absolute path of the row's fuel policy file (column
	// policy, relative to the schedule); empty: the planner's.
	Policy    string
	ZFW, Fuel float64 // zero-fuel mass and fuel on board; 0 when not given
	CI        float64
	HasCI     bool // false when the ci cell was empty (a sweep supplies it)
	Floor     float64
	Levels    string
	Speed     string
	// ArriveBy is the arrival target (column arrive_by; zero: none), and
	// Early and Late the window around it (column arrive_window, checked
	// by optimizer.ParseArrivalWindow; HasWindow false: the window runs
	// from the departure to ArriveBy).
	ArriveBy    time.Time
	HasWindow   bool
	Early, Late time.Duration
	// PerfFactorPct is the row's per-tail fuel-flow factor, percent
	// (column perf_factor_pct; see optimizer.Problem.PerfFactorPct); 0:
	// none.
	PerfFactorPct float64

	digests string // of the route and aircraft files, set by Run
}

// Window returns the row's arrival window relative to ArriveBy: the
// arrive_window cell, or from the departure (at most
// optimizer.MaxArrivalWindow before) to ArriveBy when the cell was
// empty.
func (r *Row) Window() (early, late time.Duration) {
	if r.HasWindow {
		return r.Early, r.Late
	}
	return -min(r.ArriveBy.Sub(r.Departure), optimizer.MaxArrivalWindow), 0
}

// RowError is one invalid schedule row. Bad rows are reported, not fatal:
// the other rows are still planned and the error lands in errors.csv.
type RowError struct {
	File   string `json:"file,omitempty"` // base name of the schedule file; may be empty
	Line   int    `json:"line"`
	Flight string `json:"flight,omitempty"` // may be empty
	Column string `json:"column,omitempty"` // empty when the whole row is wrong
	Msg    string `json:"msg"`
}

// Error returns e.g. "schedule.csv line 7 (flight XY123), column tow_kg: ...".
func (e RowError) Error() string {
	var b strings.Builder
	if e.File != "" {
		b.WriteString(e.File)
		b.WriteByte(' ')
	}
	fmt.Fprintf(&b, "line %d", e.Line)
	if e.Flight != "" {
		fmt.Fprintf(&b, " (flight %s)", e.Flight)
	}
	if e.Column != "" {
		fmt.Fprintf(&b, ", column %s", e.Column)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

// FormatError reports a schedule or output file that cannot be used at all
// (unreadable, bad header, malformed CSV), as opposed to a bad row.
type FormatError struct {
	File string
	Line int // 0 when not tied to a line
	Msg  string
}

func (e *FormatError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s line %d: %s", e.File, e.Line, e.Msg)
	}
	return fmt.Sprintf("%s: %s", e.File, e.Msg)
}

// Schedule columns. The required ones must all be in the header (any order).
var (
	requiredColumns = []string{"flight", "departure", "route", "aircraft", "tow_kg", "ci"}
	optionalColumns = []string{"zfw_kg", "fuel_kg", "floor_g", "levels", "speed", "policy", "arrive_by", "arrive_window", "perf_factor_pct"}
)

const (
	maxFlightLen = 64
	// maxMassKg is a sanity bound on any mass cell (no aircraft weighs a
	// thousand tonnes); it catches values typed in grams or pounds ×1000.
	maxMassKg = 1e6
	// maxTextCell bounds the levels and speed cells.
	maxTextCell = 256
	// maxScheduleBytes bounds the schedule file read into memory.
	maxScheduleBytes = 256 << 20
)

// ReadSchedule reads and validates every row of the schedule CSV at path.
// Lines starting with '#' are comments; header names are matched without
// regard to case or surrounding space; unknown or repeated header names are
// fatal (so a misspelt optional column is not silently ignored). Invalid
// rows come back in bad, one RowError per problem, and are left out of rows;
// a repeated flight id is an error on the later row, since flight ids name
// the output files. A missing or unreadable file, a bad header or malformed
// CSV is a fatal *FormatError (or the os error) naming the file.
// Route files are resolved against the schedule's directory and must exist.
// Cost is linear in the file size.
func ReadSchedule(path string) (rows []Row, bad []RowError, err error) {
	f, err := openRegular(path)
	if err != nil {
		return nil, nil, fmt.Errorf("schedule: %w", err)
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil && st.Size() > maxScheduleBytes {
		return nil, nil, &FormatError{File: path, Msg: fmt.Sprintf("file is %d bytes, more than the %d a schedule may have", st.Size(), maxScheduleBytes)}
	}
	absPath, err := filepath.Abs(path)
	if err != nil {
		return nil, nil, fmt.Errorf("schedule %s: %w", path, err)
	}
	dir := filepath.Dir(absPath)
	base := filepath.Base(path)

	// The size check above cannot see a pipe or a growing file; capReader
	// makes such input an error rather than cutting it off mid-row.
	r := csv.NewReader(&capReader{r: f, max: maxScheduleBytes, file: path})
	r.Comment = '#'
	r.FieldsPerRecord = -1
	header, err := r.Read()
	if err == io.EOF {
		return nil, nil, &FormatError{File: path, Msg: "empty file: want a header line " + strings.Join(requiredColumns, ",")}
	}
	if err != nil {
		return nil, nil, csvError(path, err)
	}
	col, err := parseHeader(header)
	if err != nil {
		line, _ := r.FieldPos(0)
		return nil, nil, &FormatError{File: path, Line: line, Msg: err.Error()}
	}

	seen := map[string]int{} // flight -> first line
	routeOK := map[string]error{}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, nil, csvError(path, err)
		}
		line, _ := r.FieldPos(0)
		if len(rec) != len(header) {
			msg := fmt.Sprintf("%d fields, the header has %d", len(rec), len(header))
			if _, hasLevels := col["levels"]; hasLevels && len(rec) > len(header) {
				msg += ` (a levels value such as list:330,370 must be quoted, or written list:330;370)`
			}
			bad = append(bad, RowError{File: base, Line: line, Flight: excerpt(cell(rec, col["flight"])), Msg: msg})
			continue
		}
		row, errs := parseRow(rec, col, line, base, dir, routeOK)
		if len(errs) == 0 && row.Flight != "" {
			if first, dup := seen[row.Flight]; dup {
				errs = append(errs, RowError{File: base, Line: line, Flight: row.Flight, Column: "flight",
					Msg: fmt.Sprintf("duplicate flight %q (first on line %d); flight ids name the output files and must be unique", row.Flight, first)})
			} else {
				seen[row.Flight] = line
			}
		}
		if len(errs) > 0 {
			bad = append(bad, errs...)
			continue
		}
		rows = append(rows, row)
	}
	return rows, bad, nil
}

// openRegular opens path for reading only when it is a regular file (or a
// symbolic link to one): a FIFO would block the open until a writer came,
// a device may never end, and a directory is not a schedule. The file is
// checked before the open and again on the open descriptor, so a swap in
// between is caught too. The error is an *InputError naming the file.
func openRegular(path string) (*os.File, error) {
	if err := checkRegular(path); err != nil {
		return nil, err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	if st, err := f.Stat(); err != nil || !st.Mode().IsRegular() {
		f.Close()
		return nil, inputErrorf("%s is not a regular file", path)
	}
	return f, nil
}

// checkRegular returns an *InputError unless path is a regular file.
func checkRegular(path string) error {
	st, err := os.Stat(path)
	if err != nil {
		return err
	}
	if !st.Mode().IsRegular() {
		kind := "not a regular file"
		switch m := st.Mode(); {
		case m.IsDir():
			kind = "a directory"
		case m&os.ModeNamedPipe != 0:
			kind = "a FIFO (named pipe)"
		case m&os.ModeDevice != 0:
			kind = "a device"
		case m&os.ModeSocket != 0:
			kind = "a socket"
		}
		return inputErrorf("%s is %s, not a regular file", path, kind)
	}
	return nil
}

// capReader reads r and fails with a *FormatError naming file once more
// than max bytes have come.
type capReader struct {
	r         io.Reader
	read, max int64
	file      string
}

func (c *capReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	if c.read += int64(n); c.read > c.max {
		return n, &FormatError{File: c.file, Msg: fmt.Sprintf("more than the %d bytes a schedule may have", c.max)}
	}
	return n, err
}

func csvError(path string, err error) error {
	var fe *FormatError
	if errors.As(err, &fe) {
		return fe
	}
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &FormatError{File: path, Line: pe.Line, Msg: "malformed CSV: " + pe.Err.Error()}
	}
	return fmt.Errorf("schedule %s: %w", path, err)
}

func parseHeader(header []string) (map[string]int, error) {
	known := map[string]bool{}
	for _, c := range requiredColumns {
		known[c] = true
	}
	for _, c := range optionalColumns {
		known[c] = true
	}
	col := map[string]int{}
	for i, h := range header {
		name := strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		if !known[name] {
			return nil, fmt.Errorf("unknown column %q (known: %s, %s)", h,
				strings.Join(requiredColumns, ","), strings.Join(optionalColumns, ","))
		}
		if _, dup := col[name]; dup {
			return nil, fmt.Errorf("column %q appears twice", name)
		}
		col[name] = i
	}
	var missing []string
	for _, c := range requiredColumns {
		if _, ok := col[c]; !ok {
			missing = append(missing, c)
		}
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("missing required column(s) %s", strings.Join(missing, ","))
	}
	return col, nil
}

// cell returns the trimmed cell of column index i, or "" when absent.
func cell(rec []string, i int) string {
	if i < 0 || i >= len(rec) {
		return ""
	}
	return strings.TrimSpace(rec[i])
}

func parseRow(rec []string, col map[string]int, line int, file, dir string, routeOK map[string]error) (Row, []RowError) {
	get := func(name string) string {
		i, ok := col[name]
		if !ok {
			return ""
		}
		return cell(rec, i)
	}
	row := Row{Line: line, Flight: get("flight")}
	var errs []RowError
	fail := func(column, format string, a ...any) {
		errs = append(errs, RowError{File: file, Line: line, Flight: row.Flight, Column: column, Msg: fmt.Sprintf(format, a...)})
	}

	switch {
	case row.Flight == "":
		fail("flight", "empty flight id")
	case len(row.Flight) > maxFlightLen:
		fail("flight", "flight id is %d bytes, more than %d", len(row.Flight), maxFlightLen)
	case strings.IndexFunc(row.Flight, func(r rune) bool { return unicode.IsControl(r) || r == unicode.ReplacementChar }) >= 0:
		fail("flight", "flight id %q holds control or invalid characters", row.Flight)
	}
	if len(row.Flight) > maxFlightLen {
		row.Flight = excerpt(row.Flight) // errors name a short excerpt
	}

	if s := get("departure"); s == "" {
		fail("departure", "empty departure time")
	} else if t, err := time.Parse(time.RFC3339, s); err != nil {
		fail("departure", "%q is not an RFC 3339 time such as 2026-06-12T08:30:00Z", excerpt(s))
	} else {
		row.Departure = t
	}

	row.RouteRaw = get("route")
	if row.RouteRaw == "" {
		fail("route", "empty route file")
	} else {
		p := row.RouteRaw
		if !filepath.IsAbs(p) {
			p = filepath.Join(dir, p)
		}
		row.Route = filepath.Clean(p)
		err, done := routeOK[row.Route]
		if !done {
			err = checkRegular(row.Route)
			routeOK[row.Route] = err
		}
		if err != nil {
			fail("route", "route file %q: %v", excerpt(row.RouteRaw), err)
		}
	}

	if row.Aircraft = get("aircraft"); row.Aircraft == "" {
		fail("aircraft", "empty aircraft")
	}

	mass := func(name string) (float64, bool) {
		s := get(name)
		if s == "" {
			return 0, false
		}
		v, err := strconv.ParseFloat(s, 64)
		switch {
		case err != nil && !errors.Is(err, strconv.ErrRange) || math.IsNaN(v):
			fail(name, "%q is not a number", excerpt(s))
		case v <= 0:
			fail(name, "%s kg: a mass must be positive", excerpt(s))
		case v >= maxMassKg:
			fail(name, "%s kg is not an aircraft mass (want less than %.0f kg)", excerpt(s), maxMassKg)
		case v < 1:
			fail(name, "%s kg is not an aircraft mass (want at least 1 kg)", excerpt(s))
		default:
			return v, true
		}
		return 0, true // present but bad (already reported)
	}
	tow, hasTOW := mass("tow_kg")
	zfw, hasZFW := mass("zfw_kg")
	fuel, hasFuel := mass("fuel_kg")
	row.TOW, row.ZFW, row.Fuel = tow, zfw, fuel
	if !hasTOW {
		switch {
		case hasZFW && hasFuel:
			row.TOW = zfw + fuel
		case hasZFW:
			row.FuelPlan = true // zfw_kg alone: a fuel plan
		default:
			fail("tow_kg", "empty take-off mass, and no zfw_kg (a fuel plan) or zfw_kg and fuel_kg to add up")
		}
	}

	if s := get("ci"); s != "" {
		v, err := strconv.ParseFloat(s, 64)
		switch {
		case err != nil && !errors.Is(err, strconv.ErrRange) || math.IsNaN(v):
			fail("ci", "%q is not a number", excerpt(s))
		case checkCI(v) != "":
			fail("ci", "%s: %s", excerpt(s), checkCI(v))
		default:
			if v == 0 {
				v = 0 // -0 and 0 are one cost index
			}
			row.CI, row.HasCI = v, true
		}
	}

	if s := get("floor_g"); s != "" {
		v, err := strconv.ParseFloat(s, 64)
		switch {
		case err != nil && !errors.Is(err, strconv.ErrRange) || math.IsNaN(v):
			fail("floor_g", "%q is not a number", excerpt(s))
		case optimizer.CheckFloor(v) != nil:
			fail("floor_g", "%v", optimizer.CheckFloor(v)) // the one floor range of every entry point
		default:
			row.Floor = v
		}
	}
	if s := get("perf_factor_pct"); s != "" {
		v, err := strconv.ParseFloat(s, 64)
		switch {
		case err != nil && !errors.Is(err, strconv.ErrRange) || math.IsNaN(v):
			fail("perf_factor_pct", "%q is not a number", excerpt(s))
		case !(v >= perf.MinPerfFactorPct && v <= perf.MaxPerfFactorPct):
			fail("perf_factor_pct", "%s %%: want %g..%g percent (the range of --perf-factor)", excerpt(s), perf.MinPerfFactorPct, perf.MaxPerfFactorPct)
		default:
			row.PerfFactorPct = v + 0 // -0 and 0 are one factor
		}
	}
	// ';' separates a list of levels without CSV quoting: list:330;370
	// is list:330,370.
	row.Levels = strings.ReplaceAll(get("levels"), ";", ",")
	row.Speed = get("speed")
	if pol := get("policy"); pol != "" {
		if !filepath.IsAbs(pol) {
			pol = filepath.Join(dir, pol)
		}
		row.Policy = filepath.Clean(pol)
		if err := checkRegular(row.Policy); err != nil {
			fail("policy", "%v", err)
		}
	}
	if s := get("arrive_by"); s != "" {
		t, err := time.Parse(time.RFC3339, s)
		switch {
		case err != nil:
			fail("arrive_by", "%q is not an RFC 3339 time such as 2026-06-12T14:30:00Z", excerpt(s))
		case !row.Departure.IsZero() && !t.After(row.Departure):
			fail("arrive_by", "%s is not after the departure %s", excerpt(s), row.Departure.Format(time.RFC3339))
		default:
			row.ArriveBy = t
		}
	}
	if s := get("arrive_window"); s != "" {
		e, l, err := optimizer.ParseArrivalWindow(s)
		switch {
		case err != nil:
			fail("arrive_window", "%v", err) // the one window parser of every entry point
		case get("arrive_by") == "":
			fail("arrive_window", "a window needs an arrive_by time")
		default:
			row.HasWindow, row.Early, row.Late = true, e, l
		}
	}
	for _, c := range []struct{ name, v string }{{"levels", row.Levels}, {"speed", row.Speed}} {
		if len(c.v) > maxTextCell {
			fail(c.name, "%d bytes, more than %d", len(c.v), maxTextCell)
		}
	}
	// Levels and speed are read here, so that a bad one is a bad row as a
	// bad floor is (the planner parses them again, cheaply).
	if row.Levels != "" && len(row.Levels) <= maxTextCell {
		if _, err := route.ParseLevelRule(row.Levels); err != nil {
			fail("levels", "%v", err)
		}
	}
	if row.Speed != "" && len(row.Speed) <= maxTextCell {
		if _, err := optimizer.ParseSpeed(row.Speed); err != nil {
			fail("speed", "%v", err)
		}
	}
	return row, errs
}
