package main

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	"levelpath/cmd/levelpath/internal/chart"
	"levelpath/optimizer"
	"levelpath/perf"
)

// checkOutputs checks the --chart and --report file names before any
// work is done: a known extension and an existing directory.
func checkOutputs(chartPath, reportPath string) error {
	for _, o := range []struct {
		flag, path string
		check      func(string) error
	}{
		{"--chart", chartPath, func(p string) error { _, err := chart.FormatOf(p); return err }},
		{"--report", reportPath, chart.CheckReportPath},
	} {
		if o.path == "" {
			continue
		}
		if err := o.check(o.path); err != nil {
			return badInputf("%s: %v", o.flag, err)
		}
		dir := filepath.Dir(o.path)
		if st, err := os.Stat(dir); err != nil || !st.IsDir() {
			return badInputf("%s %s: directory %s does not exist", o.flag, o.path, dir)
		}
	}
	return nil
}

// writeCharts draws the profile chart and the report when asked (their
// names checked by checkOutputs).
func writeCharts(chartPath, reportPath string, plan *optimizer.Plan, pr *optimizer.Problem) error {
	in := chart.ProfileFor(plan, pr)
	if chartPath != "" {
		if err := chart.WriteFile(chartPath, func(w io.Writer, format string) error { return chart.Profile(w, format, in) }); err != nil {
			return chartErr(err)
		}
	}
	if reportPath != "" {
		if err := chart.WriteReportFile(reportPath, in); err != nil {
			return chartErr(err)
		}
	}
	return nil
}

// drawEnvelopeChart draws the envelope chart (its name checked by
// checkOutputs).
func drawEnvelopeChart(path string, e perf.Envelope) error {
	return chartErr(chart.WriteFile(path, func(w io.Writer, format string) error { return chart.Envelope(w, format, e) }))
}

// chartErr maps chart errors: a file name the charts cannot write is bad
// input; anything else is internal.
func chartErr(err error) error {
	if err == nil {
		return nil
	}
	var ue chart.UnsupportedError
	var pe *fs.PathError
	if errors.As(err, &ue) || errors.As(err, &pe) {
		return badInput(err)
	}
	return err
}
