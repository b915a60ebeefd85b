package serve

import (
	"math"
	"testing"
)

// TestFuelPlanRequest: a request with a zero-fuel mass alone gets the
// dispatch fuel plan, with the ICAO Annex 6 Part I 4.3.6.3 / Doc 9976
// structure: every component present, block fuel their sum, and the
// take-off mass ZFW + block - taxi; a ZFW over MZFW is a 400 naming zfw.
func TestFuelPlanRequest(t *testing.T) {
	s := testServer(t, nil)
	req := shortFlight()
	delete(req, "mass")
	req["zfw"] = 30000.0
	a := call(t, s.Handler(), "POST", "/v1/plan", req)
	if a.code != 200 {
		t.Fatalf("fuel plan: %d %s", a.code, a.raw)
	}
	f, ok := a.doc["plan"].(map[string]any)["fuel"].(map[string]any)
	if !ok {
		t.Fatalf("no fuel section: %s", a.raw)
	}
	num := func(k string) float64 { v, _ := f[k].(float64); return v }
	sum := 0.0
	for _, k := range []string{"taxi_kg", "trip_kg", "contingency_kg", "alternate_kg", "final_reserve_kg", "additional_kg", "extra_kg"} {
		if _, present := f[k]; !present {
			t.Errorf("fuel section lacks %s", k)
		}
		sum += num(k)
	}
	if math.Abs(sum-num("block_kg")) > 1e-6 || num("trip_kg") <= 0 || num("final_reserve_kg") <= 0 {
		t.Errorf("block %.1f, components sum %.1f (trip %.1f, final reserve %.1f)", num("block_kg"), sum, num("trip_kg"), num("final_reserve_kg"))
	}
	if tow := 30000 + num("block_kg") - num("taxi_kg"); math.Abs(tow-num("takeoff_mass_kg")) > 1e-6 {
		t.Errorf("take-off mass %.1f, want ZFW + block - taxi = %.1f", num("takeoff_mass_kg"), tow)
	}
	req["zfw"] = 90000.0
	if b := call(t, s.Handler(), "POST", "/v1/plan", req); b.code != 400 || b.doc["field"] != "zfw" {
		t.Errorf("ZFW over MZFW: %d %s", b.code, b.raw)
	}
}
