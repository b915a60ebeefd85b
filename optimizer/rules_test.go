package optimizer

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"
)

// TestNewStepRules checks the dispatcher-unit constructor: feet and NM in,
// SI out, 0 NM meaning no minimum, and each refusal naming its field.
func TestNewStepRules(t *testing.T) {
	r, err := NewStepRules(4000, true, 100, 3, false)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.MaxChange-1219.2) > 1e-9 || math.Abs(r.MinDistance-185200) > 1e-9 || r.NoMinDistance || !r.AllowDescent || r.MaxSteps != 3 {
		t.Errorf("NewStepRules(4000 ft, 100 NM) = %+v; want 1219.2 m (4,000 x 0.3048), 185,200 m (100 x 1,852)", r)
	}
	if r, err := NewStepRules(2000, false, 0, 0, false); err != nil || !r.NoMinDistance || r.MinDistance != 0 {
		t.Errorf("min 0 NM = %+v, %v; want NoMinDistance", r, err)
	}
	for _, c := range []struct {
		ft, steps int
		nm        float64
		field     string
	}{
		{999, 0, 100, "Steps.MaxChange"},
		{10001, 0, 100, "Steps.MaxChange"},
		{4000, 0, -1, "Steps.MinDistance"},
		{4000, 0, math.NaN(), "Steps.MinDistance"},
		{4000, 0, MaxBlockNM + 1, "Steps.MinDistance"},
		{4000, -1, 100, "Steps.MaxSteps"},
		{4000, MaxStepsLimit + 1, 100, "Steps.MaxSteps"},
	} {
		_, err := NewStepRules(c.ft, false, c.nm, c.steps, false)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("NewStepRules(%d ft, %v NM, %d steps) = %v; want an InputError on %s", c.ft, c.nm, c.steps, err, c.field)
		}
	}
}

// TestStepRulesNone: a minimum distance given with NoMinDistance, or a
// negative one, is refused rather than read by a sign convention; a
// minimum spanning more segments than a node can count is an input error,
// not a silent clamp.
func TestStepRulesNone(t *testing.T) {
	base := &Problem{Track: track(t, longHaulRoute, "every-1000:290-430", 10), Aircraft: aircraft(t, "demo-widebody"),
		Depart: time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC), TakeoffMass: 245000}
	for _, c := range []struct {
		name  string
		steps StepRules
	}{
		{"both", StepRules{MinDistance: 100 * nmToM, NoMinDistance: true}},
		{"negative", StepRules{MinDistance: -1}},
		{"too many segments", StepRules{MinDistance: 19000 * nmToM}},
	} {
		p := *base
		p.Steps = c.steps
		_, err := Solve(&p)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != "Steps.MinDistance" {
			t.Errorf("%s: Solve = %v; want an InputError on Steps.MinDistance", c.name, err)
		}
	}
}

// TestParseRules: the text forms every entry point reads.
func TestParseRules(t *testing.T) {
	b, err := ParseBlock("FL370, FL390@1200-1800")
	if err != nil || len(b.Levels) != 2 || b.Levels[0] != 370 || b.Levels[1] != 390 || b.FromDist != 1200*1852 || b.ToDist != 1800*1852 {
		t.Errorf("ParseBlock = %+v, %v", b, err)
	}
	for _, s := range []string{"FL370", "FL370@1800-1200", "FL370@0-1e6", "FL999@0-10", "FL370@x-10"} {
		if _, err := ParseBlock(s); err == nil || !strings.HasPrefix(InputMsg(err), `"`+s+`"`) {
			t.Errorf("ParseBlock(%q) = %v; want an error starting with the value", s, err)
		}
	}
	r, err := ParseTurbulence("0.20:1.5, 0.45:closed")
	if err != nil || len(r) != 2 || r[0].Floor != 1.5 || !r[1].Closed {
		t.Errorf("ParseTurbulence = %+v, %v", r, err)
	}
	for _, s := range []string{"0.2", "-1:1.5", "inf:closed", "0.2:9", "0.2:open"} {
		if _, err := ParseTurbulence(s); err == nil {
			t.Errorf("ParseTurbulence(%q) accepted", s)
		}
	}
}
