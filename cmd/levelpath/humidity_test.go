package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"levelpath/perf/contrail"
)

// grid sample prints humidity where the weather holds it: for NCEP's
// relative humidity (over water, WMO-No. 8) RH over ice is RH e_w/e_i
// (Murphy and Koop 2005); --rh-reference overrides the centre's choice;
// weather without humidity prints none; a bad --rh-reference exits 2
// naming the value. The fixtures are testdata/winds/humidity (made with
// ecCodes' grib_set).
func TestGridSampleHumidity(t *testing.T) {
	const file = "../../testdata/winds/humidity/g2_humid_ncep.grib2"
	code, out, errs := runCLI(t, "grid", "sample", file, "--at", "50,0", "--hpa", "300", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var s map[string]any
	if err := json.Unmarshal([]byte(out), &s); err != nil {
		t.Fatal(err)
	}
	rhw, _ := s["rh_water_pct"].(float64)
	rhi, _ := s["rh_ice_pct"].(float64)
	tk, _ := s["t_k"].(float64)
	if want := rhw * contrail.SatWater(tk) / contrail.SatIce(tk); !(rhw > 0) || math.Abs(rhi-want) > 1e-6*want {
		t.Errorf("RH %v over water, %v over ice at %v K; want %v over ice", rhw, rhi, tk, want)
	}
	if q, _ := s["q_kgkg"].(float64); !(q > 0) || !strings.Contains(s["rh_from"].(string), "over liquid water") {
		t.Errorf("q %v, rh_from %v", s["q_kgkg"], s["rh_from"])
	}
	code, out, _ = runCLI(t, "grid", "sample", file, "--at", "50,0", "--hpa", "300", "--rh-reference", "mixed", "--format", "json")
	var m map[string]any
	json.Unmarshal([]byte(out), &m)
	if code != 0 || tk < 250.16 && math.Abs(m["rh_ice_pct"].(float64)-rhw) > 1e-6*rhw {
		t.Errorf("--rh-reference mixed below -23 °C: exit %d, RHi %v, want the stored %v", code, m["rh_ice_pct"], rhw)
	}
	code, out, _ = runCLI(t, "grid", "sample", file, "--at", "50,0", "--hpa", "300")
	if code != 0 || !strings.Contains(out, "over water") || !strings.Contains(out, "  q ") {
		t.Errorf("table: exit %d\n%s", code, out)
	}
	code, out, _ = runCLI(t, "grid", "sample", "../../testdata/winds/g1_wmo.grib1", "--at", "50,0", "--hpa", "250")
	if code != 0 || strings.Contains(out, "RH") || strings.Contains(out, "  q ") {
		t.Errorf("no humidity in the weather: exit %d\n%s", code, out)
	}
	code, _, errs = runCLI(t, "grid", "sample", file, "--at", "50,0", "--hpa", "300", "--rh-reference", "ice")
	if code != 2 || !strings.Contains(errs, `"ice"`) {
		t.Errorf("bad --rh-reference: exit %d, %s", code, errs)
	}
	code, _, errs = runCLI(t, "grid", "sample", "../../testdata/winds/humidity/g2_rh_high.grib2", "--at", "50,0", "--hpa", "300")
	if code != 2 || !strings.Contains(errs, "g2_rh_high.grib2") || !strings.Contains(errs, "message 13") {
		t.Errorf("RH over 150 %%: exit %d, %s", code, errs)
	}
}
