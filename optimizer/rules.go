package optimizer

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"levelpath/route"
)

// The text forms of a plan's rules, read the same way by every entry point
// (the command line, batch runs and the service). Each parser returns an
// *InputError naming the Problem field; its Msg starts with the value as
// given, so a caller can put its own name for the input in front of it.

// MaxBlockNM bounds the distances of a Block and of the least distance
// between steps, NM: ten times the longest flight (about 10,000 NM), so
// every real value passes and no arithmetic on one overflows.
const MaxBlockNM = 1e5

// ParseBlock reads levels unavailable over a stretch of route,
// "FL370,FL390@1200-1800": flight levels (route.ParseFL) and distances in
// NM from departure with 0 <= FROM < TO <= MaxBlockNM.
func ParseBlock(s string) (Block, error) {
	var b Block
	lv, rng, ok := strings.Cut(s, "@")
	from, to, ok2 := strings.Cut(rng, "-")
	if !ok || !ok2 {
		return b, inputErrorf("Blocked", "%q: want FL370,FL390@FROM_NM-TO_NM", s)
	}
	x, err1 := strconv.ParseFloat(strings.TrimSpace(from), 64)
	y, err2 := strconv.ParseFloat(strings.TrimSpace(to), 64)
	if err1 != nil || err2 != nil || !(x >= 0) || !(y > x) || !(y <= MaxBlockNM) {
		return b, inputErrorf("Blocked", "%q: distances must be numbers of NM with 0 <= FROM < TO <= %.0f", s, float64(MaxBlockNM))
	}
	b.FromDist, b.ToDist = x*nmToM, y*nmToM
	for l := range strings.SplitSeq(lv, ",") {
		n, err := route.ParseFL(l)
		if err != nil {
			return b, inputErrorf("Blocked", "%q: level %q %v", s, l, err)
		}
		b.Levels = append(b.Levels, n)
	}
	return b, nil
}

// ParseTurbulence reads turbulence rules, "0.20:1.5,0.45:closed": items
// EDR:FLOOR (a floor in MinFloor..MaxFloor g) or EDR:closed, EDR a positive
// finite number (m^(2/3)/s).
func ParseTurbulence(s string) ([]TurbulenceRule, error) {
	var out []TurbulenceRule
	for part := range strings.SplitSeq(s, ",") {
		e, v, ok := strings.Cut(strings.TrimSpace(part), ":")
		edr, err := strconv.ParseFloat(strings.TrimSpace(e), 64)
		if !ok || err != nil || !(edr > 0) || math.IsInf(edr, 0) {
			return nil, inputErrorf("Turbulence", "%q: item %q: want EDR:FLOOR or EDR:closed", s, part)
		}
		r := TurbulenceRule{EDR: edr}
		v = strings.TrimSpace(v)
		if v == "closed" {
			r.Closed = true
		} else if fl, err := strconv.ParseFloat(v, 64); err == nil && CheckFloor(fl) == nil {
			r.Floor = fl
		} else {
			return nil, inputErrorf("Turbulence", "%q: item %q: floor must be %.1f..%.1f g or closed", s, part, MinFloor, MaxFloor)
		}
		out = append(out, r)
	}
	return out, nil
}

// NewStepRules builds step rules from a dispatcher's units: the largest
// step in feet (1,000..10,000), whether step descents are allowed, the
// least distance between steps in NM (0..MaxBlockNM; 0 means none, unlike
// StepRules' zero value), the most steps (0: no limit) and none (a constant
// level). Errors are *InputErrors naming the StepRules field, their Msg
// starting with the value.
func NewStepRules(maxStepFt int, descents bool, minStepNM float64, maxSteps int, none bool) (StepRules, error) {
	if !(minStepNM >= 0 && minStepNM <= MaxBlockNM) {
		return StepRules{}, inputErrorf("Steps.MinDistance", "%v: must lie in 0..%.0f", minStepNM, float64(MaxBlockNM))
	}
	if maxStepFt < 1000 || maxStepFt > 10000 {
		return StepRules{}, inputErrorf("Steps.MaxChange", "%d: must lie in 1000..10000", maxStepFt)
	}
	if maxSteps < 0 || maxSteps > MaxStepsLimit {
		return StepRules{}, inputErrorf("Steps.MaxSteps", "%d: must lie in 0..%d", maxSteps, MaxStepsLimit)
	}
	r := StepRules{MaxChange: float64(maxStepFt) * ftToM, AllowDescent: descents, MinDistance: minStepNM * nmToM, MaxSteps: maxSteps, NoSteps: none}
	if minStepNM == 0 {
		r.NoMinDistance = true
	}
	return r, nil
}

// InputMsg returns err's message without the Problem field in front when
// err is an *InputError, else err's text: for callers that name the input
// their own way (a flag, a request field).
func InputMsg(err error) string {
	var ie *InputError
	if errors.As(err, &ie) && ie.Msg != "" {
		return ie.Msg
	}
	return fmt.Sprint(err)
}
