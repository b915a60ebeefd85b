package main

import (
	"strings"
	"testing"
)

// --perf-factor and --isa-dev reach the plan and are named in its human and
// JSON output; out-of-range values and --isa-dev with a forecast that has
// temperatures are bad input (exit 2) naming the flag.
func TestPerfFactorAndISADevFlags(t *testing.T) {
	fs := demoFiles(t)
	args := []string{"plan", "--route", fs.Routes[2], "--aircraft", "demo-narrowbody", "--mass", "72000"}
	d := planJSON(t, append(args, "--perf-factor", "3", "--isa-dev", "12")...)
	var warn strings.Builder
	for _, w := range d["warnings"].([]any) {
		warn.WriteString(w.(string) + "\n")
	}
	if !strings.Contains(warn.String(), "performance factor +3.0 %") || !strings.Contains(warn.String(), "ISA+12") {
		t.Errorf("warnings %q", warn.String())
	}
	for _, l := range d["legs"].([]any) {
		if dev := l.(map[string]any)["isa_dev_c"].(float64); abs(dev-12) > 1e-9 {
			t.Fatalf("leg ISA deviation %v, want 12", dev)
		}
	}
	code, out, errs := runCLI(t, append(args, "--perf-factor", "3")...)
	if code != 0 || !strings.Contains(out+errs, "performance factor +3.0 %") {
		t.Errorf("human output (exit %d) does not name the factor:\n%s\n%s", code, out, errs)
	}
	for _, tc := range []struct {
		extra []string
		want  string
	}{
		{[]string{"--perf-factor", "80"}, "--perf-factor"},
		{[]string{"--perf-factor", "NaN"}, "--perf-factor"},
		{[]string{"--isa-dev", "99"}, "--isa-dev"},
		{[]string{"--isa-dev", "5", "--weather", fs.Weather, "--depart", "2026-12-01T21:00:00Z"}, "ISA deviation applies only where the weather has no temperature"},
	} {
		code, _, errs := runCLI(t, append(args, tc.extra...)...)
		if code != 2 || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, stderr %q, want exit 2 naming %s", tc.extra, code, errs, tc.want)
		}
	}
}
