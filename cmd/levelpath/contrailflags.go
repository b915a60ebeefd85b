package main

import (
	"math"
	"strings"

	"github.com/spf13/cobra"

	"levelpath/winds"
)

// contrailFlags are --contrail-cost and --contrail-rhi, shared by plan,
// assess and batch.
type contrailFlags struct {
	cost float64
	rhi  float64
}

func (f *contrailFlags) register(c *cobra.Command) {
	c.Flags().Float64Var(&f.cost, "contrail-cost", 0, "kg of fuel equivalent per NM of cruise in persistent-contrail conditions, traded against fuel by the search (needs weather with humidity; 0: plan as without it)")
	c.Flags().Float64Var(&f.rhi, "contrail-rhi", 0, "relative humidity over ice, %, at or above which a contrail persists (0: 100)")
}

// check validates the flags against the weather files and their field
// (nil without --weather): a cost must be a finite number, 0 or more, and
// a positive one needs humidity in the weather.
func (f *contrailFlags) check(files []string, wx *winds.Field) error {
	return checkContrail(f.cost, f.rhi, files, wx, "--contrail-cost")
}

// checkContrail checks a contrail cost (named flag in messages) and
// persistence threshold.
func checkContrail(cost, rhi float64, files []string, wx *winds.Field, flag string) error {
	if math.IsNaN(cost) || math.IsInf(cost, 0) || cost < 0 {
		return badInputf("%s %v: want a finite number of kg per NM, 0 or more", flag, cost)
	}
	if rhi != 0 && !(rhi >= 50 && rhi <= 200) {
		return badInputf("--contrail-rhi %v: want 50..200 %% over ice, or 0 for 100", rhi)
	}
	if cost == 0 {
		return nil
	}
	if wx == nil {
		return badInputf("%s %v needs --weather with humidity (relative humidity, GRIB2 0.1.1, or specific humidity, 0.1.0, on isobaric levels)", flag, cost)
	}
	if !wx.Has(winds.ParamRH) && !wx.Has(winds.ParamQ) {
		return badInputf("%s %v: the weather %s holds no humidity (relative humidity, GRIB2 0.1.1 or GRIB1 52, or specific humidity, 0.1.0 or GRIB1 51, on isobaric levels)", flag, cost, strings.Join(files, ", "))
	}
	return nil
}
