package batch

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// MaxShards is the largest shard count accepted: far above any array a
// scheduler runs (Slurm's MaxArraySize default is 1001, from the
// slurm.conf manual; Kubernetes Indexed Jobs allow up to 100,000
// completions with more than 10^5 needing a feature gate, from memory)
// and small enough that every shard arithmetic stays in 32 bits.
const MaxShards = 1 << 20

// InputError is a shard, sweep, resume or option problem caused by the
// command line, the scheduler environment or the output directory's
// record: bad input (the CLI's exit code 2), as opposed to a failure to
// read or write files.
type InputError struct{ Msg string }

func (e *InputError) Error() string { return e.Msg }

func inputErrorf(format string, a ...any) error { return &InputError{Msg: fmt.Sprintf(format, a...)} }

// parseCount parses a whole number in 0..MaxShards (a shard index or
// count); what names the value in the error.
func parseCount(what, s string) (int, error) {
	v, err := strconv.ParseInt(strings.TrimSpace(s), 10, 64)
	switch {
	case err != nil && errors.Is(err, strconv.ErrRange), err == nil && v > MaxShards:
		return 0, inputErrorf("%s %q: more than the %d shards a run may have", what, excerpt(s), MaxShards)
	case err != nil:
		return 0, inputErrorf("%s %q is not a whole number", what, excerpt(s))
	case v < 0:
		return 0, inputErrorf("%s %q must not be negative", what, excerpt(s))
	}
	return int(v), nil
}

// ParseShard parses "K/N" (0-based shard K of N, 0 <= K < N <= MaxShards).
// The error names the value.
func ParseShard(s string) (k, n int, err error) {
	ks, ns, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return 0, 0, inputErrorf("shard %q: want K/N, e.g. 0/4", excerpt(s))
	}
	if _, err1 := strconv.Atoi(strings.TrimSpace(ks)); err1 != nil && !errors.Is(err1, strconv.ErrRange) {
		return 0, 0, inputErrorf("shard %q: K and N must be whole numbers, e.g. 0/4", excerpt(s))
	}
	if _, err2 := strconv.Atoi(strings.TrimSpace(ns)); err2 != nil && !errors.Is(err2, strconv.ErrRange) {
		return 0, 0, inputErrorf("shard %q: K and N must be whole numbers, e.g. 0/4", excerpt(s))
	}
	if n, err = parseCount("shard "+strconv.Quote(excerpt(s))+": N", ns); err != nil {
		return 0, 0, err
	}
	if n < 1 {
		return 0, 0, inputErrorf("shard %q: N must be at least 1", excerpt(s))
	}
	k, err = strconv.Atoi(strings.TrimSpace(ks))
	if err != nil || k < 0 || k >= n {
		return 0, 0, inputErrorf("shard %q: K must be in 0..%d (shards are numbered from 0)", excerpt(s), n-1)
	}
	return k, n, nil
}

// Environment variables read by ShardFromEnv.
//
// Kubernetes sets JOB_COMPLETION_INDEX in each pod of an Indexed Job
// (Kubernetes documentation, "Jobs", completion mode Indexed); the number of
// completions is not in the environment. Slurm sets SLURM_ARRAY_TASK_ID in
// each task of a job array (sbatch manual, "OUTPUT ENVIRONMENT VARIABLES");
// its SLURM_ARRAY_TASK_COUNT, _MIN, _MAX and _STEP describe the array as
// submitted, so a task re-run alone (sbatch --array=2 job.sh) sees COUNT 1:
// they are not read.
const (
	envK8sIndex = "JOB_COMPLETION_INDEX"
	envSlurmID  = "SLURM_ARRAY_TASK_ID"
)

// ShardFromEnv finds this process's shard from a cluster scheduler's
// environment and the shard count given explicitly (countFlag: --shard-count,
// or the count recorded in the output directory by an earlier task, see
// RecordedShard). The index is JOB_COMPLETION_INDEX (a Kubernetes Indexed
// Job), else SLURM_ARRAY_TASK_ID itself (a Slurm job array submitted as
// --array=0-(N-1)); the count is always countFlag, never derived from the
// array, so a task has the same shard whether the array runs whole or one
// task is re-run. ok is false when neither index is set and countFlag is 0.
// Errors (all *InputError, naming the value): an index without a count, a
// count without an index, an index not below the count, a count above
// MaxShards, a value that is not a whole number.
func ShardFromEnv(getenv func(string) string, countFlag int) (k, n int, ok bool, err error) {
	if countFlag < 0 {
		return 0, 0, false, inputErrorf("shard count %d must not be negative", countFlag)
	}
	if countFlag > MaxShards {
		return 0, 0, false, inputErrorf("shard count %d: more than the %d shards a run may have", countFlag, MaxShards)
	}
	name := envK8sIndex
	s := strings.TrimSpace(getenv(name))
	if s == "" {
		name = envSlurmID
		s = strings.TrimSpace(getenv(name))
	}
	if s == "" {
		if countFlag > 0 {
			return 0, 0, false, inputErrorf("shard count %d given but neither %s nor %s is set: run inside a Kubernetes Indexed Job or a Slurm job array, or give --shard K/N", countFlag, envK8sIndex, envSlurmID)
		}
		return 0, 0, false, nil
	}
	idx, err := parseCount(name, s)
	if err != nil {
		return 0, 0, false, err
	}
	if countFlag < 1 {
		return 0, 0, false, inputErrorf("%s=%d is set but the shard count is not: pass --shard-count N (the Job's completions, or the size of the array --array=0-(N-1))", name, idx)
	}
	if idx >= countFlag {
		return 0, 0, false, inputErrorf("%s=%d is not below the shard count %d: shards are numbered 0..%d (for Slurm, submit --array=0-%d)", name, idx, countFlag, countFlag-1, countFlag-1)
	}
	return idx, countFlag, true, nil
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
	return uint64(h)%uint64(n) == uint64(k) // 64-bit: no wrap or zero divisor for any n > 1
}

// MaxCI is the largest cost index accepted, kg/min. Flight management
// systems take cost indices of 0-999 in their own units (common practice),
// which is well below 10,000 kg/min; a larger value is a typing error.
const MaxCI = 10000

// checkCI reports what is wrong with cost index v, or "" when it is usable:
// finite, 0 <= v <= MaxCI, and not subnormal (a subnormal is a typing or
// conversion error, and its text form is hundreds of digits long).
func checkCI(v float64) string {
	switch {
	case !finite(v):
		return "is not a finite number"
	case v < 0:
		return "a cost index must not be negative"
	case v > MaxCI:
		return fmt.Sprintf("is above the largest cost index %d kg/min", MaxCI)
	case v != 0 && v < 0x1p-1022:
		return "is subnormal (smaller than 2.2e-308); write 0 for no time cost"
	}
	return ""
}

// ParseSweep parses a comma-separated list of cost indices such as
// "0,20,50". Every item must pass the row rule (finite, normal, 0..MaxCI)
// and appear once; the error (an *InputError) names the bad item. The order given is kept.
func ParseSweep(s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, inputErrorf("sweep %q: want a comma-separated list of cost indices, e.g. 0,20,50", s)
	}
	var out []float64
	for i, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		v, err := strconv.ParseFloat(item, 64)
		switch {
		case item == "":
			return nil, inputErrorf("sweep %q: item %d is empty", excerpt(s), i+1)
		case err != nil && !errors.Is(err, strconv.ErrRange) || math.IsNaN(v):
			return nil, inputErrorf("sweep %q: item %q is not a number", excerpt(s), excerpt(item))
		case checkCI(v) != "":
			return nil, inputErrorf("sweep: item %q: %s", excerpt(item), checkCI(v))
		}
		if v == 0 {
			v = 0 // -0 and 0 are one cost index
		}
		if slices.Contains(out, v) {
			return nil, inputErrorf("sweep: item %q appears twice", excerpt(item))
		}
		out = append(out, v)
	}
	return out, nil
}

// maxExcerpt bounds a quoted excerpt of input in an error message.
const maxExcerpt = 40

// excerpt returns at most maxExcerpt bytes of s (cut at a rune boundary,
// "..." appended when cut), so that errors quote the offending field, never
// a whole file or line.
func excerpt(s string) string { return excerptN(s, maxExcerpt) }

// excerptN returns at most n bytes of s, "..." appended when cut.
func excerptN(s string, n int) string {
	if len(s) <= n {
		return s
	}
	cut := n
	for cut > 0 && !utf8.RuneStart(s[cut]) {
		cut--
	}
	return s[:cut] + "..."
}
