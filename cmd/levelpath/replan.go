package main

import (
	"math"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
	"levelpath/perf"
)

// inFlightFlags are plan's in-flight re-planning flags: --from-nm or
// --from-waypoint with --fl, --mass and --time plan the remainder.
type inFlightFlags struct {
	fromNM       float64
	fromWaypoint string
	fl           int
	at           string
}

func (f *inFlightFlags) register(c *cobra.Command) {
	fl := c.Flags()
	fl.Float64Var(&f.fromNM, "from-nm", 0, "re-plan in flight from this distance along the route, NM (with --fl, --mass, --time)")
	fl.StringVar(&f.fromWaypoint, "from-waypoint", "", "re-plan in flight from this route point (instead of --from-nm)")
	fl.IntVar(&f.fl, "fl", 0, "re-plan: the level flown now, e.g. 350")
	fl.StringVar(&f.at, "time", "", "re-plan: the time of the state, RFC3339")
}

// inFlightAsked reports whether an in-flight re-plan was asked for.
func inFlightAsked(c *cobra.Command) bool {
	fs := c.Flags()
	return fs.Changed("from-nm") || fs.Changed("from-waypoint")
}

// pricer checks the in-flight flags and returns the re-plan (with the
// reserves from there when --zfw is given).
func (f *inFlightFlags) pricer(c *cobra.Command, pf *problemFlags, fpf *fuelPlanFlags, p *optimizer.Problem) (func(*optimizer.Problem) (*optimizer.Plan, error), error) {
	fs := c.Flags()
	switch {
	case fs.Changed("from-nm") && fs.Changed("from-waypoint"):
		return nil, badInputf("give --from-nm or --from-waypoint, not both")
	case !fs.Changed("mass"):
		return nil, badInputf("a re-plan needs --mass, the mass now")
	case !fs.Changed("fl"):
		return nil, badInputf("a re-plan needs --fl, the level flown now")
	case f.at == "":
		return nil, badInputf("a re-plan needs --time, the time of the state (RFC3339)")
	case fs.Changed("fuel"):
		return nil, badInputf("a re-plan takes --zfw (for the fuel on board), not --fuel")
	}
	at, err := time.Parse(time.RFC3339, f.at)
	if err != nil {
		return nil, badInputf("--time %q: want RFC3339 such as 2026-12-02T01:30:00Z", f.at)
	}
	d := f.fromNM * perf.NMToM
	if math.IsNaN(f.fromNM) || math.IsInf(f.fromNM, 0) {
		return nil, badInputf("--from-nm %v: want a distance in NM", f.fromNM)
	}
	if f.fromWaypoint != "" {
		d = -1
		var names []string
		for _, l := range p.Track.Legs {
			names = append(names, l.From.Name)
			if strings.EqualFold(l.From.Name, f.fromWaypoint) {
				d = l.StartDist
			}
		}
		if d < 0 {
			return nil, badInputf("--from-waypoint %q: not a point of the route before the destination (%s)", f.fromWaypoint, strings.Join(names, ", "))
		}
	}
	st := optimizer.InFlight{Dist: d, FL: f.fl, Mass: pf.mass, Time: at}
	var req *optimizer.FuelRequest
	if fs.Changed("zfw") {
		r, err := fpf.build(c, pf, p)
		if err != nil {
			return nil, err
		}
		req = &r
	} else if fs.Changed("policy") || fs.Changed("alternate") || fs.Changed("extra-kg") {
		return nil, badInputf("the reserves of a re-plan need --zfw")
	}
	return func(p *optimizer.Problem) (*optimizer.Plan, error) {
		plan, err := optimizer.Replan(p, st)
		if err != nil || req == nil {
			return plan, err
		}
		if err := optimizer.InFlightFuel(*req, plan); err != nil {
			return nil, err
		}
		return plan, nil
	}, nil
}
