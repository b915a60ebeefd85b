package planjson

import (
	"fmt"
	"text/tabwriter"
	"time"

	"levelpath/optimizer"
)

// Waypoint is one row of the waypoint table: the route's points, top of
// climb, steps and top of descent.
type Waypoint struct {
	Name            string   `json:"name"`
	Kind            string   `json:"kind"`
	DistanceNM      float64  `json:"distance_nm"`
	ETO             string   `json:"eto"`
	TimeMin         float64  `json:"time_min"`
	FL              float64  `json:"fl"`
	FuelUsedKg      float64  `json:"fuel_used_kg"`
	FuelRemainingKg *float64 `json:"fuel_remaining_kg"`
	MinRequiredKg   *float64 `json:"min_required_kg"`
}

func waypointDocs(p *optimizer.Plan) []Waypoint {
	out := make([]Waypoint, 0, len(p.Waypoints))
	for _, w := range p.Waypoints {
		out = append(out, Waypoint{Name: w.Name, Kind: w.Kind, DistanceNM: w.Dist / mPerNM,
			ETO:     p.Depart.Add(time.Duration(w.Time * float64(time.Second))).UTC().Format(time.RFC3339),
			TimeMin: w.Time / 60, FL: w.FL, FuelUsedKg: w.FuelUsed,
			FuelRemainingKg: Number(w.FuelRemaining), MinRequiredKg: Number(w.MinRequired)})
	}
	return out
}

// writeWaypoints writes the waypoint table; "-" where the fuel on board
// is unknown, and "LOW" where the fuel remaining is under the required.
func writeWaypoints(bw *errWriter, d *Doc) {
	if len(d.Waypoints) == 0 {
		return
	}
	bw.printf("\nWaypoints\n")
	if d.Fuel == nil && d.Waypoints[0].MinRequiredKg != nil {
		bw.printf("  (min required is the remaining trip only: no fuel policy applied; give --zfw alone for a fuel plan)\n")
	}
	tw := tabwriter.NewWriter(bw, 0, 0, 1, ' ', 0)
	fmt.Fprintln(tw, "  point\tNM\tETO\tFL\tfuel used kg\tfuel remaining kg\tmin required kg\t")
	for _, w := range d.Waypoints {
		rem, req, flag := "-", "-", ""
		if w.FuelRemainingKg != nil {
			rem = fmt.Sprintf("%.0f", *w.FuelRemainingKg)
		}
		if w.MinRequiredKg != nil {
			req = fmt.Sprintf("%.0f", *w.MinRequiredKg)
			if w.FuelRemainingKg != nil && *w.FuelRemainingKg < *w.MinRequiredKg-0.5 {
				flag = " LOW"
			}
		}
		eto := w.ETO
		if len(eto) >= 16 {
			eto = eto[11:16] + "Z"
		}
		fmt.Fprintf(tw, "  %s\t%.0f\t%s\t%03.0f\t%.0f\t%s\t%s%s\t\n", w.Name, w.DistanceNM, eto, w.FL, w.FuelUsedKg, rem, req, flag)
	}
	tw.Flush()
}
