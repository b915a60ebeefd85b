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

func init() { subcommands = append(subcommands, newEnvelopeCmd) }

type envelopeRowJSON struct {
	FL                  float64  `json:"fl"`
	PressureHPa         float64  `json:"pressure_hpa"`
	OATC                float64  `json:"oat_c"`
	SoundKt             float64  `json:"sound_kt"`
	LowBuffetMach1g     *float64 `json:"low_buffet_mach_1g"`
	HighBuffetMach1g    *float64 `json:"high_buffet_mach_1g"`
	LowBuffetMachFloor  *float64 `json:"low_buffet_mach_floor"`
	HighBuffetMachFloor *float64 `json:"high_buffet_mach_floor"`
	MMO                 float64  `json:"mmo"`
	LRCMach             *float64 `json:"lrc_mach"`
	ResidualClimbFPM    *float64 `json:"residual_climb_fpm"`
}

type envelopeJSON struct {
	Caution        string            `json:"caution"`
	Aircraft       string            `json:"aircraft"`
	MassKg         float64           `json:"mass_kg"`
	ISADevC        float64           `json:"isa_dev_c"`
	FloorG         float64           `json:"floor_g"`
	MaxFLBuffet    *float64          `json:"max_fl_buffet"`
	MaxFLThrust    *float64          `json:"max_fl_thrust"`
	MaxFLCertified float64           `json:"max_fl_certified"`
	MaxFL          *float64          `json:"max_fl"`
	OptimumFL      *float64          `json:"optimum_fl"`
	Rows           []envelopeRowJSON `json:"rows"`
}

func envelopeDoc(e perf.Envelope) envelopeJSON {
	d := envelopeJSON{Caution: optimizer.Caution, Aircraft: e.Aircraft, MassKg: e.Mass, ISADevC: e.ISADev, FloorG: e.Floor,
		MaxFLBuffet: planjson.Number(e.MaxFLBuffet), MaxFLThrust: planjson.Number(e.MaxFLThrust), MaxFLCertified: e.MaxFLCertified,
		MaxFL: planjson.Number(e.MaxFL), OptimumFL: planjson.Number(e.OptimumFL), Rows: []envelopeRowJSON{}}
	for _, r := range e.Rows {
		var rc *float64
		if !math.IsNaN(r.ResidualClimb) {
			v := r.ResidualClimb / perf.FtToM * 60
			rc = &v
		}
		d.Rows = append(d.Rows, envelopeRowJSON{FL: r.FL, PressureHPa: r.Pressure / 100, OATC: r.OAT - 273.15,
			SoundKt: r.SoundSpeed / perf.KtToMS, LowBuffetMach1g: planjson.Number(r.LowBuffet1g), HighBuffetMach1g: planjson.Number(r.HighBuffet1g),
			LowBuffetMachFloor: planjson.Number(r.LowBuffetFloor), HighBuffetMachFloor: planjson.Number(r.HighBuffetFloor), MMO: r.MMO,
			LRCMach: planjson.Number(r.LRCMach), ResidualClimbFPM: rc})
	}
	return d
}

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
	c.Flags().StringVar(&acName, "aircraft", "", "built-in aircraft name or YAML file")
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
		d := envelopeDoc(e)
		switch *format {
		case "json":
			return writeJSON(out, d)
		case "csv":
			w := csv.NewWriter(out)
			w.Write([]string{"fl", "pressure_hpa", "oat_c", "sound_kt", "low_buffet_mach_1g", "high_buffet_mach_1g", "low_buffet_mach_floor", "high_buffet_mach_floor", "mmo", "lrc_mach", "residual_climb_fpm"})
			for _, r := range d.Rows {
				w.Write([]string{planjson.CSVNumber(r.FL), planjson.CSVNumber(r.PressureHPa), planjson.CSVNumber(r.OATC), planjson.CSVNumber(r.SoundKt), planjson.CSVPointer(r.LowBuffetMach1g), planjson.CSVPointer(r.HighBuffetMach1g),
					planjson.CSVPointer(r.LowBuffetMachFloor), planjson.CSVPointer(r.HighBuffetMachFloor), planjson.CSVNumber(r.MMO), planjson.CSVPointer(r.LRCMach), planjson.CSVPointer(r.ResidualClimbFPM)})
			}
			w.Flush()
			return w.Error()
		}
		fmt.Fprintf(out, "Envelope: %s at %.0f kg, ISA%+.0f °C, buffet floor %.2f g\n", d.Aircraft, d.MassKg, d.ISADevC, d.FloorG)
		fmt.Fprintf(out, "Maximum level: buffet FL%s, thrust FL%s, certified FL%.0f -> FL%s; optimum FL%s\n\n",
			flStr(d.MaxFLBuffet), flStr(d.MaxFLThrust), d.MaxFLCertified, flStr(d.MaxFL), flStr(d.OptimumFL))
		tw := tabwriter.NewWriter(out, 0, 0, 1, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "FL\thPa\tOAT C\tbuffet 1g\t\tbuffet %.2fg\t\tMMO\tLRC\tROC fpm\t\n", d.FloorG)
		for _, r := range d.Rows {
			fmt.Fprintf(tw, "%.0f\t%.1f\t%.1f\t%s\t%s\t%s\t%s\t%.3f\t%s\t%s\t\n", r.FL, r.PressureHPa, r.OATC,
				machStr(r.LowBuffetMach1g), machStr(r.HighBuffetMach1g), machStr(r.LowBuffetMachFloor), machStr(r.HighBuffetMachFloor),
				r.MMO, machStr(r.LRCMach), fpmStr(r.ResidualClimbFPM))
		}
		tw.Flush()
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
	return fmt.Sprintf("%03.0f", math.Floor(*x))
}
