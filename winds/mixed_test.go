package winds

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

const mixedFixtures = "../testdata/winds/mixed"

// hazardRef is the reference time of the ecCodes-written EDR fixtures.
var hazardRef = time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)

// windsFile writes u, v and temperature on the 10-degree grid from 0E at
// 350..100 hPa, steps 0 and 6 h from hazardRef, with this package's
// writer (the EDR checks need no ecCodes decode of the winds).
func windsFile(t *testing.T) string { return windsFileB(t) }

func windsFileB(t testing.TB) string {
	t.Helper()
	var msgs []Message
	for _, p := range []Param{ParamU, ParamV, ParamT} {
		for _, m := range synthetic(p, []float64{35000, 30000, 25000, 20000, 15000, 10000}, []int{0, 6}, multilinear) {
			m.ValidTime = hazardRef.Add(m.ValidTime.Sub(m.RefTime))
			m.RefTime = hazardRef
			msgs = append(msgs, m)
		}
	}
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, msgs); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "winds.grib2")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// isaPressure is the ICAO standard atmosphere pressure (Pa) at geopotential
// altitude h (m): p0 (1 - L h / T0)^(g0 / (R L)) below 11 km, then
// isothermal at 216.65 K, with p0 101325 Pa, T0 288.15 K, L 0.0065 K/m,
// g0 9.80665 m/s^2, R 287.05287 J/(kg K) (ICAO Doc 7488/3, Table A, from
// memory).
func isaPressure(h float64) float64 {
	const g, r = 9.80665, 287.05287
	if h <= 11000 {
		return 101325 * math.Pow(1-0.0065*h/288.15, g/(0.0065*r))
	}
	return 22632.06 * math.Exp(-g*(h-11000)/(r*216.65))
}

// checkEDR samples f at every grid node of the ecCodes grib_get_data dump
// (longitudes -180..160, also given as 0..360) at the dumped fields'
// levels, valid at hazardRef + 6 h, against the dumped values.
func checkEDR(t *testing.T, f *Field, dump string, levels []float64) {
	t.Helper()
	blocks := readDump(t, filepath.Join(mixedFixtures, dump))
	if len(blocks) != len(levels) {
		t.Fatalf("%s: %d fields, want %d", dump, len(blocks), len(levels))
	}
	for k, b := range blocks {
		for _, p := range b {
			for _, lon := range []float64{p.lon, p.lon + 360} {
				s, err := f.Sample(p.lat, lon, levels[k], hazardRef.Add(6*time.Hour))
				if err != nil {
					t.Fatal(err)
				}
				if math.Abs(s.EDR-p.val) > 2e-7*math.Max(1, math.Abs(p.val)) {
					t.Fatalf("%s at (%g, %g) %g Pa: EDR %v, ecCodes %v", dump, p.lat, lon, levels[k], s.EDR, p.val)
				}
			}
		}
	}
}

// warningText joins the warnings' String forms, one a line.
func warningText(ws []Warning) string {
	var b strings.Builder
	for _, w := range ws {
		b.WriteString(w.String())
		b.WriteByte('\n')
	}
	return b.String()
}

// TestMixedSources combines winds on a 0..350E grid with EDR from an
// ecCodes-written hazard file on a 20-degree grid from -180E, at
// flight-level pressures rounded to 10 Pa, holding EDR parameters 28-31.
func TestMixedSources(t *testing.T) {
	wf := windsFile(t)
	edrFile := filepath.Join(mixedFixtures, "mixed_edr.grib2")
	levels := []float64{30090, 19680, 14750} // the file's levels (gen_mixed.py)

	f, err := Open(wf, edrFile)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range f.Warnings() {
		if strings.Contains(w.What, "EDR") && (w.Source != edrFile || w.Message < 1) {
			t.Errorf("warning %q names %s message %d, want a message of %s", w.What, w.Source, w.Message, edrFile)
		}
	}
	w := warningText(f.Warnings())
	if !strings.Contains(w, "using 0.19.30") || !strings.Contains(w, "0.19.28") || !strings.Contains(w, "0.19.29") || !strings.Contains(w, "0.19.31") {
		t.Errorf("warnings %q: want 0.19.30 used and 28, 29, 31 listed", w)
	}
	checkEDR(t, f, "mixed_edr_30.txt", levels)
	if got := f.ParamLevels(ParamEDR); len(got) != 3 || got[0] != 30090 || got[2] != 14750 {
		t.Errorf("EDR levels %v", got)
	}
	if got := f.Levels(); len(got) != 6 || got[0] != 35000 {
		t.Errorf("wind levels %v", got)
	}
	// Winds still come from their own grid: multilinear is reproduced
	// exactly by the interpolation (see its comment).
	s, err := f.Sample(12.5, -97.5, 27000, hazardRef.Add(3*time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	want := multilinear(12.5, 262.5, 27000, t0.Add(3*time.Hour))
	if math.Abs(s.U-want) > 1e-3 {
		t.Errorf("u = %v, want %v", s.U, want)
	}

	f29, err := Options{EDRParam: 29}.Open(wf, edrFile)
	if err != nil {
		t.Fatal(err)
	}
	checkEDR(t, f29, "mixed_edr_29.txt", levels)
	if w := warningText(f29.Warnings()); !strings.Contains(w, "using 0.19.29") || !strings.Contains(w, "as asked") {
		t.Errorf("warnings %q", w)
	}
	if _, err := OpenWith(Options{EDRParam: 27}, wf, edrFile); err == nil || !strings.Contains(err.Error(), "0.19.28") {
		t.Errorf("EDR parameter 27: %v, want an error listing those present", err)
	}
	// EDR alone: its own levels bound Sample with a RangeError.
	e, err := Open(edrFile)
	if err != nil {
		t.Fatal(err)
	}
	var re *RangeError
	if _, err := e.Sample(40, 20, 50000, hazardRef); !errors.As(err, &re) || e.Has(ParamU) {
		t.Errorf("EDR-only field at 500 hPa: %v, want a RangeError", err)
	}
}

// TestEDRLevelTolerance: the hazard file gives FL450 as 14750 Pa, the
// standard atmosphere 14747.7 Pa (13716 m); FL100 (3048 m, 696.8 hPa) and
// FL480 (14630 m, 127.7 hPa) are outside its levels. Sample answers at
// FL450 with the 14750 Pa value, and gives NaN EDR without an error
// outside; InLevels tells the planner which.
func TestEDRLevelTolerance(t *testing.T) {
	f, err := Open(windsFile(t), filepath.Join(mixedFixtures, "mixed_edr.grib2"))
	if err != nil {
		t.Fatal(err)
	}
	at := hazardRef.Add(6 * time.Hour)
	fl450 := isaPressure(45000 * 0.3048)
	if math.Abs(fl450-14748) > 1 {
		t.Fatalf("ISA FL450 %g Pa, want 147.48 hPa (standard atmosphere tables, from memory)", fl450)
	}
	a, err1 := f.Sample(40, 20, fl450, at)
	b, err2 := f.Sample(40, 20, 14750, at)
	if err1 != nil || err2 != nil || math.IsNaN(a.EDR) || a.EDR != b.EDR || !f.InLevels(ParamEDR, fl450) {
		t.Errorf("FL450: %v %v, at 14750 Pa %v %v; InLevels %v", a, err1, b, err2, f.InLevels(ParamEDR, fl450))
	}
	for _, ft := range []float64{10000, 48000} {
		p := isaPressure(ft * 0.3048)
		s, err := f.Sample(40, 20, p, at)
		if ft == 48000 {
			if err != nil || !math.IsNaN(s.EDR) || math.IsNaN(s.U) || f.InLevels(ParamEDR, p) {
				t.Errorf("FL480 (%g Pa): %+v %v, want winds and EDR NaN; InLevels %v", p, s, err, f.InLevels(ParamEDR, p))
			}
			continue
		}
		var re *RangeError
		if !errors.As(err, &re) || f.InLevels(ParamEDR, p) || f.InLevels(ParamU, p) {
			t.Errorf("FL100 (%g Pa): %v, want a RangeError (below the winds' 350 hPa)", p, err)
		}
	}
	if n := testing.AllocsPerRun(100, func() { f.Sample(40, 20, 20000, at) }); n != 0 {
		t.Errorf("Sample on two grids allocates %v times", n)
	}
}

// TestEDRTemplates: EDR in product template 4.15 (spatial statistics) is
// read, with a warning, and matches ecCodes' dump; in 4.8 (statistically
// processed over time) it is not read, with a warning naming it.
func TestEDRTemplates(t *testing.T) {
	wf := windsFile(t)
	f, err := Open(wf, filepath.Join(mixedFixtures, "mixed_edr415.grib2"))
	if err != nil {
		t.Fatal(err)
	}
	if w := warningText(f.Warnings()); !strings.Contains(w, "template 4.15") {
		t.Errorf("warnings %q: want 4.15 named", w)
	}
	checkEDR(t, f, "mixed_edr415.txt", []float64{30090, 19680, 14750})

	g, err := Open(wf, filepath.Join(mixedFixtures, "mixed_edr48.grib2"))
	if err != nil {
		t.Fatal(err)
	}
	if w := warningText(g.Warnings()); g.Has(ParamEDR) || !strings.Contains(w, "template 4.8") || !strings.Contains(w, "not read") {
		t.Errorf("4.8: Has(EDR) %v, warnings %q", g.Has(ParamEDR), w)
	}
}

// BenchmarkSampleMixed samples winds and EDR held on two grids (see
// TestMixedSources), to compare with BenchmarkSample's single grid.
func BenchmarkSampleMixed(b *testing.B) {
	f, err := Open(windsFileB(b), filepath.Join(mixedFixtures, "mixed_edr.grib2"))
	if err != nil {
		b.Fatal(err)
	}
	at := hazardRef.Add(3 * time.Hour)
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if _, err := f.Sample(float64(i%140)-70, float64(i%360), 15000+float64(i%150)*100, at); err != nil {
			b.Fatal(err)
		}
		i++
	}
}

// TestGridsFromMinus180: temperature on a global grid whose longitudes
// run from -180 combined with winds on one from 0: each is sampled on its
// own grid, -160 and 200 being one meridian.
func TestGridsFromMinus180(t *testing.T) {
	lv := []float64{30000, 20000}
	var msgs []Message
	msgs = append(msgs, synthetic(ParamU, lv, []int{0, 6}, multilinear)...)
	msgs = append(msgs, synthetic(ParamV, lv, []int{0, 6}, multilinear)...)
	for _, m := range synthetic(ParamT, lv, []int{0, 6}, multilinear) {
		m.Lon1, m.Lon2 = -180, 170
		for j := 0; j < m.Nj; j++ {
			for i := 0; i < m.Ni; i++ {
				m.Values[j*m.Ni+i] = float32(multilinear(90-10*float64(j), -180+10*float64(i), m.Level, m.ValidTime))
			}
		}
		msgs = append(msgs, m)
	}
	f, err := NewField(msgs)
	if err != nil {
		t.Fatal(err)
	}
	for _, lon := range []float64{-160, 200} {
		s, err := f.Sample(30, lon, 25000, t0.Add(2*time.Hour))
		want := multilinear(30, -160, 25000, t0.Add(2*time.Hour))
		if err != nil || math.Abs(s.T-want) > 1e-3 {
			t.Errorf("T at lon %g: %v %v, want %v", lon, s.T, err, want)
		}
		if u := multilinear(30, 200, 25000, t0.Add(2*time.Hour)); math.Abs(s.U-u) > 1e-3 {
			t.Errorf("u at lon %g: %v, want %v (the 0..350 grid)", lon, s.U, u)
		}
	}
}
