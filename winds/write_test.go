package winds

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"
)

// TestWriteRoundTrip re-encodes ecCodes-decoded fields (the g2_multi
// fixture, plus a bitmap field) and checks our decoder reads them back
// within the 16-bit quantisation step.
func TestWriteRoundTrip(t *testing.T) {
	ms := decodeFile(t, "g2_multi.grib2")[:17]
	ms = append(ms, decodeFile(t, "g2_bitmap.grib2")...)
	ms = append(ms, decodeFile(t, "g2_regional.grib2")...)
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, ms); err != nil {
		t.Fatal(err)
	}
	back, err := Decode(bytes.NewReader(buf.Bytes()), "roundtrip")
	if err != nil {
		t.Fatal(err)
	}
	if len(back) != len(ms) {
		t.Fatalf("%d messages back, want %d", len(back), len(ms))
	}
	for k := range ms {
		a, b := &ms[k], &back[k]
		if a.Param != b.Param || a.Level != b.Level || !a.ValidTime.Equal(b.ValidTime) || a.Ensemble != b.Ensemble {
			t.Errorf("message %d header: %s %g %v %d, back %s %g %v %d", k+1, a.Param, a.Level, a.ValidTime, a.Ensemble, b.Param, b.Level, b.ValidTime, b.Ensemble)
		}
		an, aw := a.Origin()
		bn, bw := b.Origin()
		if an != bn || aw != bw || a.Ni != b.Ni || a.Nj != b.Nj {
			t.Errorf("message %d grid (%g,%g) %dx%d, back (%g,%g) %dx%d", k+1, an, aw, a.Ni, a.Nj, bn, bw, b.Ni, b.Nj)
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, v := range a.Values {
			if v == v {
				lo, hi = math.Min(lo, float64(v)), math.Max(hi, float64(v))
			}
		}
		tol := (hi-lo)/65535 + 1e-6*math.Max(math.Abs(lo), math.Abs(hi))
		for i := range a.Values {
			x, y := float64(a.Values[i]), float64(b.Values[i])
			if math.IsNaN(x) != math.IsNaN(y) || math.Abs(x-y) > tol {
				t.Fatalf("message %d value %d: wrote %v, read %v (tol %g)", k+1, i, x, y, tol)
			}
		}
	}
}

// TestWriteEccodes has ecCodes' grib_get_data decode WriteGRIB2 output
// (skipped when ecCodes is not installed) and compares with what was
// written, within the 16-bit quantisation step.
func TestWriteEccodes(t *testing.T) {
	exe, err := exec.LookPath("grib_get_data")
	if err != nil {
		t.Skip("grib_get_data not installed")
	}
	msgs := synthetic(ParamU, []float64{25000}, []int{6}, func(lat, lon, p float64, tt time.Time) float64 {
		return 20 + 30*math.Cos(lat*math.Pi/180)*math.Sin(lon*math.Pi/180)
	})
	msgs[0].Values[5] = nan32
	path := filepath.Join(t.TempDir(), "w.grib2")
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, msgs); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(exe, "-m", "NaN", "-F", "%.9g", path).Output()
	if err != nil {
		t.Fatalf("grib_get_data: %v", err)
	}
	dump := filepath.Join(t.TempDir(), "w.txt")
	os.WriteFile(dump, out, 0o644)
	pts := readDump(t, dump)
	if len(pts) != 1 || len(pts[0]) != 36*19 {
		t.Fatalf("ecCodes read %d fields", len(pts))
	}
	for _, p := range pts[0] {
		want, _ := valueAt(&msgs[0], p.lat, p.lon)
		if math.IsNaN(float64(want)) != math.IsNaN(p.val) || math.Abs(float64(want)-p.val) > 60.0/65535 {
			t.Fatalf("(%g, %g): wrote %v, ecCodes read %v", p.lat, p.lon, want, p.val)
		}
	}
	info, err := exec.Command("grib_get", "-p", "shortName,level,step,packingType", path).Output()
	if err != nil || string(bytes.TrimSpace(info)) != "u 250 6 grid_simple" {
		t.Errorf("grib_get: %q %v", info, err)
	}
}
