package winds

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestRemediesWork runs the command that each "repack with:" remedy
// suggests, as given, on the file that caused it (ecCodes' grib_set, when
// installed), and checks the result decodes to the values ecCodes'
// grib_get_data prints for the original. A remedy that suggests no
// command must say what levelpath needs instead.
func TestRemediesWork(t *testing.T) {
	exe, err := exec.LookPath("grib_set")
	dump, err2 := exec.LookPath("grib_get_data")
	if err != nil || err2 != nil {
		t.Skip("ecCodes tools not installed")
	}
	dir := t.TempDir()
	tried := 0
	for _, name := range allFixtures(t) {
		src := filepath.Join(fixtures, name)
		_, err := Decode(bytes.NewReader(fixture(t, name)), name)
		var ue *UnsupportedError
		if !errors.As(err, &ue) {
			continue
		}
		cmd, ok := strings.CutPrefix(ue.Remedy, "repack with: ")
		if !ok {
			if !strings.Contains(ue.Remedy, "levelpath") && ue.Remedy != remedyArea {
				t.Errorf("%s: remedy %q neither a command nor what levelpath needs", name, ue.Remedy)
			}
			continue
		}
		args := strings.Fields(cmd)
		if args[0] != "grib_set" || len(args) != 6 || !strings.HasPrefix(args[4], "in.") || !strings.HasPrefix(args[5], "out.") {
			t.Fatalf("%s: unexpected command %q", name, cmd)
		}
		out := filepath.Join(dir, filepath.Base(name))
		args[4], args[5] = src, out
		if b, err := exec.Command(exe, args[1:]...).CombinedOutput(); err != nil {
			t.Errorf("%s: %s failed: %v\n%s", name, cmd, err, b)
			continue
		}
		b, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		ms, err := Decode(bytes.NewReader(b), out)
		if err != nil {
			t.Errorf("%s repacked by %q: %v", name, cmd, err)
			continue
		}
		ref, err := exec.Command(dump, "-m", "NaN", "-F", "%.9g", src).Output()
		if err != nil {
			t.Fatalf("grib_get_data %s: %v", src, err)
		}
		txt := filepath.Join(dir, "ref.txt")
		os.WriteFile(txt, ref, 0o644)
		checkAgainstDump(t, name, txt, ms)
		tried++
	}
	if tried < 2 {
		t.Errorf("tried %d repack remedies, want at least JPEG 2000 and GRIB1 second-order", tried)
	}
}

// TestReaderFixturesCurrent re-runs ecCodes' grib_get_data and grib_get on
// the reader fixtures, when installed, and checks the committed references
// are what it prints (testdata/winds/reader/dump.sh).
func TestReaderFixturesCurrent(t *testing.T) {
	if _, err := exec.LookPath("grib_get_data"); err != nil {
		t.Skip("ecCodes tools not installed")
	}
	dir := filepath.Join(fixtures, readerFixtures)
	run := func(want string, name string, args ...string) {
		got, err := exec.Command(name, args...).Output()
		if err != nil {
			t.Fatalf("%s %v: %v", name, args, err)
		}
		ref, err := os.ReadFile(filepath.Join(dir, want))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, ref) {
			t.Errorf("%s differs from what %s prints now", want, name)
		}
	}
	for _, f := range []string{"g1_area1", "g1_area2", "g1_area3", "g1_area4", "g1_area5", "g1_area6"} {
		run(f+".txt", "grib_get_data", "-m", "NaN", "-F", "%.9g", filepath.Join(dir, f+".grib1"))
	}
	run("g2_area.txt", "grib_get_data", "-m", "NaN", "-F", "%.9g", filepath.Join(dir, "g2_area.grib2"))
	run("g2_products.keys", "grib_get", "-p", "productDefinitionTemplateNumber,level,validityDate,validityTime", filepath.Join(dir, "g2_products.grib2"))
	run("g2_longstep.keys", "grib_get", "-p", "level,validityDate,validityTime", filepath.Join(dir, "g2_longstep.grib2"))
}

// TestCompressionHints compresses a fixture with xz, zstd and zip (when
// installed), checks the error names the format and a command, runs that
// command as given and decodes the result.
func TestCompressionHints(t *testing.T) {
	src, err := filepath.Abs(filepath.Join(fixtures, "g2_multi.grib2"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, c := range []struct{ tool, compress string }{
		{"xz", "xz -c SRC > in.xz"},
		{"zstd", "zstd -q -c SRC > in.zst"},
		{"unzip", "zip -q -j in.zip SRC"},
	} {
		if _, err := exec.LookPath(c.tool); err != nil {
			t.Logf("%s not installed", c.tool)
			continue
		}
		sh := func(cmd string) {
			if b, err := exec.Command("sh", "-c", "cd "+dir+" && "+cmd).CombinedOutput(); err != nil {
				t.Fatalf("%s: %v %s", cmd, err, b)
			}
		}
		os.Remove(filepath.Join(dir, "out.grib"))
		sh(strings.ReplaceAll(c.compress, "SRC", src))
		in := filepath.Join(dir, strings.Fields(c.compress)[len(strings.Fields(c.compress))-1])
		if c.tool == "unzip" {
			in = filepath.Join(dir, "in.zip")
		}
		_, err := ScanFile(in)
		msg := ""
		if err != nil {
			msg = err.Error()
		}
		_, cmd, ok := strings.Cut(msg, "decompress it first with: ")
		if !ok {
			t.Errorf("%s: %v, want a hint to decompress", c.tool, err)
			continue
		}
		sh(cmd)
		ms, err := ScanFile(filepath.Join(dir, "out.grib"))
		if err != nil || len(ms) != 18 {
			t.Errorf("%s: after %q: %d messages, %v", c.tool, cmd, len(ms), err)
		}
	}
}
