package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
	"levelpath/optimizer/planjson"
)

func writePlan(w io.Writer, format string, p *optimizer.Plan, assessed, brief bool) error {
	switch format {
	case "json":
		return planjson.WriteJSON(w, p, assessed)
	case "csv":
		return planjson.WriteCSV(w, p, assessed)
	}
	return planjson.WriteTableBrief(w, p, assessed, brief)
}

// planFlags are the flags of plan and assess beyond the problem's.
type planFlags struct {
	problemFlags
	chart, report, profile string
	format                 *string
	alternatives           int
	brief                  bool
	fuelPlan               fuelPlanFlags
	inFlight               inFlightFlags
	arrival                arrivalFlags
}

func (f *planFlags) register(c *cobra.Command) {
	f.format = formatFlag(c, "table", "json", "csv")
	f.problemFlags.register(c)
	c.Flags().StringVar(&f.chart, "chart", "", "also draw the profile chart to FILE (.svg, .png or .pdf)")
	c.Flags().StringVar(&f.report, "report", "", "also write a self-contained HTML flight report to FILE (.html)")
	c.Flags().BoolVar(&f.brief, "brief", false, "table: one screen, without the waypoint and leg tables")
}

// run builds the problem, prices it with price and writes the outputs.
func (f *planFlags) run(cmd *cobra.Command, assessed bool, price func(*optimizer.Problem) (*optimizer.Plan, error)) error {
	if err := checkFormat(*f.format, "table", "json", "csv"); err != nil {
		return err
	}
	if err := checkOutputs(f.chart, f.report); err != nil {
		return err
	}
	wx, err := loadWeather(f.weather, f.wx)
	if err != nil {
		return err
	}
	f.massAndZFW = !assessed && inFlightAsked(cmd)
	pr, err := f.problem(cmd, wx, cmd.ErrOrStderr())
	if err != nil {
		return err
	}
	pr.LegCeilings = assessed || f.chart != "" || f.report != "" || *f.format != "table"
	if fp := &f.fuelPlan; fp.active(cmd) {
		req, err := fp.request(cmd, &f.problemFlags, pr)
		if err != nil {
			return err
		}
		price = func(q *optimizer.Problem) (*optimizer.Plan, error) {
			r := req
			r.Problem = q // the problem priced: an arrival search varies its CI
			return optimizer.PlanFuel(r)
		}
	}
	if !assessed && inFlightAsked(cmd) {
		if price, err = f.inFlight.pricer(cmd, &f.problemFlags, &f.fuelPlan, pr); err != nil {
			return err
		}
	}
	if f.arrival.active() {
		if price, err = f.arrival.pricer(cmd, pr, price); err != nil {
			return err
		}
	}
	plan, err := price(pr)
	if err != nil {
		return planErr(err)
	}
	plan.Warnings = append(plan.Warnings, pr.Track.Warnings...) // e.g. the polar level-rule fallback
	if err := writeCharts(f.chart, f.report, plan, pr); err != nil {
		return err
	}
	if err := writePlan(cmd.OutOrStdout(), *f.format, plan, assessed, f.brief); err != nil {
		return err
	}
	// A plan whose loading makes the flight impossible (trip fuel over the
	// tanks or the fuel on board, landing under OEW or over MLW) fails
	// with exit code 2 after its output is written; assess only lists.
	if !assessed {
		if err := plan.LoadingFailure(); err != nil {
			return badInput(err)
		}
		// So does one whose arrival window cannot be met.
		if err := plan.ArrivalFailure(); err != nil {
			return badInput(err)
		}
	}
	return nil
}

func newPlanCmd() *cobra.Command {
	var f planFlags
	c := &cobra.Command{
		Use:   "plan",
		Short: "Plan the cheapest vertical profile of one flight",
		Long: "Plan the cheapest vertical profile of one flight.\n\n" +
			"With --zfw alone (no --mass, no --fuel) plan makes the dispatch fuel plan: block fuel = taxi + trip +\n" +
			"contingency + alternate + final reserve + additional + extra (ICAO Annex 6 Part I 4.3.6.3), and the\n" +
			"take-off mass solved to a fixed point. --policy FILE is YAML with these keys (defaults shown):\n\n  " +
			strings.Join(optimizer.PolicyKeys(), "\n  ") + "\n\n" +
			"With --from-nm or --from-waypoint, --fl, --mass and --time it re-plans the rest of the route in flight.",
		Example: `  levelpath plan --route levelpath-demo/route.geojson --aircraft demo-widebody --mass 245000 \
      --weather levelpath-demo/weather.grib2 --depart 2026-12-01T20:00:00Z --ci 40
  levelpath plan --route levelpath-demo/route-sunhaven.geojson --aircraft demo-narrowbody --zfw 58000 --fuel 12000 --format json
  levelpath plan --route levelpath-demo/route.geojson --aircraft demo-widebody --zfw 170000 \
      --weather levelpath-demo/weather.grib2 --depart 2026-12-01T20:00:00Z --ci 40 --alternate "25.3,55.8 24.4,54.6"`,
		Args: cobra.NoArgs,
	}
	f.register(c)
	f.fuelPlan.register(c, &f.problemFlags)
	f.inFlight.register(c)
	f.arrival.register(c)
	c.Flags().IntVar(&f.alternatives, "alternatives", 0, "also list the K next-cheapest distinct profiles (levels or step points differ), each priced exactly")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if f.alternatives < 0 || f.alternatives > 20 {
			return badInputf("--alternatives %d: want 0..20", f.alternatives)
		}
		if f.alternatives > 0 && f.arrival.active() {
			return badInputf("--alternatives with --arrive-by or --delay-cost is not supported")
		}
		return f.run(cmd, false, func(p *optimizer.Problem) (*optimizer.Plan, error) {
			plan, err := optimizer.Solve(p)
			if err != nil || f.alternatives == 0 {
				return plan, err
			}
			plan.Alternatives, err = optimizer.Alternatives(p, plan, f.alternatives)
			if err == nil && len(plan.Alternatives) < f.alternatives {
				plan.Warnings = append(plan.Warnings, fmt.Sprintf("%d alternative profile(s) found of the %d asked for", len(plan.Alternatives), f.alternatives))
			}
			return plan, err
		})
	}
	return c
}

func newAssessCmd() *cobra.Command {
	var f planFlags
	c := &cobra.Command{
		Use:   "assess",
		Short: "Price a proposed vertical profile and list the limits it breaks",
		Example: `  levelpath assess --route levelpath-demo/route.geojson --aircraft demo-widebody --mass 245000 \
      --weather levelpath-demo/weather.grib2 --profile "FL350,FL370@1250,FL390@2900"`,
		Args: cobra.NoArgs,
	}
	f.register(c)
	c.Flags().StringVar(&f.profile, "profile", "", "profile: initial level, then LEVEL@NM where each change begins, e.g. FL350,FL370@1250")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if f.profile == "" {
			return badInputf("--profile is required, e.g. FL350,FL370@1250,FL390@2900")
		}
		prof, err := optimizer.ParseProfile(f.profile)
		if err != nil {
			return badInputf("--profile: %v", err)
		}
		return f.run(cmd, true, func(p *optimizer.Problem) (*optimizer.Plan, error) { return optimizer.Assess(p, prof) })
	}
	return c
}
