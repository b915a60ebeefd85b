package main

import (
	"errors"
	"io"
	"io/fs"

	"levelpath/cmd/levelpath/internal/chart"
	"levelpath/optimizer"
	"levelpath/perf"
)

// profileInput collects what the profile chart and report draw.
func profileInput(plan *optimizer.Plan, pr *optimizer.Problem) chart.ProfileInput {
	set := map[int]bool{}
	var levels []int
	for _, s := range pr.Track.Segments {
		for _, l := range s.Levels {
			if !set[l] && l >= 250 {
				set[l] = true
				levels = append(levels, l)
			}
		}
	}
	return chart.ProfileInput{Plan: plan, Levels: levels, Title: plan.Aircraft + " " + plan.Profile.String()}
}

// writeCharts draws the profile chart and the report when asked.
func writeCharts(chartPath, reportPath string, plan *optimizer.Plan, pr *optimizer.Problem) error {
	in := profileInput(plan, pr)
	if chartPath != "" {
		if _, err := chart.FormatOf(chartPath); err != nil {
			return badInputf("--chart: %v", err)
		}
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

// drawEnvelopeChart draws the envelope chart.
func drawEnvelopeChart(path string, e perf.Envelope) error {
	if _, err := chart.FormatOf(path); err != nil {
		return badInputf("--chart: %v", err)
	}
	return chart.WriteFile(path, func(w io.Writer, format string) error { return chart.Envelope(w, format, e) })
}

// chartErr maps chart errors: a file name the charts cannot write is bad
// input; anything else is internal.
func chartErr(err error) error {
	var ue chart.UnsupportedError
	var pe *fs.PathError
	if errors.As(err, &ue) || errors.As(err, &pe) {
		return badInput(err)
	}
	return err
}
