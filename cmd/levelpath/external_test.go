package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// externalProgram is a dispatcher's own Go program in a module of its
// own: it plans one flight as `levelpath plan` does and a schedule as
// `levelpath batch` does, using only levelpath's exported packages.
const externalProgram = `package main

import (
	"context"
	"log"
	"os"
	"time"

	"levelpath/optimizer"
	"levelpath/optimizer/batch"
	"levelpath/optimizer/planjson"
	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
)

func main() {
	routeFile, weather, schedule, out := os.Args[1], os.Args[2], os.Args[3], os.Args[4]
	wx, err := winds.Options{}.OpenBetween(perf.FLToPressure(600), perf.FLToPressure(50), weather)
	if err != nil {
		log.Fatal(err)
	}
	steps, err := optimizer.NewStepRules(optimizer.DefaultMaxStepFt, false, optimizer.DefaultMinStepNM, 0, false)
	if err != nil {
		log.Fatal(err)
	}

	// One flight.
	depart := time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC)
	r, err := route.Load(routeFile)
	if err != nil {
		log.Fatal(err)
	}
	tr, err := route.Build(r, route.Options{MaxSegment: 50 * perf.NMToM, Date: depart})
	if err != nil {
		log.Fatal(err)
	}
	a, err := perf.Builtin("demo-widebody")
	if err != nil {
		log.Fatal(err)
	}
	p := &optimizer.Problem{Track: tr, Aircraft: a, Weather: wx, Depart: depart, TakeoffMass: 245000, CI: 40,
		Floor: optimizer.DefaultFloor, Steps: steps, LegCeilings: true} // the CLI asks for the ceilings in JSON
	plan, err := optimizer.Solve(p)
	if err != nil {
		log.Fatal(err)
	}
	if err := planjson.WriteJSON(os.Stdout, plan, false); err != nil {
		log.Fatal(err)
	}

	// The schedule.
	rows, bad, err := batch.ReadSchedule(schedule)
	if err != nil {
		log.Fatal(err)
	}
	pl := &batch.SchedulePlanner{Weather: wx, MaxSegment: 50 * perf.NMToM, Steps: steps}
	if _, err := batch.Run(context.Background(), rows, bad, pl.Plan, batch.Options{Out: out, Workers: 2}); err != nil {
		log.Fatal(err)
	}
}
`

// TestExternalModule builds externalProgram in a separate module that
// requires levelpath (replaced by this checkout) and checks that its plan
// of the demo flight and its plans of the demo day are byte-identical to
// the command line's. It compiles a program, so -short skips it.
func TestExternalModule(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a separate module")
	}
	goCmd, err := exec.LookPath("go")
	if err != nil {
		t.Skip("no go command on PATH")
	}
	repo, err := filepath.Abs("../..")
	if err != nil {
		t.Fatal(err)
	}
	sum, err := os.ReadFile(filepath.Join(repo, "go.sum"))
	if err != nil {
		t.Fatal(err)
	}
	mod := t.TempDir()
	files := map[string]string{
		"go.mod":  "module example.com/desk\n\ngo 1.26.0\n\nrequire levelpath v0.0.0\n\nreplace levelpath => " + repo + "\n",
		"go.sum":  string(sum),
		"main.go": externalProgram,
	}
	for name, text := range files {
		if err := os.WriteFile(filepath.Join(mod, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	bin := filepath.Join(mod, "desk")
	build := exec.Command(goCmd, "build", "-mod=mod", "-o", bin, ".")
	build.Dir = mod
	build.Env = append(os.Environ(), "GOFLAGS=-mod=mod", "GOWORK=off")
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("building the separate module: %v\n%s", err, out)
	}

	fs := demoFiles(t)
	dir := t.TempDir()
	libOut, cliOut := filepath.Join(dir, "lib"), filepath.Join(dir, "cli")
	prog := exec.Command(bin, fs.Route, fs.Weather, fs.Schedule, libOut)
	var stdout, stderr bytes.Buffer
	prog.Stdout, prog.Stderr = &stdout, &stderr
	if err := prog.Run(); err != nil {
		t.Fatalf("the separate module's program: %v\n%s", err, stderr.String())
	}
	code, cliPlan, errs := runCLI(t, "plan", "--route", fs.Route, "--aircraft", "demo-widebody", "--mass", "245000",
		"--weather", fs.Weather, "--depart", "2026-12-01T20:00:00Z", "--ci", "40", "--format", "json")
	if code != 0 {
		t.Fatalf("plan: exit %d: %s", code, errs)
	}
	if stdout.String() != cliPlan {
		t.Errorf("the separate module's plan differs from levelpath plan's:\n%s", firstDiff(stdout.String(), cliPlan))
	}
	if code, _, errs := runCLI(t, "batch", "--schedule", fs.Schedule, "--weather", fs.Weather, "--out", cliOut); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, errs)
	}
	names, err := filepath.Glob(filepath.Join(cliOut, "plans", "*.json"))
	if err != nil || len(names) == 0 {
		t.Fatalf("no CLI plans (%v)", err)
	}
	for _, n := range names {
		a, _ := os.ReadFile(n)
		b, err := os.ReadFile(filepath.Join(libOut, "plans", filepath.Base(n)))
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: the separate module's plan differs from levelpath batch's (%v)", filepath.Base(n), err)
		}
	}
}

// firstDiff shows the first line where a and b differ.
func firstDiff(a, b string) string {
	al, bl := strings.Split(a, "\n"), strings.Split(b, "\n")
	for i := 0; i < len(al) && i < len(bl); i++ {
		if al[i] != bl[i] {
			return "line " + strconv.Itoa(i+1) + ":\n  got  " + al[i] + "\n  want " + bl[i]
		}
	}
	return "lengths differ"
}
