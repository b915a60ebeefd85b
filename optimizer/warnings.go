package optimizer

import (
	"fmt"

	"levelpath/perf"
)

// addWarnings notes legs whose margin lies within 0.05 g of the floor and
// legs close to the thrust limit.
func addWarnings(p *Plan) {
	var near, thrust int
	var firstNear, firstThrust float64
	for _, l := range p.Legs {
		if l.Phase != PhaseCruise {
			continue
		}
		if l.BuffetMargin-l.Floor < 0.05 {
			if near == 0 {
				firstNear = l.FromDist
			}
			near++
		}
		if l.ResidualClimb < fpm300+100*perf.FtToM/60 {
			if thrust == 0 {
				firstThrust = l.FromDist
			}
			thrust++
		}
	}
	if near > 0 {
		p.Warnings = append(p.Warnings, fmt.Sprintf("%d cruise leg(s) within 0.05 g of the buffet floor, first at %.0f NM", near, firstNear/nmToM))
	}
	if thrust > 0 {
		p.Warnings = append(p.Warnings, fmt.Sprintf("%d cruise leg(s) limited by thrust (residual climb under 400 ft/min), first at %.0f NM", thrust, firstThrust/nmToM))
	}
}
