package winds

import (
	"bufio"
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

const fixtures = "../testdata/winds"

// point is one line of a grib_get_data dump.
type point struct{ lat, lon, val float64 }

// readDump parses the text written by ecCodes' grib_get_data (one block per
// field, each headed "Latitude Longitude Value").
func readDump(t *testing.T, path string) [][]point {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out [][]point
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) == 0 {
			continue
		}
		if fs[0] == "Latitude" {
			out = append(out, nil)
			continue
		}
		var p point
		var errs [3]error
		p.lat, errs[0] = strconv.ParseFloat(fs[0], 64)
		p.lon, errs[1] = strconv.ParseFloat(fs[1], 64)
		p.val, errs[2] = strconv.ParseFloat(fs[2], 64)
		for _, e := range errs {
			if e != nil {
				t.Fatalf("%s: %v", path, e)
			}
		}
		out[len(out)-1] = append(out[len(out)-1], p)
	}
	return out
}

// valueAt returns the decoded value at (lat, lon) using the documented
// canonical order of Message.Values.
func valueAt(m *Message, lat, lon float64) (float32, bool) {
	north, west := m.Origin()
	j := int(math.Round((north - lat) / m.Dj))
	d := math.Mod(math.Mod(lon-west, 360)+360, 360)
	i := int(math.Round(d / m.Di))
	if i == m.Ni && math.Abs(d-360) < 1e-6 {
		i = 0
	}
	if i < 0 || i >= m.Ni || j < 0 || j >= m.Nj {
		return 0, false
	}
	return m.Values[j*m.Ni+i], true
}

func decodeFile(t *testing.T, name string) []Message {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(fixtures, name))
	if err != nil {
		t.Fatal(err)
	}
	ms, err := Decode(bytes.NewReader(b), name)
	if err != nil {
		t.Fatalf("Decode %s: %v", name, err)
	}
	return ms
}

// compareDump checks every kept field of a fixture against the values
// ecCodes' grib_get_data printed for it (the reference), point by point,
// within float32 rounding.
func compareDump(t *testing.T, name string, ms []Message) {
	t.Helper()
	checkAgainstDump(t, name, filepath.Join(fixtures, strings.TrimSuffix(name, filepath.Ext(name))+".txt"), ms)
}

// checkAgainstDump is compareDump with the dump at path.
func checkAgainstDump(t *testing.T, name, path string, ms []Message) {
	t.Helper()
	dump := readDump(t, path)
	if len(dump) != len(ms) {
		t.Fatalf("%s: decoded %d fields, grib_get_data dumped %d", name, len(ms), len(dump))
	}
	for k := range ms {
		m := &ms[k]
		if m.Param == ParamOther {
			if m.Values != nil {
				t.Errorf("%s field %d: skipped parameter has values", name, k+1)
			}
			continue
		}
		if len(dump[k]) != m.Ni*m.Nj || len(m.Values) != m.Ni*m.Nj {
			t.Fatalf("%s field %d: %d values, dump %d, grid %dx%d", name, k+1, len(m.Values), len(dump[k]), m.Ni, m.Nj)
		}
		bad := 0
		for _, p := range dump[k] {
			got, ok := valueAt(m, p.lat, p.lon)
			if !ok {
				t.Fatalf("%s field %d: point (%g, %g) outside decoded grid", name, k+1, p.lat, p.lon)
			}
			if math.IsNaN(p.val) != math.IsNaN(float64(got)) ||
				(!math.IsNaN(p.val) && math.Abs(float64(got)-p.val) > 2e-7*math.Max(1, math.Abs(p.val))) {
				if bad < 5 {
					t.Errorf("%s field %d at (%g, %g): got %v, ecCodes %v", name, k+1, p.lat, p.lon, got, p.val)
				}
				bad++
			}
		}
	}
}

// TestDecodeAgainstEccodes decodes fixtures written by ecCodes 2.28 in
// every supported packing and scanning mode and compares with the values
// grib_get_data printed (testdata/winds/README.md).
func TestDecodeAgainstEccodes(t *testing.T) {
	cases := []struct {
		file            string
		packing, scan   int
		params          string
		bitmap, regular bool
	}{
		{"g2_simple.grib2", 0, 0, "u", false, true},
		{"g2_complex.grib2", 2, 0, "u", false, true},
		{"g2_sd1.grib2", 3, 0, "u", false, true},
		{"g2_sd2.grib2", 3, 0, "u", false, true},
		{"g2_ieee32.grib2", 4, 0, "u", false, true},
		{"g2_ieee64.grib2", 4, 0, "u", false, true},
		{"g2_png.grib2", 41, 0, "u", false, true},
		{"g2_png12.grib2", 41, 0, "u", false, true},
		{"g2_png24.grib2", 41, 0, "u", false, true},
		{"g2_ccsds.grib2", 42, 0, "u", false, true},
		{"g2_jpos.grib2", 0, 0x40, "u", false, true},
		{"g2_ineg.grib2", 0, 0x80, "u", false, true},
		{"g2_jcons.grib2", 0, 0x20, "u", false, true},
		{"g2_boustro.grib2", 0, 0x10, "u", false, true},
		{"g2_regional.grib2", 0, 0xc0, "t", false, false},
		{"g2_bitmap.grib2", 0, 0, "u", true, true},
		{"g2_complex_bitmap.grib2", 2, 0, "u", true, true},
		{"g2_sd2_bitmap.grib2", 3, 0, "u", true, true},
		{"g2_jcons_bitmap.grib2", 0, 0x20, "u", true, true},
		{"g2_regional_bitmap.grib2", 0, 0xc0, "t", true, false},
		{"g2_complex_missing.grib2", 2, 0, "u", false, true},
		{"g2_sd1_missing.grib2", 3, 0, "u", false, true},
		{"g2_multifield.grib2", 0, 0, "u v", true, true},
		{"g1_wmo.grib1", 0, 0, "u v t", false, true},
		{"g1_ecmwf.grib1", 0, 0, "u v t", false, true},
		{"g1_bitmap.grib1", 0, 0, "u", true, true},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			ms := decodeFile(t, c.file)
			var got []string
			for _, m := range ms {
				got = append(got, string(m.Param))
				if m.Packing != c.packing || m.ScanMode != c.scan || m.Bitmap != c.bitmap {
					t.Errorf("packing %d scan %#x bitmap %v, want %d %#x %v", m.Packing, m.ScanMode, m.Bitmap, c.packing, c.scan, c.bitmap)
				}
				if m.Level != 25000 || m.LevelType != 100 {
					t.Errorf("level %g type %d, want 25000 Pa isobaric", m.Level, m.LevelType)
				}
				if want := time.Date(2024, 1, 15, 6, 0, 0, 0, time.UTC); !m.RefTime.Equal(want) || !m.ValidTime.Equal(want) {
					t.Errorf("times %v %v, want %v", m.RefTime, m.ValidTime, want)
				}
			}
			if strings.Join(got, " ") != c.params {
				t.Errorf("params %q, want %q", strings.Join(got, " "), c.params)
			}
			compareDump(t, c.file, ms)
		})
	}
}

// TestScanningModesAgree checks that every scanning mode yields the same
// canonical grid as scanning mode 0 (the fixtures hold one analytic
// function of latitude and longitude, packed at 16 bits).
func TestScanningModesAgree(t *testing.T) {
	ref := decodeFile(t, "g2_simple.grib2")[0]
	for _, name := range []string{"g2_jpos.grib2", "g2_ineg.grib2", "g2_jcons.grib2", "g2_boustro.grib2", "g2_complex.grib2", "g2_sd2.grib2", "g2_png.grib2"} {
		m := decodeFile(t, name)[0]
		n, w := m.Origin()
		if n != 90 || w != 0 {
			t.Errorf("%s: origin (%g, %g), want (90, 0)", name, n, w)
		}
		for i := range ref.Values {
			if math.Abs(float64(m.Values[i]-ref.Values[i])) > 2e-3 {
				t.Fatalf("%s: value %d = %v, mode 0 gives %v", name, i, m.Values[i], ref.Values[i])
			}
		}
	}
}

// TestMultiMessage checks headers of a file of 18 messages: kept
// parameters at two levels and two steps, an ensemble member (template
// 4.1, perturbation number 7 as set by gen_fixtures.py) and a skipped 2 m
// temperature that Scan still lists.
func TestMultiMessage(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(fixtures, "g2_multi.grib2"))
	if err != nil {
		t.Fatal(err)
	}
	heads, err := Scan(bytes.NewReader(b), "g2_multi.grib2")
	if err != nil {
		t.Fatal(err)
	}
	if len(heads) != 18 {
		t.Fatalf("Scan: %d messages, want 18", len(heads))
	}
	for i, h := range heads {
		if h.Values != nil || h.Index != i+1 {
			t.Errorf("Scan message %d: index %d, values %v", i+1, h.Index, h.Values != nil)
		}
	}
	edr := heads[3]
	if edr.Param != ParamEDR || edr.Category != 19 || edr.Number != 30 || edr.Level != 30000 {
		t.Errorf("message 4: %+v, want EDR 0.19.30 at 30000 Pa", edr)
	}
	step := heads[8]
	if step.ValidTime.Sub(step.RefTime) != 6*time.Hour || step.Param != ParamU || step.Level != 30000 {
		t.Errorf("message 9: %v step, %s at %g", step.ValidTime.Sub(step.RefTime), step.Param, step.Level)
	}
	ens := heads[16]
	if ens.Product != 1 || ens.Ensemble != 7 || ens.Param != ParamV || ens.Level != 50000 {
		t.Errorf("message 17: product %d ensemble %d %s at %g", ens.Product, ens.Ensemble, ens.Param, ens.Level)
	}
	if heads[0].Ensemble != -1 {
		t.Errorf("message 1 ensemble %d, want -1", heads[0].Ensemble)
	}
	sfc := heads[17]
	if sfc.Param != ParamOther || sfc.LevelType != 103 || sfc.Category != 0 || sfc.Number != 0 {
		t.Errorf("message 18: %s type %d, want other at type 103", sfc.Param, sfc.LevelType)
	}
	ms := decodeFile(t, "g2_multi.grib2")
	compareDump(t, "g2_multi.grib2", ms)
}

// TestUnsupported checks that valid but unsupported templates written by
// ecCodes give an *UnsupportedError naming the template and what to do:
// repack an unsupported packing, regrid an unsupported grid (repacking
// would not change the grid).
func TestUnsupported(t *testing.T) {
	for file, c := range map[string]struct{ want, remedy string }{
		"g2_jpeg.grib2":     {"5.40", RepackHint},
		"g2_gaussian.grib2": {"3.40", "levelpath reads only regular latitude/longitude grids"},
	} {
		want := c.want
		b, err := os.ReadFile(filepath.Join(fixtures, file))
		if err != nil {
			t.Fatal(err)
		}
		_, err = Decode(bytes.NewReader(b), file)
		var ue *UnsupportedError
		if !errors.As(err, &ue) || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), c.remedy) || !strings.Contains(err.Error(), file) {
			t.Errorf("%s: %v, want UnsupportedError naming %s", file, err, want)
		}
		if _, err := Scan(bytes.NewReader(b), file); err != nil {
			t.Errorf("Scan %s: %v (headers of unsupported packings are listed)", file, err)
		}
	}
}
