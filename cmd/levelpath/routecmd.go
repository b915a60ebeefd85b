package main

import (
	"encoding/json"
	"fmt"
	"text/tabwriter"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"

	"levelpath/perf"
	"levelpath/route"
)

type pointJSON struct {
	Lat  float64 `json:"lat"`
	Lon  float64 `json:"lon"`
	Name string  `json:"name,omitempty"`
}

type legJSON struct {
	Index            int       `json:"index"`
	From             pointJSON `json:"from"`
	To               pointJSON `json:"to"`
	LengthNM         float64   `json:"length_nm"`
	InitialCourseDeg float64   `json:"initial_course_deg"`
}

type segmentJSON struct {
	Index         int       `json:"index"`
	Leg           int       `json:"leg"`
	FromNM        float64   `json:"from_nm"`
	ToNM          float64   `json:"to_nm"`
	LengthNM      float64   `json:"length_nm"`
	Start         pointJSON `json:"start"`
	End           pointJSON `json:"end"`
	TrueCourseDeg float64   `json:"true_course_deg"`
	MagVarDeg     float64   `json:"mag_var_deg"`
	MagCourseDeg  float64   `json:"mag_course_deg"`
	Levels        []int     `json:"levels"`
	// HorizontalFieldNT is the WMM2025 horizontal intensity at the
	// segment's midpoint; CompassZone is "caution" or "blackout" where
	// the compass is unreliable, else empty; LevelCourse names the course
	// the level rule used: magnetic, true, grid, or empty when it ignores it.
	HorizontalFieldNT float64 `json:"horizontal_field_nt"`
	CompassZone       string  `json:"compass_zone"`
	LevelCourse       string  `json:"level_course"`
}

type routeJSON struct {
	Source   string        `json:"source"`
	TotalNM  float64       `json:"total_nm"`
	Warnings []string      `json:"warnings"`
	Legs     []legJSON     `json:"legs"`
	Segments []segmentJSON `json:"segments"`
}

func pj(p route.Point) pointJSON { return pointJSON{Lat: p.Lat, Lon: p.Lon, Name: p.Name} }

func routeDoc(t *route.Track) routeJSON {
	d := routeJSON{Source: t.Route.Source, TotalNM: t.Total / perf.NMToM, Warnings: append(append([]string{}, t.Route.Warnings...), t.Warnings...)}
	for _, l := range t.Legs {
		d.Legs = append(d.Legs, legJSON{Index: l.Index, From: pj(l.From), To: pj(l.To), LengthNM: l.Length / perf.NMToM, InitialCourseDeg: l.InitialCourse})
	}
	for _, s := range t.Segments {
		lv := s.Levels
		if lv == nil {
			lv = []int{}
		}
		d.Segments = append(d.Segments, segmentJSON{Index: s.Index, Leg: s.Leg, FromNM: s.FromDist / perf.NMToM, ToNM: s.ToDist / perf.NMToM,
			LengthNM: s.Length / perf.NMToM, Start: pj(s.Start), End: pj(s.End), TrueCourseDeg: s.TrueCourse, MagVarDeg: s.MagVar,
			MagCourseDeg: s.MagCourse, Levels: lv, HorizontalFieldNT: s.HorizontalField, CompassZone: string(s.Zone), LevelCourse: s.LevelCourse})
	}
	return d
}

func newRouteCmd() *cobra.Command {
	var maxSeg float64
	var date, levels, polar string
	c := &cobra.Command{
		Use:   "route ROUTE",
		Short: "Split a route into geodesic segments with courses, magnetic variation and allowed levels",
		Example: `  levelpath route levelpath-demo/route.geojson
  levelpath route "44.6,-74.2 WPT01=48.5,-60.0 51.0,-1.0" --max-seg-nm 100 --format json`,
		Args: cobra.ExactArgs(1),
	}
	format := formatFlag(c, "table", "json", "geojson")
	c.Flags().Float64Var(&maxSeg, "max-seg-nm", 50, "longest segment, NM")
	c.Flags().StringVar(&date, "date", "", "date for magnetic variation, YYYY-MM-DD (default today)")
	c.Flags().StringVar(&levels, "levels", "", "level rule (default odd-even-magnetic)")
	c.Flags().StringVar(&polar, "polar", route.PolarTrue, "course the magnetic level rule uses where the WMM2025 compass caution/blackout zones make the compass unreliable: true or grid")
	c.RunE = func(cmd *cobra.Command, args []string) error {
		if err := checkFormat(*format, "table", "json", "geojson"); err != nil {
			return err
		}
		dep := time.Now().UTC()
		if date == "" {
			warnf(cmd.ErrOrStderr(), "no --date given: magnetic variation for today, %s", dep.Format("2006-01-02"))
		}
		tr, err := buildTrackPolar(args[0], levels, polar, maxSeg, date, dep, cmd.ErrOrStderr())
		if err != nil {
			return err
		}
		out := cmd.OutOrStdout()
		d := routeDoc(tr)
		switch *format {
		case "json":
			return writeJSON(out, d)
		case "geojson":
			ls := orb.LineString{}
			for i, s := range tr.Segments {
				if i == 0 {
					ls = append(ls, orb.Point{s.Start.Lon, s.Start.Lat})
				}
				ls = append(ls, orb.Point{s.End.Lon, s.End.Lat})
			}
			f := geojson.NewFeature(ls)
			f.Properties["total_nm"] = d.TotalNM
			f.Properties["segments"] = d.Segments
			f.Properties["legs"] = d.Legs
			b, err := json.MarshalIndent(geojson.NewFeatureCollection().Append(f), "", "  ")
			if err != nil {
				return err
			}
			_, err = fmt.Fprintf(out, "%s\n", b)
			return err
		}
		fmt.Fprintf(out, "Route %s: %d legs, %d segments, %.1f NM\n\n", d.Source, len(d.Legs), len(d.Segments), d.TotalNM)
		tw := tabwriter.NewWriter(out, 0, 0, 1, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "seg\tleg\tfrom NM\tto NM\tlen NM\ttrue\tvar\tmag\tH nT\tlevels on\tlevels\t")
		for _, s := range d.Segments {
			on := s.LevelCourse
			if on == "" {
				on = "-"
			}
			if s.CompassZone != "" {
				on += " (" + s.CompassZone + ")"
			}
			fmt.Fprintf(tw, "%d\t%d\t%.1f\t%.1f\t%.1f\t%05.1f\t%+.1f\t%05.1f\t%.0f\t%s\t%s\t\n", s.Index, s.Leg, s.FromNM, s.ToNM, s.LengthNM,
				s.TrueCourseDeg, s.MagVarDeg, s.MagCourseDeg, s.HorizontalFieldNT, on, levelList(s.Levels))
		}
		return tw.Flush()
	}
	return c
}

// levelList prints levels compactly: "290,310,...,410 (7)".
func levelList(lv []int) string {
	if len(lv) == 0 {
		return "none"
	}
	if len(lv) <= 4 {
		return fmt.Sprint(lv)
	}
	return fmt.Sprintf("%d,%d..%d (%d)", lv[0], lv[1], lv[len(lv)-1], len(lv))
}
