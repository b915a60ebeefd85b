package winds

import (
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// TestOpenAgainstEccodes opens fixtures written by ecCodes 2.28 in several
// scanning modes, with and without a bitmap, and with several fields per
// file (Open decodes every field through the same reused buffers), and
// checks every grid node of the field against the values grib_get_data
// printed for it (testdata/winds/README.md), NaN for missing points.
func TestOpenAgainstEccodes(t *testing.T) {
	for _, name := range []string{"g2_simple.grib2", "g2_bitmap.grib2", "g2_jcons.grib2", "g2_jcons_bitmap.grib2",
		"g2_regional.grib2", "g2_regional_bitmap.grib2", "g2_complex_bitmap.grib2", "g1_wmo.grib1", "g1_bitmap.grib1"} {
		t.Run(name, func(t *testing.T) {
			f, err := Open(filepath.Join(fixtures, name))
			if err != nil {
				t.Fatal(err)
			}
			ms := decodeFile(t, name)
			dump := readDump(t, filepath.Join(fixtures, strings.TrimSuffix(name, filepath.Ext(name))+".txt"))
			if len(dump) != len(ms) {
				t.Fatalf("decoded %d fields, grib_get_data dumped %d", len(ms), len(dump))
			}
			for k, m := range ms {
				a := f.ax[slotOf(m.Param)]
				if len(dump[k]) != a.plane {
					t.Fatalf("field %d: dump has %d points, field plane %d", k+1, len(dump[k]), a.plane)
				}
				it, il := 0, 0
				for il < len(a.levels) && a.levels[il] != m.Level {
					il++
				}
				for it < len(a.times) && !a.times[it].Equal(m.ValidTime) {
					it++
				}
				if il == len(a.levels) || it == len(a.times) {
					t.Fatalf("field %d (%s at %g Pa) not in the field", k+1, m.Param, m.Level)
				}
				plane := f.vars[slotOf(m.Param)][(it*len(a.levels)+il)*a.plane:][:a.plane]
				for _, p := range dump[k] {
					j := int(math.Round((a.north - p.lat) / a.dj))
					i := int(math.Round(math.Mod(math.Mod(p.lon-a.west, 360)+360, 360) / a.di))
					if i == a.ni && a.global {
						i = 0
					}
					if j < 0 || j >= a.nj || i < 0 || i >= a.ni {
						t.Fatalf("field %d: point (%g, %g) outside the field", k+1, p.lat, p.lon)
					}
					got := float64(plane[j*a.ni+i])
					if math.IsNaN(p.val) != math.IsNaN(got) ||
						(!math.IsNaN(p.val) && math.Abs(got-p.val) > 2e-7*math.Max(1, math.Abs(p.val))) {
						t.Fatalf("field %d %s at (%g, %g): %v, ecCodes %v", k+1, m.Param, p.lat, p.lon, got, p.val)
					}
				}
			}
		})
	}
}
