package batch

import (
	"encoding/csv"
	"errors"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

const header = "flight,departure,route,aircraft,tow_kg,ci"

func writeFile(t *testing.T, dir, name, content string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestReadScheduleGood(t *testing.T) {
	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, "routes"), 0o755); err != nil {
		t.Fatal(err)
	}
	writeFile(t, dir, "routes/a.csv", "x\n")
	// Columns in another order and case, a comment, an empty tow_kg made up
	// from zfw_kg + fuel_kg, optional columns and an offset time.
	path := writeFile(t, dir, "schedule.csv", "# day 1\n"+
		" CI ,Flight,aircraft,route,departure,tow_kg,zfw_kg,fuel_kg,floor_g,levels,speed\n"+
		"12.5,AB1,TESTJET,routes/a.csv,2026-06-12T08:30:00+02:00,,50000,9000,1.3,every-1000:FL300-FL400,M.78\n"+
		",AB2,TESTJET,routes/a.csv,2026-06-12T09:00:00Z,61000,,,,,\n")
	rows, bad, err := ReadSchedule(path)
	if err != nil || len(bad) != 0 {
		t.Fatalf("err %v, bad %v", err, bad)
	}
	if len(rows) != 2 {
		t.Fatalf("%d rows, want 2", len(rows))
	}
	r := rows[0]
	// RFC 3339 section 5.8 example form: the offset names the same instant.
	wantDep := time.Date(2026, 6, 12, 6, 30, 0, 0, time.UTC)
	if r.Line != 3 || r.Flight != "AB1" || !r.Departure.Equal(wantDep) || r.TOW != 59000 ||
		r.ZFW != 50000 || r.Fuel != 9000 || r.CI != 12.5 || !r.HasCI || r.Floor != 1.3 ||
		r.Levels != "every-1000:FL300-FL400" || r.Speed != "M.78" || r.Aircraft != "TESTJET" {
		t.Errorf("row 1 = %+v", r)
	}
	if r.RouteRaw != "routes/a.csv" || r.Route != filepath.Join(dir, "routes", "a.csv") || !filepath.IsAbs(r.Route) {
		t.Errorf("route %q raw %q, want absolute %s", r.Route, r.RouteRaw, filepath.Join(dir, "routes", "a.csv"))
	}
	if rows[1].HasCI || rows[1].TOW != 61000 || rows[1].Line != 4 {
		t.Errorf("row 2 = %+v, want no CI, TOW 61000, line 4", rows[1])
	}
}

func TestReadScheduleBadRows(t *testing.T) {
	good := "AB1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,20"
	tests := []struct {
		name, line, column, msg string
	}{
		// RFC 3339 section 5.6 grammar: a full-date needs "T", a time and an offset.
		{"bad RFC 3339", "XY1,2026-06-12 08:30,r.csv,TESTJET,61000,20", "departure", "RFC 3339"},
		{"no offset", "XY1,2026-06-12T08:30:00,r.csv,TESTJET,61000,20", "departure", "RFC 3339"},
		{"month 13", "XY1,2026-13-12T08:30:00Z,r.csv,TESTJET,61000,20", "departure", "RFC 3339"},
		{"negative tow", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,-61000,20", "tow_kg", "positive"},
		{"tow in grams", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000000,20", "tow_kg", "not an aircraft mass"},
		{"tow NaN", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,NaN,20", "tow_kg", "not a number"},
		{"no tow nor zfw", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,,20", "tow_kg", "empty take-off mass"},
		{"non-numeric ci", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,fast", "ci", "not a number"},
		{"negative ci", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,-3", "ci", "negative"},
		{"empty flight", ",2026-06-12T08:30:00Z,r.csv,TESTJET,61000,20", "flight", "empty flight"},
		{"duplicate flight", "AB1,2026-06-13T08:30:00Z,r.csv,TESTJET,61000,20", "flight", "duplicate flight \"AB1\" (first on line 2)"},
		{"missing route file", "XY1,2026-06-12T08:30:00Z,nope.csv,TESTJET,61000,20", "route", "nope.csv"},
		{"empty aircraft", "XY1,2026-06-12T08:30:00Z,r.csv,,61000,20", "aircraft", "empty aircraft"},
		{"too few fields", "XY1,2026-06-12T08:30:00Z,r.csv", "", "3 fields, the header has 6"},
		// Issue 17: one bad number is a bad row, never a run-stopping error.
		{"ci 1e300", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,1e300", "ci", "above the largest cost index 10000"},
		{"ci subnormal", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,5e-324", "ci", "subnormal"},
		{"ci overflows float64", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,1e400", "ci", "not a finite number"},
		{"ci Inf", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,Inf", "ci", "not a finite number"},
		{"ci NaN", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000,NaN", "ci", "not a number"},
		{"tow subnormal", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,5e-324,20", "tow_kg", "at least 1 kg"},
		{"tow 1e300", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,1e300,20", "tow_kg", "not an aircraft mass"},
		{"route is a directory", "XY1,2026-06-12T08:30:00Z,sub,TESTJET,61000,20", "route", "is a directory, not a regular file"},
		{"route is a FIFO", "XY1,2026-06-12T08:30:00Z,fifo,TESTJET,61000,20", "route", "is a FIFO (named pipe), not a regular file"},
		{"route is a device", "XY1,2026-06-12T08:30:00Z,/dev/zero,TESTJET,61000,20", "route", "is a device, not a regular file"},
		{"long value quoted short", "XY1,2026-06-12T08:30:00Z,r.csv,TESTJET,61000," + strings.Repeat("9", 500) + "x", "ci", `"` + strings.Repeat("9", 40) + `..."`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			writeFile(t, dir, "r.csv", "x\n")
			if err := os.Mkdir(filepath.Join(dir, "sub"), 0o755); err != nil {
				t.Fatal(err)
			}
			mkfifo(t, filepath.Join(dir, "fifo"))
			path := writeFile(t, dir, "schedule.csv", header+"\n"+good+"\n"+tc.line+"\n")
			rows, bad, err := ReadSchedule(path)
			if err != nil {
				t.Fatal(err)
			}
			if len(rows) != 1 || rows[0].Flight != "AB1" {
				t.Errorf("good row not kept: %+v", rows)
			}
			if len(bad) != 1 {
				t.Fatalf("bad = %v, want one error", bad)
			}
			e := bad[0]
			if e.Line != 3 || e.Column != tc.column || !strings.Contains(e.Msg, tc.msg) {
				t.Errorf("error %+v, want line 3, column %q, message containing %q", e, tc.column, tc.msg)
			}
			s := e.Error()
			want := "schedule.csv line 3"
			if tc.column != "" {
				want = ", column " + tc.column + ": "
			}
			if !strings.HasPrefix(s, "schedule.csv line 3") || !strings.Contains(s, want) {
				t.Errorf("Error() = %q, want it to name the file, line 3 and %q", s, want)
			}
		})
	}
}

func TestRowErrorText(t *testing.T) {
	e := RowError{File: "schedule.csv", Line: 7, Flight: "XY123", Column: "tow_kg", Msg: "-5 kg: a mass must be positive"}
	if got, want := e.Error(), "schedule.csv line 7 (flight XY123), column tow_kg: -5 kg: a mass must be positive"; got != want {
		t.Errorf("Error() = %q, want %q", got, want)
	}
}

func TestReadScheduleFatal(t *testing.T) {
	tests := []struct {
		name, content, want string
	}{
		{"missing column", "flight,departure,route,aircraft,ci\n", "missing required column(s) tow_kg"},
		{"unknown column", header + ",tow_lbs\n", `unknown column "tow_lbs"`},
		{"repeated column", header + ",ci\n", `column "ci" appears twice`},
		{"empty file", "", "empty file"},
		{"bare quote", header + "\nAB\"1,x,y,z,1,2\n", "line 2: malformed CSV"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := writeFile(t, t.TempDir(), "sched.csv", tc.content)
			_, _, err := ReadSchedule(path)
			var fe *FormatError
			if !errors.As(err, &fe) || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "sched.csv") {
				t.Errorf("err = %v, want a FormatError naming sched.csv and %q", err, tc.want)
			}
		})
	}
	_, _, err := ReadSchedule(filepath.Join(t.TempDir(), "absent.csv"))
	if !errors.Is(err, os.ErrNotExist) || !strings.Contains(err.Error(), "absent.csv") {
		t.Errorf("missing file: err = %v, want ErrNotExist naming absent.csv", err)
	}
}

// TestCapReader: input longer than the cap is a *FormatError naming the
// file (not a silent cut mid-row, which could leave a shorter but valid
// number); input of exactly the cap reads whole.
func TestCapReader(t *testing.T) {
	text := header + "\nA1,2026-06-01T08:00:00Z,r.csv,x,61000,10\n"
	for _, tc := range []struct {
		max     int64
		wantErr bool
	}{{int64(len(text)), false}, {int64(len(text)) - 3, true}} {
		r := csv.NewReader(&capReader{r: strings.NewReader(text), max: tc.max, file: "s.csv"})
		recs, err := r.ReadAll()
		if err != nil {
			err = csvError("s.csv", err)
		}
		var fe *FormatError
		switch {
		case tc.wantErr && (!errors.As(err, &fe) || fe.File != "s.csv" || !strings.Contains(fe.Msg, strconv.FormatInt(tc.max, 10))):
			t.Errorf("max %d: err = %v, want a FormatError for s.csv naming the limit", tc.max, err)
		case !tc.wantErr && (err != nil || len(recs) != 2 || recs[1][4] != "61000"):
			t.Errorf("max %d: records %q, err %v, want both lines whole", tc.max, recs, err)
		}
	}
}

// Issue 17: a schedule that is a FIFO, a device or a directory is refused
// before it is opened (opening a FIFO for reading blocks until a writer
// comes, which would hang the batch).
func TestReadScheduleRefusesNonRegular(t *testing.T) {
	dir := t.TempDir()
	mkfifo(t, filepath.Join(dir, "fifo"))
	for _, p := range []string{filepath.Join(dir, "fifo"), "/dev/zero", dir} {
		_, _, err := ReadSchedule(p)
		var ie *InputError
		if !errors.As(err, &ie) || !strings.Contains(err.Error(), p) || !strings.Contains(err.Error(), "not a regular file") {
			t.Errorf("ReadSchedule(%s) err = %v, want an *InputError naming it, not a regular file", p, err)
		}
	}
}

// TestReadScheduleArrival: arrive_by and arrive_window are read with the
// optimizer's window parser; a bad one is a bad row naming its column and
// value, and a target changes the row's fingerprint.
func TestReadScheduleArrival(t *testing.T) {
	const head = "flight,departure,route,aircraft,tow_kg,ci,arrive_by,arrive_window\n"
	const dep = "2026-06-12T08:30:00Z"
	good := []struct {
		line        string
		early, late time.Duration
	}{
		{"A1," + dep + ",r.csv,TESTJET,61000,20,2026-06-12T11:00:00Z,\"-5m,+10m\"", -5 * time.Minute, 10 * time.Minute},
		{"A2," + dep + ",r.csv,TESTJET,61000,20,2026-06-12T11:00:00Z,-5m;+10m", -5 * time.Minute, 10 * time.Minute},
		{"A3," + dep + ",r.csv,TESTJET,61000,20,2026-06-12T11:00:00Z,", -150 * time.Minute, 0}, // default: from the departure
	}
	for _, g := range good {
		dir := t.TempDir()
		writeFile(t, dir, "r.csv", "x\n")
		rows, bad, err := ReadSchedule(writeFile(t, dir, "s.csv", head+g.line+"\n"))
		if err != nil || len(bad) != 0 || len(rows) != 1 {
			t.Fatalf("%s: rows %v bad %v err %v", g.line, rows, bad, err)
		}
		if e, l := rows[0].Window(); e != g.early || l != g.late || rows[0].ArriveBy.IsZero() {
			t.Errorf("%s: window %v,%v, want %v,%v", g.line, e, l, g.early, g.late)
		}
	}
	for _, c := range []struct{ name, by, window, column, value string }{
		{"before departure", "2026-06-12T08:00:00Z", "", "arrive_by", "2026-06-12T08:00:00Z"},
		{"at departure", dep, "", "arrive_by", dep},
		{"malformed time", "11:00", "", "arrive_by", "11:00"},
		{"reversed window", "2026-06-12T11:00:00Z", "+10m;-5m", "arrive_window", "+10m;-5m"},
		{"one end", "2026-06-12T11:00:00Z", "10m", "arrive_window", "10m"},
		{"not finite", "2026-06-12T11:00:00Z", "NaN;1m", "arrive_window", "NaN"},
		{"window without time", "", "-5m;+5m", "arrive_window", "needs an arrive_by"},
	} {
		dir := t.TempDir()
		writeFile(t, dir, "r.csv", "x\n")
		line := "B1," + dep + ",r.csv,TESTJET,61000,20," + c.by + "," + c.window
		rows, bad, err := ReadSchedule(writeFile(t, dir, "s.csv", head+line+"\n"))
		if err != nil || len(rows) != 0 || len(bad) != 1 || bad[0].Column != c.column || !strings.Contains(bad[0].Msg, c.value) {
			t.Errorf("%s: rows %v, bad %v, err %v; want column %s naming %q", c.name, rows, bad, err, c.column, c.value)
		}
	}
	// A target is part of the row's resume key.
	plain := Row{Line: 2, Flight: "A1", Departure: time.Date(2026, 6, 12, 8, 30, 0, 0, time.UTC), TOW: 61000}
	withCols := plain
	withCols.ArriveBy = plain.Departure.Add(3 * time.Hour)
	if fingerprint(&plain, 20) == fingerprint(&withCols, 20) {
		t.Error("a target does not change the fingerprint (a resume would reuse the plan)")
	}
}
