package main

import (
	"errors"
	"fmt"
	"slices"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
	"levelpath/optimizer/planjson"
	"levelpath/perf"
)

// aircraftJSON describes one aircraft model: limits, engines and the
// envelope at a reference mass (90 % of MTOW, ISA, 1.3 g floor).
type aircraftJSON struct {
	Caution        string   `json:"caution,omitempty"`
	Name           string   `json:"name"`
	Description    string   `json:"description"`
	Source         string   `json:"source"`
	OEWKg          float64  `json:"oew_kg"`
	MZFWKg         float64  `json:"mzfw_kg"`
	MTOWKg         float64  `json:"mtow_kg"`
	MLWKg          float64  `json:"mlw_kg"`
	FuelCapacityKg float64  `json:"fuel_capacity_kg"`
	VMOKt          float64  `json:"vmo_kt"`
	MMO            float64  `json:"mmo"`
	CeilingFL      float64  `json:"ceiling_fl"`
	Engines        int      `json:"engines"`
	StaticThrustKN float64  `json:"static_thrust_kn"`
	TablesVersion  int      `json:"tables_version,omitempty"` // operator tables: format version; thrust then comes from them
	RefMassKg      float64  `json:"ref_mass_kg"`
	RefMaxFLBuffet *float64 `json:"ref_max_fl_buffet"`
	RefMaxFLThrust *float64 `json:"ref_max_fl_thrust"`
	RefMaxFLHot    *float64 `json:"ref_max_fl_thrust_isa_plus_20"`
	RefOptimumFL   *float64 `json:"ref_optimum_fl"`
}

// describeAircraft fills aircraftJSON; source says where the model came from.
func describeAircraft(a *perf.Aircraft, source string) (aircraftJSON, error) {
	d := aircraftJSON{Name: a.Name, Description: a.Description, Source: source,
		OEWKg: a.OEW, MZFWKg: a.MZFW, MTOWKg: a.MTOW, MLWKg: a.MLW, FuelCapacityKg: a.FuelCapacity,
		VMOKt: a.VMO / perf.KtToMS, MMO: a.MMO, CeilingFL: a.CertifiedCeiling / (100 * perf.FtToM),
		Engines: a.Engines.Count, StaticThrustKN: a.Engines.StaticThrust / 1000, RefMassKg: 0.9 * a.MTOW}
	if t := a.Tables(); t != nil {
		d.TablesVersion = t.Version
		d.Source = fmt.Sprintf("operator tables %s (format version %d; data: %s)", t.Dir, t.Version, t.Source)
	}
	e, err := a.Envelope(d.RefMassKg, 0, 1.3)
	if err != nil {
		return d, err
	}
	hot, err := a.Envelope(d.RefMassKg, 20, 1.3)
	if err != nil {
		return d, err
	}
	fl := func(x float64) *float64 { return planjson.Number(perf.ReportFL(x)) }
	d.RefMaxFLBuffet, d.RefMaxFLThrust, d.RefMaxFLHot, d.RefOptimumFL = fl(e.MaxFLBuffet), fl(e.MaxFLThrust), fl(hot.MaxFLThrust), fl(e.OptimumFL)
	return d, nil
}

func aircraftSource(name string) string {
	if slices.Contains(perf.BuiltinNames(), name) {
		return "built-in (invented demonstration data)"
	}
	return "file " + name
}

func newAircraftCmd() *cobra.Command {
	c := &cobra.Command{
		Use:   "aircraft",
		Short: "Describe aircraft models: list the built-ins, show one model's limits and ceilings, export it as tables",
		Args:  cobra.NoArgs,
	}
	c.AddCommand(newAircraftListCmd(), newAircraftShowCmd(), newAircraftExportCmd())
	return c
}

func newAircraftListCmd() *cobra.Command {
	c := &cobra.Command{
		Use:     "list",
		Short:   "List the built-in aircraft",
		Example: "  levelpath aircraft list\n  levelpath aircraft list --format json",
		Args:    cobra.NoArgs,
	}
	format := formatFlag(c, "table", "json")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if err := checkFormat(*format, "table", "json"); err != nil {
			return err
		}
		var all []aircraftJSON
		for _, n := range perf.BuiltinNames() {
			a, err := perf.Builtin(n)
			if err != nil {
				return fmt.Errorf("internal: %w", err)
			}
			d, err := describeAircraft(a, aircraftSource(n))
			if err != nil {
				return fmt.Errorf("internal: %w", err)
			}
			all = append(all, d)
		}
		out := cmd.OutOrStdout()
		if *format == "json" {
			return writeJSON(out, struct {
				Caution  string         `json:"caution"`
				Aircraft []aircraftJSON `json:"aircraft"`
			}{optimizer.Caution, all})
		}
		tw := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "NAME\tMTOW kg\tMMO\tCEILING\tDESCRIPTION")
		for _, d := range all {
			fmt.Fprintf(tw, "%s\t%.0f\t%.2f\tFL%.0f\t%s\n", d.Name, d.MTOWKg, d.MMO, d.CeilingFL, d.Description)
		}
		tw.Flush()
		fmt.Fprintf(out, "\nAny YAML file in the format of perf/aircraft/README.md (--aircraft FILE) or directory of operator tables (perf/aircraft/TABLES.md, --aircraft DIR) is accepted too.\n%s\n", "Caution: "+optimizer.Caution)
		return nil
	}
	return c
}

func newAircraftShowCmd() *cobra.Command {
	c := &cobra.Command{
		Use:     "show NAME-OR-FILE",
		Short:   "Show an aircraft model: mass and speed limits, engines, ceilings at 90 % MTOW",
		Example: "  levelpath aircraft show demo-widebody\n  levelpath aircraft show my-type.yaml --format json",
		Args:    cobra.ExactArgs(1),
	}
	format := formatFlag(c, "table", "json")
	c.RunE = func(cmd *cobra.Command, args []string) error {
		if err := checkFormat(*format, "table", "json"); err != nil {
			return err
		}
		a, err := loadAircraft(args[0])
		if err != nil {
			return err
		}
		d, err := describeAircraft(a, aircraftSource(args[0]))
		if err != nil {
			return badInput(err)
		}
		out := cmd.OutOrStdout()
		if *format == "json" {
			d.Caution = optimizer.Caution
			return writeJSON(out, d)
		}
		flOf := func(x *float64) string {
			if x == nil {
				return "none"
			}
			return fmt.Sprintf("FL%03.0f", *x)
		}
		fmt.Fprintf(out, "%s: %s\nsource: %s\n\n", d.Name, d.Description, d.Source)
		tw := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
		fmt.Fprintf(tw, "OEW\t%.0f kg\nMZFW\t%.0f kg\nMTOW\t%.0f kg\nMLW\t%.0f kg\nfuel capacity\t%.0f kg\n", d.OEWKg, d.MZFWKg, d.MTOWKg, d.MLWKg, d.FuelCapacityKg)
		fmt.Fprintf(tw, "VMO / MMO\t%.0f kt / %.3f\ncertified ceiling\tFL%.0f\n", d.VMOKt, d.MMO, d.CeilingFL)
		if d.TablesVersion > 0 {
			fmt.Fprintf(tw, "engines\t%d (thrust limits from the tables)\n", d.Engines)
		} else {
			fmt.Fprintf(tw, "engines\t%d x %.1f kN static\n", d.Engines, d.StaticThrustKN)
		}
		fmt.Fprintf(tw, "at %.0f kg (90 %% MTOW), 1.3 g:\t\n", d.RefMassKg)
		fmt.Fprintf(tw, "  buffet-limited level\t%s\n  thrust-limited level ISA / ISA+20\t%s / %s\n  optimum level ISA\t%s\n",
			flOf(d.RefMaxFLBuffet), flOf(d.RefMaxFLThrust), flOf(d.RefMaxFLHot), flOf(d.RefOptimumFL))
		tw.Flush()
		fmt.Fprintf(out, "Levels are rounded down to whole flight levels.\n\n%s\n", "Caution: "+optimizer.Caution)
		return nil
	}
	return c
}

func newAircraftExportCmd() *cobra.Command {
	var acName, out string
	var factor float64
	c := &cobra.Command{
		Use:   "export",
		Short: "Write an aircraft model as operator tables (format version 2, perf/aircraft/TABLES.md) that --aircraft DIR plans from",
		Example: "  levelpath aircraft export --aircraft demo-widebody --out widebody-tables\n" +
			"  levelpath aircraft export --aircraft my-type.yaml --out tables --perf-factor 2.5",
		Args: cobra.NoArgs,
	}
	c.Flags().StringVar(&acName, "aircraft", "", "built-in aircraft name, YAML file or operator tables directory")
	c.Flags().StringVar(&out, "out", "", "directory to write (created if needed)")
	c.Flags().Float64Var(&factor, "perf-factor", 0, "performance factor, percent, applied to the exported fuel flows")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if out == "" {
			return badInputf("--out DIR is required")
		}
		a, err := loadAircraft(acName)
		if err != nil {
			return err
		}
		if factor != 0 {
			if a, err = a.WithPerfFactor(factor); err != nil {
				return badInputf("--perf-factor: %v", err)
			}
			warnf(cmd.ErrOrStderr(), "performance factor %+.1f %%: exported fuel flows multiplied by %.3f", factor, 1+factor/100)
		}
		g := perf.DefaultExportGrid(a)
		if err := a.ExportTables(out, g); err != nil {
			var ue *perf.UnsupportedError
			if errors.As(err, &ue) {
				return badInput(err)
			}
			return fmt.Errorf("export: %w", err)
		}
		nm, nl, nt, nd := len(g.Masses), len(g.Levels), len(g.TransitionLevels), len(g.ISADevs)
		fmt.Fprintf(cmd.OutOrStdout(), "wrote format version %d tables of %s to %s:\n"+
			"  %s (with thrust), %s: %d cruise fuel-flow and thrust-limit points (%d masses %.0f-%.0f kg, %d levels FL%.0f-FL%.0f, %d Mach %.2f-%.3f, %d ISA deviations %+.0f..%+.0f)\n"+
			"  %s, %s: %d climb and descent points (%d levels from 1,500 ft)\n  %s: %d buffet-onset points\n"+
			"Plan from them with --aircraft %s. %s\n",
			perf.TablesVersion, a.Name, out,
			perf.CruiseFuelFlowFile, perf.ThrustLimitsFile, nm*nl*len(g.Machs)*nd, nm, g.Masses[0], g.Masses[nm-1], nl, g.Levels[0], g.Levels[nl-1], len(g.Machs), g.Machs[0], g.Machs[len(g.Machs)-1], nd, g.ISADevs[0], g.ISADevs[nd-1],
			perf.ClimbFile, perf.DescentFile, len(g.TransitionMasses)*nt*nd, nt, perf.BuffetFile, len(a.Buffet),
			out, "Caution: "+optimizer.Caution)
		return nil
	}
	return c
}
