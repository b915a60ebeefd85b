package batch

import (
	"fmt"
	"strconv"
	"strings"
)

// ParseShard parses "K/N" (0-based shard K of N, 0 <= K < N). The error
// names the value.
func ParseShard(s string) (k, n int, err error) {
	ks, ns, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return 0, 0, fmt.Errorf("shard %q: want K/N, e.g. 0/4", s)
	}
	k, err1 := strconv.Atoi(strings.TrimSpace(ks))
	n, err2 := strconv.Atoi(strings.TrimSpace(ns))
	if err1 != nil || err2 != nil {
		return 0, 0, fmt.Errorf("shard %q: K and N must be whole numbers, e.g. 0/4", s)
	}
	if n < 1 {
		return 0, 0, fmt.Errorf("shard %q: N must be at least 1", s)
	}
	if k < 0 || k >= n {
		return 0, 0, fmt.Errorf("shard %q: K must be in 0..%d (shards are numbered from 0)", s, n-1)
	}
	return k, n, nil
}

// Environment variables read by ShardFromEnv.
//
// Kubernetes sets JOB_COMPLETION_INDEX in each pod of an Indexed Job
// (Kubernetes documentation, "Jobs", completion mode Indexed); the number of
// completions is not in the environment, so it comes from countFlag.
// Slurm sets SLURM_ARRAY_TASK_ID, _COUNT, _MIN, _MAX and _STEP in each task
// of a job array (sbatch manual, "OUTPUT ENVIRONMENT VARIABLES").
const (
	envK8sIndex   = "JOB_COMPLETION_INDEX"
	envSlurmID    = "SLURM_ARRAY_TASK_ID"
	envSlurmCount = "SLURM_ARRAY_TASK_COUNT"
	envSlurmMin   = "SLURM_ARRAY_TASK_MIN"
	envSlurmStep  = "SLURM_ARRAY_TASK_STEP"
)

// ShardFromEnv finds this process's shard from a cluster scheduler's
// environment. Precedence (the caller applies the first): an explicit
// --shard K/N flag (the caller does not call ShardFromEnv), then a
// Kubernetes Indexed Job (JOB_COMPLETION_INDEX as K, countFlag as N, which
// is then required), then a Slurm job array (K = (ID - MIN) / STEP with MIN
// 0 and STEP 1 when unset; N = SLURM_ARRAY_TASK_COUNT, or countFlag when
// that is unset; when both are set they must agree). ok is false when
// neither scheduler's variables are set. Arrays with gaps (--array=1,5,9)
// do not map onto shards and are an error naming the variables.
func ShardFromEnv(getenv func(string) string, countFlag int) (k, n int, ok bool, err error) {
	atoi := func(name string) (int, bool, error) {
		s := strings.TrimSpace(getenv(name))
		if s == "" {
			return 0, false, nil
		}
		v, err := strconv.Atoi(s)
		if err != nil || v < 0 {
			return 0, true, fmt.Errorf("%s=%q is not a whole number >= 0", name, s)
		}
		return v, true, nil
	}
	if countFlag < 0 {
		return 0, 0, false, fmt.Errorf("shard count %d must not be negative", countFlag)
	}

	if idx, set, err := atoi(envK8sIndex); err != nil {
		return 0, 0, false, err
	} else if set {
		if countFlag < 1 {
			return 0, 0, false, fmt.Errorf("%s=%d is set but the shard count is not: pass the Job's completions as the shard count", envK8sIndex, idx)
		}
		if idx >= countFlag {
			return 0, 0, false, fmt.Errorf("%s=%d is not below the shard count %d", envK8sIndex, idx, countFlag)
		}
		return idx, countFlag, true, nil
	}

	id, set, err := atoi(envSlurmID)
	if err != nil || !set {
		return 0, 0, false, err
	}
	count, hasCount, err := atoi(envSlurmCount)
	if err != nil {
		return 0, 0, false, err
	}
	lo, _, err := atoi(envSlurmMin)
	if err != nil {
		return 0, 0, false, err
	}
	step, hasStep, err := atoi(envSlurmStep)
	if err != nil {
		return 0, 0, false, err
	}
	if !hasStep {
		step = 1
	}
	if step < 1 {
		return 0, 0, false, fmt.Errorf("%s=%d must be at least 1", envSlurmStep, step)
	}
	switch {
	case hasCount && countFlag > 0 && count != countFlag:
		return 0, 0, false, fmt.Errorf("%s=%d disagrees with the shard count %d", envSlurmCount, count, countFlag)
	case !hasCount && countFlag > 0:
		count = countFlag
	case !hasCount:
		return 0, 0, false, fmt.Errorf("%s=%d is set but neither %s nor a shard count is", envSlurmID, id, envSlurmCount)
	}
	if count < 1 {
		return 0, 0, false, fmt.Errorf("%s=%d must be at least 1", envSlurmCount, count)
	}
	if id < lo || (id-lo)%step != 0 || (id-lo)/step >= count {
		return 0, 0, false, fmt.Errorf("%s=%d does not map onto shard 0..%d (%s=%d, %s=%d): use a contiguous array such as --array=0-%d",
			envSlurmID, id, count-1, envSlurmMin, lo, envSlurmStep, step, count-1)
	}
	return (id - lo) / step, count, true, nil
}

// InShard reports whether flight belongs to shard k of n: the 32-bit FNV-1a
// hash of the flight id modulo n equals k (Fowler, Noll and Vo; constants
// from the FNV reference, as in Go's hash/fnv). Deterministic across runs,
// machines and schedule order; n <= 1 takes every flight. O(len(flight)),
// no allocation.
func InShard(flight string, k, n int) bool {
	if n <= 1 {
		return true
	}
	h := uint32(2166136261)
	for i := 0; i < len(flight); i++ {
		h ^= uint32(flight[i])
		h *= 16777619
	}
	return int(h%uint32(n)) == k
}

// ParseSweep parses a comma-separated list of cost indices such as
// "0,20,50". Every item must be a finite number >= 0 and appear once; the
// error names the bad item. The order given is kept.
func ParseSweep(s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, fmt.Errorf("sweep %q: want a comma-separated list of cost indices, e.g. 0,20,50", s)
	}
	var out []float64
	for i, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		v, err := strconv.ParseFloat(item, 64)
		switch {
		case item == "":
			return nil, fmt.Errorf("sweep %q: item %d is empty", s, i+1)
		case err != nil || !finite(v):
			return nil, fmt.Errorf("sweep %q: item %q is not a number", s, item)
		case v < 0:
			return nil, fmt.Errorf("sweep %q: item %q: a cost index must not be negative", s, item)
		}
		if v == 0 {
			v = 0 // -0 and 0 are one cost index
		}
		for _, w := range out {
			if w == v {
				return nil, fmt.Errorf("sweep %q: item %q appears twice", s, item)
			}
		}
		out = append(out, v)
	}
	return out, nil
}
