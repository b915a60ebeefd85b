package winds

import (
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"levelpath/perf/contrail"
)

const humidityFixtures = "../testdata/winds/humidity"

// eccodesDump runs ecCodes' grib_get_data on path (as
// testdata/winds/dump_expected.sh does) and returns the file it wrote,
// and grib_ls's shortName of each message; the test is skipped when
// ecCodes is not installed.
func eccodesDump(t *testing.T, path string) (dump string, names []string) {
	t.Helper()
	get, err := exec.LookPath("grib_get_data")
	if err != nil {
		t.Skip("grib_get_data (ecCodes) not installed")
	}
	ls, err := exec.LookPath("grib_ls")
	if err != nil {
		t.Skip("grib_ls (ecCodes) not installed")
	}
	out, err := exec.Command(get, "-m", "NaN", "-F", "%.9g", path).Output()
	if err != nil {
		t.Fatalf("grib_get_data %s: %v", path, err)
	}
	dump = filepath.Join(t.TempDir(), "dump.txt")
	if err := os.WriteFile(dump, out, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err = exec.Command(ls, "-p", "shortName", "-x", path).Output()
	if err != nil {
		t.Fatalf("grib_ls %s: %v", path, err)
	}
	for _, line := range strings.Split(string(out), "\n")[2:] {
		if f := strings.Fields(line); len(f) == 1 {
			names = append(names, f[0])
		}
	}
	return dump, names
}

// TestHumidityAgainstEccodes decodes the humidity fixtures (made by
// testdata/winds/humidity/make.sh with ecCodes 2.28's grib_set from the
// fixtures one folder up) and compares each field, point by point, with
// what ecCodes' grib_get_data decodes from the same file; ecCodes'
// grib_ls names each message, and relative humidity ("r") and specific
// humidity ("q") must be what this package keeps them as.
func TestHumidityAgainstEccodes(t *testing.T) {
	for _, name := range []string{"g2_humid.grib2", "g2_humid_ncep.grib2", "g2_q_only.grib2", "g1_humid.grib1", "g1_humid_ecmwf.grib1"} {
		t.Run(name, func(t *testing.T) {
			path := filepath.Join(humidityFixtures, name)
			dump, names := eccodesDump(t, path)
			ms, err := ScanFileValues(path)
			if err != nil {
				t.Fatal(err)
			}
			if len(names) != len(ms) {
				t.Fatalf("grib_ls lists %d messages, decoded %d", len(names), len(ms))
			}
			var nrh, nq int
			for k, m := range ms {
				want := map[string]Param{"u": ParamU, "v": ParamV, "t": ParamT, "r": ParamRH, "q": ParamQ}[names[k]]
				if m.Param != want {
					t.Errorf("message %d: ecCodes calls it %q, decoded as %q", k+1, names[k], m.Param)
				}
				nrh += btoi(m.Param == ParamRH)
				nq += btoi(m.Param == ParamQ)
			}
			if nq == 0 || (nrh == 0) != strings.Contains(name, "q_only") {
				t.Errorf("%d relative and %d specific humidity fields", nrh, nq)
			}
			checkAgainstDump(t, name, dump, ms)
		})
	}
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}

// ScanFileValues decodes every message of a file (test helper).
func ScanFileValues(path string) ([]Message, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return Decode(f, filepath.Base(path))
}

// Sampled humidity at grid points equals the decoded value converted by
// the source's reference. Checks: ECMWF (centre 98) relative humidity is
// over ice below -23 °C, so RHi is the stored value there, and the ratio
// RH/RHi is e_i/e_w; NCEP's is over water, RH is the stored value; from q
// alone, RHi is 100 e/e_i with e close to q p / ε (the usual small-q
// approximation, within 0.01 % for q below 1e-4; WMO-No. 8, from memory).
// Murphy and Koop's e_w/e_i at -40 °C, 1.474 (Smithsonian Meteorological
// Tables: 0.1891 and 0.1283 hPa, from memory), bounds the conversion.
func TestHumiditySample(t *testing.T) {
	if r := contrail.SatWater(233.15) / contrail.SatIce(233.15); math.Abs(r/1.474-1) > 5e-3 {
		t.Errorf("e_w/e_i at 233.15 K: %.4f, want 1.474", r)
	}
	var ref time.Time // the first valid time, set by open
	open := func(name string) (*Field, []Message) {
		path := filepath.Join(humidityFixtures, name)
		f, err := Open(path)
		if err != nil {
			t.Fatal(err)
		}
		ms, err := ScanFileValues(path)
		if err != nil {
			t.Fatal(err)
		}
		ref = f.Times()[0]
		return f, ms
	}
	value := func(ms []Message, p Param, level float64, lat, lon float64) float64 {
		for i := range ms {
			m := &ms[i]
			if m.Param == p && m.Level == level && m.ValidTime.Equal(ref) {
				v, ok := valueAt(m, lat, lon)
				if !ok {
					t.Fatalf("(%g, %g) outside %s", lat, lon, p)
				}
				return float64(v)
			}
		}
		t.Fatalf("no %s at %g Pa", p, level)
		return 0
	}
	near := func(what string, got, want, rel float64) {
		t.Helper()
		if !(math.Abs(got-want) <= rel*math.Abs(want)) {
			t.Errorf("%s: got %.7g, want %.7g", what, got, want)
		}
	}
	ecmwf, ems := open("g2_humid.grib2")
	ncep, nms := open("g2_humid_ncep.grib2")
	qonly, qms := open("g2_q_only.grib2")
	checked := 0
	for lat := -80.0; lat <= 80; lat += 20 {
		for lon := 0.0; lon < 360; lon += 50 {
			for _, p := range []float64{30000, 20000} {
				tk := value(ems, ParamT, p, lat, lon)
				s, err := ecmwf.Sample(lat, lon, p, ref)
				if err != nil {
					t.Fatal(err)
				}
				raw := value(ems, ParamRH, p, lat, lon)
				near("ECMWF q", s.Q, value(ems, ParamQ, p, lat, lon), 1e-6)
				ratio := contrail.SatIce(tk) / contrail.SatWater(tk)
				if tk <= 250.16 {
					near("ECMWF RHi below -23 °C", s.RHi, raw, 1e-6)
					near("ECMWF RH", s.RH, raw*ratio, 1e-6)
					checked++
				} else if !(s.RHi > raw && s.RHi < raw/ratio) {
					// e_i < e_s < e_w: RHi = RH e_s/e_i lies between RH and RH e_w/e_i.
					t.Errorf("mixed phase at %.2f K: RHi %.4g not between %.4g and %.4g", tk, s.RHi, raw, raw/ratio)
				}
				n, err := ncep.Sample(lat, lon, p, ref)
				if err != nil {
					t.Fatal(err)
				}
				near("NCEP RH", n.RH, value(nms, ParamRH, p, lat, lon), 1e-6)
				near("NCEP RHi", n.RHi*ratio, n.RH, 1e-6)
				qs, err := qonly.Sample(lat, lon, p, ref)
				if err != nil {
					t.Fatal(err)
				}
				q := value(qms, ParamQ, p, lat, lon)
				near("RHi from q", qs.RHi, 100*q*p/contrail.Epsilon/contrail.SatIce(tk), 1e-4)
			}
		}
	}
	if checked < 10 {
		t.Errorf("only %d points below -23 °C", checked)
	}
	dry, err := Open(filepath.Join(fixtures, "g1_wmo.grib1"))
	if err != nil {
		t.Fatal(err)
	}
	ref = dry.Times()[0]
	s, err := dry.Sample(10, 10, 25000, ref)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(s.RH) || !math.IsNaN(s.RHi) || !math.IsNaN(s.Q) {
		t.Errorf("no humidity in the field, sample has RH %v RHi %v q %v", s.RH, s.RHi, s.Q)
	}
	if dry.Has(ParamRH) || !ecmwf.Has(ParamRH) || !qonly.Has(ParamQ) || qonly.Has(ParamRH) {
		t.Error("Has disagrees with the files")
	}
}

// Relative humidity above 150 % or below 0, and humidity on a level the
// winds lack, are errors naming the file, the message and (for values)
// the point.
func TestHumidityBad(t *testing.T) {
	for _, c := range []struct {
		file string
		want []string
	}{
		{"g2_rh_high.grib2", []string{"g2_rh_high.grib2", "message 13", "outside 0..150 %", "% at ("}},
		{"g2_rh_negative.grib2", []string{"g2_rh_negative.grib2", "message 13", "outside 0..150 %", "the first -"}},
		{"g2_rh_level.grib2", []string{"g2_rh_level.grib2", "message 13", "40000 Pa", "none of the levels"}},
	} {
		_, err := Open(filepath.Join(humidityFixtures, c.file))
		var fe *FormatError
		if !errors.As(err, &fe) {
			t.Errorf("%s: error %v, want a *FormatError", c.file, err)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q lacks %q", c.file, err, w)
			}
		}
	}
}
