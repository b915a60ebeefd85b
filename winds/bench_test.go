package winds

import (
	"bytes"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"
)

// benchGrid is a 0.25-degree global field of a smooth pattern plus noise,
// as a 16-bit simple-packed GRIB2 message.
func benchGrid(b *testing.B) []byte {
	b.Helper()
	r := rand.New(rand.NewPCG(1, 2))
	m := Message{Param: ParamU, LevelType: 100, Level: 25000, RefTime: t0, ValidTime: t0,
		Ni: 1440, Nj: 721, Lat1: 90, Lon1: 0, Lat2: -90, Lon2: 359.75, Di: 0.25, Dj: 0.25, Ensemble: -1}
	m.Values = make([]float32, m.Ni*m.Nj)
	for j := 0; j < m.Nj; j++ {
		lat := (90 - 0.25*float64(j)) * math.Pi / 180
		for i := 0; i < m.Ni; i++ {
			lon := 0.25 * float64(i) * math.Pi / 180
			m.Values[j*m.Ni+i] = float32(15 + 35*math.Cos(lat)*math.Sin(2*lon) + 10*math.Sin(3*lat) + r.NormFloat64()*0.5)
		}
	}
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, []Message{m}); err != nil {
		b.Fatal(err)
	}
	return buf.Bytes()
}

// benchFiles writes the simple-packed benchmark grid to the temp directory
// (BENCH_DIR if set, for bench_eccodes.py) and a complex-packed copy made
// by ecCodes' grib_set, when installed.
func benchFiles(b *testing.B) (simple, complex []byte) {
	simple = benchGrid(b)
	dir := os.Getenv("BENCH_DIR")
	if dir == "" {
		dir = b.TempDir()
	}
	sp := filepath.Join(dir, "bench_simple.grib2")
	if err := os.WriteFile(sp, simple, 0o644); err != nil {
		b.Fatal(err)
	}
	if exe, err := exec.LookPath("grib_set"); err == nil {
		cp := filepath.Join(dir, "bench_complex.grib2")
		if out, err := exec.Command(exe, "-r", "-s", "packingType=grid_complex", sp, cp).CombinedOutput(); err != nil {
			b.Fatalf("grib_set: %v %s", err, out)
		}
		complex, _ = os.ReadFile(cp)
	}
	return simple, complex
}

func benchDecode(b *testing.B, data []byte) {
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		ms, err := Decode(bytes.NewReader(data), "bench")
		if err != nil || len(ms[0].Values) != 1440*721 {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(1440*721)*float64(b.N)/b.Elapsed().Seconds(), "values/s")
}

func BenchmarkDecodeSimple(b *testing.B) {
	simple, _ := benchFiles(b)
	benchDecode(b, simple)
}

func BenchmarkDecodeComplex(b *testing.B) {
	_, complex := benchFiles(b)
	if complex == nil {
		b.Skip("grib_set not installed: no complex-packed file")
	}
	benchDecode(b, complex)
}

func BenchmarkSample(b *testing.B) {
	fn := func(lat, lon, p float64, tt time.Time) float64 { return lat + lon + p/1000 }
	var msgs []Message
	for _, prm := range []Param{ParamU, ParamV, ParamT} {
		msgs = append(msgs, synthetic(prm, []float64{30000, 25000, 20000, 15000}, []int{0, 6}, fn)...)
	}
	f, err := NewField(msgs)
	if err != nil {
		b.Fatal(err)
	}
	r := rand.New(rand.NewPCG(3, 4))
	const n = 4096
	var lat, lon, p [n]float64
	var ts [n]time.Time
	for i := range lat {
		lat[i], lon[i] = r.Float64()*170-85, r.Float64()*360-180
		p[i], ts[i] = 15000+r.Float64()*15000, t0.Add(time.Duration(r.Float64()*6*float64(time.Hour)))
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if _, err := f.Sample(lat[i], lon[i], p[i], ts[i]); err != nil {
			b.Fatal(err)
		}
		i = (i + 1) % n
	}
}

// BenchmarkSampleHumidity is BenchmarkSample on a field that also holds
// relative humidity (converted to over ice at each sample).
func BenchmarkSampleHumidity(b *testing.B) {
	fn := func(lat, lon, p float64, tt time.Time) float64 { return lat + lon + p/1000 }
	rh := func(lat, lon, p float64, tt time.Time) float64 { return 50 + lat/4 }
	tk := func(lat, lon, p float64, tt time.Time) float64 { return 220 + lat/10 }
	levels := []float64{30000, 25000, 20000, 15000}
	var msgs []Message
	for _, prm := range []Param{ParamU, ParamV} {
		msgs = append(msgs, synthetic(prm, levels, []int{0, 6}, fn)...)
	}
	msgs = append(msgs, synthetic(ParamT, levels, []int{0, 6}, tk)...)
	msgs = append(msgs, synthetic(ParamRH, levels, []int{0, 6}, rh)...)
	f, err := NewField(msgs)
	if err != nil {
		b.Fatal(err)
	}
	r := rand.New(rand.NewPCG(3, 4))
	const n = 4096
	var lat, lon, p [n]float64
	var ts [n]time.Time
	for i := range lat {
		lat[i], lon[i] = r.Float64()*170-85, r.Float64()*360-180
		p[i], ts[i] = 15000+r.Float64()*15000, t0.Add(time.Duration(r.Float64()*6*float64(time.Hour)))
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if s, err := f.Sample(lat[i], lon[i], p[i], ts[i]); err != nil || !(s.RHi > 0) {
			b.Fatal(err, s)
		}
		i = (i + 1) % n
	}
}

// BenchmarkDecodeBitmapJPos decodes the benchmark grid with the points
// north of 60N missing (a bitmap) and scanning mode 0x40 (rows from the
// south): the message is benchGrid's with its section 3 rewritten to scan
// from the southern row (WMO code table 3.4), so the rows decode mirrored.
func BenchmarkDecodeBitmapJPos(b *testing.B) {
	data := benchGrid(b)
	ms, err := Decode(bytes.NewReader(data), "bench")
	if err != nil {
		b.Fatal(err)
	}
	m := ms[0]
	for i := range m.Values[:120*m.Ni] {
		m.Values[i] = float32(math.NaN())
	}
	var buf bytes.Buffer
	if err := WriteGRIB2(&buf, []Message{m}); err != nil {
		b.Fatal(err)
	}
	data = buf.Bytes()
	s3 := 16 + int(u32(data[16:])) // section 3 follows sections 0 and 1
	if data[s3+4] != 3 {
		b.Fatal("section 3 not found")
	}
	la1, la2 := append([]byte(nil), data[s3+46:s3+50]...), append([]byte(nil), data[s3+55:s3+59]...)
	copy(data[s3+46:], la2)
	copy(data[s3+55:], la1)
	data[s3+71] = 0x40
	benchDecode(b, data)
}
