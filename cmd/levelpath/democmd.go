package main

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"levelpath/cmd/levelpath/internal/demo"
)

func newDemoCmd() *cobra.Command {
	var dir string
	c := &cobra.Command{
		Use:   "demo",
		Short: "Write an invented demo scenario and plan its long-haul flight",
		Long: `demo writes an invented scenario (routes, synthetic weather, a day's schedule)
into a directory and prints the plan of its long-haul flight, with the command
that made it. Everything in the scenario is invented.`,
		Args: cobra.NoArgs,
	}
	format := formatFlag(c, "table", "json", "csv")
	c.Flags().StringVar(&dir, "dir", "levelpath-demo", "directory for the scenario files")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if err := checkFormat(*format, "table", "json", "csv"); err != nil {
			return err
		}
		fs, err := demo.Write(dir)
		if err != nil {
			return badInputf("demo: writing %s: %w", dir, err)
		}
		f := demo.Schedule()[0]
		args := []string{"plan", "--route", fs.Route, "--aircraft", f.Aircraft, "--mass", fmt.Sprintf("%.0f", f.TOW),
			"--weather", fs.Weather, "--depart", f.Depart.Format("2006-01-02T15:04:05Z07:00"), "--ci", fmt.Sprintf("%g", f.CI), "--format", *format}
		errw := cmd.ErrOrStderr()
		fmt.Fprintf(errw, "levelpath: wrote the invented demo scenario to %s (routes, weather.grib2, schedule.csv, schedule-arrivals.csv, delay-cost.csv)\n", dir)
		fmt.Fprintf(errw, "levelpath: flight %s, made by:\n  levelpath %s\n", f.ID, shellJoin(args))
		fmt.Fprintf(errw, "levelpath: the whole day: levelpath batch --schedule %s --weather %s --out %s\n\n",
			fs.Schedule, fs.Weather, filepath.Join(dir, "out"))
		root := newRootCmd(cmd.OutOrStdout(), errw)
		root.SetArgs(args)
		return root.Execute()
	}
	return c
}

// shellJoin quotes arguments that need it.
func shellJoin(args []string) string {
	var s strings.Builder
	for i, a := range args {
		if i > 0 {
			s.WriteString(" ")
		}
		q := false
		for _, r := range a {
			if r == ' ' || r == '"' || r == '\'' || r == '$' {
				q = true
			}
		}
		if q || a == "" {
			s.WriteString("'" + a + "'")
		} else {
			s.WriteString(a)
		}
	}
	return s.String()
}
