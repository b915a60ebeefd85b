package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"levelpath/cmd/levelpath/internal/demo"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// TestEnsembleCLI plans and assesses the demo long haul on the invented
// ensemble: the JSON ensemble section is there with every member; with
// robust share 1 every member's least margin above the floor is not
// negative; assessing the plan's profile gives the plan's spread; one
// member alone (--member) plans like that member's share of the
// ensemble.
func TestEnsembleCLI(t *testing.T) {
	fs := demoFiles(t)
	f := demo.Schedule()[0]
	args := []string{"--route", fs.Route, "--aircraft", f.Aircraft, "--mass", "245000", "--weather", fs.Ensemble,
		"--depart", "2026-12-01T20:00:00Z", "--ci", "40"}
	d := planJSON(t, append([]string{"plan", "--ensemble"}, args...)...)
	e, ok := d["ensemble"].(map[string]any)
	if !ok {
		t.Fatalf("plan --ensemble JSON has no ensemble section: %v", d["warnings"])
	}
	per := e["per_member"].([]any)
	if len(per) != demo.EnsembleMembers || e["members"].(float64) != demo.EnsembleMembers || e["objective"] != "mean" {
		t.Fatalf("ensemble section: %d members, %v", len(per), e["objective"])
	}
	for _, m := range per {
		mm := m.(map[string]any)
		if a := mm["min_margin_above_floor_g"].(float64); a < -1e-9 {
			t.Errorf("member %v: least margin %.4f g under its floor with robust share 1", mm["member"], a)
		}
		if mm["regret"] == nil {
			t.Errorf("member %v: no regret", mm["member"])
		}
	}
	fuel := e["profile"].(map[string]any)["fuel_kg"].(map[string]any)
	if !(fuel["min"].(float64) <= fuel["p10"].(float64) && fuel["p10"].(float64) <= fuel["p50"].(float64) &&
		fuel["p50"].(float64) <= fuel["p90"].(float64) && fuel["p90"].(float64) <= fuel["max"].(float64)) {
		t.Errorf("fuel spread out of order: %v", fuel)
	}
	a := planJSON(t, append([]string{"assess", "--ensemble", "--profile", d["profile"].(string)}, args...)...)
	ae := a["ensemble"].(map[string]any)
	if ae["chosen"] != "assessed" || ae["profile"].(map[string]any)["mean_cost"].(float64) != e["profile"].(map[string]any)["mean_cost"].(float64) {
		t.Errorf("assess --ensemble of the plan's profile: mean cost %v, the plan's %v", ae["profile"].(map[string]any)["mean_cost"], e["profile"].(map[string]any)["mean_cost"])
	}
	m3 := planJSON(t, append([]string{"assess", "--member", "3", "--profile", d["profile"].(string)}, args...)...)
	if got, want := m3["totals"].(map[string]any)["cost"].(float64), per[3].(map[string]any)["cost"].(float64); abs(got-want) > 1e-9*want {
		t.Errorf("member 3 alone prices the profile at %v, its share of the ensemble at %v", got, want)
	}
	svg := filepath.Join(t.TempDir(), "ensemble.svg")
	code, out, _ := runCLI(t, append([]string{"plan", "--ensemble", "--brief", "--chart", svg}, args...)...)
	if b, err := os.ReadFile(svg); err != nil || !bytes.Contains(b, []byte("P10-P90")) {
		t.Errorf("the ensemble chart has no P10-P90 band legend (%v)", err)
	}
	det := filepath.Join(t.TempDir(), "member.svg")
	if c, _, errs := runCLI(t, append([]string{"plan", "--member", "0", "--brief", "--chart", det}, args...)...); c != 0 {
		t.Fatalf("--member 0: %s", errs)
	}
	if b, _ := os.ReadFile(det); bytes.Contains(b, []byte("P10-P90")) {
		t.Errorf("a one-member chart has the ensemble band")
	}
	if code != 0 || !strings.Contains(out, "Ensemble (10 members") || !strings.Contains(out, "regret") || !strings.Contains(out, "not certified") {
		t.Errorf("table: exit %d\n%s", code, out)
	}
}

// TestEnsembleCLIBadInput: a member not in the file, members on
// different grids or times, a robust share outside (0, 1]: exit 2 with a
// message naming the value.
func TestEnsembleCLIBadInput(t *testing.T) {
	fs := demoFiles(t)
	base := []string{"plan", "--route", fs.Route, "--aircraft", "demo-widebody", "--mass", "245000", "--weather", fs.Ensemble, "--ci", "40"}
	dir := t.TempDir()
	// Member 12 on the deterministic demo grid (2 degrees, not 5).
	other := filepath.Join(dir, "member12.grib2")
	msgs := synthetic.Weather(demo.Ref())
	var kept []winds.Message
	for _, m := range msgs {
		if m.Param != winds.ParamEDR && m.Level <= 40000 && m.Level >= 15000 && m.ValidTime.Sub(demo.Ref()) <= 24*time.Hour {
			m.Ensemble = 12
			kept = append(kept, m)
		}
	}
	var buf bytes.Buffer
	if err := winds.WriteGRIB2(&buf, kept); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(other, buf.Bytes(), 0o644)
	// Member 13 on the members' grid at other times (a day later).
	late := filepath.Join(dir, "member13.grib2")
	ms := synthetic.Ensemble(demo.Ref().Add(24*time.Hour), 1)
	for i := range ms {
		ms[i].Ensemble = 13
	}
	buf.Reset()
	winds.WriteGRIB2(&buf, ms)
	os.WriteFile(late, buf.Bytes(), 0o644)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--member", "42"}, "member 42"},
		{[]string{"--member", "42"}, "members present: 0-9"},
		{[]string{"--ensemble", "--robust-share", "1.5"}, "--robust-share 1.5"},
		{[]string{"--ensemble", "--robust-share", "0"}, "--robust-share 0"},
		{[]string{"--ensemble", "--objective", "quantile:1.2"}, "quantile:1.2"},
		{[]string{"--ensemble", "--weather", other}, "member 12"},
		{[]string{"--ensemble", "--weather", other}, other},
		{[]string{"--ensemble", "--weather", late}, "member 13"},
		{[]string{"--ensemble", "--weather", late}, "valid times"},
		{nil, "--member N, or --ensemble"},
		{[]string{"--robust-share", "0.5"}, "needs --ensemble"},
		{[]string{"--ensemble", "--alternatives", "2"}, "--alternatives"},
	} {
		code, _, errs := runCLI(t, append(append([]string(nil), base...), c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, want 2 naming %q: %s", c.args, code, c.want, errs)
		}
	}
	// The fuel plan (--zfw alone) is made on one forecast.
	code, _, errs := runCLI(t, "plan", "--route", fs.Route, "--aircraft", "demo-widebody", "--zfw", "170000", "--weather", fs.Ensemble, "--ci", "40", "--ensemble")
	if code != 2 || !strings.Contains(errs, "fuel plan") {
		t.Errorf("--zfw alone with --ensemble: exit %d: %s", code, errs)
	}
}

// TestEnsembleBatch: batch --ensemble adds fuel_p10_kg, fuel_p90_kg and
// min_margin_all_members_g; P10 <= P90, and the least margin over every
// member is at most the control's (min_margin_g); a run without
// --ensemble has none of them.
func TestEnsembleBatch(t *testing.T) {
	fs := demoFiles(t)
	for _, ens := range []bool{true, false} {
		out := filepath.Join(t.TempDir(), "day")
		args := []string{"batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", out}
		if ens {
			args[4] = fs.Ensemble
			args = append(args, "--ensemble")
		}
		code, _, errs := runCLI(t, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		b, err := os.ReadFile(filepath.Join(out, "results.csv"))
		if err != nil {
			t.Fatal(err)
		}
		rows, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		col := map[string]int{}
		for i, n := range rows[0] {
			col[n] = i
		}
		_, has := col["fuel_p10_kg"]
		if has != ens || ens && (col["fuel_p90_kg"] == 0 || col["min_margin_all_members_g"] == 0) {
			t.Fatalf("ensemble %v: columns %v", ens, rows[0])
		}
		if !ens {
			continue
		}
		for _, r := range rows[1:] {
			num := func(n string) float64 {
				v, err := strconv.ParseFloat(r[col[n]], 64)
				if err != nil {
					t.Fatalf("%s %s: %q", r[0], n, r[col[n]])
				}
				return v
			}
			if num("fuel_p10_kg") > num("fuel_p90_kg") || num("min_margin_all_members_g") > num("min_margin_g") {
				t.Errorf("%s: P10 %v P90 %v, least margin of all %v above the control's %v", r[0], num("fuel_p10_kg"), num("fuel_p90_kg"), num("min_margin_all_members_g"), num("min_margin_g"))
			}
		}
	}
}

// TestEnsembleCLIIdentical: an ensemble file whose three members are one
// forecast plans, on the command line, what that forecast alone plans
// (profile, totals, legs), and its spread is nil.
func TestEnsembleCLIIdentical(t *testing.T) {
	fs := demoFiles(t)
	one := synthetic.Ensemble(demo.Ref(), 1)
	var msgs []winds.Message
	for n := range 3 {
		for _, m := range one {
			m.Ensemble = n
			msgs = append(msgs, m)
		}
	}
	var buf bytes.Buffer
	if err := winds.WriteGRIB2(&buf, msgs); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "same.grib2")
	os.WriteFile(path, buf.Bytes(), 0o644)
	args := []string{"--route", fs.Route, "--aircraft", "demo-widebody", "--mass", "245000", "--weather", path,
		"--depart", "2026-12-01T20:00:00Z", "--ci", "40"}
	e := planJSON(t, append([]string{"plan", "--ensemble"}, args...)...)
	d := planJSON(t, append([]string{"plan", "--member", "1"}, args...)...)
	if e["profile"] != d["profile"] || fmt.Sprint(e["totals"]) != fmt.Sprint(d["totals"]) || fmt.Sprint(e["legs"]) != fmt.Sprint(d["legs"]) {
		t.Errorf("identical members: ensemble %v %v, one member %v %v", e["profile"], e["totals"], d["profile"], d["totals"])
	}
	f := e["ensemble"].(map[string]any)["profile"].(map[string]any)["fuel_kg"].(map[string]any)
	if f["min"] != f["max"] {
		t.Errorf("identical members: fuel spread %v", f)
	}
}
