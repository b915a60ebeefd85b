package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// TestGridInfoInputs checks that grid info refuses a directory and a
// device with exit code 2 (a directory listed as an empty table, exit 0,
// before), and lists GRIB1 messages on grids levelpath cannot decode and
// the valid times of other product templates (ecCodes fixtures in
// testdata/winds/reader).
func TestGridInfoInputs(t *testing.T) {
	for _, p := range []string{"../../testdata/winds", "/dev/zero"} {
		if code, _, errs := runCLI(t, "grid", "info", p); code != 2 || !strings.Contains(errs, "not a GRIB file") {
			t.Errorf("grid info %s: exit %d, %q; want 2", p, code, errs)
		}
	}
	code, out, errs := runCLI(t, "grid", "info", "../../testdata/winds/reader/g1_polar.grib1", "../../testdata/winds/reader/g2_products.grib2", "--format", "json")
	var msgs []gridMsgJSON
	if code != 0 || json.Unmarshal([]byte(out), &msgs) != nil || len(msgs) != 6 {
		t.Fatalf("grid info: exit %d, %d messages, %s", code, len(msgs), errs)
	}
	// ecCodes: polar stereographic (GRIB1 table 6 type 5), 16 x 31; the 4.8
	// message is valid at the end of its 6-12 h interval (g2_products.keys).
	if m := msgs[0]; m.Grid != 5 || m.Ni != 16 || m.Nj != 31 {
		t.Errorf("polar stereographic: grid %d, %dx%d", m.Grid, m.Ni, m.Nj)
	}
	if m := msgs[1]; m.ValidTime != "2007-03-24T00:00:00Z" || m.LevelHPa == nil || *m.LevelHPa != 300 {
		t.Errorf("template 4.8: valid %s, level %v", m.ValidTime, m.LevelHPa)
	}
}
