package batch

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

// writeSchedule writes a schedule of n flights (and any extra raw lines)
// with one route file beside it, and returns its path. The numbers are
// arbitrary test inputs for orchestration only; no check compares them
// with a physical value.
func writeSchedule(t testing.TB, dir string, n int, extra ...string) string {
	t.Helper()
	if err := os.WriteFile(filepath.Join(dir, "route.geojson"), []byte("{}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	b.WriteString("flight,departure,route,aircraft,tow_kg,ci,floor_g\n")
	for i := range n {
		fmt.Fprintf(&b, "T%04d,2026-06-%02dT%02d:%02d:00Z,route.geojson,TESTJET,%d,%d,1.3\n",
			i, 1+i%28, i%24, (7*i)%60, 60000+137*i, (i%5)*10)
	}
	for _, l := range extra {
		b.WriteString(l + "\n")
	}
	path := filepath.Join(dir, "schedule.csv")
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func mustRead(t testing.TB, path string) ([]Row, []RowError) {
	t.Helper()
	rows, bad, err := ReadSchedule(path)
	if err != nil {
		t.Fatal(err)
	}
	return rows, bad
}

// fakePlan is a deterministic stand-in for the optimizer: plausible-looking
// numbers computed from the row, so that every (flight, CI) has its own
// result and a wrong join or sort shows up in the files.
func fakePlan(_ context.Context, row Row, ci float64) (Result, error) {
	fuel := row.TOW*0.05 + float64(len(row.Flight))*3.7 - ci*1.1
	tmin := 90 + row.TOW/10000 - ci*0.05
	res := Result{
		Fuel: fuel, Time: tmin, Cost: fuel + ci*tmin, CO2: 3.16 * fuel,
		InitialFL: 300 + int(row.TOW)%5*20, Steps: int(row.TOW) % 3,
		MinMargin: 1.3 + math.Mod(row.TOW, 7)/100, CostSavingPct: math.Mod(row.TOW, 13) / 10,
		LandingMass: row.TOW - fuel, Profile: fmt.Sprintf("FL%03d", 300+int(row.TOW)%5*20),
	}
	if int(row.TOW)%4 == 0 {
		res.MinMargin, res.CostSavingPct = math.NaN(), math.NaN()
	}
	res.PlanJSON, _ = json.Marshal(map[string]any{"flight": row.Flight, "ci": ci, "fuel_kg": fuel})
	return res, nil
}

// finalFiles reads the files of an output directory that must match
// between equivalent runs: the final CSVs and every plan.
func finalFiles(t testing.TB, dir string) map[string][]byte {
	t.Helper()
	got := map[string][]byte{}
	for _, name := range []string{ResultsCSV, ErrorsCSV, SummaryCSV} {
		data, err := os.ReadFile(filepath.Join(dir, name))
		if err == nil {
			got[name] = data
		} else if !os.IsNotExist(err) {
			t.Fatal(err)
		}
	}
	ents, err := os.ReadDir(filepath.Join(dir, plansDir))
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		data, err := os.ReadFile(filepath.Join(dir, plansDir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		got[plansDir+"/"+e.Name()] = data
	}
	return got
}

func compareFiles(t *testing.T, want, got map[string][]byte) {
	t.Helper()
	var wn, gn []string
	for k := range want {
		wn = append(wn, k)
	}
	for k := range got {
		gn = append(gn, k)
	}
	slices.Sort(wn)
	slices.Sort(gn)
	if !slices.Equal(wn, gn) {
		t.Fatalf("file sets differ:\nwant %v\ngot  %v", wn, gn)
	}
	for _, k := range wn {
		if !bytes.Equal(want[k], got[k]) {
			t.Errorf("%s differs:\nwant:\n%s\ngot:\n%s", k, want[k], got[k])
		}
	}
}
