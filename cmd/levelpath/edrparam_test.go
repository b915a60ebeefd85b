package main

import (
	"strings"
	"testing"
)

// TestEDRParamFlag checks --edr-param reaches the weather read: out of
// GRIB2 code table 4.2.0.19's EDR range (28-31) it is bad input (exit 2)
// before decoding; a parameter the invented demo weather lacks (it holds
// 0.19.30 only) is bad input naming the one it holds; the one it holds
// samples as without the flag.
func TestEDRParamFlag(t *testing.T) {
	fs := demoFiles(t)
	sample := []string{"grid", "sample", fs.Weather, "--at", "50,-30", "--hpa", "250", "--format", "json"}
	if code, _, errs := runCLI(t, append(sample, "--edr-param", "27")...); code != 2 || !strings.Contains(errs, "--edr-param 27") {
		t.Errorf("--edr-param 27: exit %d, %q; want 2 naming the flag", code, errs)
	}
	if code, _, errs := runCLI(t, append(sample, "--edr-param", "29")...); code != 2 || !strings.Contains(errs, "0.19.30") {
		t.Errorf("--edr-param 29: exit %d, %q; want 2 naming 0.19.30", code, errs)
	}
	code0, out0, errs0 := runCLI(t, sample...)
	code30, out30, errs30 := runCLI(t, append(sample, "--edr-param", "30")...)
	if code0 != 0 || code30 != 0 || out0 != out30 {
		t.Errorf("default: exit %d %q %q; --edr-param 30: exit %d %q %q; want the same sample", code0, out0, errs0, code30, out30, errs30)
	}
	for _, cmd := range [][]string{{"plan"}, {"assess"}, {"batch"}} {
		code, out, errs := runCLI(t, append(cmd, "--help")...)
		if code != 0 || !strings.Contains(out+errs, "--edr-param") {
			t.Errorf("%s --help: exit %d, no --edr-param", cmd[0], code)
		}
	}
}
