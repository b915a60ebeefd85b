package winds

import (
	"bufio"
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

const ccsdsFixtures = "../testdata/winds/ccsds"

// readIndexDump reads "index value" lines written by gen_ccsds.py from
// ecCodes' grib_get_data value column.
func readIndexDump(t *testing.T, path string) map[int]float64 {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	out := map[int]float64{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || line == "" {
			continue
		}
		fs := strings.Fields(line)
		i, err1 := strconv.Atoi(fs[0])
		v, err2 := strconv.ParseFloat(fs[1], 64)
		if err1 != nil || err2 != nil || len(fs) != 2 {
			t.Fatalf("%s: bad line %q", path, line)
		}
		out[i] = v
	}
	return out
}

func ccsdsNames(t *testing.T) []string {
	t.Helper()
	ms, err := filepath.Glob(filepath.Join(ccsdsFixtures, "c_*.grib2"))
	if err != nil || len(ms) == 0 {
		t.Fatalf("no CCSDS fixtures: %v", err)
	}
	var names []string
	for _, m := range ms {
		if !strings.HasSuffix(m, "_simple.grib2") {
			names = append(names, strings.TrimSuffix(filepath.Base(m), ".grib2"))
		}
	}
	return names
}

func decodeOne(t *testing.T, path string) Message {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	ms, err := Decode(bytes.NewReader(b), filepath.Base(path))
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(ms) != 1 {
		t.Fatalf("%s: %d messages", path, len(ms))
	}
	return ms[0]
}

// TestCCSDSFixtures decodes every template 5.42 fixture (bit widths 2-32,
// block sizes 8-64, with and without preprocessing, restricted option
// identifiers, constant field, bitmap, a 360x181 field) and compares each
// value with ecCodes 2.28's grib_get_data dump of the same file, and with
// this package's decode of ecCodes' grid_simple repack of it
// (testdata/winds/ccsds/README.md), which must be identical.
func TestCCSDSFixtures(t *testing.T) {
	for _, name := range ccsdsNames(t) {
		t.Run(name, func(t *testing.T) {
			m := decodeOne(t, filepath.Join(ccsdsFixtures, name+".grib2"))
			if m.Packing != 42 || m.ScanMode != 0 {
				t.Fatalf("packing %d scan mode %#x, want 42 and 0", m.Packing, m.ScanMode)
			}
			want := readIndexDump(t, filepath.Join(ccsdsFixtures, name+".txt"))
			if len(want) == 0 {
				t.Fatal("empty dump")
			}
			for i, w := range want {
				if i >= len(m.Values) {
					t.Fatalf("dump index %d beyond %d values", i, len(m.Values))
				}
				g := float64(m.Values[i])
				if math.IsNaN(w) != math.IsNaN(g) || math.Abs(g-w) > 1e-6*math.Max(1, math.Abs(w)) {
					t.Fatalf("value %d = %.9g, ecCodes %.9g", i, g, w)
				}
			}
			simple := filepath.Join(ccsdsFixtures, name+"_simple.grib2")
			if _, err := os.Stat(simple); err != nil {
				return // c_large: its repack is checked by TestCCSDSRepackEcCodes
			}
			s := decodeOne(t, simple)
			if s.Packing != 0 {
				t.Fatalf("repack has packing %d", s.Packing)
			}
			for i := range s.Values {
				a, b := m.Values[i], s.Values[i]
				if a != b && !(a != a && b != b) {
					t.Fatalf("value %d: CCSDS %.9g, simple repack %.9g", i, a, b)
				}
			}
		})
	}
}

// TestCCSDSRepackEcCodes repacks c_large (360x181, 65160 values) with
// ecCodes' grib_set -r -s packingType=grid_simple, when installed, and
// checks that both files decode to identical values.
func TestCCSDSRepackEcCodes(t *testing.T) {
	exe, err := exec.LookPath("grib_set")
	if err != nil {
		t.Skip("grib_set not installed")
	}
	src := filepath.Join(ccsdsFixtures, "c_large.grib2")
	dst := filepath.Join(t.TempDir(), "c_large_simple.grib2")
	if out, err := exec.Command(exe, "-r", "-s", "packingType=grid_simple", src, dst).CombinedOutput(); err != nil {
		t.Fatalf("grib_set: %v %s", err, out)
	}
	c, s := decodeOne(t, src), decodeOne(t, dst)
	if s.Packing != 0 || len(c.Values) != 360*181 || len(s.Values) != len(c.Values) {
		t.Fatalf("packing %d, %d and %d values", s.Packing, len(c.Values), len(s.Values))
	}
	for i := range c.Values {
		if c.Values[i] != s.Values[i] {
			t.Fatalf("value %d: CCSDS %.9g, simple repack %.9g", i, c.Values[i], s.Values[i])
		}
	}
}
