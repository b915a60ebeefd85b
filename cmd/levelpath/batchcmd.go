package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strings"
	"sync"
	"syscall"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"
	"golang.org/x/term"

	"levelpath/cmd/levelpath/internal/batch"
	"levelpath/cmd/levelpath/internal/chart"
	"levelpath/cmd/levelpath/internal/planout"
	"levelpath/optimizer"
	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
)

func init() { subcommands = append(subcommands, newBatchCmd) }

const exitSomeFailed = 3

// planner plans schedule rows with one shared weather field and caches
// aircraft models and segmented routes (both read-only once built).
type planner struct {
	wx       *winds.Field
	maxSegNM float64
	steps    optimizer.StepRules
	mu       sync.Mutex
	aircraft map[string]*perf.Aircraft
	tracks   map[string]*route.Track
}

func (p *planner) aircraftFor(name string) (*perf.Aircraft, error) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if a, ok := p.aircraft[name]; ok {
		return a, nil
	}
	a, err := perf.Load(name)
	if err != nil {
		return nil, err
	}
	p.aircraft[name] = a
	return a, nil
}

func (p *planner) trackFor(path, levels string, dep time.Time) (*route.Track, error) {
	key := path + "\x00" + levels + "\x00" + dep.UTC().Format("2006-01-02")
	p.mu.Lock()
	if t, ok := p.tracks[key]; ok {
		p.mu.Unlock()
		return t, nil
	}
	p.mu.Unlock()
	t, err := buildTrack(path, levels, p.maxSegNM, "", dep, io.Discard)
	if err != nil {
		return nil, err
	}
	p.mu.Lock()
	p.tracks[key] = t
	p.mu.Unlock()
	return t, nil
}

// plan is the batch.Planner.
func (p *planner) plan(ctx context.Context, row batch.Row, ci float64) (batch.Result, error) {
	var res batch.Result
	if err := ctx.Err(); err != nil {
		return res, err
	}
	a, err := p.aircraftFor(row.Aircraft)
	if err != nil {
		return res, err
	}
	tr, err := p.trackFor(row.Route, row.Levels, row.Departure)
	if err != nil {
		return res, err
	}
	pr := &optimizer.Problem{Track: tr, Aircraft: a, Weather: p.wx, Depart: row.Departure, CI: ci, Floor: row.Floor, Steps: p.steps}
	// ReadSchedule sets TOW (from zfw_kg + fuel_kg where tow_kg is empty);
	// with zfw_kg and fuel_kg, check them as the plan command does and let
	// the plan flag a trip that burns more than the fuel on board.
	if row.ZFW > 0 && row.Fuel > 0 {
		if row.ZFW > a.MZFW {
			return res, fmt.Errorf("zfw_kg %.0f is over MZFW %.0f kg of %s", row.ZFW, a.MZFW, a.Name)
		}
		if row.Fuel > a.FuelCapacity {
			return res, fmt.Errorf("fuel_kg %.0f is over the fuel capacity %.0f kg of %s", row.Fuel, a.FuelCapacity, a.Name)
		}
		pr.ZFW = row.ZFW
	}
	if !(row.TOW > 0) {
		return res, fmt.Errorf("no take-off mass: give tow_kg, or zfw_kg and fuel_kg")
	}
	pr.TakeoffMass = row.TOW
	if row.Speed != "" {
		sp, err := optimizer.ParseSpeed(row.Speed)
		if err != nil {
			return res, err
		}
		pr.Speed = sp
	}
	plan, err := optimizer.Solve(pr)
	if err != nil {
		return res, err
	}
	var buf strings.Builder
	if err := planout.WriteJSON(&buf, plan, false); err != nil {
		return res, err
	}
	res = batch.Result{Fuel: plan.Totals.Fuel, Time: plan.Totals.Time / 60, Cost: plan.Totals.Cost, CO2: plan.Totals.CO2,
		InitialFL: plan.Profile.Initial, Steps: len(plan.Steps), MinMargin: plan.MinMargin(), BaselineSavingPct: math.NaN(),
		LandingMass: plan.Totals.LandingMass, Profile: plan.Profile.String(),
		PlanJSON: []byte(buf.String())}
	if plan.Baseline != nil {
		res.BaselineSavingPct = plan.Baseline.SavingPct
	}
	return res, nil
}

func newBatchCmd() *cobra.Command {
	var (
		schedule, out, sweep, shard, chartPath string
		weather                                []string
		workers, shardCount                    int
		budgetMiB                              int64
		resume                                 bool
		maxSegNM                               float64
		maxStepFt, maxSteps                    int
		minStepNM                              float64
		stepDescents, noSteps                  bool
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
	fl.StringVar(&schedule, "schedule", "", "schedule CSV: flight,departure,route,aircraft,tow_kg,ci (+ zfw_kg,fuel_kg,floor_g,levels,speed)")
	fl.StringArrayVar(&weather, "weather", nil, "GRIB2/GRIB1 weather file (repeatable), decoded once and shared")
	fl.StringVar(&out, "out", "", "output directory")
	weatherBudgetFlag(c, &budgetMiB)
	fl.IntVar(&workers, "workers", 0, "parallel planners (default: one per CPU)")
	fl.StringVar(&sweep, "ci-sweep", "", "plan every flight at each cost index, e.g. 0,20,50,100")
	fl.StringVar(&shard, "shard", "", "plan only shard K/N of the flights (0-based K); also read from JOB_COMPLETION_INDEX with --shard-count, or SLURM_ARRAY_TASK_ID/SLURM_ARRAY_TASK_COUNT")
	fl.IntVar(&shardCount, "shard-count", 0, "number of shards for a Kubernetes Indexed Job (with JOB_COMPLETION_INDEX)")
	fl.BoolVar(&resume, "resume", false, "continue a stopped run in --out, planning only what is missing")
	fl.Float64Var(&maxSegNM, "max-seg-nm", 50, "longest route segment, NM")
	fl.StringVar(&chartPath, "chart", "", "with --ci-sweep: draw total fuel against total time per CI to FILE (.svg, .png, .pdf)")
	fl.IntVar(&maxStepFt, "max-step-ft", 4000, "step rule for every flight: largest level change of one step, ft")
	fl.BoolVar(&stepDescents, "step-descents", false, "step rule for every flight: allow step descents in cruise")
	fl.Float64Var(&minStepNM, "min-step-nm", 100, "step rule for every flight: least distance between steps, NM (0: none)")
	fl.IntVar(&maxSteps, "max-steps", 0, "step rule for every flight: most steps (0: no limit)")
	fl.BoolVar(&noSteps, "no-steps", false, "step rule for every flight: one constant level")
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
		if chartPath != "" {
			if opt.Sweep == nil {
				return badInputf("--chart needs --ci-sweep")
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
			opt.Shard, opt.Shards = k, n
		default:
			k, n, ok, err := batch.ShardFromEnv(os.Getenv, shardCount)
			if err != nil {
				return badInput(err)
			}
			if ok {
				opt.Shard, opt.Shards = k, n
			}
		}
		rows, bad, err := batch.ReadSchedule(schedule)
		if err != nil {
			return badInput(err)
		}
		wx, err := loadWeather(weather, budgetMiB)
		if err != nil {
			return err
		}
		steps, err := stepRules(maxStepFt, stepDescents, minStepNM, maxSteps, noSteps)
		if err != nil {
			return err
		}
		pl := &planner{wx: wx, maxSegNM: maxSegNM, steps: steps, aircraft: map[string]*perf.Aircraft{}, tracks: map[string]*route.Track{}}
		ctx, stop := signal.NotifyContext(cmd.Context(), os.Interrupt, syscall.SIGTERM)
		defer stop()
		start := time.Now()
		sum, err := batch.Run(ctx, rows, bad, pl.plan, opt)
		if el := time.Since(start); err == nil && sum.Planned > sum.Skipped {
			n := sum.Planned - sum.Skipped
			fmt.Fprintf(cmd.ErrOrStderr(), "levelpath: %d plans in %.1f s (%.1f plans/s), peak memory %.0f MiB\n",
				n, el.Seconds(), float64(n)/el.Seconds(), float64(peakRSS())/(1<<20))
		}
		if err != nil {
			if errors.Is(err, batch.ErrStopped) {
				return &exitError{code: exitInternal, msg: err.Error() + "; rerun with --resume to finish"}
			}
			return badInput(err)
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
		if sum.Failed > 0 || sum.BadRows > 0 {
			return &exitError{code: exitSomeFailed, msg: fmt.Sprintf("%d plan(s) failed and %d schedule row(s) were bad: see %s/errors.csv", sum.Failed, sum.BadRows, out)}
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
			return badInput(err)
		}
		return printBatchSummary(cmd.OutOrStdout(), *format, sum)
	}
	return c
}

type batchSummaryJSON struct {
	Planned int          `json:"planned"`
	Failed  int          `json:"failed"`
	Skipped int          `json:"skipped"`
	BadRows int          `json:"bad_rows"`
	ByCI    []ciLineJSON `json:"by_ci"`
}

type ciLineJSON struct {
	CI      float64 `json:"ci"`
	Flights int     `json:"flights"`
	Failed  int     `json:"failed"`
	FuelKg  float64 `json:"fuel_kg"`
	TimeMin float64 `json:"time_min"`
	Cost    float64 `json:"cost"`
	CO2Kg   float64 `json:"co2_kg"`
}

func printBatchSummary(w io.Writer, format string, s batch.Summary) error {
	d := batchSummaryJSON{Planned: s.Planned, Failed: s.Failed, Skipped: s.Skipped, BadRows: s.BadRows, ByCI: []ciLineJSON{}}
	for _, b := range s.ByCI {
		d.ByCI = append(d.ByCI, ciLineJSON{CI: b.CI, Flights: b.Flights, Failed: b.Failed, FuelKg: b.Fuel, TimeMin: b.Time, Cost: b.Cost, CO2Kg: b.CO2})
	}
	switch format {
	case "json":
		return writeJSON(w, d)
	case "csv":
		fmt.Fprintln(w, "ci,flights,failed,fuel_kg,time_min,cost,co2_kg")
		for _, b := range d.ByCI {
			fmt.Fprintf(w, "%g,%d,%d,%g,%g,%g,%g\n", b.CI, b.Flights, b.Failed, b.FuelKg, b.TimeMin, b.Cost, b.CO2Kg)
		}
		return nil
	}
	fmt.Fprintf(w, "Planned %d, failed %d, reused %d, bad schedule rows %d\n", d.Planned, d.Failed, d.Skipped, d.BadRows)
	tw := tabwriter.NewWriter(w, 0, 0, 1, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "CI\tflights\tfailed\tfuel kg\ttime h\tcost\tCO2 t\t")
	for _, b := range d.ByCI {
		fmt.Fprintf(tw, "%g\t%d\t%d\t%.0f\t%.1f\t%.0f\t%.1f\t\n", b.CI, b.Flights, b.Failed, b.FuelKg, b.TimeMin/60, b.Cost, b.CO2Kg/1000)
	}
	tw.Flush()
	fmt.Fprintf(w, "\n%s\n", "Caution: "+optimizer.Caution)
	return nil
}
