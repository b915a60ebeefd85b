package main

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"
)

// stepSegments returns each step of a plan JSON as "FROM>TO" and the
// route segment where it starts (the segment of the step leg).
func stepSegments(t *testing.T, d map[string]any) (names []string, segs []int) {
	t.Helper()
	for _, s := range d["steps"].([]any) {
		sm := s.(map[string]any)
		at := sm["at_nm"].(float64)
		seg := -1
		for _, l := range d["legs"].([]any) {
			lm := l.(map[string]any)
			if lm["phase"] == "step" && abs(lm["from_nm"].(float64)-at) < 0.5 {
				seg = int(lm["segment"].(float64))
				break
			}
		}
		if seg < 0 {
			t.Fatalf("no step leg at %.1f NM", at)
		}
		names = append(names, fmt.Sprintf("FL%.0f>FL%.0f", sm["from_fl"], sm["to_fl"]))
		segs = append(segs, seg)
	}
	return names, segs
}

// Self-consistency check, not an outside one: the demo long-haul planned
// from the demo-widebody model's own exported tables (aircraft export,
// default grid) must cost within 0.3 % of planning with the model, with
// the same steps, each starting in the same route segment or the next or
// previous one. The tables are the model sampled on a grid and
// interpolated multilinearly, so this checks the table reader, the
// interpolation and the table-backed aircraft against the model they came
// from; the model's outside checks (perf tests) stay as they are.
func TestPlanFromExportedTables(t *testing.T) {
	fs := demoFiles(t)
	dir := filepath.Join(t.TempDir(), "widebody-tables")
	if code, out, errs := runCLI(t, "aircraft", "export", "--aircraft", "demo-widebody", "--out", dir); code != 0 || !strings.Contains(out, "format version 2") {
		t.Fatalf("export: exit %d\n%s%s", code, out, errs)
	}
	args := []string{"--route", fs.Route, "--mass", "245000", "--weather", fs.Weather, "--depart", "2026-12-01T20:00:00Z", "--ci", "40"}
	model := planJSON(t, append([]string{"plan", "--aircraft", "demo-widebody"}, args...)...)
	tab := planJSON(t, append([]string{"plan", "--aircraft", dir}, args...)...)
	cm := model["totals"].(map[string]any)["cost"].(float64)
	ct := tab["totals"].(map[string]any)["cost"].(float64)
	if rel := abs(ct-cm) / cm; rel > 0.003 {
		t.Errorf("cost from tables %.1f, from the model %.1f: %.3f %% apart, want at most 0.3 %%", ct, cm, 100*rel)
	}
	nm, sm := stepSegments(t, model)
	nt, st := stepSegments(t, tab)
	if strings.Join(nm, " ") != strings.Join(nt, " ") {
		t.Fatalf("steps from tables %v, from the model %v", nt, nm)
	}
	for i := range sm {
		if d := st[i] - sm[i]; d < -1 || d > 1 {
			t.Errorf("step %s starts in segment %d from tables, %d from the model", nm[i], st[i], sm[i])
		}
	}
	t.Logf("cost: model %.1f, tables %.1f (%+.3f %%); steps %v in segments %v (model) and %v (tables)", cm, ct, 100*(ct-cm)/cm, nm, sm, st)

	// Assess and envelope take the directory too.
	a := planJSON(t, append([]string{"assess", "--aircraft", dir, "--profile", tab["profile"].(string)}, args...)...)
	if ca := a["totals"].(map[string]any)["cost"].(float64); abs(ca-ct) > 1e-6*ct {
		t.Errorf("assess of the tables' plan costs %.3f, the plan %.3f", ca, ct)
	}
	if code, out, errs := runCLI(t, "envelope", "--aircraft", dir, "--mass", "231000", "--isa-dev", "10"); code != 0 || !strings.Contains(out, "Maximum level") {
		t.Errorf("envelope from tables: exit %d\n%s%s", code, out, errs)
	}
	// Outside the tables (ISA+35, the table ends at ISA+30) a plan is an
	// input error naming the segment, the axis and the table's range.
	code, _, errs := runCLI(t, "plan", "--aircraft", dir, "--route", fs.Route, "--mass", "245000", "--isa-dev", "35", "--ci", "40")
	if code != 2 || !strings.Contains(errs, "segment 0") || !strings.Contains(errs, "isa_dev_k 35 outside the table's -30..30") {
		t.Errorf("plan at ISA+35 from tables: exit %d, %q", code, errs)
	}
}
