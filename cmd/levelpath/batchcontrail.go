package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"maps"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"levelpath/cmd/levelpath/internal/chart"
	"levelpath/optimizer"
	"levelpath/optimizer/batch"
)

// co2PerKgFuel is the CO2 emitted per kg of jet fuel burnt, 3.16 kg (ICAO
// Carbon Emissions Calculator Methodology, the factor ICAO applies to
// every flight; from memory: version 11, 2018), as optimizer.Totals.CO2.
const co2PerKgFuel = 3.16

// parseContrailSweep reads "0,5,20,100": finite contrail costs in kg/NM,
// 0 or more, each once, in the order given.
func parseContrailSweep(s string) ([]float64, error) {
	var out []float64
	for i, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		v, err := strconv.ParseFloat(item, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			return nil, badInputf("--contrail-sweep %q: item %d %q: want a finite contrail cost in kg/NM, 0 or more", s, i+1, item)
		}
		v += 0 // -0 is 0
		if slices.Contains(out, v) {
			return nil, badInputf("--contrail-sweep %q: %q appears twice", s, item)
		}
		out = append(out, v)
	}
	return out, nil
}

// contrailLine is one contrail cost of a sweep: totals over the
// successful plans (every flight at every cost index of the schedule).
type contrailLine struct {
	CostPerNM    float64  `json:"contrail_cost_kg_per_nm"`
	Dir          string   `json:"dir"`
	Flights      int      `json:"flights"`
	Failed       int      `json:"failed"`
	Infeasible   int      `json:"infeasible"`
	FuelKg       float64  `json:"fuel_kg"`
	CO2Kg        float64  `json:"co2_kg"`
	PersistentNM float64  `json:"persistent_contrail_nm"`
	DayNM        float64  `json:"persistent_contrail_day_nm"`
	NightNM      float64  `json:"persistent_contrail_night_nm"`
	ChangedPct   *float64 `json:"flights_changed_pct"`     // profiles unlike the reference's
	ExtraFuelPct *float64 `json:"extra_fuel_pct"`          // against the reference
	AvoidedPct   *float64 `json:"contrail_nm_avoided_pct"` // against the reference
}

// runContrailSweep plans the schedule once per contrail cost, each run in
// out/contrail-COST (resumable like any run), and returns a line per cost.
// The reference of the changed share, extra fuel and avoided distance is
// the lowest cost of the sweep. plan makes the planner of one cost.
func runContrailSweep(ctx context.Context, rows []batch.Row, bad []batch.RowError, costs []float64, opt batch.Options,
	plan func(cost float64) batch.Planner) ([]contrailLine, bool, error) {
	var lines []contrailLine
	profiles := make([]map[string]string, len(costs))
	failed := false
	for i, c := range costs {
		o := opt
		o.Out = filepath.Join(opt.Out, "contrail-"+strconv.FormatFloat(c, 'f', -1, 64))
		o.Meta = maps.Clone(opt.Meta)
		o.Meta["contrail_cost"] = strconv.FormatFloat(c, 'g', -1, 64)
		sum, err := batch.Run(ctx, rows, bad, plan(c), o)
		if err != nil {
			return nil, false, err
		}
		l := contrailLine{CostPerNM: c, Dir: o.Out, Failed: sum.Failed, Infeasible: sum.Infeasible}
		for _, b := range sum.ByCI {
			l.Flights += b.Flights
			l.FuelKg += b.Fuel
			l.PersistentNM += b.PersistentNM
			l.DayNM += b.DayNM
			l.NightNM += b.NightNM
		}
		l.CO2Kg = co2PerKgFuel * l.FuelKg
		failed = failed || sum.Failed > 0 || sum.Infeasible > 0 || sum.BadRows > 0
		if profiles[i], err = readProfiles(filepath.Join(o.Out, batch.ResultsCSV)); err != nil {
			return nil, false, err
		}
		lines = append(lines, l)
	}
	ref := 0
	for i, c := range costs {
		if c < costs[ref] {
			ref = i
		}
	}
	for i := range lines {
		l, r := &lines[i], lines[ref]
		same, both := 0, 0
		for k, p := range profiles[i] {
			if q, ok := profiles[ref][k]; ok {
				both++
				if p == q {
					same++
				}
			}
		}
		if both > 0 {
			l.ChangedPct = new(100 * float64(both-same) / float64(both))
		}
		if r.FuelKg > 0 {
			l.ExtraFuelPct = new(100 * (l.FuelKg - r.FuelKg) / r.FuelKg)
		}
		if r.PersistentNM > 0 {
			l.AvoidedPct = new(100 * (r.PersistentNM - l.PersistentNM) / r.PersistentNM)
		}
	}
	return lines, failed, nil
}

// readProfiles maps "flight|ci" to the profile of each successful plan
// (status ok or warning) of a run's results.csv.
func readProfiles(path string) (map[string]string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil || len(recs) == 0 {
		return nil, fmt.Errorf("%s: %v", path, err)
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for _, h := range []string{"flight", "ci", "status", "profile"} {
		if _, ok := col[h]; !ok {
			return nil, fmt.Errorf("%s: no %s column", path, h)
		}
	}
	out := map[string]string{}
	for _, r := range recs[1:] {
		if s := r[col["status"]]; s == "ok" || s == "warning" {
			out[r[col["flight"]]+"|"+r[col["ci"]]] = r[col["profile"]]
		}
	}
	return out, nil
}

// printContrailSweep writes the sweep's lines as a table, JSON or CSV,
// with both cautions.
func printContrailSweep(w io.Writer, format string, lines []contrailLine) error {
	pct := func(p *float64) string {
		if p == nil {
			return "-"
		}
		return fmt.Sprintf("%.2f", *p)
	}
	csvPct := func(p *float64) string {
		if p == nil {
			return ""
		}
		return strconv.FormatFloat(*p, 'f', 3, 64)
	}
	switch format {
	case "json":
		return writeJSON(w, struct {
			Caution         string         `json:"caution"`
			ContrailCaution string         `json:"contrail_caution"`
			Sweep           []contrailLine `json:"contrail_sweep"`
		}{optimizer.Caution, optimizer.ContrailCaution, lines})
	case "csv":
		cw := csv.NewWriter(w)
		cw.Write([]string{"contrail_cost_kg_per_nm", "flights", "failed", "infeasible", "fuel_kg", "co2_kg", "persistent_contrail_nm", "persistent_contrail_day_nm", "persistent_contrail_night_nm", "flights_changed_pct", "extra_fuel_pct", "contrail_nm_avoided_pct", "caution"})
		for _, l := range lines {
			cw.Write([]string{strconv.FormatFloat(l.CostPerNM, 'f', -1, 64), strconv.Itoa(l.Flights), strconv.Itoa(l.Failed), strconv.Itoa(l.Infeasible),
				strconv.FormatFloat(l.FuelKg, 'f', 1, 64), strconv.FormatFloat(l.CO2Kg, 'f', 1, 64), strconv.FormatFloat(l.PersistentNM, 'f', 1, 64),
				strconv.FormatFloat(l.DayNM, 'f', 1, 64), strconv.FormatFloat(l.NightNM, 'f', 1, 64), csvPct(l.ChangedPct), csvPct(l.ExtraFuelPct), csvPct(l.AvoidedPct),
				optimizer.Caution + " " + optimizer.ContrailCaution})
		}
		cw.Flush()
		return cw.Error()
	}
	fmt.Fprintln(w, "Contrail cost sweep (reference: the lowest cost; CO2 = 3.16 x fuel, ICAO)")
	tw := tabwriter.NewWriter(w, 0, 0, 1, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "kg/NM\tflights\tinfeasible\tfailed\tfuel kg\tCO2 t\tpersistent NM\tday NM\tnight NM\tchanged %\textra fuel %\tNM avoided %\t")
	for _, l := range lines {
		fmt.Fprintf(tw, "%g\t%d\t%d\t%d\t%.0f\t%.1f\t%.0f\t%.0f\t%.0f\t%s\t%s\t%s\t\n", l.CostPerNM, l.Flights, l.Infeasible, l.Failed, l.FuelKg, l.CO2Kg/1000,
			l.PersistentNM, l.DayNM, l.NightNM, pct(l.ChangedPct), pct(l.ExtraFuelPct), pct(l.AvoidedPct))
	}
	tw.Flush()
	fmt.Fprintf(w, "\n%s\nCaution: %s\n", optimizer.ContrailCaution, optimizer.Caution)
	return nil
}

// contrailChart draws the sweep's trade-off (extra fuel against contrail
// distance avoided); lines without a reference value are left out.
func contrailChart(path string, lines []contrailLine) error {
	var pts []chart.TradeoffPoint
	for _, l := range lines {
		if l.ExtraFuelPct != nil && l.AvoidedPct != nil {
			pts = append(pts, chart.TradeoffPoint{CostPerNM: l.CostPerNM, ExtraFuelPct: *l.ExtraFuelPct, AvoidedPct: *l.AvoidedPct})
		}
	}
	if len(pts) == 0 {
		return badInputf("--chart %s: the sweep's reference plans have no persistent contrail distance to avoid", path)
	}
	return chart.WriteFile(path, func(w io.Writer, f string) error { return chart.Tradeoff(w, f, pts, optimizer.ContrailCaution) })
}

// writeContrailSweepFile writes the sweep's CSV beside its runs.
func writeContrailSweepFile(path string, lines []contrailLine) error {
	return batch.WriteFileAtomic(path, func(w io.Writer) error { return printContrailSweep(w, "csv", lines) })
}
