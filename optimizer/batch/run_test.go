package batch

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
)

// The oracle for the orchestration tests is equivalence: a run split into
// shards and merged, or stopped and resumed, must give the same files as
// one whole run; file formats are checked by reading them back with
// encoding/csv and parquet-go.

func TestShardsMergeEqualWholeRun(t *testing.T) {
	dir := t.TempDir()
	path := writeSchedule(t, dir, 60,
		"BAD1,2026-06-01T08:00:00Z,route.geojson,TESTJET,-5,10,",
		"BAD2,not-a-time,route.geojson,TESTJET,61000,10,")
	rows, bad := mustRead(t, path)
	sweep := []float64{0, 20, 50}
	whole := filepath.Join(dir, "whole")
	ws, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: whole, Workers: 3, Sweep: sweep})
	if err != nil {
		t.Fatal(err)
	}
	if ws.Planned != 180 || ws.Failed != 0 || ws.BadRows != 2 || len(ws.ByCI) != 3 {
		t.Fatalf("whole run summary %+v, want 180 planned, 2 bad rows, 3 CIs", ws)
	}

	const n = 3
	var shardDirs []string
	seen := map[string]int{}
	total := 0
	for k := range n {
		d := filepath.Join(dir, "shard"+strconv.Itoa(k))
		s, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: d, Workers: 2, Sweep: sweep, Shard: k, Shards: n})
		if err != nil {
			t.Fatalf("shard %d: %v", k, err)
		}
		total += s.Planned
		shardDirs = append(shardDirs, d)
		for _, r := range readCSV(t, filepath.Join(d, ResultsCSV))[1:] {
			seen[r[0]]++
		}
	}
	if total != ws.Planned {
		t.Errorf("shards planned %d in all, whole run %d", total, ws.Planned)
	}
	for f, c := range seen {
		if c != len(sweep) {
			t.Errorf("flight %s appears %d times across shards, want %d (once per CI)", f, c, len(sweep))
		}
	}
	merged := filepath.Join(dir, "merged")
	ms, err := Merge(shardDirs, merged)
	if err != nil {
		t.Fatal(err)
	}
	if ms.Planned != ws.Planned || ms.BadRows != ws.BadRows {
		t.Errorf("merge summary %+v, whole %+v", ms, ws)
	}
	for i := range ws.ByCI {
		if ms.ByCI[i] != ws.ByCI[i] {
			t.Errorf("CI summary %d: merged %+v, whole %+v", i, ms.ByCI[i], ws.ByCI[i])
		}
	}
	compareFiles(t, finalFiles(t, whole), finalFiles(t, merged))
	if !equalParquetRows(t, filepath.Join(whole, ResultsParquet), filepath.Join(merged, ResultsParquet)) {
		t.Error("merged results.parquet rows differ from the whole run's")
	}

	// Merging again into a directory that holds records is refused, as is
	// an incomplete set of shards or a shard given twice.
	if _, err := Merge(shardDirs, merged); err == nil || !strings.Contains(err.Error(), "Options.Resume") {
		t.Errorf("merge into a used directory: err = %v, want one asking for --resume or a fresh directory", err)
	}
	var me *MergeError
	if _, err := Merge(shardDirs[:2], filepath.Join(dir, "m2")); !errors.As(err, &me) || !strings.Contains(err.Error(), "shard 2/3 missing") {
		t.Errorf("merge of 2 of 3 shards: err = %v, want shard 2/3 missing", err)
	}
	if _, err := Merge([]string{shardDirs[0], shardDirs[1], shardDirs[2], shardDirs[1]}, filepath.Join(dir, "m3")); !errors.As(err, &me) || !strings.Contains(err.Error(), "given twice") {
		t.Errorf("merge with a shard twice: err = %v, want given twice", err)
	}
}

func TestMergeReportsDuplicateRecords(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 20))
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	for k, d := range []string{a, b} {
		if _, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: d, Workers: 2, Shard: k, Shards: 2}); err != nil {
			t.Fatal(err)
		}
	}
	// Plant one of a's records in b as well, listed in b's manifest.
	ma, err := readManifest(a)
	if err != nil {
		t.Fatal(err)
	}
	name := ma.Records[0]
	data, err := os.ReadFile(filepath.Join(a, partsDir, name))
	if err != nil {
		t.Fatal(err)
	}
	plant := func(content []byte) {
		if err := os.WriteFile(filepath.Join(b, partsDir, name), content, 0o644); err != nil {
			t.Fatal(err)
		}
		mb, err := readManifest(b)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(strings.Join(mb.Records, " "), name) {
			mb.Records = append(mb.Records, name)
			writeManifestForTest(t, b, mb)
		}
	}
	plant(data)
	var me *MergeError
	if _, err := Merge([]string{a, b}, filepath.Join(dir, "m1")); !errors.As(err, &me) || !strings.Contains(err.Error(), name) || !strings.Contains(err.Error(), "identical") {
		t.Errorf("identical duplicate: err = %v, want MergeError naming %s as identical", err, name)
	}
	plant(bytes.Replace(data, []byte(`"status":"ok"`), []byte(`"status":"failed"`), 1))
	if _, err := Merge([]string{a, b}, filepath.Join(dir, "m2")); !errors.As(err, &me) || !strings.Contains(err.Error(), "conflicting") {
		t.Errorf("conflicting duplicate: err = %v, want MergeError saying conflicting", err)
	}
	// A shard whose run did not finish has no manifest.
	if err := os.Remove(filepath.Join(b, manifestName)); err != nil {
		t.Fatal(err)
	}
	if _, err := Merge([]string{a, b}, filepath.Join(dir, "m3")); err == nil || !strings.Contains(err.Error(), "did not finish") {
		t.Errorf("unfinished shard: err = %v, want did not finish", err)
	}
}

func TestCancelledRunResumesToWholeRun(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 40, "BAD1,2026-06-01T08:00:00Z,route.geojson,TESTJET,61000,abc,"))
	whole := filepath.Join(dir, "whole")
	if _, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: whole, Workers: 2}); err != nil {
		t.Fatal(err)
	}

	out := filepath.Join(dir, "out")
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var calls atomic.Int32
	stopping := func(ctx context.Context, row Row, ci float64) (Result, error) {
		if calls.Add(1) == 15 {
			cancel()
		}
		if ctx.Err() != nil {
			return Result{}, ctx.Err()
		}
		return fakePlan(ctx, row, ci)
	}
	s, err := Run(ctx, rows, bad, stopping, Options{Out: out, Workers: 2})
	if !errors.Is(err, ErrStopped) || !errors.Is(err, context.Canceled) {
		t.Fatalf("stopped run: err = %v, want ErrStopped and context.Canceled", err)
	}
	if s.Pending == 0 || s.Pending >= len(rows) {
		t.Fatalf("stopped run left %d pending of %d, want some but not all", s.Pending, len(rows))
	}
	if _, err := os.Stat(filepath.Join(out, ResultsCSV)); !os.IsNotExist(err) {
		t.Errorf("a stopped run wrote %s (stat err %v)", ResultsCSV, err)
	}
	parts := countResultParts(t, out)
	if parts+s.Pending != len(rows) {
		t.Errorf("%d records + %d pending != %d flights", parts, s.Pending, len(rows))
	}

	// Without --resume the directory is refused.
	if _, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: out}); err == nil || !strings.Contains(err.Error(), "Options.Resume") {
		t.Fatalf("rerun without resume: err = %v, want a message naming --resume", err)
	}

	// A temp file left by a kill and a record emptied by a power loss must
	// not hurt: the empty record's flight is planned again.
	if err := os.WriteFile(filepath.Join(out, partsDir, tmpPrefix+"123"), []byte("{"), 0o644); err != nil {
		t.Fatal(err)
	}
	ents, _ := os.ReadDir(filepath.Join(out, partsDir))
	var emptied string
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), "T") {
			emptied = e.Name()
			break
		}
	}
	if err := os.WriteFile(filepath.Join(out, partsDir, emptied), nil, 0o644); err != nil {
		t.Fatal(err)
	}

	var resumedCalls atomic.Int32
	counting := func(ctx context.Context, row Row, ci float64) (Result, error) {
		resumedCalls.Add(1)
		return fakePlan(ctx, row, ci)
	}
	rs, err := Run(context.Background(), rows, bad, counting, Options{Out: out, Workers: 3, Resume: true})
	if err != nil {
		t.Fatal(err)
	}
	if want := s.Pending + 1; int(resumedCalls.Load()) != want {
		t.Errorf("resume planned %d flights, want %d (pending plus the emptied record)", resumedCalls.Load(), want)
	}
	if rs.Skipped != parts-1 || rs.Planned != len(rows) {
		t.Errorf("resume summary %+v, want skipped %d, planned %d", rs, parts-1, len(rows))
	}
	if _, err := os.Stat(filepath.Join(out, partsDir, tmpPrefix+"123")); !os.IsNotExist(err) {
		t.Errorf("leftover temp file not removed (stat err %v)", err)
	}
	compareFiles(t, finalFiles(t, whole), finalFiles(t, out))
	if !equalParquetRows(t, filepath.Join(whole, ResultsParquet), filepath.Join(out, ResultsParquet)) {
		t.Error("resumed results.parquet rows differ from the whole run's")
	}

	// Resuming a finished run plans nothing and changes nothing.
	resumedCalls.Store(0)
	if _, err := Run(context.Background(), rows, bad, counting, Options{Out: out, Resume: true}); err != nil {
		t.Fatal(err)
	}
	if resumedCalls.Load() != 0 {
		t.Errorf("resuming a finished run planned %d flights", resumedCalls.Load())
	}
	compareFiles(t, finalFiles(t, whole), finalFiles(t, out))
}

func TestBadRowsAndPanicDoNotStopOthers(t *testing.T) {
	dir := t.TempDir()
	path := writeSchedule(t, dir, 12,
		"BADTOW,2026-06-01T08:00:00Z,route.geojson,TESTJET,-5,10,",
		",2026-06-01T08:00:00Z,route.geojson,TESTJET,61000,10,",
		"BADROUTE,2026-06-01T08:00:00Z,nowhere.geojson,TESTJET,61000,10,")
	rows, bad := mustRead(t, path)
	if len(rows) != 12 || len(bad) != 3 {
		t.Fatalf("read %d rows and %d bad, want 12 and 3: %v", len(rows), len(bad), bad)
	}
	planner := func(ctx context.Context, row Row, ci float64) (Result, error) {
		switch row.Flight {
		case "T0003":
			i := len(row.Flight) + 10
			_ = row.Flight[i] // index out of range: a real runtime panic
		case "T0007":
			return Result{}, errors.New("no level meets the buffet floor")
		}
		return fakePlan(ctx, row, ci)
	}
	var prog bytes.Buffer
	out := filepath.Join(dir, "out")
	s, err := Run(context.Background(), rows, bad, planner, Options{Out: out, Workers: 4, Progress: &prog})
	if err != nil {
		t.Fatal(err)
	}
	if s.Planned != 10 || s.Failed != 2 || s.BadRows != 3 {
		t.Errorf("summary %+v, want 10 planned, 2 failed, 3 bad rows", s)
	}
	res := readCSV(t, filepath.Join(out, ResultsCSV))
	status := map[string]string{}
	for _, r := range res[1:] {
		status[r[0]] = r[2] + " " + r[len(r)-1]
	}
	if !strings.HasPrefix(status["T0003"], "failed internal error: ") {
		t.Errorf("panicking flight: %q, want failed with internal error", status["T0003"])
	}
	if status["T0007"] != "failed no level meets the buffet floor" {
		t.Errorf("failing flight: %q", status["T0007"])
	}
	if status["T0004"] != "ok " {
		t.Errorf("other flight: %q, want ok", status["T0004"])
	}
	errs := readCSV(t, filepath.Join(out, ErrorsCSV))
	if strings.Join(errs[0], ",") != "flight,row,reason,ci" || len(errs) != 1+3+2 {
		t.Fatalf("errors.csv:\n%v", errs)
	}
	// Schedule lines: header is line 1, T0000..T0011 are lines 2..13.
	wantBad := map[string]string{"BADTOW": "line 14 (flight BADTOW), column tow_kg", "": "line 15, column flight", "BADROUTE": "line 16 (flight BADROUTE), column route"}
	for _, e := range errs[1:] {
		if w, ok := wantBad[e[0]]; ok && e[3] == "" {
			if !strings.Contains(e[2], w) {
				t.Errorf("errors.csv %v: reason should contain %q", e, w)
			}
			delete(wantBad, e[0])
		}
	}
	if len(wantBad) > 0 {
		t.Errorf("bad rows missing from errors.csv: %v", wantBad)
	}
	if !strings.Contains(prog.String(), "planner panic") {
		t.Errorf("progress output does not report the panic:\n%s", prog.String())
	}
}

func TestRunNeedsCIWithoutSweep(t *testing.T) {
	dir := t.TempDir()
	path := writeSchedule(t, dir, 3, "NOCI,2026-06-01T08:00:00Z,route.geojson,TESTJET,61000,,")
	rows, bad := mustRead(t, path)
	out := filepath.Join(dir, "out")
	s, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: out})
	if err != nil {
		t.Fatal(err)
	}
	if s.Planned != 3 || s.BadRows != 1 {
		t.Errorf("summary %+v, want 3 planned and 1 bad row", s)
	}
	errs := readCSV(t, filepath.Join(out, ErrorsCSV))
	if len(errs) != 2 || errs[1][0] != "NOCI" || !strings.Contains(errs[1][2], "column ci") {
		t.Errorf("errors.csv %v, want the NOCI row with column ci", errs)
	}
	// With a sweep the same row is planned.
	s, err = Run(context.Background(), rows, bad, fakePlan, Options{Out: filepath.Join(dir, "sw"), Sweep: []float64{5}})
	if err != nil || s.Planned != 4 {
		t.Errorf("sweep run: %+v, %v; want 4 planned", s, err)
	}
	if _, err := os.Stat(filepath.Join(dir, "sw", SummaryCSV)); err != nil {
		t.Errorf("sweep run wrote no %s: %v", SummaryCSV, err)
	}
	if _, err := os.Stat(filepath.Join(out, SummaryCSV)); !os.IsNotExist(err) {
		t.Errorf("run without sweep wrote %s", SummaryCSV)
	}
}

func TestProgressOutput(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 40))
	for _, tty := range []bool{false, true} {
		var buf bytes.Buffer
		if _, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: filepath.Join(dir, strconv.FormatBool(tty)), Progress: &buf, ProgressTTY: tty}); err != nil {
			t.Fatal(err)
		}
		s := buf.String()
		if !strings.Contains(s, "40/40 (100%)") || !strings.Contains(s, "40 plans made") {
			t.Errorf("tty=%v: progress lacks the final count:\n%s", tty, s)
		}
		if tty != strings.Contains(s, "\r") {
			t.Errorf("tty=%v: carriage returns present = %v", tty, !tty)
		}
		if !tty && strings.Count(s, "\n") > 2+20+1 {
			t.Errorf("plain progress printed %d lines for 40 plans, want at most one per 5 %%", strings.Count(s, "\n"))
		}
	}
}

func readCSV(t testing.TB, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs
}

func countResultParts(t testing.TB, out string) int {
	t.Helper()
	ents, err := os.ReadDir(filepath.Join(out, partsDir))
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, e := range ents {
		if !strings.HasSuffix(e.Name(), ".bad.json") && strings.HasSuffix(e.Name(), ".json") {
			n++
		}
	}
	return n
}

// TestResultsSortedByFlightAndCI checks the order of the final files
// against a sort of the parsed (flight, ci) pairs: CI compares as a number
// (5 < 20 < 100), not as text.
func TestResultsSortedByFlightAndCI(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 15))
	out := filepath.Join(dir, "out")
	s, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: out, Sweep: []float64{100, 5, 20}})
	if err != nil {
		t.Fatal(err)
	}
	all := readCSV(t, filepath.Join(out, ResultsCSV))
	recs := all[1:]
	fuelCol := slices.Index(all[0], "fuel_kg")
	if len(recs) != 45 {
		t.Fatalf("%d rows, want 45", len(recs))
	}
	key := func(r []string) (string, float64) {
		ci, err := strconv.ParseFloat(r[1], 64)
		if err != nil {
			t.Fatal(err)
		}
		return r[0], ci
	}
	for i := 1; i < len(recs); i++ {
		f0, c0 := key(recs[i-1])
		f1, c1 := key(recs[i])
		if f0 > f1 || f0 == f1 && c0 >= c1 {
			t.Errorf("rows %d and %d out of order: (%s, %v) then (%s, %v)", i, i+1, f0, c0, f1, c1)
		}
	}
	sum := readCSV(t, filepath.Join(out, SummaryCSV))
	if len(sum) != 4 || sum[1][0] != "5" || sum[2][0] != "20" || sum[3][0] != "100" {
		t.Errorf("summary.csv %v, want CIs 5, 20, 100", sum)
	}
	// The summary totals are the sums of the result rows (encoding/csv
	// parse of our own file, summed independently here).
	for i, c := range s.ByCI {
		var fuel float64
		n := 0
		for _, r := range recs {
			if _, ci := key(r); ci == c.CI {
				v, err := strconv.ParseFloat(r[fuelCol], 64)
				if err != nil {
					t.Fatal(err)
				}
				fuel += v
				n++
			}
		}
		// Each cell is rounded to 0.1 kg: at most 0.05 kg off per row.
		if c.Flights != n || math.Abs(c.Fuel-fuel) > 0.05*float64(n) {
			t.Errorf("CI %v: summary %d flights %.1f kg, rows give %d flights %.1f kg", c.CI, c.Flights, c.Fuel, n, fuel)
		}
		if got := sum[i+1][2]; got != strconv.FormatFloat(math.Round(c.Fuel*10)/10, 'f', -1, 64) {
			t.Errorf("summary.csv fuel %s, Summary %v", got, c.Fuel)
		}
	}
}

// TestResumeReplansChangedRows: a record whose input no longer matches its
// schedule row is planned again, so the result equals a fresh run of the
// edited schedule.
func TestResumeReplansChangedRows(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 10))
	out := filepath.Join(dir, "out")
	if _, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: out}); err != nil {
		t.Fatal(err)
	}
	rows[4].TOW += 1000
	var calls atomic.Int32
	var planned string
	counting := func(ctx context.Context, row Row, ci float64) (Result, error) {
		calls.Add(1)
		planned = row.Flight
		return fakePlan(ctx, row, ci)
	}
	if _, err := Run(context.Background(), rows, bad, counting, Options{Out: out, Resume: true}); err != nil {
		t.Fatal(err)
	}
	if calls.Load() != 1 || planned != rows[4].Flight {
		t.Errorf("resume planned %d flights (last %s), want only the edited %s", calls.Load(), planned, rows[4].Flight)
	}
	fresh := filepath.Join(dir, "fresh")
	if _, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: fresh}); err != nil {
		t.Fatal(err)
	}
	compareFiles(t, finalFiles(t, fresh), finalFiles(t, out))
}

// TestMergeRefusesForeignPlanPath: a record whose plan field points
// outside its own plans/<name> is corrupt; Merge must refuse it rather
// than remove and link the file it names.
func TestMergeRefusesForeignPlanPath(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 4))
	run := filepath.Join(dir, "run")
	if _, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: run}); err != nil {
		t.Fatal(err)
	}
	victim := filepath.Join(dir, "victim.txt")
	if err := os.WriteFile(victim, []byte("keep\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	man, err := readManifest(run)
	if err != nil {
		t.Fatal(err)
	}
	name := man.Records[0]
	path := filepath.Join(run, partsDir, name)
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	good := `"plan":"` + planPath(name) + `"`
	if !bytes.Contains(data, []byte(good)) {
		t.Fatalf("record %s lacks %s: %s", name, good, data)
	}
	data = bytes.Replace(data, []byte(good), []byte(`"plan":"../../victim.txt"`), 1)
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	var fe *FormatError
	if _, err := Merge([]string{run}, filepath.Join(dir, "a", "b")); !errors.As(err, &fe) || fe.File != path {
		t.Errorf("merge of a record with a foreign plan path: err = %v, want a FormatError naming %s", err, path)
	}
	if got, err := os.ReadFile(victim); err != nil || string(got) != "keep\n" {
		t.Errorf("file outside the output directory touched: %q, %v", got, err)
	}
}
