package main

import (
	"fmt"
	"os"
	"time"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
)

// arrivalFlags are plan's arrival-time target and delay cost.
type arrivalFlags struct {
	arriveBy, window, delayCost string
}

func (a *arrivalFlags) register(c *cobra.Command) {
	fl := c.Flags()
	fl.StringVar(&a.arriveBy, "arrive-by", "", "arrival target, RFC3339: fly the least-cost cost index (--ci is the value of time) whose arrival, departure + trip time, falls in --arrive-window")
	fl.StringVar(&a.window, "arrive-window", "", "window around --arrive-by, EARLY,LATE such as -5m,+10m (default: from the departure to --arrive-by)")
	fl.StringVar(&a.delayCost, "delay-cost", "", "cost of lateness after --arrive-by, CSV with header minutes_late,cost_kg (piecewise linear, non-decreasing): fly the cost index whose fuel + --ci x time_min + delay cost is least")
}

func (a *arrivalFlags) active() bool { return a.arriveBy != "" || a.window != "" || a.delayCost != "" }

// readDelayCost reads and checks a delay-cost file (flag names the flag
// or column it came from).
func readDelayCost(path, flag string) (optimizer.DelayCost, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return optimizer.DelayCost{}, badInputf("%s %s: %v", flag, path, err)
	}
	if !fi.Mode().IsRegular() || fi.Size() > 1<<16 {
		return optimizer.DelayCost{}, badInputf("%s %s: want a regular file of at most 65536 bytes", flag, path)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return optimizer.DelayCost{}, badInputf("%s %s: %v", flag, path, err)
	}
	d, err := optimizer.ParseDelayCost(data, path)
	if err != nil {
		return optimizer.DelayCost{}, badInput(err)
	}
	return d, nil
}

// pricer checks the arrival flags against the problem and returns price
// searched over the cost index: optimizer.SolveArriveBy for a window,
// optimizer.SearchDelayCost for a delay cost. A window left out runs from
// the departure to the target (any arrival not later is on time), and
// the plan says so.
func (a *arrivalFlags) pricer(c *cobra.Command, p *optimizer.Problem, price func(*optimizer.Problem) (*optimizer.Plan, error)) (func(*optimizer.Problem) (*optimizer.Plan, error), error) {
	switch {
	case a.arriveBy == "":
		return nil, badInputf("--arrive-window and --delay-cost need --arrive-by (the scheduled arrival)")
	case inFlightAsked(c):
		return nil, badInputf("--arrive-by with an in-flight re-plan (--from-nm, --from-waypoint) is not supported")
	case a.delayCost != "" && a.window != "":
		return nil, badInputf("--delay-cost prices lateness itself: give it without --arrive-window (a grace period is a stretch of zero cost in the file)")
	case p.Speed.Kind != optimizer.SpeedEcon:
		return nil, badInputf("--arrive-by needs --speed econ: with --speed %s the cost index does not set the speed", p.Speed)
	}
	at, err := time.Parse(time.RFC3339, a.arriveBy)
	if err != nil {
		return nil, badInputf("--arrive-by %q: want RFC3339 such as 2026-12-02T07:30:00Z", a.arriveBy)
	}
	if !p.Depart.IsZero() && !at.After(p.Depart) {
		return nil, badInputf("--arrive-by %s is not after the departure %s", at.UTC().Format(time.RFC3339), p.Depart.UTC().Format(time.RFC3339))
	}
	if a.delayCost != "" {
		cost, err := readDelayCost(a.delayCost, "--delay-cost")
		if err != nil {
			return nil, err
		}
		s := optimizer.DelaySearch{Scheduled: at, Cost: cost, Price: price}
		return func(q *optimizer.Problem) (*optimizer.Plan, error) {
			pl, _, err := optimizer.SearchDelayCost(q, s)
			return pl, err
		}, nil
	}
	t := optimizer.ArrivalTarget{At: at, Price: price}
	if a.window != "" {
		if t.Early, t.Late, err = optimizer.ParseArrivalWindow(a.window); err != nil {
			return nil, badInputf("--arrive-window: %v", err)
		}
	} else {
		t.Early = -optimizer.MaxArrivalWindow
		if !p.Depart.IsZero() {
			t.Early = -min(at.Sub(p.Depart), optimizer.MaxArrivalWindow)
		}
		p.Notes = append(p.Notes, fmt.Sprintf("no --arrive-window: the window runs from %s to --arrive-by (any arrival not later is on time)", at.Add(t.Early).UTC().Format(time.RFC3339)))
	}
	return func(q *optimizer.Problem) (*optimizer.Plan, error) {
		pl, _, err := optimizer.SolveArriveBy(q, t)
		return pl, err
	}, nil
}
