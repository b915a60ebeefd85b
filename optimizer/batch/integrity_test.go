package batch

import (
	"context"
	"errors"
	"fmt"
	"hash/fnv"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// Issue 17: file names of plans are the sanitized flight id and a short
// hash, bounded whatever the row's numbers; 1e300 used to make a 300-digit
// name ("file name too long").
func TestResultNameBounded(t *testing.T) {
	safe := regexp.MustCompile(`^[A-Za-z0-9_][A-Za-z0-9_-]*_[0-9a-f]{16}\.json$`)
	seen := map[string]bool{}
	for _, c := range []struct {
		flight string
		ci     float64
	}{
		{"T1", 0}, {"T1", 20}, {"T1", 1e300}, {"T1", 5e-324}, {"T1", math.MaxFloat64},
		{"../../etc/passwd", 0}, {"-rf", 0}, {".hidden", 0}, {strings.Repeat("Ä", 30), 0},
		{"a/b", 0}, {"a_b", 0}, {"a b", 0}, // three ids with one stem: the hash tells them apart
	} {
		name := resultName(c.flight, c.ci)
		if len(name) > 54 || !safe.MatchString(name) || strings.Contains(name, "300") {
			t.Errorf("resultName(%q, %v) = %q: want a bounded name of [A-Za-z0-9_-] plus 16 hex digits", c.flight, c.ci, name)
		}
		if seen[name] {
			t.Errorf("resultName(%q, %v) = %q repeats an earlier name", c.flight, c.ci, name)
		}
		seen[name] = true
	}
}

// Issue 17: InShard must not divide by zero or wrap for counts past 2^32
// (the count is bounded by MaxShards at the edges; InShard itself is
// safe anyway). Checked against Go's hash/fnv 32-bit FNV-1a modulo n in
// 64 bits.
func TestInShardLargeCounts(t *testing.T) {
	for _, n := range []int{1 << 32, 1<<32 + 1, 1 << 40} {
		for _, id := range []string{"T1", "DEMO101", ""} {
			h := fnv.New32a()
			h.Write([]byte(id))
			want := int(uint64(h.Sum32()) % uint64(n))
			if !InShard(id, want, n) || InShard(id, want+1, n) {
				t.Errorf("InShard(%q, k, %d): want true only for k = %d", id, n, want)
			}
		}
	}
}

func runOrFatal(t *testing.T, rows []Row, bad []RowError, plan Planner, opt Options) Summary {
	t.Helper()
	s, err := Run(context.Background(), rows, bad, plan, opt)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// Issue 13: the output directory records its shard and fingerprint;
// --resume refuses another shard or fingerprint, naming both.
func TestResumeRefusesOtherShardOrFingerprint(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 12))
	out := filepath.Join(dir, "out")
	meta := map[string]string{"version": "1", "weather.0.sha256": "aaa"}
	runOrFatal(t, rows, bad, fakePlan, Options{Out: out, Shard: 2, Shards: 4, Meta: meta})
	if k, n, ok, err := RecordedShard(out); err != nil || !ok || k != 2 || n != 4 {
		t.Errorf("RecordedShard = %d, %d, %v, %v; want 2, 4, true", k, n, ok, err)
	}
	var ie *InputError
	// A one-task re-run that took the array's count would be shard 0/1.
	_, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: out, Shard: 0, Shards: 1, Meta: meta, Resume: true})
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "holds shard 2/4, this run is shard 0/1") {
		t.Errorf("resume as another shard: err = %v, want an InputError naming both shards", err)
	}
	other := map[string]string{"version": "1", "weather.0.sha256": "bbb"}
	_, err = Run(context.Background(), rows, bad, fakePlan, Options{Out: out, Shard: 2, Shards: 4, Meta: other, Resume: true})
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), `weather.0.sha256 "aaa", now "bbb"`) {
		t.Errorf("resume with other weather: err = %v, want an InputError naming the changed digest", err)
	}
	_, err = Run(context.Background(), rows, bad, fakePlan, Options{Out: out, Shard: 2, Shards: 4, Meta: map[string]string{"version": "1"}, Resume: true})
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), `weather.0.sha256 "aaa", now none`) {
		t.Errorf("resume without weather: err = %v, want an InputError naming the dropped digest", err)
	}
	// The same shard and fingerprint resumes, planning nothing.
	var calls atomic.Int32
	counting := func(ctx context.Context, r Row, ci float64) (Result, error) {
		calls.Add(1)
		return fakePlan(ctx, r, ci)
	}
	s := runOrFatal(t, rows, bad, counting, Options{Out: out, Shard: 2, Shards: 4, Meta: meta, Resume: true})
	if calls.Load() != 0 || s.Skipped == 0 {
		t.Errorf("same shard and fingerprint: planned %d, reused %d; want 0 planned", calls.Load(), s.Skipped)
	}
}

// Issue 13: a changed route file (same path) changes the flight's input,
// so a resume plans it again.
func TestResumeReplansChangedRouteFile(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 5))
	out := filepath.Join(dir, "out")
	runOrFatal(t, rows, bad, fakePlan, Options{Out: out})
	if err := os.WriteFile(filepath.Join(dir, "route.geojson"), []byte(`{"type":"FeatureCollection"}`), 0o644); err != nil {
		t.Fatal(err)
	}
	var calls atomic.Int32
	counting := func(ctx context.Context, r Row, ci float64) (Result, error) {
		calls.Add(1)
		return fakePlan(ctx, r, ci)
	}
	runOrFatal(t, rows, bad, counting, Options{Out: out, Resume: true})
	if calls.Load() != 5 {
		t.Errorf("after the route file changed, resume planned %d of 5 flights", calls.Load())
	}
}

// Issue 17: --resume verifies each reused plan file against the digest in
// its record; a truncated or deleted plan is planned again and the result
// equals a run never damaged.
func TestResumeReplansDamagedPlans(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 10))
	whole := filepath.Join(dir, "whole")
	runOrFatal(t, rows, bad, fakePlan, Options{Out: whole})
	out := filepath.Join(dir, "out")
	runOrFatal(t, rows, bad, fakePlan, Options{Out: out})
	ents, err := os.ReadDir(filepath.Join(out, plansDir))
	if err != nil || len(ents) < 3 {
		t.Fatalf("plans: %v, %d files", err, len(ents))
	}
	if err := os.WriteFile(filepath.Join(out, plansDir, ents[0].Name()), nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Remove(filepath.Join(out, plansDir, ents[1].Name())); err != nil {
		t.Fatal(err)
	}
	// Same length, one byte changed.
	p2 := filepath.Join(out, plansDir, ents[2].Name())
	data, _ := os.ReadFile(p2)
	data[len(data)/2] ^= 1
	if err := os.WriteFile(p2, data, 0o644); err != nil {
		t.Fatal(err)
	}
	var calls atomic.Int32
	counting := func(ctx context.Context, r Row, ci float64) (Result, error) {
		calls.Add(1)
		return fakePlan(ctx, r, ci)
	}
	s := runOrFatal(t, rows, bad, counting, Options{Out: out, Resume: true})
	if calls.Load() != 3 || s.Replanned != 3 {
		t.Errorf("resume planned %d, Replanned %d; want the 3 damaged plans", calls.Load(), s.Replanned)
	}
	compareFiles(t, finalFiles(t, whole), finalFiles(t, out))
}

// Issue 17: merge refuses a manifest naming a record outside parts/
// (it used to follow "../" and replace a file outside --out).
func TestMergeRefusesEscapingManifest(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 4))
	run := filepath.Join(dir, "run")
	runOrFatal(t, rows, bad, fakePlan, Options{Out: run})
	man, err := readManifest(run)
	if err != nil {
		t.Fatal(err)
	}
	for _, evil := range []string{"../../victim.json", "../run.json", "/etc/passwd.json", "sub/x.json", ".lock", "..", "x.txt"} {
		m := man
		m.Records = append([]string{evil}, man.Records...)
		writeManifestForTest(t, run, m)
		var fe *FormatError
		_, err := Merge([]string{run}, filepath.Join(dir, "merged"))
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), "leaves the parts directory") {
			t.Errorf("manifest naming %q: err = %v, want a FormatError", evil, err)
		}
	}
}

// Issue 17: a merge refuses a plan file that does not match its record.
func TestMergeRefusesDamagedPlan(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 4))
	run := filepath.Join(dir, "run")
	runOrFatal(t, rows, bad, fakePlan, Options{Out: run})
	ents, _ := os.ReadDir(filepath.Join(run, plansDir))
	if err := os.WriteFile(filepath.Join(run, plansDir, ents[0].Name()), []byte("{}"), 0o644); err != nil {
		t.Fatal(err)
	}
	var fe *FormatError
	if _, err := Merge([]string{run}, filepath.Join(dir, "merged")); !errors.As(err, &fe) || !strings.Contains(err.Error(), "digest") {
		t.Errorf("merge of a damaged plan: err = %v, want a FormatError about the digest", err)
	}
}

// Issue 17: an output directory holds a lock; a second run on it while
// the first is running is refused with a message naming the directory.
func TestSecondRunOnLockedDirRefused(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 4))
	out := filepath.Join(dir, "out")
	started, release := make(chan struct{}), make(chan struct{})
	var once atomic.Bool
	blocking := func(ctx context.Context, r Row, ci float64) (Result, error) {
		if once.CompareAndSwap(false, true) {
			close(started)
		}
		<-release
		return fakePlan(ctx, r, ci)
	}
	first := make(chan error, 1)
	go func() {
		_, err := Run(context.Background(), rows, bad, blocking, Options{Out: out, Workers: 1})
		first <- err
	}()
	<-started
	var ie *InputError
	_, err := Run(context.Background(), rows, bad, fakePlan, Options{Out: out, Resume: true})
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "in use by another levelpath run") || !strings.Contains(err.Error(), out) {
		t.Errorf("second run: err = %v, want an InputError saying %s is in use", err, out)
	}
	if _, err := Merge([]string{filepath.Join(dir, "nope")}, out); err == nil {
		t.Error("merge into a locked directory: no error")
	}
	close(release)
	if err := <-first; err != nil {
		t.Fatalf("first run: %v", err)
	}
	// Once the first run ended the lock is free.
	runOrFatal(t, rows, bad, fakePlan, Options{Out: out, Resume: true})
}

// Issue 17: a planner that ignores cancellation (e.g. blocked opening a
// FIFO) does not keep a stopped run from returning; its late result is
// not recorded.
func TestStopDoesNotWaitForStuckPlanner(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 6))
	out := filepath.Join(dir, "out")
	ctx, cancel := context.WithCancel(context.Background())
	stuck := make(chan struct{})
	defer close(stuck)
	planner := func(_ context.Context, r Row, ci float64) (Result, error) {
		cancel()
		<-stuck // ignores ctx
		return fakePlan(context.Background(), r, ci)
	}
	done := make(chan error, 1)
	go func() {
		_, err := Run(ctx, rows, bad, planner, Options{Out: out, Workers: 2, StopGrace: 20 * time.Millisecond})
		done <- err
	}()
	select {
	case err := <-done:
		if !errors.Is(err, ErrStopped) {
			t.Errorf("err = %v, want ErrStopped", err)
		}
	case <-time.After(time.Minute): // a liveness guard, not a speed check
		t.Fatal("Run did not return after cancellation with a stuck planner")
	}
	if n := countResultParts(t, out); n != 0 {
		t.Errorf("%d records written by abandoned planners", n)
	}
}

// Issue 17: text cells a spreadsheet would run as a formula get a leading
// single quote (OWASP "CSV Injection"), in results.csv and errors.csv;
// numbers (a negative saving) are left alone.
func TestCSVInjectionDefused(t *testing.T) {
	dir := t.TempDir()
	path := writeSchedule(t, dir, 0,
		"=HYPERLINK(1),2026-06-01T08:00:00Z,route.geojson,@ac,60000,10,1.3",
		"+A1,2026-06-01T08:00:00Z,route.geojson,TESTJET,60000,10,1.3",
		"-A2,2026-06-01T08:00:00Z,route.geojson,TESTJET,60000,10,1.3",
		"@A3,2026-06-01T08:00:00Z,route.geojson,TESTJET,60000,x,1.3")
	rows, bad := mustRead(t, path)
	planner := func(ctx context.Context, r Row, ci float64) (Result, error) {
		if r.Flight == "-A2" {
			return Result{}, fmt.Errorf("=cmd|' /C calc'!A0")
		}
		res, err := fakePlan(ctx, r, ci)
		res.CostSavingPct = -1.5
		res.Warnings = []string{"+warning"}
		return res, err
	}
	out := filepath.Join(dir, "out")
	runOrFatal(t, rows, bad, planner, Options{Out: out})
	for _, f := range []string{ResultsCSV, ErrorsCSV} {
		recs := readCSV(t, filepath.Join(out, f))
		for _, r := range recs[1:] {
			for i, c := range r {
				if c != "" && strings.ContainsRune("=+@\t\r", rune(c[0])) {
					t.Errorf("%s column %s: cell %q starts a formula", f, recs[0][i], c)
				}
				if c != "" && c[0] == '-' && (recs[0][i] != "cost_saving_pct" || c != "-1.5") {
					t.Errorf("%s column %s: cell %q starts a formula", f, recs[0][i], c)
				}
			}
		}
		data, _ := os.ReadFile(filepath.Join(out, f))
		for _, want := range []string{"'=HYPERLINK(1)", "'+A1"} {
			if f == ResultsCSV && !strings.Contains(string(data), want) {
				t.Errorf("%s lacks the defused cell %q:\n%s", f, want, data)
			}
		}
		if f == ErrorsCSV && (!strings.Contains(string(data), "'@A3") || !strings.Contains(string(data), "'-A2")) {
			t.Errorf("errors.csv lacks the defused flights:\n%s", data)
		}
	}
}

// Issue 17: a planner error quoting a whole file (a route pointing at an
// environment file) is cut to a short excerpt in the record.
func TestFailureReasonBounded(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 1))
	secret := strings.Repeat("SECRET=1\n", 1000)
	planner := func(context.Context, Row, float64) (Result, error) {
		return Result{}, errors.New("route: line 1: bad field " + secret)
	}
	out := filepath.Join(dir, "out")
	runOrFatal(t, rows, bad, planner, Options{Out: out})
	data, err := os.ReadFile(filepath.Join(out, ErrorsCSV))
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(data), "SECRET"); n > 40 || len(data) > 1000 {
		t.Errorf("errors.csv is %d bytes with %d copies of the file's text", len(data), n)
	}
}

// Issue 17: a route that is some other file (an environment file) makes
// the route parser quote its first line; the reason keeps 40 bytes of it.
func TestShortenQuoted(t *testing.T) {
	long := "SECRET_TOKEN=" + strings.Repeat("x", 100)
	for _, c := range []struct{ in, want string }{
		{`header "` + long + `" lacks a lat column`, `header "` + long[:40] + `..." lacks a lat column`},
		{`a "short" b "` + long + `"`, `a "short" b "` + long[:40] + `..."`},
		{`esc "\"` + long + `" end`, `esc "\"` + long[:38] + `..." end`},
		{`open "` + long, `open "` + long[:40] + `...`},
		{"no quotes", "no quotes"},
	} {
		if got := shortenQuoted(c.in); got != c.want {
			t.Errorf("shortenQuoted(%q)\n= %q\nwant %q", c.in, got, c.want)
		}
	}
}

// Issue 13: a changed aircraft file (same path) re-plans its flights too.
func TestResumeReplansChangedAircraftFile(t *testing.T) {
	dir := t.TempDir()
	ac := filepath.Join(dir, "jet.yaml")
	if err := os.WriteFile(ac, []byte("name: a\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	rows, bad := mustRead(t, writeSchedule(t, dir, 4))
	for i := range rows[:2] {
		rows[i].Aircraft = ac
	}
	out := filepath.Join(dir, "out")
	runOrFatal(t, rows, bad, fakePlan, Options{Out: out})
	if err := os.WriteFile(ac, []byte("name: b\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	var calls atomic.Int32
	counting := func(ctx context.Context, r Row, ci float64) (Result, error) {
		calls.Add(1)
		return fakePlan(ctx, r, ci)
	}
	runOrFatal(t, rows, bad, counting, Options{Out: out, Resume: true})
	if calls.Load() != 2 {
		t.Errorf("after the aircraft file changed, resume planned %d flights, want its 2", calls.Load())
	}
}

// Issue 13: a plan breaking a limit (fuel shortfall, landing mass) is
// "infeasible", in results, errors.csv and the counts; one with warnings
// only is "warning".
func TestInfeasibleAndWarningStatus(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 3))
	planner := func(ctx context.Context, r Row, ci float64) (Result, error) {
		res, err := fakePlan(ctx, r, ci)
		switch r.Flight {
		case "T0000":
			res.Violations = []string{"fuel on board 5000 kg is 11720 kg short of the trip fuel"}
		case "T0001":
			res.Warnings = []string{"3 cruise leg(s) within 0.05 g of the buffet floor"}
		}
		return res, err
	}
	out := filepath.Join(dir, "out")
	s := runOrFatal(t, rows, bad, planner, Options{Out: out})
	if s.Infeasible != 1 || s.Planned != 2 || s.Failed != 0 {
		t.Errorf("summary %+v: want 1 infeasible, 2 planned", s)
	}
	recs := readCSV(t, filepath.Join(out, ResultsCSV))
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	want := map[string][2]string{"T0000": {"infeasible", "short of the trip fuel"}, "T0001": {"warning", "buffet floor"}, "T0002": {"ok", ""}}
	for _, r := range recs[1:] {
		w := want[r[col["flight"]]]
		if r[col["status"]] != w[0] || !strings.Contains(r[col["warnings"]], w[1]) || (w[1] == "" && r[col["warnings"]] != "") {
			t.Errorf("%s: status %q warnings %q, want %q with %q", r[col["flight"]], r[col["status"]], r[col["warnings"]], w[0], w[1])
		}
	}
	eb, _ := os.ReadFile(filepath.Join(out, ErrorsCSV))
	if !strings.Contains(string(eb), "T0000") || !strings.Contains(string(eb), "infeasible: fuel on board") || strings.Contains(string(eb), "T0001") {
		t.Errorf("errors.csv:\n%s", eb)
	}
}
