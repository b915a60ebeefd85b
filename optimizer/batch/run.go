package batch

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
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
	"time"
)

// Result is what the planner returns for one flight at one CI.
type Result struct {
	Fuel, Time, Cost, CO2 float64 // kg, min, kg-equivalent, kg
	InitialFL, Steps      int
	MinMargin             float64 // g; NaN if none
	// CostSavingPct is the cost saving against the best constant level,
	// (baseline cost - plan cost) / baseline cost x 100; NaN if none.
	CostSavingPct float64
	LandingMass   float64  // kg
	TakeoffMass   float64  // kg
	ZFW           float64  // kg; 0 when not known
	Block         float64  // block fuel of a fuel-plan row, kg; 0 otherwise
	LimitedBy     string   // the limits a fuel plan's loading breaks (MTOW, MLW, ...), space-separated
	Distance      float64  // route length, m
	Floor         float64  // buffet protection floor applied, g
	Speed         string   // speed policy used
	Levels        string   // level rule used
	Warnings      []string // the plan's warnings
	Violations    []string // limits the plan breaks (fuel, landing mass, ...): makes it infeasible
	Profile       string   // e.g. "FL350,FL370@1250"
	PlanJSON      []byte   // full plan document, written to plans/
	// Contrail is set when the plan has contrail figures (weather with
	// humidity): PersistentNM, PersistentDayNM and PersistentNightNM, its
	// cruise distance in persistent-contrail conditions (all, by day, by
	// night), NM.
	Contrail                                         bool
	PersistentNM, PersistentDayNM, PersistentNightNM float64
	// Arrival is filled for a row with an arrival target (arrive_by);
	// nil otherwise.
	Arrival *ArrivalResult
}

// ArrivalResult is how a flight with an arrival target came out.
type ArrivalResult struct {
	CIUsed   float64 // the cost index flown, kg/min
	DelayMin float64 // arrival minus arrive_by, minutes (negative: early)
	OnTime   bool    // the arrival lies in the row's window
	// DelayCost is the delay cost of the arrival, kg fuel-equivalent,
	// when the run has one (SchedulePlanner.DelayCost); NaN otherwise.
	DelayCost float64
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
	// Meta names the inputs and options every plan depends on beyond its
	// schedule row: the program version, the weather files' digests, step
	// rules, segment length and so on (key: value). Its fingerprint is
	// recorded in Out; a resume with another is refused. It becomes
	// results.parquet's key-value metadata.
	Meta map[string]string
	// StopGrace is how long a cancelled Run waits for planners that do not
	// return; then it returns anyway (their plans are not recorded).
	// 0: DefaultStopGrace.
	StopGrace time.Duration
}

// DefaultStopGrace is the default Options.StopGrace.
const DefaultStopGrace = 3 * time.Second

// Summary counts a run. Planned and Failed count (flight, CI) results in
// the final files, including those reused from an earlier run (Skipped);
// BadRows counts invalid schedule lines of this shard. After a stopped run
// Pending is the number of plans not made and the final files are not
// written.
type Summary struct {
	Planned, Failed, Skipped int
	Infeasible               int // planned, but breaking a limit (not in Planned)
	BadRows, Pending         int
	Replanned                int      // reused records whose plan file was missing or damaged
	Sweep                    bool     // the run had a CI sweep (ByCI is a per-CI table)
	Warnings                 []string // e.g. Merge's output directory could not be locked
	Targets                  bool     // some flight had an arrive_by time (ByCI counts on-time plans)
	ByCI                     []CISummary
}

// CISummary totals the successful plans at one cost index.
type CISummary struct {
	CI                    float64
	Flights               int // successful plans (status ok or warning)
	Failed                int
	Infeasible            int
	Fuel, Time, Cost, CO2 float64 // sums: kg, min, cost units, kg
	// ContrailFlights counts the successful plans with contrail figures
	// (weather with humidity), whose persistent-contrail distances, NM,
	// are summed in PersistentNM, DayNM and NightNM.
	ContrailFlights              int
	PersistentNM, DayNM, NightNM float64
	// WithTarget counts the plans (any status but failed) of flights with
	// an arrive_by time, OnTime those of them arriving in their window.
	WithTarget, OnTime int
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
// (see the package documentation and Merge). It holds an exclusive lock on
// Out for its whole run (a second Run or Merge on Out is refused) and first
// writes Out/run.json, the shard and the fingerprint of opt.Meta and the
// sweep. Each result is written atomically to Out/parts/ (after its plan
// JSON to Out/plans/, whose SHA-256 the record holds) as soon as it is
// made; the final results.csv, results.parquet, errors.csv and, with a
// sweep, summary.csv are then assembled from the records, sorted by
// (flight, ci), each written atomically, and manifest.json last.
//
// A planner error or panic fails that flight only. When ctx is cancelled
// the workers take no new flight, the records written stay, and Run returns
// (within opt.StopGrace of the cancellation even if a planner ignores ctx)
// an error wrapping ErrStopped and ctx.Err(). A later Run with Resume
// refuses an Out of another shard or fingerprint (*InputError), skips every
// flight whose record matches its input (row, CI, route and aircraft file
// digests) and whose plan file matches its digest, plans the rest, and ends
// with the same files as a run never stopped. Without Resume an Out holding
// records is an error. bad (from ReadSchedule) lands in errors.csv, as does
// a row whose CI fails the row rule. Rows must have unique flight ids.
// Errors caused by the input or the directory's record are *InputError or
// *FormatError; others (a write failure) are the file system's.
// Orchestration cost is O(F log F) for F plans plus two small file writes
// and one read per plan, and one read of each route and aircraft file (and,
// on resume, of each reused plan file) to hash it.
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
	if n > MaxShards {
		return sum, inputErrorf("batch: shard count %d: more than the %d shards a run may have", n, MaxShards)
	}
	if k < 0 || k >= n {
		return sum, inputErrorf("batch: shard %d/%d: K must be in 0..%d", opt.Shard, opt.Shards, n-1)
	}
	for i, ci := range opt.Sweep {
		if msg := checkCI(ci); msg != "" {
			return sum, inputErrorf("batch: sweep cost index %v %s", ci, msg)
		}
		if slices.Contains(opt.Sweep[:i], ci) {
			return sum, inputErrorf("batch: sweep cost index %v appears twice", ci)
		}
	}
	if opt.Sweep != nil && len(opt.Sweep) == 0 {
		return sum, inputErrorf("batch: empty sweep")
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	grace := opt.StopGrace
	if grace <= 0 {
		grace = DefaultStopGrace
	}

	// The work set of this shard.
	badByLine := map[int][]RowError{}
	for _, b := range bad {
		if InShard(b.Flight, k, n) {
			badByLine[b.Line] = append(badByLine[b.Line], b)
		}
	}
	var jobs []job
	var mine []*Row
	lineOf := map[string]int{}
	names := map[string]string{} // record name -> flight, to catch a hash collision
	for i := range rows {
		r := &rows[i]
		if first, dup := lineOf[r.Flight]; dup {
			return sum, inputErrorf("batch: flight %q appears on lines %d and %d; flight ids must be unique", excerpt(r.Flight), first, r.Line)
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
			if msg := checkCI(r.CI); msg != "" {
				badByLine[r.Line] = append(badByLine[r.Line], RowError{Line: r.Line, Flight: r.Flight, Column: "ci",
					Msg: fmt.Sprintf("%v %s", r.CI, msg)})
				continue
			}
			cis = []float64{r.CI}
		}
		mine = append(mine, r)
		for _, ci := range cis {
			name := resultName(r.Flight, ci)
			if other, dup := names[name]; dup {
				return sum, fmt.Errorf("batch: internal error: flights %q and %q share record name %s", other, r.Flight, name)
			}
			names[name] = r.Flight
			jobs = append(jobs, job{row: r, ci: ci, name: name})
		}
	}
	rr := runRecord{Version: manifestVersion, Shard: k, Shards: n, Sweep: opt.Sweep,
		Fingerprint: runFingerprint(opt.Meta, opt.Sweep), Meta: opt.Meta}
	man := manifest{Version: manifestVersion, Shard: k, Shards: n, Sweep: opt.Sweep, Schedule: scheduleFingerprint(rows, bad),
		Fingerprint: rr.Fingerprint, Meta: opt.Meta}
	for _, j := range jobs {
		man.Records = append(man.Records, j.name)
	}
	for line := range badByLine {
		man.Records = append(man.Records, badName(line))
	}
	slices.Sort(man.Records)

	if err := os.MkdirAll(opt.Out, 0o755); err != nil {
		return sum, fmt.Errorf("batch: output directory: %w", err)
	}
	unlock, warning, err := lockDir(opt.Out)
	if err != nil {
		return sum, err
	}
	if warning != "" && opt.Progress != nil {
		fmt.Fprintln(opt.Progress, warning)
	}
	defer unlock()
	records, err := prepareOut(opt.Out, opt.Resume)
	if err != nil {
		return sum, err
	}
	if opt.Resume {
		if err := checkResume(opt.Out, rr, records); err != nil {
			return sum, err
		}
	}
	if err := writeRunRecord(opt.Out, rr); err != nil {
		return sum, err
	}
	if err := setDigests(ctx, mine); err != nil {
		return sum, stopped(ctx, err, len(jobs), len(jobs), opt.Out)
	}
	pending := jobs
	if opt.Resume {
		pending = pending[:0:0]
		for _, j := range jobs {
			if err := ctx.Err(); err != nil {
				return sum, stopped(ctx, err, len(jobs)-sum.Skipped, len(jobs), opt.Out)
			}
			reuse, damaged := reusable(opt.Out, &j)
			if reuse {
				sum.Skipped++
				continue
			}
			if damaged != "" {
				sum.Replanned++
				if opt.Progress != nil {
					fmt.Fprintf(opt.Progress, "batch: flight %s ci %s: plan file %s, planning it again\n", excerpt(j.row.Flight), ciText(j.ci), damaged)
				}
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
	made, werr := runPool(ctx, pending, plan, workers, opt.Out, prog, grace)
	if werr != nil || ctx.Err() != nil && made < len(pending) {
		sum.Pending = len(pending) - made
		prog.end(true, sum.Pending)
		if werr != nil {
			return sum, werr
		}
		return sum, stopped(ctx, ctx.Err(), sum.Pending, len(jobs), opt.Out)
	}
	prog.end(false, 0)

	s, err := assemble(opt.Out, man)
	s.Skipped, s.Replanned, s.Sweep = sum.Skipped, sum.Replanned, opt.Sweep != nil
	return s, err
}

// stopped wraps err (ctx's error, or one caused by it) in ErrStopped when
// ctx is done, else returns err.
func stopped(ctx context.Context, err error, pending, total int, out string) error {
	if ctx.Err() == nil {
		return err
	}
	return fmt.Errorf("%w: %d of %d plans not made, records kept in %s (resume the run to finish): %w",
		ErrStopped, pending, total, out, ctx.Err())
}

// reusable reports whether the record of j in out can be kept: it is
// readable, of this flight and CI with the same input key, and its plan
// file (if it names one) has the digest the record holds. damaged says
// why a record with a missing or changed plan file is not reused.
func reusable(out string, j *job) (ok bool, damaged string) {
	rec, err := readRecord(filepath.Join(out, partsDir, j.name))
	if err != nil || rec.Kind != recordKind || rec.Flight != j.row.Flight || rec.CI != j.ci || rec.Input != j.row.inputKey(j.ci) {
		return false, ""
	}
	if rec.Plan == "" {
		return true, ""
	}
	d, err := fileDigest(context.Background(), filepath.Join(out, filepath.FromSlash(rec.Plan)))
	switch {
	case errors.Is(err, os.ErrNotExist):
		return false, rec.Plan + " is missing"
	case err != nil:
		return false, rec.Plan + " is unreadable"
	case d != rec.PlanSHA256:
		return false, rec.Plan + " does not match the digest in its record"
	}
	return true, ""
}

func writeRunRecord(out string, rr runRecord) error {
	data, err := json.MarshalIndent(rr, "", " ")
	if err != nil {
		return err
	}
	if err := atomicWrite(out, runName, append(data, '\n')); err != nil {
		return fmt.Errorf("batch: %w", err)
	}
	return nil
}

// runPool plans the jobs with workers (>= 1) goroutines and returns how many
// records it wrote, and the first write error (which stops the pool).
//
// When ctx is cancelled it waits at most grace for the planners running
// then; a planner still busy after that is left behind (its result is not
// recorded: the count is taken under the lock and the pool is marked
// closed), so a stop never hangs on a planner that ignores ctx.
func runPool(ctx context.Context, jobs []job, plan Planner, workers int, out string, prog *progress, grace time.Duration) (int, error) {
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
		closed   bool // set when runPool returned: late results are dropped
		wg       sync.WaitGroup
	)
	for range workers {
		wg.Go(func() {
			for j := range ch {
				if ctx.Err() != nil {
					continue // drain: the feeder stops too
				}
				res, perr := safePlan(ctx, plan, j, prog)
				if perr != nil && ctx.Err() != nil {
					continue // abandoned: no record, resume plans it
				}
				rec := resultRecord(j.row, j.ci, res, perr)
				mu.Lock()
				if closed {
					mu.Unlock()
					return
				}
				err := writeResult(out, j.name, &rec, res.PlanJSON)
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
					prog.step(rec.Status == statusFailed)
				}
			}
		})
	}
	done := make(chan struct{})
	go func() { wg.Wait(); close(done) }()
	select {
	case <-done:
	case <-ctx.Done():
		select {
		case <-done:
		case <-time.After(grace):
			prog.note(fmt.Sprintf("batch: %v after the stop, planners still running are abandoned", grace))
		}
	}
	mu.Lock()
	defer mu.Unlock()
	closed = true
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
	if rec.Status != statusFailed && len(planJSON) > 0 { // ok, warning and infeasible plans are all kept
		if err := atomicWrite(filepath.Join(out, plansDir), name, planJSON); err != nil {
			return err
		}
		rec.Plan = planPath(name)
		sum := sha256.Sum256(planJSON)
		rec.PlanSHA256 = hex.EncodeToString(sum[:])
	} else if err := os.Remove(filepath.Join(out, plansDir, name)); err != nil && !errors.Is(err, os.ErrNotExist) {
		return err // a stale plan of an earlier, successful run must not stay
	}
	return writeRecord(out, name, rec)
}

// prepareOut creates out/parts and out/plans, removes temporary files left
// by a killed run (the caller holds out's lock, so none is another run's)
// and the manifest (the run is now incomplete), and without resume refuses
// a directory that already holds records. It returns the number of records.
func prepareOut(out string, resume bool) (int, error) {
	records := 0
	for _, d := range []string{partsDir, plansDir} {
		if err := os.MkdirAll(filepath.Join(out, d), 0o755); err != nil {
			return 0, fmt.Errorf("batch: output directory: %w", err)
		}
		ents, err := os.ReadDir(filepath.Join(out, d))
		if err != nil {
			return 0, fmt.Errorf("batch: output directory: %w", err)
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
		return 0, inputErrorf("batch: output directory %s already holds %d records of an earlier run: resume it (Options.Resume) to continue, or choose a fresh directory", out, records)
	}
	if err := os.Remove(filepath.Join(out, manifestName)); err != nil && !errors.Is(err, os.ErrNotExist) {
		return 0, fmt.Errorf("batch: %w", err)
	}
	return records, nil
}
