package batch

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// MergeError lists the problems that stop Merge: (flight, CI) records found
// in more than one input directory, and missing or repeated shards.
type MergeError struct {
	Problems []string
}

func (e *MergeError) Error() string {
	const show = 10
	p := e.Problems
	more := ""
	if len(p) > show {
		more = fmt.Sprintf("\n  ... and %d more", len(p)-show)
		p = p[:show]
	}
	return "merge: " + strings.Join(p, "\n  ") + more
}

// Merge joins the output directories of the shards of one run (each
// finished, i.e. holding manifest.json) into out, producing the same files
// as one whole run: parts/ and plans/ are linked (or copied), then
// results.csv, results.parquet, errors.csv and summary.csv are assembled
// from the records. It returns a *MergeError naming every record present in
// more than one directory (identical or conflicting), every shard given
// twice and every shard missing, and an error when the directories were run
// on different schedules, sweeps or shard counts. A single unsharded
// directory merges into a copy of itself. out must not be one of dirs and
// must not hold records. O(R log R) in the number of records.
func Merge(dirs []string, out string) (Summary, error) {
	if len(dirs) == 0 {
		return Summary{}, errors.New("merge: no input directories")
	}
	absOut, err := filepath.Abs(out)
	if err != nil {
		return Summary{}, fmt.Errorf("merge: %w", err)
	}
	mans := make([]manifest, len(dirs))
	for i, d := range dirs {
		if a, err := filepath.Abs(d); err == nil && a == absOut {
			return Summary{}, fmt.Errorf("merge: output directory %s is also an input", out)
		}
		if mans[i], err = readManifest(d); err != nil {
			return Summary{}, fmt.Errorf("merge: %w", err)
		}
		m0 := mans[0]
		if mans[i].Schedule != m0.Schedule {
			return Summary{}, fmt.Errorf("merge: %s and %s were run on different schedules", dirs[0], d)
		}
		if !slices.Equal(mans[i].Sweep, m0.Sweep) || (mans[i].Sweep == nil) != (m0.Sweep == nil) {
			return Summary{}, fmt.Errorf("merge: %s (sweep %v) and %s (sweep %v) used different sweeps", dirs[0], m0.Sweep, d, mans[i].Sweep)
		}
		if mans[i].Fingerprint != m0.Fingerprint {
			return Summary{}, fmt.Errorf("merge: %s and %s were planned with other inputs or options (fingerprints %.12s and %.12s)", dirs[0], d, m0.Fingerprint, mans[i].Fingerprint)
		}
		if mans[i].Shards != m0.Shards {
			return Summary{}, fmt.Errorf("merge: %s is shard %d/%d but %s is shard %d/%d", dirs[0], m0.Shard, m0.Shards, d, mans[i].Shard, mans[i].Shards)
		}
	}

	var problems []string
	shardDir := map[int]string{}
	for i, m := range mans {
		if prev, dup := shardDir[m.Shard]; dup {
			problems = append(problems, fmt.Sprintf("shard %d/%d given twice: %s and %s", m.Shard, m.Shards, prev, dirs[i]))
			continue
		}
		shardDir[m.Shard] = dirs[i]
	}
	for s := range mans[0].Shards {
		if _, ok := shardDir[s]; !ok {
			problems = append(problems, fmt.Sprintf("shard %d/%d missing", s, mans[0].Shards))
		}
	}
	if len(problems) > 0 {
		return Summary{}, &MergeError{Problems: problems}
	}

	// Every record, and the directory it came from.
	from := map[string]int{}
	var names []string
	for i, m := range mans {
		for _, name := range m.Records {
			if j, dup := from[name]; dup {
				a, errA := os.ReadFile(filepath.Join(dirs[j], partsDir, name))
				b, errB := os.ReadFile(filepath.Join(dirs[i], partsDir, name))
				kind := "conflicting"
				if errA == nil && errB == nil && bytes.Equal(a, b) {
					kind = "identical"
				}
				problems = append(problems, fmt.Sprintf("record %s is in both %s and %s (%s)", name, dirs[j], dirs[i], kind))
				continue
			}
			from[name] = i
			names = append(names, name)
		}
	}
	if len(problems) > 0 {
		return Summary{}, &MergeError{Problems: problems}
	}

	if err := os.MkdirAll(out, 0o755); err != nil {
		return Summary{}, fmt.Errorf("merge: %w", err)
	}
	unlock, lockWarning, err := lockDir(out)
	if err != nil {
		return Summary{}, fmt.Errorf("merge: %w", err)
	}
	defer unlock()
	if _, err := prepareOut(out, false); err != nil {
		return Summary{}, fmt.Errorf("merge: %w", err)
	}
	slices.Sort(names)
	recs := make([]record, 0, len(names))
	for _, name := range names {
		dir := dirs[from[name]]
		rec, err := readRecord(filepath.Join(dir, partsDir, name))
		if err != nil {
			return Summary{}, fmt.Errorf("merge: %w", err)
		}
		if rec.Plan != "" {
			src := filepath.Join(dir, filepath.FromSlash(rec.Plan))
			if d, err := fileDigest(context.Background(), src); err != nil || d != rec.PlanSHA256 {
				return Summary{}, &FormatError{File: src, Msg: "plan file missing, unreadable or not matching the digest in its record: resume that shard's run (Options.Resume)"}
			}
			if err := linkOrCopy(filepath.Join(dir, filepath.FromSlash(rec.Plan)), filepath.Join(out, filepath.FromSlash(rec.Plan))); err != nil {
				return Summary{}, fmt.Errorf("merge: %w", err)
			}
		}
		if err := linkOrCopy(filepath.Join(dir, partsDir, name), filepath.Join(out, partsDir, name)); err != nil {
			return Summary{}, fmt.Errorf("merge: %w", err)
		}
		recs = append(recs, rec)
	}
	man := manifest{Version: manifestVersion, Shard: 0, Shards: 1, Sweep: mans[0].Sweep, Schedule: mans[0].Schedule,
		Fingerprint: mans[0].Fingerprint, Meta: mans[0].Meta, Records: names}
	rr := runRecord{Version: manifestVersion, Shard: 0, Shards: 1, Sweep: man.Sweep, Fingerprint: man.Fingerprint, Meta: man.Meta}
	if err := writeRunRecord(out, rr); err != nil {
		return Summary{}, err
	}
	sum, err := writeFinal(out, man, recs)
	sum.Sweep = man.Sweep != nil
	if lockWarning != "" {
		sum.Warnings = append(sum.Warnings, lockWarning)
	}
	return sum, err
}

// linkOrCopy hard-links src to dst, or copies it (atomically) when links
// are not possible (other file system).
func linkOrCopy(src, dst string) error {
	os.Remove(dst)
	if err := os.Link(src, dst); err == nil {
		return nil
	}
	f, err := os.Open(src)
	if err != nil {
		return err
	}
	defer f.Close()
	data, err := io.ReadAll(f)
	if err != nil {
		return fmt.Errorf("reading %s: %w", src, err)
	}
	return atomicWrite(filepath.Dir(dst), filepath.Base(dst), data)
}
