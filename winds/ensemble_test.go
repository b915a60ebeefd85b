package winds

import (
	"bytes"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// ensembleBase returns u, v and temperature at two levels and two times
// on the 10-degree test grid, as one deterministic forecast (Ensemble -1).
func ensembleBase(hours []int) []Message {
	lv := []float64{25000, 20000}
	f := func(off float64) func(lat, lon, p float64, t time.Time) float64 {
		return func(lat, lon, p float64, t time.Time) float64 {
			return off + 20*math.Cos(lat*math.Pi/180)*math.Sin((lon+float64(t.Hour())*5)*math.Pi/180) + (p-20000)/1000
		}
	}
	var out []Message
	out = append(out, synthetic(ParamU, lv, hours, f(10))...)
	out = append(out, synthetic(ParamV, lv, hours, f(-3))...)
	out = append(out, synthetic(ParamT, lv, hours, f(220))...)
	return out
}

// writeMembers writes msgs once per member n, with Ensemble n (product
// template 4.1) and every value offset by n, and returns the paths.
func writeMembers(t *testing.T, dir string, msgs []Message, ns ...int) []string {
	t.Helper()
	var paths []string
	for _, n := range ns {
		ms := make([]Message, len(msgs))
		for i, m := range msgs {
			m.Ensemble = n
			m.Values = append([]float32(nil), m.Values...)
			for k := range m.Values {
				m.Values[k] += float32(n)
			}
			ms[i] = m
		}
		var buf bytes.Buffer
		if err := WriteGRIB2(&buf, ms); err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, "m"+strconv.Itoa(n)+".grib2")
		if err := os.WriteFile(p, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, p)
	}
	return paths
}

func catFiles(t *testing.T, dst string, srcs ...string) {
	t.Helper()
	var all []byte
	for _, s := range srcs {
		b, err := os.ReadFile(s)
		if err != nil {
			t.Fatal(err)
		}
		all = append(all, b...)
	}
	if err := os.WriteFile(dst, all, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestEnsembleAgainstEccodes makes ensemble members with ecCodes 2.28's
// grib_set (productDefinitionTemplateNumber=1, typeOfEnsembleForecast=3,
// perturbationNumber=N, offsetValuesBy=N on a deterministic file written
// by WriteGRIB2), one file per member and all members in one file, and
// checks the member numbers against grib_ls -p perturbationNumber and the
// values of every member's Field against grib_get_data (skipped when
// ecCodes is not installed).
func TestEnsembleAgainstEccodes(t *testing.T) {
	set, err := exec.LookPath("grib_set")
	if err != nil {
		t.Skip("grib_set not installed")
	}
	for _, tool := range []string{"grib_ls", "grib_get_data"} {
		if _, err := exec.LookPath(tool); err != nil {
			t.Skip(tool + " not installed")
		}
	}
	dir := t.TempDir()
	base := filepath.Join(dir, "base.grib2")
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, ensembleBase([]int{0, 6})); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(base, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	ns := []int{0, 3, 7}
	var files []string
	for _, n := range ns {
		p := filepath.Join(dir, "member"+strconv.Itoa(n)+".grib2")
		keys := "productDefinitionTemplateNumber=1,typeOfEnsembleForecast=3,numberOfForecastsInEnsemble=10,perturbationNumber=" +
			strconv.Itoa(n) + ",offsetValuesBy=" + strconv.Itoa(n)
		if out, err := exec.Command(set, "-s", keys, base, p).CombinedOutput(); err != nil {
			t.Fatalf("grib_set: %v %s", err, out)
		}
		files = append(files, p)
	}
	all := filepath.Join(dir, "all.grib2")
	catFiles(t, all, files...)

	// Member numbers, message by message, as grib_ls prints them.
	out, err := exec.Command("grib_ls", "-p", "perturbationNumber", all).Output()
	if err != nil {
		t.Fatalf("grib_ls: %v", err)
	}
	var want []int
	for _, line := range strings.Split(string(out), "\n") {
		if n, err := strconv.Atoi(strings.TrimSpace(line)); err == nil {
			want = append(want, n)
		}
	}
	heads, err := ScanFile(all)
	if err != nil {
		t.Fatal(err)
	}
	if len(heads) != len(want) || len(want) != 3*12 {
		t.Fatalf("Scan found %d messages, grib_ls listed %d member numbers (want 36)", len(heads), len(want))
	}
	for i, m := range heads {
		if m.Ensemble != want[i] || m.Product != 1 {
			t.Errorf("message %d: member %d template 4.%d, grib_ls says perturbationNumber %d (template 4.1)", i+1, m.Ensemble, m.Product, want[i])
		}
	}
	// Values, field by field, against grib_get_data.
	dumpText, err := exec.Command("grib_get_data", "-m", "NaN", "-F", "%.9g", all).Output()
	if err != nil {
		t.Fatalf("grib_get_data: %v", err)
	}
	dumpPath := filepath.Join(dir, "all.txt")
	if err := os.WriteFile(dumpPath, dumpText, 0o644); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(all)
	msgs, err := Decode(bytes.NewReader(b), all)
	if err != nil {
		t.Fatal(err)
	}
	checkAgainstDump(t, "all.grib2", dumpPath, msgs)
	dump := readDump(t, dumpPath)

	// Every member's Field at the grid points holds what ecCodes printed.
	checkEnsemble := func(t *testing.T, e *Ensemble) {
		t.Helper()
		if len(e.Members) != len(ns) {
			t.Fatalf("members %v, want %v", e.Members, ns)
		}
		for j, n := range ns {
			if e.Members[j] != n || e.Fields[j].Member() != n {
				t.Fatalf("member %d: number %d, Field.Member %d, want %d", j, e.Members[j], e.Fields[j].Member(), n)
			}
		}
		for k, m := range msgs {
			j := -1
			for i, n := range ns {
				if n == m.Ensemble {
					j = i
				}
			}
			f := e.Fields[j]
			for _, p := range dump[k] {
				s, err := f.Sample(p.lat, p.lon, m.Level, m.ValidTime)
				if err != nil {
					t.Fatal(err)
				}
				got := map[Param]float64{ParamU: s.U, ParamV: s.V, ParamT: s.T}[m.Param]
				if math.Abs(got-p.val) > 1e-5*math.Max(1, math.Abs(p.val)) {
					t.Fatalf("member %d %s at (%g, %g, %g Pa, %v): field %v, grib_get_data %v", m.Ensemble, m.Param, p.lat, p.lon, m.Level, m.ValidTime, got, p.val)
				}
			}
		}
	}
	t.Run("one file", func(t *testing.T) {
		e, err := OpenEnsemble(all)
		if err != nil {
			t.Fatal(err)
		}
		checkEnsemble(t, e)
	})
	t.Run("file per member", func(t *testing.T) {
		e, err := OpenEnsemble(files...)
		if err != nil {
			t.Fatal(err)
		}
		checkEnsemble(t, e)
	})
	t.Run("Member", func(t *testing.T) {
		n := 3
		f, err := Options{Member: &n}.Open(all)
		if err != nil {
			t.Fatal(err)
		}
		if f.Member() != 3 {
			t.Fatalf("Member() %d", f.Member())
		}
		// grib_get_data's first field of member 3 is u at 250 hPa, hour 0.
		k := 12
		if msgs[k].Ensemble != 3 || msgs[k].Param != ParamU {
			t.Fatalf("message %d is member %d %s", k+1, msgs[k].Ensemble, msgs[k].Param)
		}
		for _, p := range dump[k] {
			s, err := f.Sample(p.lat, p.lon, msgs[k].Level, msgs[k].ValidTime)
			if err != nil || math.Abs(s.U-p.val) > 1e-5*math.Max(1, math.Abs(p.val)) {
				t.Fatalf("(%g, %g): u %v, grib_get_data %v (%v)", p.lat, p.lon, s.U, p.val, err)
			}
		}
	})
}

// TestEnsembleBadInput checks the errors for a member not in the files,
// several members without a choice, and members on different grids or
// times: each a *MemberError naming the file and the member.
func TestEnsembleBadInput(t *testing.T) {
	dir := t.TempDir()
	good := writeMembers(t, dir, ensembleBase([]int{0, 6}), 0, 1, 2)
	all := filepath.Join(dir, "all.grib2")
	catFiles(t, all, good...)

	n := 5
	_, err := Options{Member: &n}.Open(all)
	var me *MemberError
	if !errors.As(err, &me) || me.Member != 5 || !strings.Contains(err.Error(), "members present: 0-2") || !strings.Contains(err.Error(), all) {
		t.Errorf("member 5: %v", err)
	}
	if _, err := (Options{Member: &n}).OpenEnsemble(all); !errors.As(err, &me) || me.Member != 5 {
		t.Errorf("OpenEnsemble member 5: %v", err)
	}
	if _, err := Open(all); !errors.As(err, &me) || me.Member != 1 || !strings.Contains(err.Error(), "ensemble member") || !strings.Contains(err.Error(), "Options.Member") {
		t.Errorf("several members, none chosen: %v", err)
	}
	det := filepath.Join(dir, "det.grib2")
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, ensembleBase([]int{0, 6})); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(det, buf.Bytes(), 0o644)
	if _, err := OpenEnsemble(det); !errors.As(err, &me) || !strings.Contains(err.Error(), "no ensemble members") {
		t.Errorf("deterministic file as an ensemble: %v", err)
	}
	if _, err := (Options{Member: &n}).Open(det); !errors.As(err, &me) || !strings.Contains(err.Error(), "no ensemble members") {
		t.Errorf("member of a deterministic file: %v", err)
	}

	// Member 3 on another grid (20 degrees).
	coarse := ensembleBase([]int{0, 6})
	for i := range coarse {
		m := &coarse[i]
		m.Ni, m.Nj, m.Di, m.Dj, m.Lon2 = 18, 10, 20, 20, 340
		m.Values = m.Values[:18*10]
	}
	bad := writeMembers(t, filepath.Join(dir), coarse, 3)
	_, err = OpenEnsemble(append(append([]string(nil), good...), bad...)...)
	if !errors.As(err, &me) || me.Member != 3 || me.Source != bad[0] || !strings.Contains(err.Error(), "grid") {
		t.Errorf("member on another grid: %v", err)
	}
	// Member 4 at other valid times.
	late := writeMembers(t, dir, ensembleBase([]int{0, 12}), 4)
	_, err = OpenEnsemble(append(append([]string(nil), good...), late...)...)
	if !errors.As(err, &me) || me.Member != 4 || !strings.Contains(err.Error(), late[0]) || !strings.Contains(err.Error(), "valid times") {
		t.Errorf("member at other times: %v", err)
	}
	// Member 4 with a level fewer.
	var short []Message
	for _, m := range ensembleBase([]int{0, 6}) {
		if m.Level != 20000 {
			short = append(short, m)
		}
	}
	fewer := writeMembers(t, dir, short, 4)
	_, err = OpenEnsemble(append(append([]string(nil), good...), fewer...)...)
	if !errors.As(err, &me) || me.Member != 4 || !strings.Contains(err.Error(), "lacks") {
		t.Errorf("member with a level fewer: %v", err)
	}
}

// TestEnsembleSharedEDR checks that fields of no member (EDR from a
// deterministic file) go to every member.
func TestEnsembleSharedEDR(t *testing.T) {
	dir := t.TempDir()
	files := writeMembers(t, dir, ensembleBase([]int{0, 6}), 1, 2)
	edr := synthetic(ParamEDR, []float64{25000}, []int{0, 6}, func(lat, lon, p float64, tt time.Time) float64 { return 0.1 })
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, edr); err != nil {
		t.Fatal(err)
	}
	ep := filepath.Join(dir, "edr.grib2")
	os.WriteFile(ep, buf.Bytes(), 0o644)
	e, err := OpenEnsemble(append(files, ep)...)
	if err != nil {
		t.Fatal(err)
	}
	for j, f := range e.Fields {
		s, err := f.Sample(40, 20, 25000, t0)
		if err != nil || math.Abs(s.EDR-0.1) > 1e-3 || !f.Has(ParamEDR) {
			t.Errorf("member %d: EDR %v (%v)", e.Members[j], s.EDR, err)
		}
		// The members differ by their offset (1 m/s a member number).
		s0, _ := e.Fields[0].Sample(40, 20, 25000, t0)
		if d := s.U - s0.U; math.Abs(d-float64(e.Members[j]-e.Members[0])) > 1e-3 {
			t.Errorf("member %d: u differs from member %d by %v", e.Members[j], e.Members[0], d)
		}
	}
}

// TestEnsembleBudget: the budget covers every member together, checked
// from the headers: three members of 36x19 points, 3 variables, 2 levels
// and 2 times need 3 x 3 x 2 x 2 x 684 x 4 bytes = 98,496 bytes.
func TestEnsembleBudget(t *testing.T) {
	dir := t.TempDir()
	files := writeMembers(t, dir, ensembleBase([]int{0, 6}), 0, 1, 2)
	var be *BudgetError
	if _, err := (Options{Budget: 98495}).OpenEnsemble(files...); !errors.As(err, &be) || be.Need != 98496 {
		t.Errorf("budget one byte short: %v", err)
	}
	if _, err := (Options{Budget: 98496 + 1<<16}).OpenEnsemble(files...); err != nil {
		t.Errorf("budget enough: %v", err)
	}
}
