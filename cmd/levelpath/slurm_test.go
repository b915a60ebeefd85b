//go:build linux

package main

import (
	"bytes"
	"crypto/rand"
	"fmt"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
)

// slurmRecipe is the job script of the README's Slurm recipe, verbatim
// but for the names of the schedule and weather files.
const slurmRecipe = `#!/bin/sh
#SBATCH --job-name=levelpath-day
#SBATCH --array=0-7
#SBATCH --cpus-per-task=4
levelpath batch --schedule day.csv --weather wx.grib2 --workers "$SLURM_CPUS_PER_TASK" \
    --shard-count 8 --out "out/shard-$SLURM_ARRAY_TASK_ID" --resume
`

// freePort returns a TCP port free on localhost now.
func freePort(t *testing.T) int {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Skip("no TCP port:", err)
	}
	defer l.Close()
	return l.Addr().(*net.TCPAddr).Port
}

// startSlurm starts a private one-node Slurm cluster (munged, slurmctld,
// slurmd from Debian's slurm-wlm and munge, configured as the slurm.conf
// manual describes) in dir and returns the environment its clients need.
// It skips the test when the programs are absent or not root.
func startSlurm(t *testing.T, dir string) []string {
	t.Helper()
	for _, p := range []string{"munged", "slurmctld", "slurmd", "sbatch", "sinfo", "squeue", "scancel"} {
		if _, err := exec.LookPath(p); err != nil {
			t.Skipf("%s not installed (Debian: apt-get install slurm-wlm munge)", p)
		}
	}
	if os.Geteuid() != 0 {
		t.Skip("a private slurmd runs as root")
	}
	for _, d := range []string{"state", "spool", "log"} {
		os.MkdirAll(filepath.Join(dir, d), 0o755)
	}
	key := make([]byte, 1024)
	rand.Read(key)
	if err := os.WriteFile(filepath.Join(dir, "munge.key"), key, 0o400); err != nil {
		t.Fatal(err)
	}
	sock := filepath.Join(dir, "munge.sock")
	munged := exec.Command("munged", "-F", "-f", "-S", sock, "--key-file="+filepath.Join(dir, "munge.key"),
		"--log-file="+filepath.Join(dir, "log", "munged.log"), "--pid-file="+filepath.Join(dir, "munged.pid"),
		"--seed-file="+filepath.Join(dir, "munged.seed"))
	conf := filepath.Join(dir, "slurm.conf")
	cfg := fmt.Sprintf(`ClusterName=lptest
SlurmctldHost=localhost
SlurmctldPort=%d
SlurmdPort=%d
AuthType=auth/munge
AuthInfo=socket=%s
CredType=cred/munge
SlurmUser=root
SlurmdUser=root
StateSaveLocation=%s
SlurmdSpoolDir=%s
SlurmctldPidFile=%s
SlurmdPidFile=%s
SlurmctldLogFile=%s
SlurmdLogFile=%s
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SchedulerType=sched/builtin
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
NodeName=localhost CPUs=%d RealMemory=1000 State=UNKNOWN
PartitionName=debug Nodes=localhost Default=YES MaxTime=INFINITE State=UP OverSubscribe=YES
`, freePort(t), freePort(t), sock, filepath.Join(dir, "state"), filepath.Join(dir, "spool"),
		filepath.Join(dir, "slurmctld.pid"), filepath.Join(dir, "slurmd.pid"),
		filepath.Join(dir, "log", "slurmctld.log"), filepath.Join(dir, "log", "slurmd.log"), runtime.NumCPU())
	if err := os.WriteFile(conf, []byte(cfg), 0o644); err != nil {
		t.Fatal(err)
	}
	env := append(os.Environ(), "SLURM_CONF="+conf)
	ctld := exec.Command("slurmctld", "-D", "-c", "-f", conf)
	slurmd := exec.Command("slurmd", "-D", "-f", conf)
	for _, c := range []*exec.Cmd{munged, ctld, slurmd} {
		c.Env = env
		if err := c.Start(); err != nil {
			t.Fatalf("%v: %v", c.Args, err)
		}
		t.Cleanup(func() { c.Process.Kill(); c.Wait() })
		time.Sleep(300 * time.Millisecond)
	}
	for deadline := time.Now().Add(60 * time.Second); ; time.Sleep(250 * time.Millisecond) {
		cmd := exec.Command("sinfo", "-h", "-o", "%t")
		cmd.Env = env
		out, _ := cmd.Output()
		if s := strings.TrimSpace(string(out)); s == "idle" || s == "mix" {
			break
		}
		if time.Now().After(deadline) {
			logs, _ := os.ReadFile(filepath.Join(dir, "log", "slurmctld.log"))
			t.Skipf("the private Slurm cluster did not come up: sinfo %q\n%s", out, logs)
		}
	}
	return env
}

// TestSlurmRecipe runs the README's Slurm recipe on a private one-node
// cluster with task 2 cancelled (scancel) and re-run alone with "sbatch
// --array=2 job.sh", as the README says; then removes that task's manifest,
// final files and one record (what a task stopped part way leaves) and
// re-runs it alone again. The task keeps
// its shard (2/8) although Slurm tells it SLURM_ARRAY_TASK_COUNT=1, and the
// merged shards equal a whole run (issue 13).
func TestSlurmRecipe(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a Slurm cluster")
	}
	dir := t.TempDir()
	env := startSlurm(t, filepath.Join(dir, "slurm"))
	fs := demoFiles(t)
	work := filepath.Join(dir, "work")
	bin := filepath.Join(dir, "bin")
	os.MkdirAll(work, 0o755)
	os.MkdirAll(bin, 0o755)
	ents, err := os.ReadDir(fs.Dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		os.Symlink(filepath.Join(fs.Dir, e.Name()), filepath.Join(work, e.Name()))
	}
	os.Symlink(fs.Schedule, filepath.Join(work, "day.csv"))
	os.Symlink(fs.Weather, filepath.Join(work, "wx.grib2"))
	// "levelpath" on the PATH of the jobs is this test binary running main.
	wrapper := fmt.Sprintf("#!/bin/sh\nLEVELPATH_MAIN=1 exec %q \"$@\"\n", os.Args[0])
	if err := os.WriteFile(filepath.Join(bin, "levelpath"), []byte(wrapper), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(work, "job.sh"), []byte(slurmRecipe), 0o755); err != nil {
		t.Fatal(err)
	}
	env = append(env, "PATH="+bin+":"+os.Getenv("PATH"))
	sbatch := func(args ...string) {
		t.Helper()
		// --cpus-per-task on the command line overrides the script's 4 on
		// a small node (sbatch manual: options given there take precedence).
		cmd := exec.Command("sbatch", append([]string{"--wait", "--cpus-per-task=1", "-o", filepath.Join(work, "slurm-%A_%a.out")}, args...)...)
		cmd.Dir, cmd.Env = work, env
		var out bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &out
		done := make(chan error, 1)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		go func() { done <- cmd.Wait() }()
		select {
		case err := <-done:
			// sbatch --wait exits with the highest task exit code; 3 is
			// "finished, some flights infeasible or failed".
			if code := cmd.ProcessState.ExitCode(); err != nil && code != 3 {
				logs, _ := filepath.Glob(filepath.Join(work, "slurm-*.out"))
				var b strings.Builder
				for _, l := range logs {
					data, _ := os.ReadFile(l)
					fmt.Fprintf(&b, "%s:\n%s\n", l, data)
				}
				t.Fatalf("sbatch %v: %v\n%s\n%s", args, err, out.String(), b.String())
			}
		case <-time.After(5 * time.Minute): // a liveness guard, not a speed check
			cmd.Process.Kill()
			t.Fatalf("sbatch %v did not finish in 5 minutes", args)
		}
	}
	// The whole array, with task 2 cancelled by scancel as soon as it is
	// submitted (pending on a small node, or already running: either way
	// its directory is incomplete or absent).
	submit := exec.Command("sbatch", "--parsable", "--cpus-per-task=1", "-o", filepath.Join(work, "slurm-%A_%a.out"), "job.sh")
	submit.Dir, submit.Env = work, env
	idb, err := submit.Output()
	if err != nil {
		t.Fatalf("sbatch: %v", err)
	}
	jobID := strings.TrimSpace(strings.Split(string(idb), ";")[0])
	cancel := exec.Command("scancel", jobID+"_2")
	cancel.Env = env
	if out, err := cancel.CombinedOutput(); err != nil {
		t.Fatalf("scancel %s_2: %v %s", jobID, err, out)
	}
	for deadline := time.Now().Add(5 * time.Minute); ; time.Sleep(250 * time.Millisecond) {
		q := exec.Command("squeue", "-h", "-j", jobID)
		q.Env = env
		out, err := q.Output()
		if err == nil && strings.TrimSpace(string(out)) == "" {
			break
		}
		if time.Now().After(deadline) { // a liveness guard, not a speed check
			t.Fatalf("job %s still queued after 5 minutes: %s", jobID, out)
		}
	}
	if _, err := os.Stat(filepath.Join(work, "out", "shard-2", "manifest.json")); err == nil {
		t.Log("task 2 finished before scancel reached it")
	}
	sbatch("--array=2", "job.sh") // re-run the cancelled task alone
	shard2 := filepath.Join(work, "out", "shard-2")
	for _, f := range []string{"manifest.json", "results.csv", "results.parquet", "errors.csv"} {
		os.Remove(filepath.Join(shard2, f))
	}
	parts, _ := filepath.Glob(filepath.Join(shard2, "parts", "*.json"))
	if len(parts) > 0 {
		os.Remove(parts[0])
	}
	sbatch("--array=2", "job.sh")
	rerun, _ := filepath.Glob(filepath.Join(work, "slurm-*_2.out"))
	var rerunLog []byte
	for _, r := range rerun {
		data, _ := os.ReadFile(r)
		rerunLog = append(rerunLog, data...)
	}
	if len(parts) > 0 && !bytes.Contains(rerunLog, []byte("1 plans to make")) {
		t.Errorf("the re-run task should have planned the one lost record:\n%s", rerunLog)
	}

	clearSchedulerEnv(t)
	whole := filepath.Join(dir, "whole")
	if code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", whole); code != 0 && code != 3 {
		t.Fatalf("whole run: exit %d: %s", code, errs)
	}
	var shards []string
	for k := range 8 {
		shards = append(shards, filepath.Join(work, "out", fmt.Sprintf("shard-%d", k)))
	}
	merged := filepath.Join(dir, "merged")
	if code, _, errs := runCLI(t, append([]string{"batch", "merge", "--out", merged}, shards...)...); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, errs)
	}
	for _, f := range []string{"results.csv", "errors.csv"} {
		a, _ := os.ReadFile(filepath.Join(whole, f))
		b, _ := os.ReadFile(filepath.Join(merged, f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s: merged differs from the whole run:\n%s\n---\n%s", f, a, b)
		}
	}
}
