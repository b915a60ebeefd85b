package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// When the test binary is started with LEVELPATH_MAIN set, it runs the
// command line instead of the tests, so a test can kill a real process.
func init() {
	if os.Getenv("LEVELPATH_MAIN") == "1" {
		os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
	}
}

// TestBatchKilledAndResumed kills a real batch process with SIGKILL part
// way through, resumes it, and checks that the results equal those of a
// run never stopped, byte for byte.
func TestBatchKilledAndResumed(t *testing.T) {
	if testing.Short() {
		t.Skip("starts processes")
	}
	fs := demoFiles(t)
	var sb strings.Builder
	sb.WriteString("flight,departure,route,aircraft,tow_kg,ci\n")
	for i := 0; i < 40; i++ {
		fmt.Fprintf(&sb, "K%02d,2026-12-01T%02d:%02d:00Z,route-lakeport.geojson,demo-regional,%d,%d\n", i, 20+i/20, (i*3)%60, 34000+50*i, i%5*10)
	}
	sched := filepath.Join(fs.Dir, "sched-kill.csv")
	if err := os.WriteFile(sched, []byte(sb.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	whole, killed := filepath.Join(dir, "whole"), filepath.Join(dir, "killed")
	if code, _, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", whole, "--workers", "2"); code != 0 {
		t.Fatalf("whole run: exit %d: %s", code, errs)
	}
	cmd := exec.Command(os.Args[0], "batch", "--schedule", sched, "--weather", fs.Weather, "--out", killed, "--workers", "1")
	cmd.Env = append(os.Environ(), "LEVELPATH_MAIN=1")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(60 * time.Second)
	for {
		parts, _ := filepath.Glob(filepath.Join(killed, "parts", "*.json"))
		if len(parts) >= 8 {
			break
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatalf("the batch process wrote %d records in 60 s: %s", len(parts), stderr.String())
		}
		time.Sleep(5 * time.Millisecond)
	}
	cmd.Process.Signal(syscall.SIGKILL)
	cmd.Wait()
	parts, _ := filepath.Glob(filepath.Join(killed, "parts", "*.json"))
	t.Logf("killed with %d of 40 records written", len(parts))
	if _, err := os.Stat(filepath.Join(killed, "results.csv")); err == nil {
		t.Skip("the process finished before it was killed; nothing to resume")
	}
	if code, _, errs := runCLI(t, "batch", "--schedule", sched, "--weather", fs.Weather, "--out", killed, "--resume"); code != 0 {
		t.Fatalf("resume: exit %d: %s", code, errs)
	}
	for _, f := range []string{"results.csv", "errors.csv"} {
		a, _ := os.ReadFile(filepath.Join(whole, f))
		b, _ := os.ReadFile(filepath.Join(killed, f))
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs after kill and resume:\n%s\n---\n%s", f, a, b)
		}
	}
}
