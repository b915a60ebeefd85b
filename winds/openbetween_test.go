package winds

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// TestOpenBetween keeps the levels of a pressure band and one beyond each
// bound: interpolation inside the band equals that of the whole field.
func TestOpenBetween(t *testing.T) {
	ref := time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)
	var msgs []Message
	levels := []float64{100000, 85000, 70000, 50000, 30000, 25000, 20000, 10000, 5000}
	for _, lv := range levels {
		for _, v := range []struct {
			c, n int
			par  Param
		}{{2, 2, ParamU}, {2, 3, ParamV}, {0, 0, ParamT}} {
			vals := make([]float32, 36*19)
			for i := range vals {
				vals[i] = float32(lv/1000 + float64(i%36)) // varies with level and longitude
			}
			msgs = append(msgs, Message{Category: v.c, Number: v.n, Param: v.par, LevelType: 100, Level: lv, RefTime: ref,
				ValidTime: ref, Ni: 36, Nj: 19, Lat1: 90, Lon1: 0, Lat2: -90, Lon2: 350, Di: 10, Dj: 10, Ensemble: -1, Values: vals})
		}
	}
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, msgs); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "f.grib2")
	os.WriteFile(path, buf.Bytes(), 0o644)
	all, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	band, err := OpenBetween(22000, 60000, path)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{70000, 50000, 30000, 25000, 20000} // 50..25 kPa inside, 70 and 20 kPa beyond
	got := band.Levels()
	if len(got) != len(want) {
		t.Fatalf("levels %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("levels %v, want %v", got, want)
		}
	}
	for _, p := range []float64{60000, 40000, 26000, 22000} {
		a, err1 := all.Sample(33, 47, p, ref)
		b, err2 := band.Sample(33, 47, p, ref)
		if err1 != nil || err2 != nil || a.U != b.U || a.V != b.V || a.T != b.T {
			t.Errorf("at %g Pa: whole %+v %v, band %+v %v", p, a, err1, b, err2)
		}
	}
	if _, err := band.Sample(33, 47, 90000, ref); err == nil {
		t.Error("a pressure outside the kept levels sampled without error")
	}
}
