package main

import (
	"bytes"
	"encoding/csv"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// clearSchedulerEnv unsets the cluster variables batch reads, for the
// test's duration.
func clearSchedulerEnv(t *testing.T) {
	t.Helper()
	for _, v := range []string{"JOB_COMPLETION_INDEX", "SLURM_ARRAY_TASK_ID", "SLURM_ARRAY_TASK_COUNT",
		"SLURM_ARRAY_TASK_MIN", "SLURM_ARRAY_TASK_MAX", "SLURM_ARRAY_TASK_STEP"} {
		t.Setenv(v, "")
	}
}

// Issue 17 (shard counts past 2^32 divided by zero or wrapped; a sweep of
// 1e300 made a file name too long) and issue 13 (--shard-count without an
// index silently planned every flight): each is exit 2 naming the value.
func TestBatchBadShardAndSweep(t *testing.T) {
	fs := demoFiles(t)
	for _, c := range []struct {
		env  map[string]string
		args []string
		want string
	}{
		{nil, []string{"--shard", "0/4294967296"}, "4294967296"},
		{nil, []string{"--shard", "0/4294967297"}, "4294967297"},
		{map[string]string{"JOB_COMPLETION_INDEX": "0"}, []string{"--shard-count", "4294967296"}, "4294967296"},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "0", "SLURM_ARRAY_TASK_COUNT": "4294967296"}, []string{"--shard-count", "4294967297"}, "4294967297"},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "4294967296"}, []string{"--shard-count", "2"}, "4294967296"},
		{nil, []string{"--shard-count", "4"}, "neither JOB_COMPLETION_INDEX nor SLURM_ARRAY_TASK_ID is set"},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "1", "SLURM_ARRAY_TASK_COUNT": "2"}, nil, "SLURM_ARRAY_TASK_ID=1 is set but the shard count is not"},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "3"}, []string{"--shard-count", "3"}, "SLURM_ARRAY_TASK_ID=3 is not below the shard count 3"},
		{nil, []string{"--ci-sweep", "0,1e300"}, "1e300"},
		{nil, []string{"--ci-sweep", "5e-324"}, "5e-324"},
	} {
		clearSchedulerEnv(t)
		for k, v := range c.env {
			t.Setenv(k, v)
		}
		out := filepath.Join(t.TempDir(), "out")
		args := append([]string{"batch", "--schedule", fs.Schedule, "--out", out}, c.args...)
		code, _, errs := runCLI(t, args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v %v: exit %d, %q; want 2 naming %q", c.env, c.args, code, errs, c.want)
		}
		if _, err := os.Stat(filepath.Join(out, "parts")); err == nil {
			t.Errorf("%v %v: planned into %s", c.env, c.args, out)
		}
	}
}

func readResults(t *testing.T, dir string) [][]string {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

// Issue 13: the README's Slurm recipe (one task per array index, each
// with --shard-count) merged equals the whole run, also when one task is
// cancelled and re-run alone with "sbatch --array=1": that task sees
// SLURM_ARRAY_TASK_COUNT=1 and MIN=MAX=1, and must still be shard 1/3
// (the count from the record its directory holds).
func TestBatchSlurmRerunOneTask(t *testing.T) {
	fs := demoFiles(t)
	clearSchedulerEnv(t)
	tmp := t.TempDir()
	whole := filepath.Join(tmp, "whole")
	if code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", whole); code != 0 && code != 3 {
		t.Fatalf("whole run: exit %d: %s", code, errs)
	}
	var dirs []string
	for k := range 3 {
		d := filepath.Join(tmp, "shard"+string(rune('0'+k)))
		dirs = append(dirs, d)
		t.Setenv("SLURM_ARRAY_TASK_ID", string(rune('0'+k)))
		t.Setenv("SLURM_ARRAY_TASK_COUNT", "3")
		t.Setenv("SLURM_ARRAY_TASK_MIN", "0")
		t.Setenv("SLURM_ARRAY_TASK_MAX", "2")
		if code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", d, "--shard-count", "3"); code != 0 && code != 3 {
			t.Fatalf("task %d: exit %d: %s", k, code, errs)
		}
	}
	// Task 1 "cancelled": its manifest and final files gone, one record lost.
	for _, f := range []string{"manifest.json", "results.csv"} {
		os.Remove(filepath.Join(dirs[1], f))
	}
	ents, _ := os.ReadDir(filepath.Join(dirs[1], "parts"))
	if len(ents) == 0 {
		t.Fatal("shard 1 has no records")
	}
	os.Remove(filepath.Join(dirs[1], "parts", ents[0].Name()))
	// Re-run alone: sbatch --array=1 job.sh, same script.
	t.Setenv("SLURM_ARRAY_TASK_ID", "1")
	t.Setenv("SLURM_ARRAY_TASK_COUNT", "1")
	t.Setenv("SLURM_ARRAY_TASK_MIN", "1")
	t.Setenv("SLURM_ARRAY_TASK_MAX", "1")
	code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", dirs[1], "--resume")
	if code != 0 && code != 3 {
		t.Fatalf("re-run of task 1: exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "1 plans to make") {
		t.Errorf("re-run of task 1 should plan the one lost record: %s", errs)
	}
	clearSchedulerEnv(t)
	merged := filepath.Join(tmp, "merged")
	if code, _, errs := runCLI(t, append([]string{"batch", "merge", "--out", merged}, dirs...)...); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, errs)
	}
	a, b := readResults(t, whole), readResults(t, merged)
	if !slices.EqualFunc(a, b, slices.Equal[[]string]) {
		t.Errorf("merged results differ from the whole run:\nwhole  %q\nmerged %q", a, b)
	}
	// A task of another count into the same directory is refused.
	t.Setenv("SLURM_ARRAY_TASK_ID", "1")
	code, _, errs = runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", dirs[1], "--resume", "--shard-count", "4")
	if code != 2 || !strings.Contains(errs, "holds shard 1/3, this run is shard 1/4") {
		t.Errorf("resume as 1/4: exit %d, %q", code, errs)
	}
	// Resumed with another segment length: refused, naming it.
	code, _, errs = runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", dirs[1], "--resume", "--max-seg-nm", "40")
	if code != 2 || !strings.Contains(errs, `max_seg_nm "50", now "40"`) {
		t.Errorf("resume with --max-seg-nm 40: exit %d, %q", code, errs)
	}
	// Resumed with other weather (none): refused, naming the change.
	code, _, errs = runCLI(t, "batch", "--schedule", fs.Schedule, "--out", dirs[1], "--resume")
	if code != 2 || !strings.Contains(errs, "weather.0.sha256") {
		t.Errorf("resume without weather: exit %d, %q", code, errs)
	}
}

// Issue 13: batch without --weather says so, on stderr and in every
// result's warnings; levels may be written list:330;370 without quotes.
func TestBatchStillAirAndLevels(t *testing.T) {
	fs := demoFiles(t)
	clearSchedulerEnv(t)
	sched := filepath.Join(fs.Dir, "sched-levels.csv")
	os.WriteFile(sched, []byte("flight,departure,route,aircraft,tow_kg,ci,levels\n"+
		"L1,2026-12-01T21:00:00Z,route-lakeport.geojson,demo-regional,36000,10,list:250;270\n"), 0o644)
	out := filepath.Join(t.TempDir(), "out")
	code, stdout, errs := runCLI(t, "batch", "--schedule", sched, "--out", out)
	if code != 0 && code != 3 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// No per-CI table of one flight without a sweep (issue 13).
	if strings.Contains(stdout, "fuel kg") || !strings.Contains(stdout, "Planned 1") {
		t.Errorf("without a sweep stdout has a per-CI table, or no count:\n%s", stdout)
	}
	if !strings.Contains(errs, "warning: "+stillAirWarning) {
		t.Errorf("no still-air warning on stderr: %s", errs)
	}
	recs := readResults(t, out)
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	r := recs[1]
	if !strings.Contains(r[col["warnings"]], stillAirWarning) || r[col["status"]] == "ok" {
		t.Errorf("status %s, warnings %q: want the still-air warning", r[col["status"]], r[col["warnings"]])
	}
	// The research columns (issue 13): the row's mass, a route length, an
	// arrival after the departure by time_min.
	if r[col["takeoff_mass_kg"]] != "36000" || r[col["distance_nm"]] == "" || r[col["departure_utc"]] != "2026-12-01T21:00:00Z" ||
		r[col["arrival_utc"]] <= r[col["departure_utc"]] || r[col["speed"]] != "econ" || r[col["floor_g"]] == "" {
		t.Errorf("research columns: %q", r)
	}
	if r[col["levels"]] != "list:250,270" || (r[col["profile"]] != "FL250" && r[col["profile"]] != "FL270" && !strings.Contains(r[col["profile"]], "FL2")) {
		t.Errorf("levels %q, profile %q", r[col["levels"]], r[col["profile"]])
	}
	// Unquoted commas: a clear bad row naming the fix.
	os.WriteFile(sched, []byte("flight,departure,route,aircraft,tow_kg,ci,levels\n"+
		"L1,2026-12-01T21:00:00Z,route-lakeport.geojson,demo-regional,36000,10,list:250,270\n"), 0o644)
	out2 := filepath.Join(t.TempDir(), "out")
	code, _, _ = runCLI(t, "batch", "--schedule", sched, "--out", out2)
	eb, _ := os.ReadFile(filepath.Join(out2, "errors.csv"))
	if code != 3 || !bytes.Contains(eb, []byte("list:330;370")) {
		t.Errorf("unquoted levels list: exit %d, errors.csv %s", code, eb)
	}
}

// Issue 17: a write failure is an environment failure, exit 1, not bad
// input (2). Here the output's plans/ is a file, so nothing can be written
// under it.
func TestBatchWriteFailureExit1(t *testing.T) {
	fs := demoFiles(t)
	clearSchedulerEnv(t)
	out := filepath.Join(t.TempDir(), "out")
	os.MkdirAll(out, 0o755)
	os.WriteFile(filepath.Join(out, "plans"), []byte("x"), 0o644)
	code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--out", out)
	if code != 1 {
		t.Errorf("exit %d, want 1: %s", code, errs)
	}
}

// hmm: tables show h:mm (issue 13: one time format per medium).
func TestHMM(t *testing.T) {
	for _, c := range []struct {
		min  float64
		want string
	}{{0, "0:00"}, {59.4, "0:59"}, {59.5, "1:00"}, {678.3, "11:18"}, {-61, "-1:01"}} {
		if got := hmm(c.min); got != c.want {
			t.Errorf("hmm(%v) = %q, want %q", c.min, got, c.want)
		}
	}
}
