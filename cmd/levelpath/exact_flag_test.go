package main

import (
	"strings"
	"testing"
)

// TestExactFlagAndBucket: --exact plans the same flight with the search's
// approximations off, within 0.02 % of the default's cost, and an absurd
// --mass-bucket-kg is bad input (exit 2) naming the flag's field.
func TestExactFlagAndBucket(t *testing.T) {
	fs := demoFiles(t)
	args := []string{"plan", "--route", fs.Routes[2], "--aircraft", "demo-narrowbody", "--mass", "72000", "--weather", fs.Weather,
		"--depart", "2026-12-01T21:00:00Z", "--ci", "20"}
	def := planJSON(t, args...)
	ex := planJSON(t, append(args, "--exact")...)
	dc := def["totals"].(map[string]any)["cost"].(float64)
	ec := ex["totals"].(map[string]any)["cost"].(float64)
	if d := (dc - ec) / ec; d > 2e-4 {
		t.Errorf("default cost %.2f, --exact %.2f: %.4f %% more", dc, ec, 100*d)
	}
	code, _, errs := runCLI(t, append(args, "--mass-bucket-kg", "0.0001")...)
	if code != 2 || !strings.Contains(errs, "mass-bucket") {
		t.Errorf("--mass-bucket-kg 0.0001: exit %d, stderr %q; want exit 2 naming mass-bucket", code, errs)
	}
}
