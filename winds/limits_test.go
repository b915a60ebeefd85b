package winds

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// readKeys parses the output of ecCodes' grib_get -p (one line a message,
// space-separated values) written beside a reader fixture.
func readKeys(t *testing.T, name string) [][]string {
	t.Helper()
	f, err := os.Open(filepath.Join(fixtures, readerFixtures, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out [][]string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		out = append(out, strings.Fields(sc.Text()))
	}
	return out
}

// ecTime converts ecCodes' validityDate (YYYYMMDD) and validityTime (HHMM).
func ecTime(t *testing.T, date, hm string) time.Time {
	t.Helper()
	d, err1 := strconv.Atoi(date)
	h, err2 := strconv.Atoi(hm)
	if err1 != nil || err2 != nil {
		t.Fatalf("bad ecCodes date %q %q", date, hm)
	}
	return time.Date(d/10000, time.Month(d/100%100), d%100, h/100, h%100, 0, 0, time.UTC)
}

// TestMemoryBomb opens the 107 KB file of 600 constant 4096 x 4096 fields
// (20 levels x 10 times x u, v, t; written by ecCodes, see
// testdata/winds/reader/README.md), which would need 40 GiB: it must be
// refused from the headers with a *BudgetError naming the file and the
// size, having allocated next to nothing. Before, Open asked for 13.4 GB
// in one block. Decode is refused once its fields pass the budget.
func TestMemoryBomb(t *testing.T) {
	path := filepath.Join(fixtures, readerFixtures, "bomb.grib2")
	keys := readKeys(t, "bomb.keys") // ecCodes: 600 messages, 4096 x 4096, 0 bits per value
	if keys[0][0] != "600" || keys[1][0] != "4096" || keys[1][1] != "4096" || keys[1][2] != "0" {
		t.Fatalf("bomb.keys: %v", keys)
	}
	var before, after runtimeStats
	before.read()
	_, err := Open(path)
	after.read()
	var be *BudgetError
	if !errors.As(err, &be) || !strings.Contains(err.Error(), "bomb.grib2") || be.Need != 3*20*10*4096*4096*4 || be.Budget != uint64(DefaultBudget) {
		t.Fatalf("Open: %v, want BudgetError for 3 x 20 x 10 x 4096 x 4096 x 4 bytes", err)
	}
	if d := after.alloc - before.alloc; d > 8<<20 {
		t.Errorf("refusing the bomb allocated %d bytes", d)
	}
	// A budget under one field (64 MiB) stops Decode at the first field.
	_, err = Options{Budget: 32 << 20}.Decode(bytes.NewReader(fixture(t, filepath.Join(readerFixtures, "bomb.grib2"))), "bomb.grib2")
	if !errors.As(err, &be) || !strings.Contains(err.Error(), "message 1") {
		t.Errorf("Decode with a 32 MiB budget: %v", err)
	}
	// The same file with a budget it fits: its 600 headers only.
	heads, err := Options{Budget: 1 << 20}.Scan(bytes.NewReader(fixture(t, filepath.Join(readerFixtures, "bomb.grib2"))), "bomb.grib2")
	if err != nil || len(heads) != 600 {
		t.Errorf("Scan: %d headers, %v", len(heads), err)
	}
}

// TestDecodeBudget checks Decode's running total: g2_multi's 18 fields of
// 684 points (17 kept) need 17 x 684 x 4 bytes plus 18 headers.
func TestDecodeBudget(t *testing.T) {
	b := fixture(t, "g2_multi.grib2")
	need := int64(17*684*4 + 18*headerBytes)
	if _, err := (Options{Budget: need}).Decode(bytes.NewReader(b), "m"); err != nil {
		t.Errorf("budget %d: %v", need, err)
	}
	_, err := Options{Budget: need - 1}.Decode(bytes.NewReader(b), "m")
	var be *BudgetError
	if !errors.As(err, &be) || be.Need != uint64(need) {
		t.Errorf("budget %d: %v, want BudgetError needing %d", need-1, err, need)
	}
}

// TestProductTemplates lists messages of product templates 4.8, 4.11,
// 4.15, 4.2 and a 4.0 with a forecast time of 3,000,000 hours (342 years:
// it overflows a time.Duration, and wrapped before), and compares level
// and valid time with what ecCodes' grib_get printed (g2_products.keys).
func TestProductTemplates(t *testing.T) {
	heads, err := Scan(bytes.NewReader(fixture(t, filepath.Join(readerFixtures, "g2_products.grib2"))), "p")
	if err != nil {
		t.Fatal(err)
	}
	long, err := Scan(bytes.NewReader(fixture(t, filepath.Join(readerFixtures, "g2_longstep.grib2"))), "l")
	if err != nil {
		t.Fatal(err)
	}
	heads = append(heads, long...)
	keys := append(readKeys(t, "g2_products.keys"), append([]string{"0"}, readKeys(t, "g2_longstep.keys")[0]...))
	if len(heads) != len(keys) {
		t.Fatalf("%d messages, ecCodes %d", len(heads), len(keys))
	}
	for i, m := range heads {
		k := keys[i]
		tmpl, _ := strconv.Atoi(k[0])
		lev, _ := strconv.ParseFloat(k[1], 64)
		want := ecTime(t, k[2], k[3])
		if m.Product != tmpl || m.Level != lev*100 || m.LevelType != LevelIsobaric || !m.ValidTime.Equal(want) {
			t.Errorf("message %d: template 4.%d, level %g Pa, valid %v; ecCodes 4.%d, %g hPa, %v", i+1, m.Product, m.Level, m.ValidTime, tmpl, lev, want)
		}
	}
	if heads[1].Ensemble != 4 {
		t.Errorf("4.11 perturbation number %d, want 4", heads[1].Ensemble)
	}
	if heads[5].Param != ParamU {
		t.Errorf("long-step u: %s", heads[5].Param)
	}
}

// TestGRIB1OtherGrids lists GRIB1 messages on grids levelpath does not
// read (ecCodes samples: polar stereographic, reduced Gaussian; GRIB1
// table 6 data representation types 5 and 4) instead of failing; Decode
// says plainly it cannot read them.
func TestGRIB1OtherGrids(t *testing.T) {
	keys := readKeys(t, "g1_grids.keys") // ecCodes gridType
	for i, c := range []struct {
		file string
		grid int
	}{{"g1_polar.grib1", 5}, {"g1_gaussian.grib1", 4}} {
		if want := []string{"polar_stereographic", "reduced_gg"}[i]; keys[i][0] != want {
			t.Fatalf("g1_grids.keys line %d: %v, want %s", i+1, keys[i], want)
		}
		b := fixture(t, filepath.Join(readerFixtures, c.file))
		heads, err := Scan(bytes.NewReader(b), c.file)
		if err != nil || len(heads) != 1 || heads[0].Grid != c.grid || heads[0].Edition != 1 {
			t.Fatalf("Scan %s: %+v, %v; want one message on grid type %d", c.file, heads, err, c.grid)
		}
		ni, _ := strconv.Atoi(keys[i][1]) // "MISSING" (a reduced grid) reads as 0
		if nj, _ := strconv.Atoi(keys[i][2]); heads[0].Ni != ni || heads[0].Nj != nj {
			t.Errorf("Scan %s: %dx%d, ecCodes %sx%s", c.file, heads[0].Ni, heads[0].Nj, keys[i][1], keys[i][2])
		}
		_, err = Decode(bytes.NewReader(b), c.file)
		var ue *UnsupportedError
		if heads[0].Param != ParamOther && (!errors.As(err, &ue) || ue.Remedy != remedyRegrid) {
			t.Errorf("Decode %s: %v, want UnsupportedError saying which grid is needed", c.file, err)
		}
	}
}

// TestLevelToleranceEdge samples FL340 (249.99 hPa in the standard
// atmosphere, isaPressure, 1 Pa above a 250 hPa top level) and gets the
// 250 hPa values; 0.3 % beyond the top level is still sampled there
// (LevelTolerance, 0.5 %), 0.6 % is out of range.
func TestLevelToleranceEdge(t *testing.T) {
	f, err := NewField(synthetic(ParamU, []float64{30000, 25000}, []int{0}, multilinear))
	if err != nil {
		t.Fatal(err)
	}
	fl340 := isaPressure(34000 * 0.3048)
	if fl340 >= 25000 || fl340 < 24998 {
		t.Fatalf("FL340 = %g Pa", fl340)
	}
	at, err1 := f.Sample(10, 20, 25000, t0)
	for _, p := range []float64{fl340, 25000 * 0.997} {
		got, err2 := f.Sample(10, 20, p, t0)
		if err1 != nil || err2 != nil || got.U != at.U {
			t.Errorf("%g Pa: %v %v, %v; want the 250 hPa value %v", p, got.U, err1, err2, at.U)
		}
	}
	if _, err := f.Sample(10, 20, 25000*0.994, t0); err == nil {
		t.Error("0.6 % above the top level: no error")
	}
	if _, err := f.Sample(10, 20, 30000*1.0045, t0); err != nil {
		t.Errorf("0.45 %% below the bottom level: %v", err)
	}
	if _, err := f.Sample(10, 20, 30000*1.006, t0); err == nil {
		t.Error("0.6 % below the bottom level: no error")
	}
}

// TestSanityWarnings writes a field with a 160 m/s u component at one
// point, a wind of 120 m/s east and 120 m/s north (170 m/s, 330 kt, with
// neither component over 300 kt) at another and a 400 K temperature, and
// checks Open warns about each, naming the message and the point.
func TestSanityWarnings(t *testing.T) {
	ms := synthetic(ParamU, []float64{25000}, []int{0}, func(lat, lon, p float64, t time.Time) float64 { return 10 })
	ms = append(ms, synthetic(ParamV, []float64{25000}, []int{0}, func(lat, lon, p float64, t time.Time) float64 { return 5 })...)
	ms = append(ms, synthetic(ParamT, []float64{25000}, []int{0}, func(lat, lon, p float64, t time.Time) float64 { return 220 })...)
	u, v, tt := &ms[0], &ms[1], &ms[2]
	put := func(m *Message, lat, lon float64, x float32) {
		north, west := m.Origin()
		m.Values[int(math.Round((north-lat)/m.Dj))*m.Ni+int(math.Round((lon-west)/m.Di))] = x
	}
	put(u, 40, 30, 160)
	put(u, -20, 100, 120)
	put(v, -20, 100, 120)
	put(tt, 0, 0, 400)
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, ms); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "hot.grib2")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	var seen []Warning
	f, err := Options{Warn: func(w Warning) { seen = append(seen, w) }}.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	ws := f.Warnings()
	if len(ws) != 3 || len(seen) != 3 {
		t.Fatalf("warnings %v (Warn saw %d), want 3", ws, len(seen))
	}
	for _, c := range []struct {
		msg  int
		text string
	}{{1, "(40.0000, 30.0000)"}, {3, "K at (0.0000, 0.0000)"}, {1, "kt) at (-20.0000, 100.0000)"}} {
		found := false
		for _, w := range ws {
			found = found || w.Message == c.msg && strings.Contains(w.String(), c.text) && strings.Contains(w.String(), "hot.grib2")
		}
		if !found {
			t.Errorf("no warning on message %d with %q in %v", c.msg, c.text, ws)
		}
	}
}

// TestLongMessageBudget declares a 2 MiB message under a 1 MiB budget:
// it is refused after 1 MiB of it is read (before, the whole message was
// buffered first, whatever its declared length).
func TestLongMessageBudget(t *testing.T) {
	g2 := append([]byte(nil), fixture(t, "g2_simple.grib2")[:16]...)
	binary.BigEndian.PutUint64(g2[8:], 2<<20)
	r := io.MultiReader(bytes.NewReader(g2), &zeroReader{2<<20 - 16})
	_, err := Options{Budget: 1 << 20}.Decode(r, "long")
	var be *BudgetError
	if !errors.As(err, &be) || be.Need != 2<<20 || !strings.Contains(err.Error(), "long message 1") {
		t.Errorf("%v, want BudgetError for a 2 MiB message", err)
	}
}

// TestOpenUnreadableGrid opens a regular and a Gaussian (template 3.40)
// file together: the error names the Gaussian message and says which grid
// levelpath needs, rather than that the grids differ.
func TestOpenUnreadableGrid(t *testing.T) {
	for _, order := range [][]string{{"g2_simple.grib2", "g2_gaussian.grib2"}, {"g2_gaussian.grib2", "g2_simple.grib2"}} {
		_, err := Open(filepath.Join(fixtures, order[0]), filepath.Join(fixtures, order[1]))
		var ue *UnsupportedError
		if !errors.As(err, &ue) || !strings.Contains(err.Error(), "g2_gaussian.grib2: message 1") || !strings.Contains(err.Error(), "3.40") ||
			ue.Remedy != remedyRegrid {
			t.Errorf("%v: %v, want UnsupportedError naming the Gaussian grid", order, err)
		}
	}
	_, err := Open(filepath.Join(fixtures, readerFixtures, "g1_gaussian.grib1"))
	var ue *UnsupportedError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), "data representation type 4") {
		t.Errorf("GRIB1 Gaussian: %v", err)
	}
}
