package main

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"
	"golang.org/x/term"

	"levelpath/cmd/levelpath/internal/chart"
	"levelpath/optimizer"
	"levelpath/optimizer/batch"
	"levelpath/perf"
)

const exitSomeFailed = 3

func newBatchCmd() *cobra.Command {
	var (
		schedule, out, sweep, shard, chartPath string
		weather                                []string
		workers, shardCount                    int
		wxo                                    weatherOpts
		policyPath, delayPath                  string
		resume                                 bool
		maxSegNM                               float64
		maxStepFt, maxSteps                    int
		minStepNM                              float64
		stepDescents, noSteps                  bool
		con                                    contrailFlags
		contrailSweep                          string
	)
	c := &cobra.Command{
		Use:   "batch",
		Short: "Plan a whole schedule in parallel, resumably, optionally over a cost-index sweep or one shard of a cluster job",
		Example: `  levelpath batch --schedule levelpath-demo/schedule.csv --weather levelpath-demo/weather.grib2 --out day1
  levelpath batch --schedule day.csv --weather gfs.grib2 --out sweep --ci-sweep 0,20,50,100 --chart sweep.svg
  levelpath batch --schedule day.csv --weather gfs.grib2 --out shard3 --shard 3/8
  levelpath batch merge shard0 shard1 shard2 --out day1`,
		Args: cobra.NoArgs,
	}
	format := formatFlag(c, "table", "json", "csv")
	fl := c.Flags()
	fl.StringVar(&schedule, "schedule", "", "schedule CSV: flight,departure,route,aircraft,tow_kg,ci (+ zfw_kg,fuel_kg,floor_g,levels,speed,policy,arrive_by,arrive_window)")
	fl.StringArrayVar(&weather, "weather", nil, "GRIB2/GRIB1 weather file (repeatable), decoded once and shared")
	fl.StringVar(&out, "out", "", "output directory")
	weatherFlags(c, &wxo)
	fl.StringVar(&policyPath, "policy", "", "fuel policy YAML for rows that give zfw_kg alone (a fuel plan; default: the documented default policy)")
	fl.StringVar(&delayPath, "delay-cost", "", "cost of lateness (CSV minutes_late,cost_kg) for rows with arrive_by: each flies the cost index minimising fuel + its ci x time + delay cost, instead of the least-cost one in its arrive_window")
	fl.IntVar(&workers, "workers", 0, "parallel planners (default: one per CPU)")
	fl.StringVar(&sweep, "ci-sweep", "", "plan every flight at each cost index, e.g. 0,20,50,100")
	fl.StringVar(&shard, "shard", "", "plan only shard K/N of the flights (0-based K, N at most 1048576); or give --shard-count inside a cluster job")
	fl.IntVar(&shardCount, "shard-count", 0, "number of shards of a Kubernetes Indexed Job (index JOB_COMPLETION_INDEX) or Slurm job array (index SLURM_ARRAY_TASK_ID, --array=0-(N-1)); default: the count recorded in --out")
	fl.BoolVar(&resume, "resume", false, "continue a stopped run in --out, planning only what is missing")
	fl.Float64Var(&maxSegNM, "max-seg-nm", 50, "longest route segment, NM")
	fl.StringVar(&chartPath, "chart", "", "with --ci-sweep: draw total fuel against total time per CI to FILE (.svg, .png, .pdf)")
	fl.IntVar(&maxStepFt, "max-step-ft", 4000, "step rule for every flight: largest level change of one step, ft")
	fl.BoolVar(&stepDescents, "step-descents", false, "step rule for every flight: allow step descents in cruise")
	fl.Float64Var(&minStepNM, "min-step-nm", 100, "step rule for every flight: least distance between steps, NM (0: none)")
	fl.IntVar(&maxSteps, "max-steps", 0, "step rule for every flight: most steps (0: no limit)")
	fl.BoolVar(&noSteps, "no-steps", false, "step rule for every flight: one constant level")
	con.register(c)
	fl.StringVar(&contrailSweep, "contrail-sweep", "", "plan every flight at each contrail cost (kg/NM), e.g. 0,5,20,100, each run in OUT/contrail-COST; prints fuel, CO2, persistent contrail NM and the share of flights changed per cost")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if err := checkFormat(*format, "table", "json", "csv"); err != nil {
			return err
		}
		if schedule == "" || out == "" {
			return badInputf("--schedule and --out are required")
		}
		if workers < 0 {
			return badInputf("--workers %d: must be positive", workers)
		}
		opt := batch.Options{Out: out, Workers: workers, Resume: resume, Progress: cmd.ErrOrStderr()}
		if f, ok := cmd.ErrOrStderr().(*os.File); ok && term.IsTerminal(int(f.Fd())) {
			opt.ProgressTTY = true
		}
		if sweep != "" {
			s, err := batch.ParseSweep(sweep)
			if err != nil {
				return badInputf("--ci-sweep: %v", err)
			}
			opt.Sweep = s
		}
		var costs []float64
		if contrailSweep != "" {
			var err error
			if costs, err = parseContrailSweep(contrailSweep); err != nil {
				return err
			}
			switch {
			case cmd.Flags().Changed("contrail-cost"):
				return badInputf("give --contrail-sweep or --contrail-cost, not both")
			case opt.Sweep != nil:
				return badInputf("--contrail-sweep and --ci-sweep cannot be combined: run one sweep at a time")
			case shard != "" || shardCount != 0:
				return badInputf("--contrail-sweep plans whole schedules: it cannot be combined with --shard or --shard-count")
			}
		}
		if chartPath != "" {
			if opt.Sweep == nil && costs == nil {
				return badInputf("--chart needs --ci-sweep or --contrail-sweep")
			}
			if _, err := chart.FormatOf(chartPath); err != nil {
				return badInputf("--chart: %v", err)
			}
		}
		switch {
		case shard != "":
			k, n, err := batch.ParseShard(shard)
			if err != nil {
				return badInputf("--shard: %v", err)
			}
			if shardCount != 0 && shardCount != n {
				return badInputf("--shard %s and --shard-count %d disagree", shard, shardCount)
			}
			opt.Shard, opt.Shards = k, n
		default:
			// A Slurm array task re-run alone sees a one-task array, so
			// the count is never taken from the array: it is --shard-count,
			// or the count an earlier run recorded in --out.
			count := shardCount
			if count == 0 && (os.Getenv("SLURM_ARRAY_TASK_ID") != "" || os.Getenv("JOB_COMPLETION_INDEX") != "") {
				if _, n, ok, err := batch.RecordedShard(out); err != nil {
					return batchError(err)
				} else if ok {
					count = n
				}
			}
			k, n, ok, err := batch.ShardFromEnv(os.Getenv, count)
			if err != nil {
				return badInput(err)
			}
			if ok {
				opt.Shard, opt.Shards = k, n
			}
		}
		// Until Run starts nothing is worth saving, so SIGINT and SIGTERM
		// keep their default action (end the process) while the schedule
		// is read and the weather decoded; non-regular files are refused
		// before they are opened (batchMeta hashes each weather file
		// first), so none of these steps blocks on a FIFO.
		rows, bad, err := batch.ReadSchedule(schedule)
		if err != nil {
			return badInput(err)
		}
		steps, err := stepRules(maxStepFt, stepDescents, minStepNM, maxSteps, noSteps)
		if err != nil {
			return err
		}
		if opt.Meta, err = batchMeta(cmd.Context(), weather, wxo.edrParam, maxSegNM, steps); err != nil {
			return err
		}
		wx, err := loadWeather(weather, wxo)
		if err != nil {
			return err
		}
		if err := con.check(weather, wx); err != nil {
			return err
		}
		for _, v := range costs {
			if err := checkContrail(v, con.rhi, weather, wx, "--contrail-sweep item"); err != nil {
				return err
			}
		}
		if con.cost != 0 {
			opt.Meta["contrail_cost"] = strconv.FormatFloat(con.cost, 'g', -1, 64) // a resume with another cost is refused
		}
		if con.rhi != 0 {
			opt.Meta["contrail_rhi"] = strconv.FormatFloat(con.rhi, 'g', -1, 64)
		}
		if wxo.rhRef != "" && wxo.rhRef != "auto" {
			opt.Meta["rh_reference"] = wxo.rhRef // it changes the humidity, so the contrail figures
		}
		if wx == nil {
			warnf(cmd.ErrOrStderr(), "%s", stillAirWarning)
		}
		if !(maxSegNM >= 1 && maxSegNM <= 1000) {
			return badInputf("--max-seg-nm %v: want 1..1000", maxSegNM)
		}
		pl := &batch.SchedulePlanner{Weather: wx, MaxSegment: maxSegNM * perf.NMToM, Steps: steps, Sweep: opt.Sweep != nil, ContrailCost: con.cost, ContrailRHiPct: con.rhi}
		if delayPath != "" {
			dc, err := readDelayCost(delayPath, "--delay-cost")
			if err != nil {
				return err
			}
			pl.DelayCost = &dc
			sum := sha256.Sum256([]byte(fmt.Sprintf("%+v", dc)))
			opt.Meta["delay_cost"] = hex.EncodeToString(sum[:]) // a resume with another delay cost is refused
		}
		var pol *optimizer.FuelPolicy
		if policyPath != "" {
			p, err := readPolicy(policyPath)
			if err != nil {
				return err
			}
			pol = &p
			pl.Policy = pol
			sum := sha256.Sum256([]byte(fmt.Sprintf("%+v", *pol)))
			opt.Meta["fuel_policy"] = hex.EncodeToString(sum[:]) // a resume with another policy is refused
		}
		// From here a first SIGINT or SIGTERM stops the run cleanly
		// (records kept, see batch.Run and Options.StopGrace); a second
		// ends the process at once: stop() restores the default action
		// once the first has cancelled ctx.
		ctx, stop := signal.NotifyContext(cmd.Context(), os.Interrupt, syscall.SIGTERM)
		defer stop()
		go func() { <-ctx.Done(); stop() }()
		if costs != nil {
			plannerFor := func(cost float64) batch.Planner {
				return (&batch.SchedulePlanner{Weather: wx, MaxSegment: pl.MaxSegment, Steps: steps, Policy: pol, DelayCost: pl.DelayCost, Sweep: pl.Sweep,
					ContrailCost: cost, ContrailRHiPct: con.rhi}).Plan
			}
			lines, someFailed, err := runContrailSweep(ctx, rows, bad, costs, opt, plannerFor)
			if err != nil {
				if errors.Is(err, batch.ErrStopped) {
					return &exitError{code: exitInternal, msg: err.Error() + "; rerun with --resume to finish"}
				}
				return batchError(err)
			}
			if err := writeContrailSweepFile(filepath.Join(out, "contrail_sweep.csv"), lines); err != nil {
				return err
			}
			if err := printContrailSweep(cmd.OutOrStdout(), *format, lines); err != nil {
				return err
			}
			if chartPath != "" {
				if err := contrailChart(chartPath, lines); err != nil {
					return err
				}
			}
			if someFailed {
				return &exitError{code: exitSomeFailed, msg: fmt.Sprintf("some plans failed, were infeasible or had bad schedule rows: see %s/contrail-*/errors.csv", out)}
			}
			return nil
		}
		start := time.Now()
		sum, err := batch.Run(ctx, rows, bad, pl.Plan, opt)
		if el := time.Since(start); err == nil && sum.Planned > sum.Skipped {
			n := sum.Planned - sum.Skipped
			fmt.Fprintf(cmd.ErrOrStderr(), "levelpath: %d plans in %.1f s (%.1f plans/s), peak memory %.0f MiB\n",
				n, el.Seconds(), float64(n)/el.Seconds(), float64(peakRSS())/(1<<20))
		}
		if err != nil {
			if errors.Is(err, batch.ErrStopped) {
				return &exitError{code: exitInternal, msg: err.Error() + "; rerun with --resume to finish"}
			}
			return batchError(err)
		}
		if sum.Replanned > 0 {
			warnf(cmd.ErrOrStderr(), "%d reused record(s) had a missing or damaged plan file and were planned again", sum.Replanned)
		}
		if err := printBatchSummary(cmd.OutOrStdout(), *format, sum); err != nil {
			return err
		}
		if chartPath != "" {
			pts := make([]chart.SweepPoint, 0, len(sum.ByCI))
			for _, b := range sum.ByCI {
				pts = append(pts, chart.SweepPoint{CI: b.CI, FuelKg: b.Fuel, TimeMin: b.Time, Flights: b.Flights})
			}
			if err := chart.WriteFile(chartPath, func(w io.Writer, f string) error { return chart.Sweep(w, f, pts, "Cost-index sweep") }); err != nil {
				return err
			}
		}
		if sum.Failed > 0 || sum.BadRows > 0 || sum.Infeasible > 0 {
			return &exitError{code: exitSomeFailed, msg: fmt.Sprintf("%d plan(s) failed, %d infeasible and %d schedule row(s) were bad: see %s/errors.csv", sum.Failed, sum.Infeasible, sum.BadRows, out)}
		}
		return nil
	}
	c.AddCommand(newBatchMergeCmd())
	return c
}

func newBatchMergeCmd() *cobra.Command {
	var out string
	c := &cobra.Command{
		Use:   "merge DIR... --out DIR",
		Short: "Join shard outputs into the files of one whole run",
		Args:  cobra.MinimumNArgs(1),
	}
	format := formatFlag(c, "table", "json", "csv")
	c.Flags().StringVar(&out, "out", "", "output directory")
	c.RunE = func(cmd *cobra.Command, args []string) error {
		if err := checkFormat(*format, "table", "json", "csv"); err != nil {
			return err
		}
		if out == "" {
			return badInputf("--out is required")
		}
		sum, err := batch.Merge(args, out)
		if err != nil {
			return batchError(err)
		}
		for _, w := range sum.Warnings {
			fmt.Fprintln(cmd.ErrOrStderr(), w)
		}
		return printBatchSummary(cmd.OutOrStdout(), *format, sum)
	}
	return c
}

// stillAirWarning is printed, and put in every result's warnings, when a
// batch runs without weather.
const stillAirWarning = batch.StillAirWarning

// batchError maps an error of batch.Run or batch.Merge to an exit code:
// bad input (a schedule, shard, sweep, resume or lock problem, a corrupt
// record or manifest, a missing file) is 2; anything else, such as a write
// failure on a full disk, is an environment failure, 1.
func batchError(err error) error {
	var ie *batch.InputError
	var fe *batch.FormatError
	if errors.As(err, &ie) || errors.As(err, &fe) || errors.Is(err, fs.ErrNotExist) {
		// The library speaks of its options; say the flag a user types.
		if msg := err.Error(); strings.Contains(msg, "Options.Resume") {
			return badInputf("%s", strings.ReplaceAll(msg, "Options.Resume", "--resume"))
		}
		return badInput(err)
	}
	return err
}

// batchMeta names what every plan of a batch depends on beyond its row:
// the program version, each weather file and its SHA-256, the segment
// length and step rules, and the EDR parameter asked for (only when one
// is, so that default runs keep their fingerprint). batch.Run records its
// fingerprint and writes it to results.parquet's metadata.
func batchMeta(ctx context.Context, weather []string, edrParam int, maxSegNM float64, steps optimizer.StepRules) (map[string]string, error) {
	m := map[string]string{
		"version":    version,
		"max_seg_nm": strconv.FormatFloat(maxSegNM, 'g', -1, 64),
		"step_rules": fmt.Sprintf("%+v", steps),
		"caution":    optimizer.Caution,
		"weather":    "none: still air, ISA",
	}
	if len(weather) > 0 {
		m["weather"] = strconv.Itoa(len(weather)) + " file(s)"
	}
	if edrParam != 0 {
		m["edr_param"] = strconv.Itoa(edrParam)
	}
	for i, w := range weather {
		d, err := batch.FileDigest(ctx, w)
		if err != nil {
			return nil, batchError(fmt.Errorf("weather file %s: %w", w, err))
		}
		m[fmt.Sprintf("weather.%d.file", i)] = filepath.Base(w)
		m[fmt.Sprintf("weather.%d.sha256", i)] = d
	}
	return m, nil
}

type batchSummaryJSON struct {
	Planned    int          `json:"planned"`
	Failed     int          `json:"failed"`
	Infeasible int          `json:"infeasible"`
	Skipped    int          `json:"skipped"`
	BadRows    int          `json:"bad_rows"`
	ByCI       []ciLineJSON `json:"by_ci"`
}

type ciLineJSON struct {
	CI         float64 `json:"ci"`
	Flights    int     `json:"flights"`
	Failed     int     `json:"failed"`
	Infeasible int     `json:"infeasible"`
	FuelKg     float64 `json:"fuel_kg"`
	TimeMin    float64 `json:"time_min"`
	Cost       float64 `json:"cost"`
	CO2Kg      float64 `json:"co2_kg"`
	// Persistent-contrail distances, NM, over the plans that have them
	// (weather with humidity); absent otherwise.
	PersistentNM      *float64 `json:"persistent_contrail_nm,omitempty"`
	PersistentDayNM   *float64 `json:"persistent_contrail_day_nm,omitempty"`
	PersistentNightNM *float64 `json:"persistent_contrail_night_nm,omitempty"`
	// With arrival targets: the plans of flights with arrive_by at this
	// CI, and those arriving in their window.
	WithArriveBy *int `json:"with_arrive_by,omitempty"`
	OnTime       *int `json:"on_time,omitempty"`
}

func printBatchSummary(w io.Writer, format string, s batch.Summary) error {
	d := batchSummaryJSON{Planned: s.Planned, Failed: s.Failed, Infeasible: s.Infeasible, Skipped: s.Skipped, BadRows: s.BadRows, ByCI: []ciLineJSON{}}
	r := func(v float64, dec int) float64 { p := math.Pow10(dec); return math.Round(v*p) / p }
	contrails := false
	for _, b := range s.ByCI {
		line := ciLineJSON{CI: b.CI, Flights: b.Flights, Failed: b.Failed, Infeasible: b.Infeasible,
			FuelKg: r(b.Fuel, 1), TimeMin: r(b.Time, 2), Cost: r(b.Cost, 1), CO2Kg: r(b.CO2, 1)}
		if s.Targets {
			line.WithArriveBy, line.OnTime = new(b.WithTarget), new(b.OnTime)
		}
		if b.ContrailFlights > 0 {
			contrails = true
			line.PersistentNM, line.PersistentDayNM, line.PersistentNightNM = new(r(b.PersistentNM, 1)), new(r(b.DayNM, 1)), new(r(b.NightNM, 1))
		}
		d.ByCI = append(d.ByCI, line)
	}
	switch format {
	case "json":
		return writeJSON(w, d)
	case "csv":
		head := "ci,flights,failed,infeasible,fuel_kg,time_min,cost,co2_kg"
		if s.Targets {
			head += ",with_arrive_by,on_time"
		}
		fmt.Fprintln(w, head)
		for _, b := range d.ByCI {
			fmt.Fprintf(w, "%g,%d,%d,%d,%g,%g,%g,%g", b.CI, b.Flights, b.Failed, b.Infeasible, b.FuelKg, b.TimeMin, b.Cost, b.CO2Kg)
			if s.Targets {
				fmt.Fprintf(w, ",%d,%d", *b.WithArriveBy, *b.OnTime)
			}
			fmt.Fprintln(w)
		}
		return nil
	}
	fmt.Fprintf(w, "Planned %d, infeasible %d, failed %d, reused %d, bad schedule rows %d\n", d.Planned, d.Infeasible, d.Failed, d.Skipped, d.BadRows)
	if contrails {
		var nm, day, night float64
		for _, b := range d.ByCI {
			if b.PersistentNM != nil {
				nm, day, night = nm+*b.PersistentNM, day+*b.PersistentDayNM, night+*b.PersistentNightNM
			}
		}
		fmt.Fprintf(w, "Persistent contrail conditions %.0f NM (day %.0f, night %.0f) over the successful plans\n%s\n", nm, day, night, optimizer.ContrailCaution)
	}
	if s.Targets && !s.Sweep {
		on, of := 0, 0
		for _, b := range s.ByCI {
			on, of = on+b.OnTime, of+b.WithTarget
		}
		fmt.Fprintf(w, "Arrival targets: %s of the flights with arrive_by arrive in their window\n", onTimeText(on, of))
	}
	if s.Sweep { // without a sweep a per-CI table says nothing the files do not
		tw := tabwriter.NewWriter(w, 0, 0, 1, ' ', tabwriter.AlignRight)
		head := "CI\tflights\tinfeasible\tfailed\tfuel kg\ttime h:mm\tcost\tCO2 t\t"
		if s.Targets {
			head += "on time\t"
		}
		fmt.Fprintln(tw, head)
		for _, b := range d.ByCI {
			fmt.Fprintf(tw, "%g\t%d\t%d\t%d\t%.0f\t%s\t%.0f\t%.1f\t", b.CI, b.Flights, b.Infeasible, b.Failed, b.FuelKg, hmm(b.TimeMin), b.Cost, b.CO2Kg/1000)
			if s.Targets {
				fmt.Fprintf(tw, "%s\t", onTimeText(*b.OnTime, *b.WithArriveBy))
			}
			fmt.Fprintln(tw)
		}
		tw.Flush()
	}
	fmt.Fprintf(w, "\n%s\n", "Caution: "+optimizer.Caution)
	return nil
}

// onTimeText is "n/m (p %)" of the flights with arrive_by on time.
func onTimeText(on, of int) string {
	if of == 0 {
		return "-"
	}
	return fmt.Sprintf("%d/%d (%.0f %%)", on, of, 100*float64(on)/float64(of))
}

// hmm formats minutes as h:mm (rounded to the minute), the one time format
// of tables; data files keep minutes.
func hmm(min float64) string {
	if !(math.Abs(min) < 1e9) {
		return "-"
	}
	m := int64(math.Round(min))
	sign := ""
	if m < 0 {
		sign, m = "-", -m
	}
	return fmt.Sprintf("%s%d:%02d", sign, m/60, m%60)
}
