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
	for i := range 40 {
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

// Issue 17: a FIFO as the schedule or as a weather file used to hang the
// batch (opening a FIFO for reading waits for a writer), ignoring SIGTERM.
// Now it is refused before it is opened, exit 2 naming it; and a batch
// stopped by SIGTERM exits 1 telling how to resume.
func TestBatchFIFOInputsAndSIGTERM(t *testing.T) {
	if testing.Short() {
		t.Skip("starts processes")
	}
	fs := demoFiles(t)
	dir := t.TempDir()
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("no FIFO here:", err)
	}
	start := func(args ...string) (*exec.Cmd, *bytes.Buffer) {
		cmd := exec.Command(os.Args[0], args...)
		cmd.Env = append(os.Environ(), "LEVELPATH_MAIN=1", "SLURM_ARRAY_TASK_ID=", "JOB_COMPLETION_INDEX=")
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		return cmd, &stderr
	}
	wait := func(cmd *exec.Cmd) int {
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		select {
		case <-done:
		case <-time.After(60 * time.Second): // a liveness guard, not a speed check
			cmd.Process.Kill()
			<-done
			t.Fatalf("%v did not end in 60 s", cmd.Args)
		}
		return cmd.ProcessState.ExitCode()
	}
	for _, args := range [][]string{
		{"batch", "--schedule", fifo, "--out", filepath.Join(dir, "o1")},
		{"batch", "--schedule", fs.Schedule, "--weather", fifo, "--out", filepath.Join(dir, "o2")},
	} {
		cmd, stderr := start(args...)
		if code := wait(cmd); code != 2 || !strings.Contains(stderr.String(), fifo) || !strings.Contains(stderr.String(), "FIFO") {
			t.Errorf("%v: exit %d, %s; want 2 naming the FIFO", args[1:], code, stderr)
		}
	}

	var sb strings.Builder
	sb.WriteString("flight,departure,route,aircraft,tow_kg,ci\n")
	for i := range 400 {
		fmt.Fprintf(&sb, "S%03d,2026-12-01T20:%02d:00Z,route-lakeport.geojson,demo-regional,%d,10\n", i, i%60, 34000+10*i)
	}
	sched := filepath.Join(dir, "sched.csv")
	os.WriteFile(sched, []byte(sb.String()), 0o644)
	rel, _ := filepath.Rel(dir, filepath.Join(fs.Dir, "route-lakeport.geojson"))
	os.WriteFile(sched, []byte(strings.ReplaceAll(sb.String(), "route-lakeport.geojson", rel)), 0o644)
	out := filepath.Join(dir, "o3")
	cmd, stderr := start("batch", "--schedule", sched, "--weather", fs.Weather, "--out", out, "--workers", "1")
	deadline := time.Now().Add(60 * time.Second)
	for {
		parts, _ := filepath.Glob(filepath.Join(out, "parts", "*.json"))
		if len(parts) >= 3 || time.Now().After(deadline) {
			break
		}
		time.Sleep(5 * time.Millisecond)
	}
	cmd.Process.Signal(syscall.SIGTERM)
	if code := wait(cmd); code != 1 || !strings.Contains(stderr.String(), "--resume") {
		t.Errorf("SIGTERM: exit %d, %s; want 1 and a --resume hint", code, stderr)
	}
}
