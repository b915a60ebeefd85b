package batch

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzReadSchedule: any schedule text gives rows, bad rows or a fatal
// error naming the file, never a panic; every bad row names its line.
func FuzzReadSchedule(f *testing.F) {
	f.Add("flight,departure,route,aircraft,tow_kg,ci\nA1,2026-06-01T08:00:00Z,r.csv,demo-regional,36000,10\n")
	f.Add("flight,departure,route,aircraft,tow_kg,ci,zfw_kg,fuel_kg\nB2,2026-06-01T08:00:00+02:00,r.csv,x,,5,30000,6000\n")
	f.Add("flight,departure,route,aircraft,tow_kg,ci\n\"A,1\",bad,r.csv,x,NaN,-1\n")
	f.Add("# comment\nflight;departure\n")
	f.Fuzz(func(t *testing.T, text string) {
		dir := t.TempDir()
		if err := os.WriteFile(filepath.Join(dir, "r.csv"), []byte("name,lat,lon\nA,1,2\nB,3,4\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, "s.csv")
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		rows, bad, err := ReadSchedule(path)
		if err != nil {
			var fe *FormatError
			if !errors.As(err, &fe) && !strings.Contains(err.Error(), "s.csv") {
				t.Fatalf("fatal error does not name the file: %v", err)
			}
			return
		}
		for _, b := range bad {
			if b.Line <= 0 {
				t.Fatalf("bad row without a line: %+v", b)
			}
		}
		for _, r := range rows {
			if r.Flight == "" || r.Line <= 0 {
				t.Fatalf("row without flight or line: %+v", r)
			}
		}
	})
}

// FuzzParseShard: any --shard text gives 0 <= K < N <= MaxShards or an
// *InputError, never a panic (issue 17: 0/4294967296 divided by zero).
func FuzzParseShard(f *testing.F) {
	for _, s := range []string{"0/1", "3/4", "0/4294967296", "0/4294967297", "-1/2", "1/0", "a/b", "99999999999999999999/1", " 2 / 3 ", "0/1048576", "/"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		k, n, err := ParseShard(s)
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("ParseShard(%q): %T %v, want an *InputError", s, err, err)
			}
			if len(err.Error()) > 400 { // the value is quoted as a short excerpt

				t.Fatalf("ParseShard(%q): error of %d bytes", s, len(err.Error()))
			}
			return
		}
		if k < 0 || k >= n || n > MaxShards {
			t.Fatalf("ParseShard(%q) = %d/%d", s, k, n)
		}
		_ = InShard(s, k, n) // must not panic
		if !InShard(s, 0, 1) {
			t.Fatalf("InShard(%q, 0, 1) = false: one shard holds every flight", s)
		}
	})
}

// FuzzShardFromEnv: any index text and count give a shard in range or an
// *InputError of bounded length, never a panic.
func FuzzShardFromEnv(f *testing.F) {
	f.Add("JOB_COMPLETION_INDEX", "3", 5)
	f.Add("SLURM_ARRAY_TASK_ID", "4294967296", 2)
	f.Add("SLURM_ARRAY_TASK_ID", "1", 1<<32)
	f.Add("SLURM_ARRAY_TASK_ID", "", 4)
	f.Add("JOB_COMPLETION_INDEX", "-1", 0)
	f.Fuzz(func(t *testing.T, name, value string, count int) {
		env := map[string]string{name: value}
		k, n, ok, err := ShardFromEnv(func(s string) string { return env[s] }, count)
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("%s=%q count %d: %T %v, want an *InputError", name, value, count, err, err)
			}
			if len(err.Error()) > 400 {
				t.Fatalf("%s=%q count %d: error of %d bytes", name, value, count, len(err.Error()))
			}
			return
		}
		if ok && (k < 0 || k >= n || n > MaxShards) || !ok && (k != 0 || n != 0) {
			t.Fatalf("%s=%q count %d: %d/%d ok %v", name, value, count, k, n, ok)
		}
	})
}
