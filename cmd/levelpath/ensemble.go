package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
	"levelpath/perf"
	"levelpath/winds"
)

// ensembleFlags are plan's and assess's ensemble flags: --member keeps
// one member of an ensemble file; --ensemble plans (or prices) one profile
// on every member, with --objective and --robust-share.
type ensembleFlags struct {
	member      int
	ensemble    bool
	objective   string
	robustShare float64
	memberMach  bool

	obj     optimizer.Objective
	members []optimizer.Member // opened by open
}

func (e *ensembleFlags) register(c *cobra.Command) {
	fl := c.Flags()
	fl.IntVar(&e.member, "member", 0, "of an ensemble forecast in --weather, use member N only (GRIB2 perturbation number; 0 is the control)")
	fl.BoolVar(&e.ensemble, "ensemble", false, "plan one profile for every member of the ensemble forecast in --weather (one file, or one per member) and report its spread over them")
	fl.StringVar(&e.objective, "objective", "mean", "with --ensemble: minimise the members' mean cost, or quantile:Q of their costs (e.g. quantile:0.9; a heuristic)")
	fl.Float64Var(&e.robustShare, "robust-share", 1, "with --ensemble: share of members, in (0, 1], in which every leg must keep the buffet floor and the other limits")
	fl.BoolVar(&e.memberMach, "member-mach", false, "with --ensemble: price each member at its own econ Mach in the search too (slower; default: the control's Mach, each member's own in the priced results)")
}

// registerBatch registers batch's ensemble flags: --member, --ensemble,
// --objective and --robust-share.
func (e *ensembleFlags) registerBatch(c *cobra.Command) {
	fl := c.Flags()
	fl.IntVar(&e.member, "member", 0, "of an ensemble forecast in --weather, plan on member N only (GRIB2 perturbation number; 0 is the control)")
	fl.BoolVar(&e.ensemble, "ensemble", false, "plan each flight's one profile for every member of the ensemble forecast in --weather; results gain fuel_p10_kg, fuel_p90_kg and min_margin_all_members_g")
	fl.StringVar(&e.objective, "objective", "mean", "with --ensemble: minimise the members' mean cost, or quantile:Q of their costs (a heuristic)")
	fl.Float64Var(&e.robustShare, "robust-share", 1, "with --ensemble: share of members, in (0, 1], in which every leg must keep its limits")
}

// check validates the ensemble flags; other names the flags of cmd that
// an ensemble plan does not combine with.
func (e *ensembleFlags) check(cmd *cobra.Command, weather []string) error {
	ch := cmd.Flags().Changed
	if !e.ensemble {
		for _, n := range []string{"objective", "robust-share", "member-mach"} {
			if cmd.Flags().Lookup(n) != nil && ch(n) {
				return badInputf("--%s needs --ensemble", n)
			}
		}
	}
	if ch("member") {
		if e.ensemble {
			return badInputf("--member %d and --ensemble: choose one member, or every member", e.member)
		}
		if e.member < 0 {
			return badInputf("--member %d: a member is a perturbation number, 0 or more", e.member)
		}
		if len(weather) == 0 {
			return badInputf("--member %d needs --weather", e.member)
		}
	}
	if !e.ensemble {
		return nil
	}
	if len(weather) == 0 {
		return badInputf("--ensemble needs --weather (an ensemble forecast)")
	}
	o, err := optimizer.ParseObjective(e.objective)
	if err != nil {
		return badInputf("--objective: %v", err)
	}
	e.obj = o
	if err := optimizer.CheckRobustShare(e.robustShare); err != nil {
		return badInputf("--robust-share %v: %v", e.robustShare, err)
	}
	for _, n := range []string{"alternatives", "from-nm", "from-waypoint"} {
		if cmd.Flags().Lookup(n) != nil && ch(n) {
			return badInputf("--ensemble does not combine with --%s (plan one member with --member N for that)", n)
		}
	}
	return nil
}

// memberHint adds the command-line names to an error about several
// ensemble members in a file opened as one forecast: --member N, and
// --ensemble where the command has it (withEnsemble).
func memberHint(err error, withEnsemble bool) error {
	var me *winds.MemberError
	if errors.As(err, &me) && strings.Contains(me.What, "Options.Member") {
		if !withEnsemble {
			return badInputf("%v (on the command line: --member N)", err)
		}
		return badInputf("%v (on the command line: --member N, or --ensemble)", err)
	}
	return err
}

// weatherOpts returns o with --member applied.
func (e *ensembleFlags) weatherOpts(cmd *cobra.Command, o weatherOpts) weatherOpts {
	if cmd.Flags().Changed("member") {
		n := e.member
		o.member = &n
	}
	return o
}

// open opens every member of the ensemble at paths (cruise levels as
// loadWeather keeps them) and returns the control's field.
func (e *ensembleFlags) open(paths []string, o weatherOpts) (*winds.Field, error) {
	if o.budgetMiB <= 0 || o.budgetMiB > 1<<24 {
		return nil, badInputf("--weather-budget-mib %d: want 1..%d", o.budgetMiB, 1<<24)
	}
	for _, p := range paths {
		if _, err := os.Stat(p); err != nil {
			return nil, badInputf("weather file %s: %w", p, err)
		}
	}
	ens, err := winds.Options{Budget: o.budgetMiB << 20, EDRParam: o.edrParam}.OpenEnsembleBetween(perf.FLToPressure(600), perf.FLToPressure(50), paths...)
	if err != nil {
		return nil, badInput(err)
	}
	e.members = make([]optimizer.Member, len(ens.Members))
	for i, n := range ens.Members {
		e.members[i] = optimizer.Member{Number: n, Weather: ens.Fields[i]}
	}
	return ens.Fields[0], nil
}

// problem is the ensemble problem of flight p.
func (e *ensembleFlags) problem(p *optimizer.Problem) *optimizer.EnsembleProblem {
	return &optimizer.EnsembleProblem{Problem: *p, Members: e.members, Objective: e.obj, RobustShare: e.robustShare,
		MemberMach: e.memberMach, Regret: true}
}

// solve plans p on every member.
func (e *ensembleFlags) solve(p *optimizer.Problem) (*optimizer.Plan, error) {
	plan, err := optimizer.SolveEnsemble(context.Background(), e.problem(p))
	if err == nil {
		plan.Warnings = append(plan.Warnings, e.note())
	}
	return plan, err
}

// assess prices prof on every member.
func (e *ensembleFlags) assess(p *optimizer.Problem, prof optimizer.Profile) (*optimizer.Plan, error) {
	plan, err := optimizer.AssessEnsemble(context.Background(), e.problem(p), prof)
	if err == nil {
		plan.Warnings = append(plan.Warnings, e.note())
	}
	return plan, err
}

// note says what the plan's legs and totals are.
func (e *ensembleFlags) note() string {
	return fmt.Sprintf("ensemble of %d members: legs and totals are the control member's (member %d); the ensemble section gives every member's", len(e.members), e.members[0].Number)
}
