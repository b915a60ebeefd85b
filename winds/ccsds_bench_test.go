package winds

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// BenchmarkDecodeCCSDS decodes benchGrid's 1440x721 field repacked by
// ecCodes with grib_set -r -s packingType=grid_ccsds (16 bits, ecCodes'
// defaults: block size 32, interval 128, flags 14 = preprocessing, MSB,
// 3-byte). The file is written to BENCH_DIR, when set, for
// testdata/winds/bench_eccodes.py to time ecCodes on the same bytes.
func BenchmarkDecodeCCSDS(b *testing.B) {
	exe, err := exec.LookPath("grib_set")
	if err != nil {
		b.Skip("grib_set not installed: no CCSDS-packed file")
	}
	dir := os.Getenv("BENCH_DIR")
	if dir == "" {
		dir = b.TempDir()
	}
	sp, cp := filepath.Join(dir, "bench_simple.grib2"), filepath.Join(dir, "bench_ccsds.grib2")
	if err := os.WriteFile(sp, benchGrid(b), 0o644); err != nil {
		b.Fatal(err)
	}
	if out, err := exec.Command(exe, "-r", "-s", "packingType=grid_ccsds", sp, cp).CombinedOutput(); err != nil {
		b.Fatalf("grib_set: %v %s", err, out)
	}
	data, err := os.ReadFile(cp)
	if err != nil {
		b.Fatal(err)
	}
	// Besides wall time, report the process's CPU time per decode
	// (getrusage), which a loaded machine disturbs less; bench_eccodes.py
	// reports the same for ecCodes.
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	c0 := cpuTime()
	for b.Loop() {
		ms, err := Decode(bytes.NewReader(data), "bench")
		if err != nil || len(ms[0].Values) != 1440*721 {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64((cpuTime()-c0).Nanoseconds())/float64(b.N), "cpu-ns/op")
	b.ReportMetric(float64(1440*721)*float64(b.N)/b.Elapsed().Seconds(), "values/s")
}

// BenchmarkCCSDSUnpack times the template 5.42 decoder alone (section 7 of
// bench_ccsds.grib2 into a reused buffer), without message reading and
// canonical ordering.
func BenchmarkCCSDSUnpack(b *testing.B) {
	exe, err := exec.LookPath("grib_set")
	if err != nil {
		b.Skip("grib_set not installed: no CCSDS-packed file")
	}
	dir := b.TempDir()
	sp, cp := filepath.Join(dir, "s.grib2"), filepath.Join(dir, "c.grib2")
	if err := os.WriteFile(sp, benchGrid(b), 0o644); err != nil {
		b.Fatal(err)
	}
	if out, err := exec.Command(exe, "-r", "-s", "packingType=grid_ccsds", sp, cp).CombinedOutput(); err != nil {
		b.Fatalf("grib_set: %v %s", err, out)
	}
	msg, err := os.ReadFile(cp)
	if err != nil {
		b.Fatal(err)
	}
	var d *grib2Decoder
	err = readMessages(bytes.NewReader(msg), "bench", false, &decodeScratch{}, func(m *Message) error { return nil })
	if err != nil {
		b.Fatal(err)
	}
	// Parse sections 5 and 7 the way the decoder does.
	d = &grib2Decoder{src: "bench", index: 1, msg: msg, scratch: &decodeScratch{reuse: true}, npoints: 1440 * 721}
	var s7 []byte
	for q := 16; q+5 <= len(msg) && string(msg[q:q+4]) != "7777"; q += int(u32(msg[q:])) {
		sec := msg[q : q+int(u32(msg[q:]))]
		switch sec[4] {
		case 5:
			if err := d.dataRepresentation(sec); err != nil {
				b.Fatal(err)
			}
		case 7:
			s7 = sec[5:]
		}
	}
	b.SetBytes(int64(len(s7)))
	b.ResetTimer()
	c0 := cpuTime()
	for b.Loop() {
		if _, err := d.unpackCCSDS(s7, 0); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64((cpuTime()-c0).Nanoseconds())/float64(b.N), "cpu-ns/op")
	b.ReportMetric(float64(1440*721)*float64(b.N)/b.Elapsed().Seconds(), "values/s")
}

// cpuTime is the user and system CPU time of the process (getrusage).
func cpuTime() time.Duration {
	var r syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &r)
	return time.Duration(r.Utime.Nano() + r.Stime.Nano())
}
