package main

import (
	"encoding/csv"
	"fmt"
	"math"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
	"levelpath/optimizer/planjson"
	"levelpath/perf"
)

func newEnvelopeCmd() *cobra.Command {
	var (
		acName string
		mass   float64
		isaDev float64
		floor  float64
		chart  string
	)
	c := &cobra.Command{
		Use:   "envelope",
		Short: "Buffet and thrust envelope of an aircraft at a mass: ceilings, buffet Mach band, LRC and optimum level",
		Example: `  levelpath envelope --aircraft demo-widebody --mass 231000 --isa-dev 10
  levelpath envelope --aircraft my-type.yaml --mass 60000 --floor 1.4 --format json`,
		Args: cobra.NoArgs,
	}
	format := formatFlag(c, "table", "json", "csv")
	c.Flags().StringVar(&acName, "aircraft", "", "built-in aircraft name, YAML file or operator tables directory")
	c.Flags().Float64Var(&mass, "mass", 0, "gross mass, kg")
	c.Flags().Float64Var(&isaDev, "isa-dev", 0, "temperature deviation from ISA, °C")
	c.Flags().Float64Var(&floor, "floor", 1.3, "buffet protection floor, g (common practice 1.3)")
	c.Flags().StringVar(&chart, "chart", "", "also draw the envelope chart to FILE (.svg, .png or .pdf)")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if err := checkFormat(*format, "table", "json", "csv"); err != nil {
			return err
		}
		if err := checkOutputs(chart, ""); err != nil {
			return err
		}
		a, err := loadAircraft(acName)
		if err != nil {
			return err
		}
		if !cmd.Flags().Changed("mass") {
			return badInputf("--mass is required (kg, between OEW %.0f and MTOW %.0f)", a.OEW, a.MTOW)
		}
		if floor < 1 {
			return badInputf("--floor %v: the protection floor must be at least 1.0 g", floor)
		}
		if math.IsNaN(isaDev) || isaDev < -60 || isaDev > 60 {
			return badInputf("--isa-dev %v: want -60..60 °C", isaDev)
		}
		e, err := a.Envelope(mass, isaDev, floor)
		if err != nil {
			return badInput(err)
		}
		if chart != "" {
			if err := drawEnvelopeChart(chart, e); err != nil {
				return err
			}
		}
		out := cmd.OutOrStdout()
		d := planjson.FromEnvelope(e)
		switch *format {
		case "json":
			return writeJSON(out, d)
		case "csv":
			w := csv.NewWriter(out)
			w.Write([]string{"fl", "pressure_hpa", "oat_c", "sound_kt", "low_buffet_mach_1g", "high_buffet_mach_1g", "low_buffet_mach_floor", "high_buffet_mach_floor", "mmo", "vmo_mach", "band_low_mach", "band_high_mach", "band_low_limit", "band_high_limit", "lrc_mach", "residual_climb_fpm"})
			for _, r := range d.Rows {
				w.Write([]string{planjson.CSVNumber(r.FL), planjson.CSVNumber(r.PressureHPa), planjson.CSVNumber(r.OATC), planjson.CSVNumber(r.SoundKt), planjson.CSVPointer(r.LowBuffetMach1g), planjson.CSVPointer(r.HighBuffetMach1g),
					planjson.CSVPointer(r.LowBuffetMachFloor), planjson.CSVPointer(r.HighBuffetMachFloor), planjson.CSVNumber(r.MMO), planjson.CSVPointer(r.VMOMach),
					planjson.CSVPointer(r.BandLowMach), planjson.CSVPointer(r.BandHighMach), r.BandLowLimit, r.BandHighLimit, planjson.CSVPointer(r.LRCMach), planjson.CSVPointer(r.ResidualClimbFPM)})
			}
			w.Flush()
			return w.Error()
		}
		fmt.Fprintf(out, "Envelope: %s at %.0f kg, ISA%+.0f °C, buffet floor %.2f g\n", d.Aircraft, d.MassKg, d.ISADevC, d.FloorG)
		thrust := flStr(d.MaxFLThrust)
		if d.MaxFLThrustAtTableTop {
			thrust += " or above (top of the tables)"
		}
		fmt.Fprintf(out, "Maximum level: buffet FL%s, thrust FL%s, certified FL%.0f -> FL%s; optimum FL%s\n\n",
			flStr(d.MaxFLBuffet), thrust, d.MaxFLCertified, flStr(d.MaxFL), flStr(d.OptimumFL))
		tw := tabwriter.NewWriter(out, 0, 0, 1, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "FL\thPa\tOAT C\tbuffet 1g\t\tbuffet %.2fg\t\tMMO\tVMO M\tusable band\t\tLRC\tROC fpm\t\n", d.FloorG)
		beyond := false
		for _, r := range d.Rows {
			hi1, hiF := machStr(r.HighBuffetMach1g), machStr(r.HighBuffetMachFloor)
			if r.HighBuffet1gBeyondData && r.HighBuffetMach1g != nil {
				hi1, beyond = ">"+hi1, true
			}
			if r.HighBuffetFloorBeyondData && r.HighBuffetMachFloor != nil {
				hiF, beyond = ">"+hiF, true
			}
			fmt.Fprintf(tw, "%.0f\t%.1f\t%.1f\t%s\t%s\t%s\t%s\t%.3f\t%s\t%s\t%s\t%s\t%s\t\n", r.FL, r.PressureHPa, r.OATC,
				machStr(r.LowBuffetMach1g), hi1, machStr(r.LowBuffetMachFloor), hiF,
				r.MMO, machStr(r.VMOMach), bandEnd(r.BandLowMach, r.BandLowLimit), bandEnd(r.BandHighMach, r.BandHighLimit), machStr(r.LRCMach), fpmStr(r.ResidualClimbFPM))
		}
		tw.Flush()
		if beyond {
			fmt.Fprintf(out, "\n>: the buffet onset lies beyond the aircraft's buffet data (its table ends at that Mach)\n")
		}
		fmt.Fprintf(out, "Levels are rounded down to the whole FL (perf.ReportFL).\n")
		fmt.Fprintf(out, "\n%s\n", "Caution: "+optimizer.Caution)
		return nil
	}
	return c
}

func machStr(x *float64) string {
	if x == nil {
		return "-"
	}
	return fmt.Sprintf("%.3f", *x)
}

func fpmStr(x *float64) string {
	if x == nil {
		return "-"
	}
	return fmt.Sprintf("%.0f", *x)
}

func flStr(x *float64) string {
	if x == nil {
		return "---"
	}
	return fmt.Sprintf("%03.0f", perf.ReportFL(*x)) // the one rounding rule: down to the whole FL
}

// bandEnd prints one end of the usable band with the limit that sets it.
func bandEnd(m *float64, limit string) string {
	if m == nil {
		return "-"
	}
	return fmt.Sprintf("%.3f %s", *m, limit)
}
