package planjson

import (
	"fmt"
	"time"

	"levelpath/optimizer"
)

// Arrival is how a plan meets the arrival window it was asked for
// (optimizer.SolveArriveBy). Times are UTC, RFC 3339; minutes signed.
type Arrival struct {
	TargetUTC       string  `json:"target_utc"`
	WindowEarlyMin  float64 `json:"window_early_min"` // the window's ends relative to the target
	WindowLateMin   float64 `json:"window_late_min"`
	WindowOpensUTC  string  `json:"window_opens_utc"`
	WindowClosesUTC string  `json:"window_closes_utc"`
	BaseCI          float64 `json:"base_ci"` // the cost index asked for: the value of time
	CIUsed          float64 `json:"ci_used"` // the cost index chosen and flown
	ArrivalUTC      string  `json:"arrival_utc"`
	Met             bool    `json:"met"`
	// MarginAfterOpenMin and MarginBeforeCloseMin are how long after the
	// window opens and before it closes the plan arrives (negative:
	// outside the window on that side).
	MarginAfterOpenMin   float64 `json:"margin_after_open_min"`
	MarginBeforeCloseMin float64 `json:"margin_before_close_min"`
	// MissMin is how far outside the window the plan arrives: positive
	// late, negative early, 0 inside.
	MissMin float64 `json:"miss_min"`
	// Slowest and Fastest are the arrivals at CI 0 and at the highest
	// CI tried, given when the window cannot be met.
	Slowest     *ArrivalBound `json:"slowest,omitempty"`
	Fastest     *ArrivalBound `json:"fastest,omitempty"`
	MaxCI       float64       `json:"max_ci"`
	ToleranceCI float64       `json:"tolerance_ci"`
	Plans       int           `json:"plans"`
}

// ArrivalBound is the arrival at one end of the cost-index range.
type ArrivalBound struct {
	CI         float64 `json:"ci"`
	ArrivalUTC string  `json:"arrival_utc"`
	MissMin    float64 `json:"miss_min"`
}

// Delay is how a plan was chosen against a cost of lateness
// (optimizer.SearchDelayCost). Costs are kg of fuel-equivalent, the unit
// of fuel_kg + CI x time_min.
type Delay struct {
	ScheduledUTC  string  `json:"scheduled_utc"`
	ValueOfTimeCI float64 `json:"value_of_time_ci"` // kg/min: prices time in the objective
	CIUsed        float64 `json:"ci_used"`          // the cost index chosen and flown
	ArrivalUTC    string  `json:"arrival_utc"`
	DelayMin      float64 `json:"delay_min"` // minutes after the scheduled arrival (negative: early)
	DelayCostKg   float64 `json:"delay_cost_kg"`
	FuelKg        float64 `json:"fuel_kg"`
	TimeMin       float64 `json:"time_min"`
	TimeCostKg    float64 `json:"time_cost_kg"` // value of time x time_min
	TotalKg       float64 `json:"total_kg"`     // fuel + time cost + delay cost: the objective
	MaxCI         float64 `json:"max_ci"`
	StepCI        float64 `json:"step_ci"`
	ToleranceCI   float64 `json:"tolerance_ci"`
	Plans         int     `json:"plans"`
}

func utc(t time.Time) string { return t.UTC().Format(time.RFC3339) }

func arrivalDoc(r *optimizer.ArrivalResult) *Arrival {
	if r == nil {
		return nil
	}
	afterOpen, beforeClose := r.Margins()
	d := &Arrival{TargetUTC: utc(r.At), WindowEarlyMin: r.Early.Minutes(), WindowLateMin: r.Late.Minutes(),
		WindowOpensUTC: utc(r.Opens()), WindowClosesUTC: utc(r.Closes()), BaseCI: r.BaseCI, CIUsed: r.CI,
		ArrivalUTC: utc(r.Arrival), Met: r.Met, MarginAfterOpenMin: afterOpen.Minutes(), MarginBeforeCloseMin: beforeClose.Minutes(),
		MissMin: r.Miss.Minutes(), MaxCI: r.MaxCI, ToleranceCI: r.Tolerance, Plans: r.Tries}
	bound := func(b *optimizer.ArrivalBound) *ArrivalBound {
		if b == nil {
			return nil
		}
		return &ArrivalBound{CI: b.CI, ArrivalUTC: utc(b.Arrival), MissMin: b.Miss.Minutes()}
	}
	d.Slowest, d.Fastest = bound(r.Slowest), bound(r.Fastest)
	return d
}

func delayDoc(c *optimizer.DelayChoice) *Delay {
	if c == nil {
		return nil
	}
	return &Delay{ScheduledUTC: utc(c.Scheduled), ValueOfTimeCI: c.ValueOfTime, CIUsed: c.CI, ArrivalUTC: utc(c.Arrival),
		DelayMin: c.LateMin, DelayCostKg: c.DelayCost, FuelKg: c.Fuel, TimeMin: c.TimeMin, TimeCostKg: c.ValueOfTime * c.TimeMin,
		TotalKg: c.Total, MaxCI: c.MaxCI, StepCI: c.Step, ToleranceCI: c.Tolerance, Plans: c.Tries}
}

// writeArrival prints the arrival and delay-cost lines of the table.
func writeArrival(bw *errWriter, d *Doc) {
	if a := d.Arrival; a != nil {
		bw.printf("Arrival  target %s, window %+gm..%+gm (%s to %s); cost index %g chosen (asked %g, %d plans)\n",
			a.TargetUTC, a.WindowEarlyMin, a.WindowLateMin, a.WindowOpensUTC, a.WindowClosesUTC, a.CIUsed, a.BaseCI, a.Plans)
		if a.Met {
			bw.printf("         planned arrival %s: %.1f min after the window opens, %.1f min before it closes\n", a.ArrivalUTC, a.MarginAfterOpenMin, a.MarginBeforeCloseMin)
		} else {
			bw.printf("         WINDOW CANNOT BE MET: planned arrival %s, %s\n", a.ArrivalUTC, missWords(a.MissMin))
			for _, b := range []struct {
				name string
				b    *ArrivalBound
			}{{"slowest", a.Slowest}, {"fastest", a.Fastest}} {
				if b.b != nil {
					bw.printf("         %s (cost index %g): arrives %s, %s\n", b.name, b.b.CI, b.b.ArrivalUTC, missWords(b.b.MissMin))
				}
			}
		}
	}
	if c := d.Delay; c != nil {
		bw.printf("Delay    scheduled arrival %s, value of time %g kg/min: cost index %g chosen (grid every %g to %g, refined to %g; %d plans)\n",
			c.ScheduledUTC, c.ValueOfTimeCI, c.CIUsed, c.StepCI, c.MaxCI, c.ToleranceCI, c.Plans)
		bw.printf("         arrives %s, %s; delay cost %.0f kg; total fuel %.0f + time %.0f + delay %.0f = %.0f kg-equivalent\n",
			c.ArrivalUTC, lateWords(c.DelayMin), c.DelayCostKg, c.FuelKg, c.TimeCostKg, c.DelayCostKg, c.TotalKg)
	}
}

func missWords(min float64) string {
	switch {
	case min > 0:
		return fmt.Sprintf("%.1f min after the window closes", min)
	case min < 0:
		return fmt.Sprintf("%.1f min before the window opens", -min)
	}
	return "inside the window"
}

func lateWords(min float64) string {
	if min >= 0 {
		return fmt.Sprintf("%.1f min late", min)
	}
	return fmt.Sprintf("%.1f min early", -min)
}

// arrivalCSV returns the extra columns of the legs CSV (header and the
// value every row repeats) for a plan with an arrival window or a delay
// cost; none otherwise.
func arrivalCSV(d *Doc) (head, vals []string) {
	if a := d.Arrival; a != nil {
		head = append(head, "arrive_by_utc", "window_early_min", "window_late_min", "ci_used", "arrival_utc", "arrival_met", "margin_after_open_min", "margin_before_close_min", "miss_min")
		vals = append(vals, a.TargetUTC, CSVNumber(a.WindowEarlyMin), CSVNumber(a.WindowLateMin), CSVNumber(a.CIUsed), a.ArrivalUTC,
			fmt.Sprint(a.Met), CSVNumber(a.MarginAfterOpenMin), CSVNumber(a.MarginBeforeCloseMin), CSVNumber(a.MissMin))
	}
	if c := d.Delay; c != nil {
		if d.Arrival == nil {
			head = append(head, "ci_used", "arrival_utc")
			vals = append(vals, CSVNumber(c.CIUsed), c.ArrivalUTC)
		}
		head = append(head, "scheduled_utc", "value_of_time_ci", "delay_min", "delay_cost_kg", "total_kg")
		vals = append(vals, c.ScheduledUTC, CSVNumber(c.ValueOfTimeCI), CSVNumber(c.DelayMin), CSVNumber(c.DelayCostKg), CSVNumber(c.TotalKg))
	}
	return head, vals
}
