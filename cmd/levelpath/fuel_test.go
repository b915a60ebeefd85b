package main

import (
	"strings"
	"testing"
)

// TestPlanKeepsItsRules: with a block that forces the flight off its
// levels, the plan steps down only where the level stops being available
// and breaks none of the rules it was asked to keep (assess of its own
// profile agrees).
func TestPlanKeepsItsRules(t *testing.T) {
	fs := demoFiles(t)
	args := []string{"--route", fs.Route, "--aircraft", "demo-widebody", "--mass", "245000", "--weather", fs.Weather,
		"--depart", "2026-12-01T20:00:00Z", "--ci", "40", "--block", "FL350,FL370@1000-3000"}
	d := planJSON(t, append([]string{"plan"}, args...)...)
	if v := d["violations"].([]any); len(v) != 0 || d["status"] != "ok" {
		t.Errorf("plan %s: status %v, violations %v", d["profile"], d["status"], v)
	}
	a := planJSON(t, append([]string{"assess", "--profile", d["profile"].(string)}, args...)...)
	if v := a["violations"].([]any); len(v) != 0 {
		t.Errorf("assess of %s: %v", d["profile"], v)
	}
	if a["baseline"] == nil {
		t.Errorf("assess computed no baseline: %v", a["baseline_note"])
	}
}

// TestPlanImpossibleWithMass: a take-off mass whose trip burns more than
// the tanks hold fails with exit 2 after the plan, naming the limit.
func TestPlanImpossibleWithMass(t *testing.T) {
	fs := demoFiles(t)
	code, out, errs := runCLI(t, "plan", "--route", fs.Route, "--aircraft", "demo-regional", "--mass", "40000", "--weather", fs.Weather, "--depart", "2026-12-01T20:00:00Z")
	if code != 2 || !strings.Contains(errs, "fuel-capacity") || !strings.Contains(out, "IMPOSSIBLE") {
		t.Errorf("exit %d, stderr %q, table status missing: %v", code, errs, !strings.Contains(out, "IMPOSSIBLE"))
	}
}
