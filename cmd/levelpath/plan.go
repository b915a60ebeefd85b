package main

import (
	"io"

	"github.com/spf13/cobra"

	"levelpath/cmd/levelpath/internal/planout"
	"levelpath/optimizer"
)

func init() { subcommands = append(subcommands, newPlanCmd, newAssessCmd) }

func writePlan(w io.Writer, format string, p *optimizer.Plan, assessed bool) error {
	switch format {
	case "json":
		return planout.WriteJSON(w, p, assessed)
	case "csv":
		return planout.WriteCSV(w, p, assessed)
	}
	return planout.WriteTable(w, p, assessed)
}

func newPlanCmd() *cobra.Command {
	var pf problemFlags
	var chartPath, reportPath string
	c := &cobra.Command{
		Use:   "plan",
		Short: "Plan the cheapest vertical profile of one flight",
		Example: `  levelpath plan --route levelpath-demo/route.geojson --aircraft demo-widebody --mass 240000 \
      --weather levelpath-demo/weather.grib2 --depart 2026-12-01T21:00:00Z --ci 40
  levelpath plan --route "51.47,-0.45 40.64,-73.78" --aircraft demo-narrowbody --zfw 58000 --fuel 19000 --format json`,
		Args: cobra.NoArgs,
	}
	format := formatFlag(c, "table", "json", "csv")
	pf.register(c)
	c.Flags().StringVar(&chartPath, "chart", "", "also draw the profile chart to FILE (.svg, .png or .pdf)")
	c.Flags().StringVar(&reportPath, "report", "", "also write a self-contained HTML flight report to FILE")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if err := checkFormat(*format, "table", "json", "csv"); err != nil {
			return err
		}
		wx, err := loadWeather(pf.weather)
		if err != nil {
			return err
		}
		pr, err := pf.problem(cmd, wx, cmd.ErrOrStderr())
		if err != nil {
			return err
		}
		pr.LegCeilings = chartPath != "" || reportPath != "" || *format != "table"
		plan, err := optimizer.Solve(pr)
		if err != nil {
			return planErr(err)
		}
		if err := writeCharts(chartPath, reportPath, plan, pr); err != nil {
			return err
		}
		return writePlan(cmd.OutOrStdout(), *format, plan, false)
	}
	return c
}

func newAssessCmd() *cobra.Command {
	var pf problemFlags
	var profile string
	var chartPath, reportPath string
	c := &cobra.Command{
		Use:   "assess",
		Short: "Price a proposed vertical profile and list the limits it breaks",
		Example: `  levelpath assess --route levelpath-demo/route.geojson --aircraft demo-widebody --mass 240000 \
      --weather levelpath-demo/weather.grib2 --profile "FL350,FL370@1250,FL390@2900"`,
		Args: cobra.NoArgs,
	}
	format := formatFlag(c, "table", "json", "csv")
	pf.register(c)
	c.Flags().StringVar(&profile, "profile", "", "profile: initial level, then LEVEL@NM where each change begins, e.g. FL350,FL370@1250")
	c.Flags().StringVar(&chartPath, "chart", "", "also draw the profile chart to FILE (.svg, .png or .pdf)")
	c.Flags().StringVar(&reportPath, "report", "", "also write a self-contained HTML flight report to FILE")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if err := checkFormat(*format, "table", "json", "csv"); err != nil {
			return err
		}
		if profile == "" {
			return badInputf("--profile is required, e.g. FL350,FL370@1250,FL390@2900")
		}
		prof, err := optimizer.ParseProfile(profile)
		if err != nil {
			return badInputf("--profile: %v", err)
		}
		wx, err := loadWeather(pf.weather)
		if err != nil {
			return err
		}
		pr, err := pf.problem(cmd, wx, cmd.ErrOrStderr())
		if err != nil {
			return err
		}
		pr.LegCeilings = true
		plan, err := optimizer.Assess(pr, prof)
		if err != nil {
			return planErr(err)
		}
		if err := writeCharts(chartPath, reportPath, plan, pr); err != nil {
			return err
		}
		return writePlan(cmd.OutOrStdout(), *format, plan, true)
	}
	return c
}
