package route

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// TestPointLimit: a CSV route of 60,000 waypoints (1.7 MB, the size that
// ran the planner out of memory) is refused while it is read, with an
// *UnsupportedError naming the limit and the line; MaxPoints is accepted.
func TestPointLimit(t *testing.T) {
	csvOf := func(n int) string {
		var b strings.Builder
		b.WriteString("name,lat,lon\n")
		for i := range n {
			f := float64(i) / float64(n-1)
			fmt.Fprintf(&b, "W%d,%.6f,%.6f\n", i, 44.6+6.4*f, -74.2+73.2*f)
		}
		return b.String()
	}
	big := csvOf(60000)
	_, err := ParseCSV(strings.NewReader(big), "big.csv")
	var ue *UnsupportedError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), "limit of 5000 points") || !strings.Contains(err.Error(), "line 5002") {
		t.Errorf("60,000 points: err %v", err)
	}
	if _, err := ParseCSV(strings.NewReader(csvOf(MaxPoints)), "max.csv"); err != nil {
		t.Errorf("%d points: %v", MaxPoints, err)
	}
	var inline strings.Builder
	for range MaxPoints + 1 {
		inline.WriteString("1,2 ")
	}
	if _, err := ParseInline(inline.String()); !errors.As(err, &ue) {
		t.Errorf("inline %d points: err %v", MaxPoints+1, err)
	}
	var gj strings.Builder
	gj.WriteString(`{"type":"LineString","coordinates":[`)
	for i := range MaxPoints + 1 {
		if i > 0 {
			gj.WriteByte(',')
		}
		fmt.Fprintf(&gj, "[%d,1]", i%100)
	}
	gj.WriteString("]}")
	if _, err := ParseGeoJSON([]byte(gj.String()), "big.geojson"); !errors.As(err, &ue) {
		t.Errorf("GeoJSON %d points: err %v", MaxPoints+1, err)
	}
}

// TestSegmentLimit: a route that needs more than MaxSegments segments is
// refused before the segments are allocated (checked by the bytes
// allocated: 10,000 segments would take several MB).
func TestSegmentLimit(t *testing.T) {
	r, err := ParseInline("0,0 0,89")
	if err != nil {
		t.Fatal(err)
	}
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	_, err = Build(r, Options{Date: testDate, MaxSegment: 500}) // 9,900 km / 500 m: 19,800 segments
	runtime.ReadMemStats(&m1)
	var ue *UnsupportedError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), "10000 segments") {
		t.Errorf("err %v", err)
	}
	if a := m1.TotalAlloc - m0.TotalAlloc; a > 1<<20 {
		t.Errorf("refusing allocated %d bytes", a)
	}
	// 9,900 km / 1 km: 9,900 segments, under the limit.
	if tr, err := Build(r, Options{Date: testDate, MaxSegment: 1000}); err != nil || len(tr.Segments) > MaxSegments {
		t.Errorf("9,900 segments: %v", err)
	}
}

// TestErrorsQuoteLittle: an error about a file the parsers cannot read
// quotes at most a short excerpt (maxExcerpt bytes) of the offending
// field, never the rest of the file: a process environment file is the
// case that matters.
func TestErrorsQuoteLittle(t *testing.T) {
	dir := t.TempDir()
	secret := "TOKEN_abcdef0123456789abcdef0123456789"
	cases := map[string]string{
		"environ":       "HOME=/root\nAPI_" + secret + "\nPATH=/usr/bin:/bin\n",
		"environ.csv":   "HOME=/root,USER=x,API=" + secret + "\n",
		"longlat.csv":   "name,lat,lon\nA,1,2\nB,1" + secret + ",3\n",
		"longname.csv":  "name,lat,lon\nA" + secret + ",1,2\nB,1,2\n",
		"type.geojson":  `{"type":"` + secret + `"}`,
		"coord.geojson": `{"type":"LineString","coordinates":[[1,2],["` + secret + `",3]]}`,
		"bin":           "\x00\x01" + secret + "\xff\xfe",
	}
	for name, body := range cases {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o600); err != nil {
			t.Fatal(err)
		}
		_, err := Load(p)
		if err == nil {
			t.Errorf("%s: no error", name)
			continue
		}
		msg := strings.ReplaceAll(err.Error(), p, "FILE")
		if strings.Contains(msg, secret[maxExcerpt/2:]) || strings.Contains(msg, "PATH") || strings.Contains(msg, "/usr/bin") {
			t.Errorf("%s: error echoes the file: %s", name, msg)
		}
	}
	if _, err := ParseInline("1,2 " + secret + ",x"); err == nil || strings.Contains(err.Error(), secret[maxExcerpt/2:]) {
		t.Errorf("inline: %v", err)
	}
}

// TestBuildOptionNumbers: non-finite or out-of-model option numbers are
// refused with an error, not turned into NaN courses: the magnetic height
// must lie in the WMM2025's -1 to 850 km (its report, Sec. 1) and the
// segment length be positive and finite.
func TestBuildOptionNumbers(t *testing.T) {
	r, err := ParseInline("50,-30 50,-20")
	if err != nil {
		t.Fatal(err)
	}
	for _, o := range []Options{
		{MagAltitude: math.NaN()}, {MagAltitude: math.Inf(1)}, {MagAltitude: 851e3}, {MagAltitude: -2e3},
		{MaxSegment: math.NaN()}, {MaxSegment: math.Inf(1)}, {MaxSegment: -1}, {MaxSegment: 1e-300},
	} {
		o.Date = testDate
		if tr, err := Build(r, o); err == nil {
			t.Errorf("%+v: accepted, %d segments", o, len(tr.Segments))
		}
	}
}
