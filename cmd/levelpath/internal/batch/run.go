package batch

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"slices"
	"strings"
	"sync"
)

// Result is what the planner returns for one flight at one CI.
type Result struct {
	Fuel, Time, Cost, CO2 float64 // kg, min, kg-equivalent, kg
	InitialFL, Steps      int
	MinMargin             float64 // g; NaN if none
	BaselineSavingPct     float64 // NaN if none
	LandingMass           float64 // kg
	Profile               string  // e.g. "FL350,FL370@1250"
	PlanJSON              []byte  // full plan document, written to plans/
}

// Planner plans one flight at cost index ci. It is called from several
// goroutines at once and must be safe for that. It should return soon after
// ctx is cancelled; an error returned while ctx is cancelled abandons the
// flight (no record, a resumed run plans it again).
type Planner func(ctx context.Context, row Row, ci float64) (Result, error)

// Options configure Run.
type Options struct {
	Out         string    // output directory, created if needed
	Workers     int       // concurrent planner calls; <= 0: runtime.NumCPU()
	Sweep       []float64 // cost indices to plan every flight at; nil: the row's own CI
	Shard       int       // 0-based shard K of Shards
	Shards      int       // 0 or 1: all flights
	Resume      bool      // keep records already in Out and plan only the rest
	Progress    io.Writer // progress and per-flight notes (stderr); nil: none
	ProgressTTY bool      // Progress is a terminal: draw a bar
}

// Summary counts a run. Planned and Failed count (flight, CI) results in
// the final files, including those reused from an earlier run (Skipped);
// BadRows counts invalid schedule lines of this shard. After a stopped run
// Pending is the number of plans not made and the final files are not
// written.
type Summary struct {
	Planned, Failed, Skipped int
	BadRows, Pending         int
	ByCI                     []CISummary
}

// CISummary totals the successful plans at one cost index.
type CISummary struct {
	CI                    float64
	Flights               int // successful plans
	Failed                int
	Fuel, Time, Cost, CO2 float64 // sums: kg, min, cost units, kg
}

type job struct {
	row  *Row
	ci   float64
	name string // record and plan file name
}

// ErrStopped is wrapped by the error Run returns when ctx was cancelled
// before every plan was made.
var ErrStopped = errors.New("batch stopped before every flight was planned")

// Run plans every (flight, CI) of shard opt.Shard of opt.Shards with a pool
// of opt.Workers goroutines sharing plan, and writes the outputs to opt.Out
// (see the package documentation and Merge). Each result is written
// atomically to Out/parts/ (after its plan JSON to Out/plans/) as soon as it
// is made; the final results.csv, results.parquet, errors.csv and, with a
// sweep, summary.csv are then assembled from the records, sorted by
// (flight, ci), each written atomically, and manifest.json last.
//
// A planner error or panic fails that flight only. When ctx is cancelled
// the workers take no new flight, the records written stay, and Run returns
// an error wrapping ErrStopped and ctx.Err(); a later Run with Resume skips
// every flight whose record matches its input and ends with the same files
// as a run never stopped. Without Resume an Out holding records is an error.
// bad (from ReadSchedule) lands in errors.csv. Rows must have unique flight
// ids. Orchestration cost is O(F log F) for F plans plus two small file
// writes and one read per plan.
func Run(ctx context.Context, rows []Row, bad []RowError, plan Planner, opt Options) (Summary, error) {
	var sum Summary
	if plan == nil {
		return sum, errors.New("batch: no planner")
	}
	if opt.Out == "" {
		return sum, errors.New("batch: no output directory")
	}
	k, n := opt.Shard, opt.Shards
	if n <= 1 {
		k, n = 0, 1
	}
	if k < 0 || k >= n {
		return sum, fmt.Errorf("batch: shard %d/%d: K must be in 0..%d", opt.Shard, opt.Shards, n-1)
	}
	for i, ci := range opt.Sweep {
		if !finite(ci) || ci < 0 {
			return sum, fmt.Errorf("batch: sweep cost index %v must be a finite number >= 0", ci)
		}
		for _, c := range opt.Sweep[:i] {
			if c == ci {
				return sum, fmt.Errorf("batch: sweep cost index %v appears twice", ci)
			}
		}
	}
	if opt.Sweep != nil && len(opt.Sweep) == 0 {
		return sum, errors.New("batch: empty sweep")
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}

	// The work set of this shard.
	badByLine := map[int][]RowError{}
	for _, b := range bad {
		if InShard(b.Flight, k, n) {
			badByLine[b.Line] = append(badByLine[b.Line], b)
		}
	}
	var jobs []job
	lineOf := map[string]int{}
	for i := range rows {
		r := &rows[i]
		if first, dup := lineOf[r.Flight]; dup {
			return sum, fmt.Errorf("batch: flight %q appears on lines %d and %d; flight ids must be unique", r.Flight, first, r.Line)
		}
		lineOf[r.Flight] = r.Line
		if !InShard(r.Flight, k, n) {
			continue
		}
		cis := opt.Sweep
		if cis == nil {
			if !r.HasCI {
				badByLine[r.Line] = append(badByLine[r.Line], RowError{Line: r.Line, Flight: r.Flight, Column: "ci",
					Msg: "empty cost index and no sweep given"})
				continue
			}
			cis = []float64{r.CI}
		}
		for _, ci := range cis {
			jobs = append(jobs, job{row: r, ci: ci, name: resultName(r.Flight, ci)})
		}
	}
	man := manifest{Version: 1, Shard: k, Shards: n, Sweep: opt.Sweep, Schedule: scheduleFingerprint(rows, bad)}
	for _, j := range jobs {
		man.Records = append(man.Records, j.name)
	}
	for line := range badByLine {
		man.Records = append(man.Records, badName(line))
	}
	slices.Sort(man.Records)

	if err := prepareOut(opt.Out, opt.Resume); err != nil {
		return sum, err
	}
	pending := jobs
	if opt.Resume {
		pending = pending[:0:0]
		for _, j := range jobs {
			rec, err := readRecord(filepath.Join(opt.Out, partsDir, j.name))
			if err == nil && rec.Kind == recordKind && rec.Input == fingerprint(j.row, j.ci) {
				sum.Skipped++
				continue
			}
			pending = append(pending, j)
		}
	}
	for line, errs := range badByLine {
		rec := record{Kind: badKind, Flight: errs[0].Flight, Row: line, Errors: errs, Input: "bad"}
		if err := writeRecord(opt.Out, badName(line), &rec); err != nil {
			return sum, err
		}
	}

	workers = min(workers, max(len(pending), 1))
	prog := newProgress(opt.Progress, opt.ProgressTTY)
	prog.begin(len(pending), sum.Skipped, len(badByLine), workers)
	made, werr := runPool(ctx, pending, plan, workers, opt.Out, prog)
	if werr != nil || ctx.Err() != nil && made < len(pending) {
		sum.Pending = len(pending) - made
		prog.end(true, sum.Pending)
		if werr != nil {
			return sum, werr
		}
		return sum, fmt.Errorf("%w: %d of %d plans not made, records kept in %s (rerun with --resume): %w",
			ErrStopped, sum.Pending, len(jobs), opt.Out, ctx.Err())
	}
	prog.end(false, 0)

	s, err := assemble(opt.Out, man)
	s.Skipped = sum.Skipped
	return s, err
}

// runPool plans the jobs with workers (>= 1) goroutines and returns how many
// records it wrote, and the first write error (which stops the pool).
func runPool(ctx context.Context, jobs []job, plan Planner, workers int, out string, prog *progress) (int, error) {
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	ch := make(chan *job)
	go func() {
		defer close(ch)
		for i := range jobs {
			select {
			case ch <- &jobs[i]:
			case <-ctx.Done():
				return
			}
		}
	}()
	var (
		mu       sync.Mutex
		made     int
		firstErr error
		wg       sync.WaitGroup
	)
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range ch {
				if ctx.Err() != nil {
					continue // drain: the feeder stops too
				}
				res, perr := safePlan(ctx, plan, j, prog)
				if perr != nil && ctx.Err() != nil {
					continue // abandoned: no record, resume plans it
				}
				rec := resultRecord(j.row, j.ci, res, perr)
				err := writeResult(out, j.name, &rec, res.PlanJSON)
				mu.Lock()
				if err != nil {
					if firstErr == nil {
						firstErr = err
					}
					cancel()
				} else {
					made++
				}
				mu.Unlock()
				if err == nil {
					prog.step(rec.Status != statusOK)
				}
			}
		}()
	}
	wg.Wait()
	return made, firstErr
}

// safePlan calls plan, turning a panic into an "internal error" result and
// writing the stack to the progress writer.
func safePlan(ctx context.Context, plan Planner, j *job, prog *progress) (res Result, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("internal error: %v", r)
			prog.note(fmt.Sprintf("batch: flight %s ci %s: planner panic: %v\n%s", j.row.Flight, ciText(j.ci), r, debug.Stack()))
		}
	}()
	return plan(ctx, *j.row, j.ci)
}

// writeResult writes the plan JSON (if any) and then the record, so that a
// record on disk implies its plan is there.
func writeResult(out, name string, rec *record, planJSON []byte) error {
	if rec.Status == statusOK && len(planJSON) > 0 {
		if err := atomicWrite(filepath.Join(out, plansDir), name, planJSON); err != nil {
			return err
		}
		rec.Plan = planPath(name)
	} else if err := os.Remove(filepath.Join(out, plansDir, name)); err != nil && !errors.Is(err, os.ErrNotExist) {
		return err // a stale plan of an earlier, successful run must not stay
	}
	return writeRecord(out, name, rec)
}

// prepareOut creates out/parts and out/plans, removes temporary files left
// by a killed run and the manifest (the run is now incomplete), and without
// resume refuses a directory that already holds records.
func prepareOut(out string, resume bool) error {
	records := 0
	for _, d := range []string{partsDir, plansDir} {
		if err := os.MkdirAll(filepath.Join(out, d), 0o755); err != nil {
			return fmt.Errorf("batch: output directory: %w", err)
		}
		ents, err := os.ReadDir(filepath.Join(out, d))
		if err != nil {
			return fmt.Errorf("batch: output directory: %w", err)
		}
		for _, e := range ents {
			name := e.Name()
			switch {
			case strings.HasPrefix(name, tmpPrefix):
				os.Remove(filepath.Join(out, d, name))
			case d == partsDir && strings.HasSuffix(name, ".json"):
				records++
			}
		}
	}
	if records > 0 && !resume {
		return fmt.Errorf("batch: output directory %s already holds %d records of an earlier run: pass --resume to continue it, or choose a fresh directory", out, records)
	}
	if err := os.Remove(filepath.Join(out, manifestName)); err != nil && !errors.Is(err, os.ErrNotExist) {
		return fmt.Errorf("batch: %w", err)
	}
	return nil
}
