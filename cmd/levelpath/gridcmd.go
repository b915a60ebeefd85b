package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"

	"levelpath/optimizer/planjson"
	"levelpath/perf"
	"levelpath/winds"
)

func newGridCmd() *cobra.Command {
	c := &cobra.Command{Use: "grid", Short: "Inspect and sample GRIB weather files"}
	c.AddCommand(newGridInfoCmd(), newGridSampleCmd())
	return c
}

type gridMsgJSON struct {
	File       string   `json:"file"`
	Message    int      `json:"message"`
	Edition    int      `json:"edition"`
	Discipline int      `json:"discipline"`
	Category   int      `json:"category"`
	Number     int      `json:"number"`
	Parameter  string   `json:"parameter"`
	LevelType  int      `json:"level_type"`
	LevelHPa   *float64 `json:"level_hpa"`
	RefTime    string   `json:"ref_time"`
	ValidTime  string   `json:"valid_time"`
	Ni         int      `json:"ni"`
	Nj         int      `json:"nj"`
	Lat1       float64  `json:"lat1"`
	Lon1       float64  `json:"lon1"`
	Lat2       float64  `json:"lat2"`
	Lon2       float64  `json:"lon2"`
	Grid       int      `json:"grid"`
	Packing    int      `json:"packing"`
	Ensemble   int      `json:"ensemble"`
	Kept       bool     `json:"kept"`
}

func newGridInfoCmd() *cobra.Command {
	c := &cobra.Command{
		Use:     "info FILE...",
		Short:   "List the messages of GRIB files: parameter, level, times, grid, packing",
		Example: "  levelpath grid info levelpath-demo/weather.grib2 --format json",
		Args:    cobra.MinimumNArgs(1),
	}
	format := formatFlag(c, "table", "json")
	c.RunE = func(cmd *cobra.Command, args []string) error {
		if err := checkFormat(*format, "table", "json"); err != nil {
			return err
		}
		var all []gridMsgJSON
		// Warnings (zero padding skipped) go to stderr; a directory,
		// device or FIFO is refused before it is opened.
		opts := winds.Options{Warn: func(w winds.Warning) { warnf(cmd.ErrOrStderr(), "%s", w) }}
		for _, path := range args {
			msgs, err := opts.ScanFile(path)
			if err != nil {
				return badInput(err)
			}
			for _, m := range msgs {
				j := gridMsgJSON{File: path, Message: m.Index, Edition: m.Edition, Discipline: m.Discipline, Category: m.Category,
					Number: m.Number, Parameter: string(m.Param), LevelType: m.LevelType, RefTime: m.RefTime.UTC().Format(time.RFC3339),
					ValidTime: validTime(m.ValidTime), Ni: m.Ni, Nj: m.Nj, Lat1: m.Lat1, Lon1: m.Lon1, Lat2: m.Lat2,
					Lon2: m.Lon2, Grid: m.Grid, Packing: m.Packing, Ensemble: m.Ensemble, Kept: m.Param != "other"}
				if m.LevelType == 100 {
					j.LevelHPa = planjson.Number(m.Level / 100)
				}
				all = append(all, j)
			}
		}
		out := cmd.OutOrStdout()
		if *format == "json" {
			if all == nil {
				all = []gridMsgJSON{}
			}
			return writeJSON(out, all)
		}
		tw := tabwriter.NewWriter(out, 0, 0, 1, ' ', 0)
		fmt.Fprintln(tw, "file\tmsg\ted\tparam\t(d.c.n)\tlevel hPa\tref time\tvalid time\tgrid\tni x nj\tarea\tpacking\t")
		for _, m := range all {
			lv := "-"
			if m.LevelHPa != nil {
				lv = strconv.FormatFloat(*m.LevelHPa, 'f', -1, 64)
			}
			name := m.Parameter
			if !m.Kept {
				name += " (skipped)"
			}
			fmt.Fprintf(tw, "%s\t%d\t%d\t%s\t%d.%d.%d\t%s\t%s\t%s\t%d\t%dx%d\t%g,%g..%g,%g\t%d\t\n", m.File, m.Message, m.Edition, name,
				m.Discipline, m.Category, m.Number, lv, m.RefTime, m.ValidTime, m.Grid, m.Ni, m.Nj, m.Lat1, m.Lon1, m.Lat2, m.Lon2, m.Packing)
		}
		return tw.Flush()
	}
	return c
}

// validTime formats a message's valid time, "-" when its product template
// gives none.
func validTime(t time.Time) string {
	if t.IsZero() {
		return "-"
	}
	return t.UTC().Format(time.RFC3339)
}

type sampleJSON struct {
	Lat  float64  `json:"lat"`
	Lon  float64  `json:"lon"`
	HPa  float64  `json:"hpa"`
	Time string   `json:"time"`
	U    *float64 `json:"u_ms"`
	V    *float64 `json:"v_ms"`
	T    *float64 `json:"t_k"`
	EDR  *float64 `json:"edr"`
	// Humidity, present only when the weather holds it (see winds.Sample).
	RHWater *float64 `json:"rh_water_pct,omitempty"`
	RHIce   *float64 `json:"rh_ice_pct,omitempty"`
	Q       *float64 `json:"q_kgkg,omitempty"`
	RHFrom  string   `json:"rh_from,omitempty"`
}

func newGridSampleCmd() *cobra.Command {
	var at, tm string
	var hpa, fl float64
	var wxo weatherOpts
	c := &cobra.Command{
		Use:     "sample FILE...",
		Short:   "Sample wind, temperature, EDR and humidity at a point, pressure (or flight level) and time",
		Example: "  levelpath grid sample levelpath-demo/weather.grib2 --at 52.0,-20.0 --fl 350 --time 2026-12-01T23:00:00Z",
		Args:    cobra.MinimumNArgs(1),
	}
	format := formatFlag(c, "table", "json")
	c.Flags().StringVar(&at, "at", "", "point LAT,LON in degrees")
	weatherFlags(c, &wxo)
	c.Flags().Float64Var(&hpa, "hpa", 0, "pressure level, hPa")
	c.Flags().Float64Var(&fl, "fl", 0, "flight level (converted with the ICAO standard atmosphere)")
	c.Flags().StringVar(&tm, "time", "", "valid time, RFC3339 (default: the first valid time)")
	c.RunE = func(cmd *cobra.Command, args []string) error {
		if err := checkFormat(*format, "table", "json"); err != nil {
			return err
		}
		la, lo, ok := strings.Cut(at, ",")
		lat, err1 := strconv.ParseFloat(strings.TrimSpace(la), 64)
		lon, err2 := strconv.ParseFloat(strings.TrimSpace(lo), 64)
		if !ok || err1 != nil || err2 != nil || math.Abs(lat) > 90 || math.Abs(lon) > 360 {
			return badInputf("--at %q: want LAT,LON in degrees, such as 52.0,-20.0", at)
		}
		hs, fs := cmd.Flags().Changed("hpa"), cmd.Flags().Changed("fl")
		var p float64
		switch {
		case hs == fs:
			return badInputf("give exactly one of --hpa and --fl")
		case hs:
			if !(hpa > 0 && hpa <= 1100) {
				return badInputf("--hpa %v: want 0..1100", hpa)
			}
			p = hpa * 100
		default:
			if !(fl >= 0 && fl <= 1000) {
				return badInputf("--fl %v: want 0..1000", fl)
			}
			p = perf.FLToPressure(fl)
		}
		field, err := openWeather(args, 0, math.Inf(1), wxo) // every level, not only the cruise band
		if err != nil {
			return err
		}
		for _, w := range field.Warnings() {
			warnf(cmd.ErrOrStderr(), "%s", w)
		}
		t := field.Times()[0]
		if tm != "" {
			if t, err = time.Parse(time.RFC3339, tm); err != nil {
				return badInputf("--time %q: want RFC3339", tm)
			}
		}
		s, err := field.Sample(lat, lon, p, t)
		if err != nil {
			return badInput(err)
		}
		d := sampleJSON{Lat: lat, Lon: lon, HPa: p / 100, Time: t.UTC().Format(time.RFC3339), U: planjson.Number(s.U), V: planjson.Number(s.V), T: planjson.Number(s.T), EDR: planjson.Number(s.EDR),
			RHWater: planjson.Number(s.RH), RHIce: planjson.Number(s.RHi), Q: planjson.Number(s.Q)}
		if d.RHWater != nil || d.RHIce != nil {
			d.RHFrom = humiditySource(field)
		}
		out := cmd.OutOrStdout()
		if *format == "json" {
			return writeJSON(out, d)
		}
		show := func(x *float64, unit string) string {
			if x == nil {
				return "n/a"
			}
			return fmt.Sprintf("%.2f %s", *x, unit)
		}
		fmt.Fprintf(out, "%.4f, %.4f at %.1f hPa, %s\n  u %s\n  v %s\n  T %s\n  EDR %s\n", lat, lon, d.HPa, d.Time,
			show(d.U, "m/s"), show(d.V, "m/s"), show(d.T, "K"), show(d.EDR, "m^(2/3)/s"))
		if d.RHWater != nil || d.RHIce != nil {
			fmt.Fprintf(out, "  RH %s over water, %s over ice (%s)\n", show(d.RHWater, "%"), show(d.RHIce, "%"), d.RHFrom)
		}
		if d.Q != nil {
			fmt.Fprintf(out, "  q %.3g kg/kg\n", *d.Q)
		}
		return nil
	}
	return c
}

// humiditySource says where a sample's relative humidity comes from.
func humiditySource(f *winds.Field) string {
	if f.Has(winds.ParamRH) {
		return "the weather's relative humidity, " + f.RHReference().String()
	}
	return "from specific humidity"
}
