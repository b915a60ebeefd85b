package batch

import (
	"context"
	"fmt"
	"hash/fnv"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func TestParseShard(t *testing.T) {
	tests := []struct {
		in      string
		k, n    int
		wantErr string
	}{
		{"0/1", 0, 1, ""},
		{"2/3", 2, 3, ""},
		{" 1 / 4 ", 1, 4, ""},
		{"3/3", 0, 0, `shard "3/3": K must be in 0..2`},
		{"-1/3", 0, 0, `shard "-1/3": K must be in 0..2`},
		{"1/0", 0, 0, `shard "1/0": N must be at least 1`},
		{"1", 0, 0, `shard "1": want K/N`},
		{"a/3", 0, 0, `shard "a/3": K and N must be whole numbers`},
		{"", 0, 0, `shard "": want K/N`},
		// Issue 17: 2^32 made InShard divide by zero, 2^32+1 wrapped to 1.
		{"0/4294967296", 0, 0, "more than the 1048576 shards"},
		{"0/4294967297", 0, 0, "more than the 1048576 shards"},
		{"0/99999999999999999999", 0, 0, "more than the 1048576 shards"},
		{"99999999999999999999/4", 0, 0, "K must be in 0..3"},
		{"0/1048576", 0, 1048576, ""},
	}
	for _, tc := range tests {
		k, n, err := ParseShard(tc.in)
		if tc.wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
				t.Errorf("ParseShard(%q) err = %v, want %q", tc.in, err, tc.wantErr)
			}
			continue
		}
		if err != nil || k != tc.k || n != tc.n {
			t.Errorf("ParseShard(%q) = %d, %d, %v; want %d, %d", tc.in, k, n, err, tc.k, tc.n)
		}
	}
}

// Variable names and meanings: Kubernetes documentation (Indexed Job sets
// JOB_COMPLETION_INDEX); sbatch manual (SLURM_ARRAY_TASK_ID, _COUNT, _MIN,
// _STEP; "sbatch --array=2 job.sh" re-runs task 2 alone, which then sees
// SLURM_ARRAY_TASK_COUNT=1 and MIN=MAX=2). The shard is the task ID and the
// explicit count, whatever the array variables say.
func TestShardFromEnv(t *testing.T) {
	tests := []struct {
		name    string
		env     map[string]string
		count   int
		k, n    int
		ok      bool
		wantErr string
	}{
		{"nothing", nil, 0, 0, 0, false, ""},
		{"kubernetes", map[string]string{"JOB_COMPLETION_INDEX": "3"}, 5, 3, 5, true, ""},
		{"kubernetes without count", map[string]string{"JOB_COMPLETION_INDEX": "3"}, 0, 0, 0, false, "JOB_COMPLETION_INDEX=3 is set but the shard count is not"},
		{"kubernetes index too big", map[string]string{"JOB_COMPLETION_INDEX": "5"}, 5, 0, 0, false, "JOB_COMPLETION_INDEX=5 is not below the shard count 5"},
		{"kubernetes over slurm", map[string]string{"JOB_COMPLETION_INDEX": "1", "SLURM_ARRAY_TASK_ID": "0", "SLURM_ARRAY_TASK_COUNT": "2"}, 4, 1, 4, true, ""},
		{"slurm whole array", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_COUNT": "4", "SLURM_ARRAY_TASK_MIN": "0"}, 4, 2, 4, true, ""},
		// The case of issue 13: one task re-run alone must stay shard 2/4.
		{"slurm task re-run alone", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_COUNT": "1", "SLURM_ARRAY_TASK_MIN": "2", "SLURM_ARRAY_TASK_MAX": "2"}, 4, 2, 4, true, ""},
		{"slurm without count", map[string]string{"SLURM_ARRAY_TASK_ID": "1", "SLURM_ARRAY_TASK_COUNT": "4"}, 0, 0, 0, false, "SLURM_ARRAY_TASK_ID=1 is set but the shard count is not"},
		{"slurm 1-based array", map[string]string{"SLURM_ARRAY_TASK_ID": "4", "SLURM_ARRAY_TASK_MIN": "1"}, 4, 0, 0, false, "SLURM_ARRAY_TASK_ID=4 is not below the shard count 4"},
		{"slurm bad id", map[string]string{"SLURM_ARRAY_TASK_ID": "x"}, 2, 0, 0, false, `SLURM_ARRAY_TASK_ID "x" is not a whole number`},
		{"slurm huge id", map[string]string{"SLURM_ARRAY_TASK_ID": "4294967296"}, 2, 0, 0, false, `SLURM_ARRAY_TASK_ID "4294967296": more than the 1048576 shards`},
		{"slurm id overflows int64", map[string]string{"SLURM_ARRAY_TASK_ID": "99999999999999999999"}, 2, 0, 0, false, "more than the 1048576 shards"},
		{"count without index", nil, 4, 0, 0, false, "shard count 4 given but neither JOB_COMPLETION_INDEX nor SLURM_ARRAY_TASK_ID is set"},
		{"count 2^32", map[string]string{"JOB_COMPLETION_INDEX": "0"}, 1 << 32, 0, 0, false, "shard count 4294967296: more than the 1048576 shards"},
		{"count 2^32+1", map[string]string{"SLURM_ARRAY_TASK_ID": "0"}, 1<<32 + 1, 0, 0, false, "shard count 4294967297: more than"},
		{"negative count", nil, -1, 0, 0, false, "must not be negative"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			k, n, ok, err := ShardFromEnv(func(s string) string { return tc.env[s] }, tc.count)
			if tc.wantErr != "" {
				if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
					t.Errorf("err = %v, want %q", err, tc.wantErr)
				}
				return
			}
			if err != nil || k != tc.k || n != tc.n || ok != tc.ok {
				t.Errorf("= %d, %d, %v, %v; want %d, %d, %v", k, n, ok, err, tc.k, tc.n, tc.ok)
			}
		})
	}
}

func TestParseSweep(t *testing.T) {
	tests := []struct {
		in      string
		want    []float64
		wantErr string
	}{
		{"0,20,50", []float64{0, 20, 50}, ""},
		{" 50 , 12.5 ", []float64{50, 12.5}, ""},
		{"-0", []float64{0}, ""},
		{"", nil, "want a comma-separated list"},
		{"0,,5", nil, "item 2 is empty"},
		{"0,x,5", nil, `item "x" is not a number`},
		{"0,Inf", nil, `item "Inf": is not a finite number`},
		{"0,NaN", nil, `item "NaN" is not a number`},
		{"0,-5", nil, `item "-5": a cost index must not be negative`},
		// Issue 17: 1e300 and 5e-324 made file names too long.
		{"0,1e300", nil, `item "1e300": is above the largest cost index 10000 kg/min`},
		{"1e999", nil, `item "1e999": is not a finite number`},
		{"5e-324", nil, `item "5e-324": is subnormal`},
		{"10000", []float64{10000}, ""},
		{"10,20,10", nil, `item "10" appears twice`},
	}
	for _, tc := range tests {
		got, err := ParseSweep(tc.in)
		if tc.wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
				t.Errorf("ParseSweep(%q) err = %v, want %q", tc.in, err, tc.wantErr)
			}
			continue
		}
		if err != nil || !slices.Equal(got, tc.want) {
			t.Errorf("ParseSweep(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
		}
	}
}

// InShard must be FNV-1a (32-bit) mod n. Checked against Go's hash/fnv and
// against the FNV-1a test vectors of the FNV reference (draft-eastlake-fnv:
// FNV1a-32("") = 0x811c9dc5, FNV1a-32("a") = 0xe40c292c, from memory).
func TestInShardIsFNV1a(t *testing.T) {
	for _, v := range []struct {
		s string
		h uint32
	}{{"", 0x811c9dc5}, {"a", 0xe40c292c}} {
		for _, n := range []int{2, 3, 7, 1000} {
			if !InShard(v.s, int(v.h%uint32(n)), n) {
				t.Errorf("InShard(%q, %d, %d) = false; FNV-1a is %#x", v.s, v.h%uint32(n), n, v.h)
			}
		}
	}
	for i := range 500 {
		f := fmt.Sprintf("XY%d", i)
		h := fnv.New32a()
		h.Write([]byte(f))
		n := 1 + i%9
		want := int(h.Sum32() % uint32(n))
		hits := 0
		for k := range n {
			if InShard(f, k, n) {
				hits++
				if k != want {
					t.Errorf("InShard(%q, %d, %d) true, hash/fnv says shard %d", f, k, n, want)
				}
			}
		}
		if hits != 1 {
			t.Errorf("%q is in %d of %d shards, want exactly 1", f, hits, n)
		}
	}
}

func TestRunRejectsBadOptions(t *testing.T) {
	dir := t.TempDir()
	rows, bad := mustRead(t, writeSchedule(t, dir, 2))
	out := filepath.Join(dir, "out")
	for _, opt := range []Options{
		{},
		{Out: out, Shard: 3, Shards: 3},
		{Out: out, Sweep: []float64{}},
		{Out: out, Sweep: []float64{1, 1}},
		{Out: out, Sweep: []float64{-1}},
	} {
		if _, err := Run(context.Background(), rows, bad, fakePlan, opt); err == nil {
			t.Errorf("Run with %+v: no error", opt)
		}
	}
	if _, err := Run(context.Background(), rows, bad, nil, Options{Out: out}); err == nil {
		t.Error("Run without a planner: no error")
	}
	dup := append(rows[:1:1], rows[0])
	if _, err := Run(context.Background(), dup, nil, fakePlan, Options{Out: out}); err == nil || !strings.Contains(err.Error(), "unique") {
		t.Errorf("Run with a repeated flight: err = %v", err)
	}
}
