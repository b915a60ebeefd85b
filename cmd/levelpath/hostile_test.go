package main

import (
	"encoding/json"
	"fmt"
	iofs "io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"github.com/spf13/cobra"
)

// TestPolarCLI: on 80N 100E to 88N 170E (eastbound true course, inside the
// WMM2025 compass blackout zone all along) route's JSON names the course
// and zone of every segment, and plan picks an odd (eastbound) level and
// carries the warning in its machine output.
func TestPolarCLI(t *testing.T) {
	code, out, errs := runCLI(t, "route", "80,100 88,170", "--date", "2026-06-01", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var d routeJSON
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	for _, s := range d.Segments {
		if s.LevelCourse != "true" || s.CompassZone != "blackout" || !(s.HorizontalFieldNT > 0 && s.HorizontalFieldNT < 2000) {
			t.Errorf("segment %d: %q %q %v", s.Index, s.LevelCourse, s.CompassZone, s.HorizontalFieldNT)
		}
	}
	if len(d.Warnings) == 0 || !strings.Contains(errs, "blackout zone") {
		t.Errorf("warnings %q, stderr %q", d.Warnings, errs)
	}
	p := planJSON(t, "plan", "--route", "80,100 88,170", "--aircraft", "demo-widebody", "--mass", "231000", "--date", "2026-06-01")
	fl, _ := p["initial_fl"].(float64)
	// ICAO Annex 2 Appendix 3: eastbound levels are the odd thousands
	// below FL290 and FL290 + 40k... up to FL410.
	if int(fl)%20 != 10 && int(fl) != 290 && int(fl) != 330 && int(fl) != 370 && int(fl) != 410 {
		t.Errorf("initial FL%v is not an eastbound level", fl)
	}
	ws, _ := json.Marshal(p["warnings"])
	if !strings.Contains(string(ws), "blackout zone") {
		t.Errorf("plan warnings %s", ws)
	}
	if code, _, errs := runCLI(t, "route", "80,100 88,170", "--polar", "compass"); code != 2 || !strings.Contains(errs, "--polar") {
		t.Errorf("--polar compass: exit %d %q", code, errs)
	}
}

// TestWriteFailureExit: a write that fails for lack of space (/dev/full
// answers every write with ENOSPC) is an environment failure, exit 1, not
// bad input, whether it is stdout or a chart file.
func TestWriteFailureExit(t *testing.T) {
	full, err := os.OpenFile("/dev/full", os.O_WRONLY, 0)
	if err != nil {
		t.Skipf("no /dev/full: %v", err)
	}
	defer full.Close()
	fs := demoFiles(t)
	args := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional", "--mass", "36000", "--format", "json"}
	var errb strings.Builder
	if code := run(args, full, &errb); code != 1 || !strings.Contains(errb.String(), "no space") {
		t.Errorf("stdout on /dev/full: exit %d, %q", code, errb.String())
	}
	// demo writes its files in place: one of them on /dev/full fails with
	// ENOSPC (exit 2 before: the command marked every write error as input).
	dir := t.TempDir()
	if err := os.Symlink("/dev/full", filepath.Join(dir, "README.txt")); err != nil {
		t.Skip(err)
	}
	if code, _, errs := runCLI(t, "demo", "--dir", dir); code != 1 || !strings.Contains(errs, "no space") {
		t.Errorf("demo onto /dev/full: exit %d, %q", code, errs)
	}
	// A chart is written to a temporary file and renamed, so /dev/full
	// cannot stand in for a full disk there; the error chartErr returns
	// for one (an fs.PathError wrapping ENOSPC, marked as input) must
	// still exit 1.
	saved := subcommands
	defer func() { subcommands = saved }()
	subcommands = append(append([]func() *cobra.Command(nil), saved...), func() *cobra.Command {
		return &cobra.Command{Use: "fail-disk", RunE: func(*cobra.Command, []string) error {
			return chartErr(fmt.Errorf("chart: p.svg: %w", &iofs.PathError{Op: "write", Path: "p.svg", Err: syscall.ENOSPC}))
		}}
	})
	if code, _, errs := runCLI(t, "fail-disk"); code != 1 {
		t.Errorf("chart on a full disk: exit %d, %q", code, errs)
	}
}

// TestNumberFlags: numbers that overflow or are not finite are refused as
// bad input (exit 2) naming the flag, never a panic or a silent default.
func TestNumberFlags(t *testing.T) {
	fs := demoFiles(t)
	base := []string{"plan", "--route", fs.Routes[3], "--aircraft", "demo-regional"}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--mass", "36000", "--min-step-nm", "1e308"}, "--min-step-nm"},
		{[]string{"--mass", "36000", "--min-step-nm", "NaN"}, "--min-step-nm"},
		{[]string{"--mass", "36000", "--max-seg-nm", "Inf"}, "--max-seg-nm"},
		{[]string{"--mass", "36000", "--max-seg-nm", "1e308"}, "--max-seg-nm"},
		{[]string{"--mass", "36000", "--block", "FL370@0-1e308"}, "--block"},
		{[]string{"--mass", "36000", "--block", "FL375@0-100"}, "--block"},
		{[]string{"--mass", "36000", "--turbulence", "Inf:closed"}, "--turbulence"},
		{[]string{"--mass", "36000", "--max-fl", "999999999"}, "--max-fl"},
		{[]string{"--mass", "36000", "--min-fl", "-5"}, "--min-fl"},
		{[]string{"--zfw", "NaN", "--fuel", "100"}, "--zfw"},
		{[]string{"--zfw", "20000", "--fuel", "-1"}, "--fuel"},
	} {
		code, _, errs := runCLI(t, append(base, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q", c.args, code, errs)
		}
	}
	// --date 0001-01-01 is time.Time's zero: still clamped, with a warning.
	if code, _, errs := runCLI(t, "route", "1,2 3,4", "--date", "0001-01-01"); code != 0 || !strings.Contains(errs, "before WMM2025") {
		t.Errorf("--date 0001-01-01: exit %d, %q", code, errs)
	}
}

// TestRouteSizeCLI: the 60,000-waypoint CSV route (1.7 MB) that ran plan
// out of memory, and a route needing more than route.MaxSegments
// segments, are refused as bad input with the limit named.
func TestRouteSizeCLI(t *testing.T) {
	var b strings.Builder
	b.WriteString("name,lat,lon\n")
	for i := range 60000 {
		f := float64(i) / 59999
		fmt.Fprintf(&b, "W%d,%.6f,%.6f\n", i, 44.6+6.4*f, -74.2+73.2*f)
	}
	big := filepath.Join(t.TempDir(), "big.csv")
	if err := os.WriteFile(big, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	args := []string{"plan", "--aircraft", "demo-widebody", "--mass", "231000"}
	if code, _, errs := runCLI(t, append(args, "--route", big)...); code != 2 || !strings.Contains(errs, "limit of 5000 points") {
		t.Errorf("60,000 points: exit %d, %q", code, errs)
	}
	// Two legs of 89 degrees of arc on the equator, 10,690 NM, at 1 NM.
	if code, _, errs := runCLI(t, append(args, "--route", "0,-89 0,0 0,89", "--max-seg-nm", "1")...); code != 2 || !strings.Contains(errs, "10000 segments") {
		t.Errorf("10,690 segments: exit %d, %q", code, errs)
	}
}
