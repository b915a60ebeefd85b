package batch

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"levelpath/perf"
)

// runName is the output directory's record of its run: which shard it
// holds and the fingerprint of the inputs and options it was planned with.
// Run writes it before the first plan; a resumed run and a re-run array
// task read it.
const runName = "run.json"

type runRecord struct {
	Version     int               `json:"version"`
	Shard       int               `json:"shard"`
	Shards      int               `json:"shards"`
	Sweep       []float64         `json:"sweep"`
	Fingerprint string            `json:"fingerprint"`
	Meta        map[string]string `json:"meta,omitempty"`
}

// runFingerprint is the SHA-256 of the run's Meta (sorted by key; the
// caller puts there the program version, the weather files' digests and
// every option that changes a plan) and the sweep. Route and aircraft file
// digests are per row (see Row.digests), so that a resumed run re-plans
// only the flights whose files changed.
func runFingerprint(meta map[string]string, sweep []float64) string {
	h := sha256.New()
	fmt.Fprintf(h, "levelpath-batch-run-v%d\n", manifestVersion)
	for _, k := range slices.Sorted(maps.Keys(meta)) {
		fmt.Fprintf(h, "%d:%s=%d:%s\n", len(k), k, len(meta[k]), meta[k])
	}
	fmt.Fprintf(h, "sweep=%v,%v\n", sweep == nil, sweep)
	return hex.EncodeToString(h.Sum(nil))
}

// readRunRecord reads out/run.json; ok is false when there is none.
func readRunRecord(out string) (rr runRecord, ok bool, err error) {
	path := filepath.Join(out, runName)
	st, err := os.Stat(path)
	if errors.Is(err, os.ErrNotExist) {
		return rr, false, nil
	}
	if err != nil {
		return rr, false, err
	}
	if !st.Mode().IsRegular() || st.Size() > maxRecordBytes {
		return rr, false, &FormatError{File: path, Msg: "not a run record (not a regular file, or too large)"}
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return rr, false, err
	}
	if err := json.Unmarshal(data, &rr); err != nil {
		return rr, false, &FormatError{File: path, Msg: "corrupt run record: " + excerpt(err.Error())}
	}
	if rr.Version != manifestVersion {
		return rr, false, &FormatError{File: path, Msg: fmt.Sprintf("run record version %d, this program writes %d: finish it with the program that started it, or choose a fresh directory", rr.Version, manifestVersion)}
	}
	if rr.Shards < 1 || rr.Shards > MaxShards || rr.Shard < 0 || rr.Shard >= rr.Shards {
		return rr, false, &FormatError{File: path, Msg: fmt.Sprintf("shard %d/%d is not a shard", rr.Shard, rr.Shards)}
	}
	return rr, true, nil
}

// RecordedShard returns the shard an earlier run recorded in output
// directory out (ok false when out holds no run record), so that a Slurm
// array task re-run alone can take the shard count from the directory it
// continues.
func RecordedShard(out string) (k, n int, ok bool, err error) {
	rr, ok, err := readRunRecord(out)
	return rr.Shard, rr.Shards, ok, err
}

// checkResume refuses to continue the run recorded in out when this run is
// another shard or has another fingerprint (an *InputError naming both and,
// for a fingerprint, the Meta entries that differ).
func checkResume(out string, want runRecord, records int) error {
	got, ok, err := readRunRecord(out)
	if err != nil {
		return err
	}
	if !ok {
		if records > 0 {
			return inputErrorf("batch: %s holds %d records but no %s, so what they were planned with is unknown: choose a fresh directory", out, records, runName)
		}
		return nil
	}
	if got.Shard != want.Shard || got.Shards != want.Shards {
		return inputErrorf("batch: resume: %s holds shard %d/%d, this run is shard %d/%d: give the same shard, or another output directory", out, got.Shard, got.Shards, want.Shard, want.Shards)
	}
	if got.Fingerprint != want.Fingerprint {
		var diff []string
		for _, k := range slices.Sorted(maps.Keys(want.Meta)) {
			if got.Meta[k] != want.Meta[k] {
				diff = append(diff, fmt.Sprintf("%s %q, now %q", k, excerpt(got.Meta[k]), excerpt(want.Meta[k])))
			}
		}
		for _, k := range slices.Sorted(maps.Keys(got.Meta)) {
			if _, in := want.Meta[k]; !in {
				diff = append(diff, fmt.Sprintf("%s %q, now none", k, excerpt(got.Meta[k])))
			}
		}
		if !slices.Equal(got.Sweep, want.Sweep) || (got.Sweep == nil) != (want.Sweep == nil) {
			diff = append(diff, fmt.Sprintf("sweep %v, now %v", got.Sweep, want.Sweep))
		}
		return inputErrorf("batch: resume: %s was planned with other inputs or options (%s): its results cannot be mixed with this run's; plan afresh into another directory", out, strings.Join(diff, "; "))
	}
	return nil
}

// maxDigestFiles bounds the distinct route and aircraft files hashed.
const maxDigestFiles = 1 << 16

// setDigests sets each row's digests from its route file's and (when the
// aircraft names a regular file) aircraft file's SHA-256 (of a table
// directory, perf.TablesDigest), hashing each
// distinct file once. Honours ctx between files and while reading.
func setDigests(ctx context.Context, rows []*Row) error {
	cache := map[string]string{}
	digest := func(path string) (string, error) {
		if d, ok := cache[path]; ok {
			return d, nil
		}
		if len(cache) >= maxDigestFiles {
			return "", fmt.Errorf("batch: more than %d distinct route and aircraft files", maxDigestFiles)
		}
		d, err := fileDigest(ctx, path)
		if err != nil {
			return "", err
		}
		cache[path] = d
		return d, nil
	}
	for _, r := range rows {
		if err := ctx.Err(); err != nil {
			return err
		}
		rd, err := digest(r.Route)
		if err != nil {
			return fmt.Errorf("batch: route of flight %s: %w", r.Flight, err)
		}
		ad := "name:" + r.Aircraft // a built-in model: the program version covers it
		if checkRegular(r.Aircraft) == nil {
			if ad, err = digest(r.Aircraft); err != nil {
				return fmt.Errorf("batch: aircraft of flight %s: %w", r.Flight, err)
			}
		} else if fi, err := os.Stat(r.Aircraft); err == nil && fi.IsDir() {
			// Operator tables: the digest of the whole set.
			d, ok := cache[r.Aircraft]
			if !ok {
				if d, err = perf.TablesDigest(r.Aircraft); err != nil {
					return fmt.Errorf("batch: aircraft tables of flight %s: %w", r.Flight, err)
				}
				cache[r.Aircraft] = d
			}
			ad = "tables:" + d
		}
		r.digests = rd[:16] + "-" + ad
		if r.Policy != "" {
			pd, err := digest(r.Policy)
			if err != nil {
				return fmt.Errorf("batch: fuel policy of flight %s: %w", r.Flight, err)
			}
			r.digests += "-" + pd[:16]
		}
	}
	return nil
}

// fileDigest is the hex SHA-256 of a regular file's contents.
func fileDigest(ctx context.Context, path string) (string, error) {
	f, err := openRegular(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, ctxReader{ctx, f}); err != nil {
		return "", fmt.Errorf("reading %s: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// ctxReader fails reads once ctx is done.
type ctxReader struct {
	ctx context.Context
	r   io.Reader
}

func (c ctxReader) Read(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, err
	}
	return c.r.Read(p)
}

// FileDigest returns the hex SHA-256 of the regular file at path (refusing
// FIFOs, devices and directories before opening), for the caller's Meta
// (weather files).
func FileDigest(ctx context.Context, path string) (string, error) { return fileDigest(ctx, path) }
