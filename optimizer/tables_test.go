package optimizer

import (
	"errors"
	"strings"
	"testing"

	"levelpath/perf"
)

// tablesAircraft is the demo-widebody model exported as operator tables
// and read back (perf.DefaultExportGrid).
func tablesAircraft(t testing.TB) *perf.Aircraft {
	t.Helper()
	m := aircraft(t, "demo-widebody")
	dir := t.TempDir()
	if err := m.ExportTables(dir, perf.DefaultExportGrid(m)); err != nil {
		t.Fatal(err)
	}
	a, err := perf.Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// Operator tables hold no thrust, so no propulsion efficiency: over
// weather with humidity a plan from tables leaves its cruise unclassified
// and says why (never "no contrail"), and a contrail cost is an input
// error rather than a search that could not see contrails.
func TestTablesContrailsNotGuessed(t *testing.T) {
	wx, ref := demoWeather(t)
	c := contrailInstances[1]
	p := c.problem(t, wx, ref, 0)
	p.Aircraft = tablesAircraft(t)
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
	p.Aircraft = tablesAircraft(t)
	_, err = Solve(p)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Field != "ContrailCost" || !strings.Contains(err.Error(), "hold no thrust") {
		t.Errorf("contrail cost with tables: %v", err)
	}
}
