package optimizer

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"levelpath/perf"
)

// tablesAircraft is the demo-widebody model exported as operator tables
// and read back (perf.DefaultExportGrid); without thrust, the cruise
// table's optional thrust column is taken out first.
func tablesAircraft(t testing.TB, thrust bool) *perf.Aircraft {
	t.Helper()
	m := aircraft(t, "demo-widebody")
	dir := t.TempDir()
	if err := m.ExportTables(dir, perf.DefaultExportGrid(m)); err != nil {
		t.Fatal(err)
	}
	if !thrust {
		path := filepath.Join(dir, perf.CruiseFuelFlowFile)
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		var out []string
		for _, l := range strings.Split(strings.TrimRight(string(data), "\n"), "\n") {
			out = append(out, l[:strings.LastIndex(l, ",")])
		}
		if err := os.WriteFile(path, []byte(strings.Join(out, "\n")+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	a, err := perf.Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// Operator tables without their thrust column give no propulsion
// efficiency: over
// weather with humidity a plan from tables leaves its cruise unclassified
// and says why (never "no contrail"), and a contrail cost is an input
// error rather than a search that could not see contrails.
func TestTablesContrailsNotGuessed(t *testing.T) {
	wx, ref := demoWeather(t)
	c := contrailInstances[1]
	p := c.problem(t, wx, ref, 0)
	p.Aircraft = tablesAircraft(t, false)
	plan, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	if plan.Contrail == nil || plan.Contrail.PersistentNM != 0 || plan.Contrail.ShortLivedNM != 0 || !(plan.Contrail.UnknownNM > 0) {
		t.Fatalf("contrail totals from tables: %+v", plan.Contrail)
	}
	for _, l := range plan.Legs {
		if l.Contrail != "" {
			t.Fatalf("leg at FL%.0f classified %q from tables", l.FL, l.Contrail)
		}
	}
	found := false
	for _, w := range plan.Warnings {
		found = found || strings.Contains(w, "propulsion efficiency is unknown")
	}
	if !found {
		t.Errorf("no warning that contrails were not classified: %v", plan.Warnings)
	}
	if sec, err := ContrailSection(p, plan); err != nil || sec != nil {
		t.Errorf("contrail section from tables: %v, %v", sec, err)
	}
	p = c.problem(t, wx, ref, 5)
	p.Aircraft = tablesAircraft(t, false)
	_, err = Solve(p)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Field != "ContrailCost" || !strings.Contains(err.Error(), "hold no thrust") {
		t.Errorf("contrail cost with tables: %v", err)
	}
}

// Self-consistency check, not an outside one: with the thrust column the
// tables give a drag and so a propulsion efficiency, and the demo
// long-haul's contrails from the model's own exported tables are
// classified everywhere the model classifies them, with persistent-contrail
// distances within 10 % of the model's (the plans' profiles may differ
// by a segment, and the tables are interpolated).
func TestTablesContrailsWithThrust(t *testing.T) {
	wx, ref := demoWeather(t)
	c := contrailInstances[1]
	pm := c.problem(t, wx, ref, 0)
	model, err := Solve(pm)
	if err != nil {
		t.Fatal(err)
	}
	pt := c.problem(t, wx, ref, 0)
	pt.Aircraft = tablesAircraft(t, true)
	tab, err := Solve(pt)
	if err != nil {
		t.Fatal(err)
	}
	cm, ct := model.Contrail, tab.Contrail
	if cm == nil || ct == nil || ct.UnknownNM != cm.UnknownNM {
		t.Fatalf("contrail totals: model %+v, tables %+v", cm, ct)
	}
	if d := ct.PersistentNM - cm.PersistentNM; d > 0.1*cm.PersistentNM+1 || -d > 0.1*cm.PersistentNM+1 {
		t.Errorf("persistent contrails from tables %.0f NM, from the model %.0f NM", ct.PersistentNM, cm.PersistentNM)
	}
	t.Logf("persistent NM: model %.0f, tables %.0f; short-lived %.0f, %.0f", cm.PersistentNM, ct.PersistentNM, cm.ShortLivedNM, ct.ShortLivedNM)
	pc := c.problem(t, wx, ref, 5)
	pc.Aircraft = pt.Aircraft
	if _, err := Solve(pc); err != nil {
		t.Errorf("contrail cost with tables holding thrust: %v", err)
	}
}
