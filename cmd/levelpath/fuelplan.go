package main

import (
	"fmt"
	"math"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"levelpath/optimizer"
)

// fuelPlanFlags are plan's dispatch fuel-plan flags: --zfw without --fuel
// makes a fuel plan (optimizer.PlanFuel).
type fuelPlanFlags struct {
	policy, alternate string
	extraKg           float64
}

func (f *fuelPlanFlags) register(c *cobra.Command, pf *problemFlags) {
	pf.zfwOnly = true
	fl := c.Flags()
	fl.StringVar(&f.policy, "policy", "", "fuel policy YAML file (with --zfw alone; default: "+defaultPolicyText()+")")
	fl.StringVar(&f.alternate, "alternate", "", "alternate route from the destination (within 5 NM) to the alternate: file or inline \"lat,lon lat,lon ...\"")
	fl.Float64Var(&f.extraKg, "extra-kg", 0, "discretionary (extra) fuel, kg, added to the policy's")
}

// defaultPolicyText summarises the default fuel policy for help text.
func defaultPolicyText() string {
	p := optimizer.DefaultFuelPolicy()
	return fmt.Sprintf("contingency %g %% of trip but at least %g min holding, final reserve %g min holding at %g ft, taxi %g min at idle",
		p.ContingencyPct, p.ContingencyMinMinutes, p.FinalReserveMinutes, p.HoldingHeightFt, p.TaxiMinutes)
}

// active reports whether a fuel plan was asked for: --zfw without --fuel
// or --mass. Its flags without --zfw alone are an error in request.
func (f *fuelPlanFlags) active(c *cobra.Command) bool {
	fs := c.Flags()
	if inFlightAsked(c) {
		return false
	}
	if fs.Changed("zfw") && !fs.Changed("fuel") && !fs.Changed("mass") {
		return true
	}
	return fs.Changed("policy") || fs.Changed("alternate") || fs.Changed("extra-kg")
}

// request builds the fuel request for problem p.
func (f *fuelPlanFlags) request(c *cobra.Command, pf *problemFlags, p *optimizer.Problem) (optimizer.FuelRequest, error) {
	var req optimizer.FuelRequest
	fs := c.Flags()
	if !fs.Changed("zfw") || fs.Changed("fuel") || fs.Changed("mass") {
		return req, badInputf("--policy, --alternate and --extra-kg make a fuel plan: give --zfw alone (not --mass or --fuel)")
	}
	return f.build(c, pf, p)
}

// build loads the policy and alternate into a fuel request.
func (f *fuelPlanFlags) build(c *cobra.Command, pf *problemFlags, p *optimizer.Problem) (optimizer.FuelRequest, error) {
	var req optimizer.FuelRequest
	fs := c.Flags()
	pol := optimizer.DefaultFuelPolicy()
	if f.policy != "" {
		var err error
		if pol, err = readPolicy(f.policy); err != nil {
			return req, err
		}
	} else {
		warnf(c.ErrOrStderr(), "no --policy: the default fuel policy (%s)", defaultPolicyText())
	}
	if fs.Changed("extra-kg") {
		if math.IsNaN(f.extraKg) || math.IsInf(f.extraKg, 0) || f.extraKg < 0 || f.extraKg > 200000 {
			return req, badInputf("--extra-kg %v: want 0..200000", f.extraKg)
		}
		pol.ExtraKg += f.extraKg
	}
	req = optimizer.FuelRequest{Problem: p, ZFW: pf.zfw, Policy: pol}
	if f.alternate != "" {
		tr, err := buildTrack(f.alternate, pf.levels, pf.maxSegNM, pf.date, p.Depart, c.ErrOrStderr())
		if err != nil {
			return req, fmt.Errorf("--alternate: %w", err)
		}
		req.Alternate = tr
	}
	if len(p.Blocked) > 0 {
		warnf(c.ErrOrStderr(), "--block applies to the route, not to the alternate (%s)", strings.Join(pf.blocks, " "))
	}
	return req, nil
}

// readPolicy reads a fuel policy file (at most 64 KiB) for --policy.
func readPolicy(path string) (optimizer.FuelPolicy, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return optimizer.FuelPolicy{}, badInputf("--policy %s: %v", path, err)
	}
	if !fi.Mode().IsRegular() || fi.Size() > 1<<16 {
		return optimizer.FuelPolicy{}, badInputf("--policy %s: want a regular file of at most 65536 bytes", path)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return optimizer.FuelPolicy{}, badInputf("--policy %s: %v", path, err)
	}
	pol, err := optimizer.ParseFuelPolicy(data, path)
	if err != nil {
		return optimizer.FuelPolicy{}, badInput(err)
	}
	return pol, nil
}
