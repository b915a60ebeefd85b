package planjson

import (
	"fmt"

	"levelpath/optimizer"
)

// Ensemble is the ensemble section of a plan: the profile's distribution
// over the members of an ensemble forecast (optimizer.EnsembleReport).
type Ensemble struct {
	Members     int     `json:"members"`
	Numbers     []int   `json:"member_numbers"`
	Objective   string  `json:"objective"`
	RobustShare float64 `json:"robust_share"`
	Need        int     `json:"members_needed"`
	Chosen      string  `json:"chosen"`
	// Profile is the chosen (or assessed) profile on every member,
	// Control the control member's own best profile on every member.
	Profile        EnsembleProfile  `json:"profile"`
	Control        *EnsembleProfile `json:"control_own,omitempty"`
	PerMember      []MemberResult   `json:"per_member"`
	Regret         *Spread          `json:"regret,omitempty"`
	FuelBand       []BandPoint      `json:"fuel_used_band"`
	Approximations []string         `json:"approximations"`
}

// Spread is a distribution over the members: least, P10, P50, P90,
// greatest (null where no member has a value).
type Spread struct {
	Min *float64 `json:"min"`
	P10 *float64 `json:"p10"`
	P50 *float64 `json:"p50"`
	P90 *float64 `json:"p90"`
	Max *float64 `json:"max"`
}

// EnsembleProfile is one profile priced on every member.
type EnsembleProfile struct {
	Profile          string   `json:"profile"`
	Objective        *float64 `json:"objective"`
	MeanCost         *float64 `json:"mean_cost"`
	FuelKg           Spread   `json:"fuel_kg"`
	TimeMin          Spread   `json:"time_min"`
	Cost             Spread   `json:"cost"`
	MarginG          Spread   `json:"min_margin_g"`
	MarginAboveFloor Spread   `json:"min_margin_above_floor_g"`
	Breaking         int      `json:"members_breaking_limits"`
}

// MemberResult is the chosen profile on one member.
type MemberResult struct {
	Member           int      `json:"member"`
	FuelKg           *float64 `json:"fuel_kg"`
	TimeMin          *float64 `json:"time_min"`
	Cost             *float64 `json:"cost"`
	MinMarginG       *float64 `json:"min_margin_g"`
	MarginAboveFloor *float64 `json:"min_margin_above_floor_g"`
	Violations       int      `json:"violations"`
	OwnProfile       string   `json:"own_profile,omitempty"`
	OwnCost          *float64 `json:"own_cost"`
	Regret           *float64 `json:"regret"`
}

// BandPoint is the spread of fuel used at one distance.
type BandPoint struct {
	AtNM   float64 `json:"at_nm"`
	UsedKg Spread  `json:"used_kg"`
}

func spread(s optimizer.Spread) Spread {
	return Spread{Min: Number(s.Min), P10: Number(s.P10), P50: Number(s.P50), P90: Number(s.P90), Max: Number(s.Max)}
}

func minutes(s optimizer.Spread) optimizer.Spread {
	return optimizer.Spread{Min: s.Min / 60, P10: s.P10 / 60, P50: s.P50 / 60, P90: s.P90 / 60, Max: s.Max / 60}
}

func ensembleProfile(p *optimizer.EnsembleProfile) EnsembleProfile {
	return EnsembleProfile{Profile: p.Profile.String(), Objective: Number(p.Objective), MeanCost: Number(p.MeanCost),
		FuelKg: spread(p.Fuel), TimeMin: spread(minutes(p.Time)), Cost: spread(p.Cost), MarginG: spread(p.Margin),
		MarginAboveFloor: spread(p.MarginAboveFloor), Breaking: p.Breaking}
}

// ensembleDoc converts a plan's ensemble report (nil: none).
func ensembleDoc(r *optimizer.EnsembleReport) *Ensemble {
	if r == nil {
		return nil
	}
	e := &Ensemble{Members: r.Members, Numbers: r.Numbers, Objective: r.Objective, RobustShare: r.RobustShare, Need: r.Need,
		Chosen: r.Chosen, Profile: ensembleProfile(r.Profile), Approximations: append([]string{}, r.Approximations...)}
	if r.Control != nil {
		c := ensembleProfile(r.Control)
		e.Control = &c
	}
	for _, m := range r.PerMember {
		mr := MemberResult{Member: m.Member, FuelKg: Number(m.Fuel), TimeMin: Number(m.Time / 60), Cost: Number(m.Cost), MinMarginG: Number(m.MinMargin),
			MarginAboveFloor: Number(m.MarginAboveFloor), Violations: m.Violations, OwnCost: Number(m.OwnCost), Regret: Number(m.Regret)}
		if m.OwnProfile != nil {
			mr.OwnProfile = m.OwnProfile.String()
		}
		e.PerMember = append(e.PerMember, mr)
	}
	if r.Regret != nil {
		s := spread(*r.Regret)
		e.Regret = &s
	}
	e.FuelBand = []BandPoint{}
	for _, b := range r.FuelBand {
		e.FuelBand = append(e.FuelBand, BandPoint{AtNM: b.Dist / mPerNM, UsedKg: spread(b.Used)})
	}
	return e
}

// writeEnsemble prints the table's ensemble summary: the chosen profile's
// and the control's own profile's spread over the members, and regrets.
func writeEnsemble(bw *errWriter, e *Ensemble) {
	if e == nil {
		return
	}
	bw.printf("\nEnsemble (%d members, objective %s, limits kept in %d of %d members; profile from the %s)\n", e.Members, e.Objective, e.Need, e.Members, e.Chosen)
	row := func(name string, p *EnsembleProfile) {
		mean := "-"
		if p.MeanCost != nil {
			mean = fmt.Sprintf("%.0f", *p.MeanCost)
		}
		bw.printf("  %s %s: mean cost %s, members breaking a limit: %d\n", name, p.Profile, mean, p.Breaking)
		bw.printf("    %-9s %s\n", "", "      min       P10       P50       P90       max")
		bw.printf("    %-9s %s\n", "fuel kg", spreadText(p.FuelKg, "%9.0f"))
		bw.printf("    %-9s %s\n", "time min", spreadText(p.TimeMin, "%9.1f"))
		bw.printf("    %-9s %s\n", "cost", spreadText(p.Cost, "%9.0f"))
		bw.printf("    %-9s %s\n", "margin g", spreadText(p.MarginG, "%9.3f"))
	}
	row("profile", &e.Profile)
	if e.Control != nil {
		row("control member's own profile", e.Control)
	}
	if e.Regret != nil {
		bw.printf("  regret (what a member's own best profile would have saved it)\n    %-9s %s\n", "cost", spreadText(*e.Regret, "%9.1f"))
	}
	for _, a := range e.Approximations {
		bw.printf("  approximation: %s\n", a)
	}
}

func spreadText(s Spread, f string) string {
	out := ""
	for _, x := range []*float64{s.Min, s.P10, s.P50, s.P90, s.Max} {
		if out != "" {
			out += " "
		}
		if x == nil {
			out += "        -"
			continue
		}
		out += fmt.Sprintf(f, *x)
	}
	return out
}
