package winds

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"testing/iotest"
)

// readerFixtures is the folder of the reader fixtures (testdata/winds/reader/README.md).
const readerFixtures = "reader"

// allFixtures returns the names (relative to fixtures) of every GRIB
// fixture.
func allFixtures(t *testing.T) []string {
	t.Helper()
	var out []string
	for _, pat := range []string{"*.grib1", "*.grib2", readerFixtures + "/*.grib1", readerFixtures + "/*.grib2"} {
		m, err := filepath.Glob(filepath.Join(fixtures, pat))
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range m {
			if filepath.Base(p) == "bomb.grib2" {
				continue // 40 GiB decoded: TestMemoryBomb
			}
			rel, _ := filepath.Rel(fixtures, p)
			out = append(out, rel)
		}
	}
	if len(out) < 30 {
		t.Fatalf("found only %d fixtures", len(out))
	}
	return out
}

// chunkReader returns random chunks of 1 to max bytes.
type chunkReader struct {
	r   io.Reader
	rng *rand.Rand
	max int
}

func (c *chunkReader) Read(p []byte) (int, error) {
	n := 1 + c.rng.IntN(c.max)
	if n < len(p) {
		p = p[:n]
	}
	return c.r.Read(p)
}

// readers are the ways TestReaders feeds a stream: whole, one byte at a
// time, half of each request, with the last data and io.EOF together, and
// in random small chunks.
var readers = []struct {
	name string
	wrap func(io.Reader, int) io.Reader
}{
	{"one byte", func(r io.Reader, _ int) io.Reader { return iotest.OneByteReader(r) }},
	{"half", func(r io.Reader, _ int) io.Reader { return iotest.HalfReader(r) }},
	{"data+EOF", func(r io.Reader, _ int) io.Reader { return iotest.DataErrReader(r) }},
	{"chunks of 1-7", func(r io.Reader, s int) io.Reader {
		return &chunkReader{r, rand.New(rand.NewPCG(uint64(s), 7)), 7}
	}},
	{"chunks of 1-4099", func(r io.Reader, s int) io.Reader {
		return &chunkReader{r, rand.New(rand.NewPCG(uint64(s), 4099)), 4099}
	}},
}

// sameMessages compares two decodes field by field, values bit for bit
// (NaN for NaN).
func sameMessages(t *testing.T, what string, got, want []Message) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d messages, want %d", what, len(got), len(want))
	}
	for k := range want {
		g, w := got[k], want[k]
		gv, wv := g.Values, w.Values
		g.Values, w.Values = nil, nil
		gl, wl := g.Level, w.Level
		g.Level, w.Level = 0, 0
		if fmt.Sprint(g) != fmt.Sprint(w) || !(gl == wl || math.IsNaN(gl) && math.IsNaN(wl)) {
			t.Fatalf("%s: message %d header\n got %+v\nwant %+v", what, k+1, g, w)
		}
		if !slices.EqualFunc(gv, wv, func(a, b float32) bool { return math.Float32bits(a) == math.Float32bits(b) }) {
			t.Fatalf("%s: message %d values differ", what, k+1)
		}
	}
}

// TestReaders feeds every fixture through readers that return one byte,
// half a request, or random small chunks at a time (testing/iotest); each
// must give the same messages, or the same error, as reading the file
// whole. Before the fix the edition octet was taken from a peek slice the
// reader had already overwritten, and GRIB1 files failed.
func TestReaders(t *testing.T) {
	for i, name := range allFixtures(t) {
		b := fixture(t, name)
		want, werr := Decode(bytes.NewReader(b), name)
		for _, rd := range readers {
			got, err := Decode(rd.wrap(bytes.NewReader(b), i), name)
			if fmt.Sprint(err) != fmt.Sprint(werr) {
				t.Errorf("%s, %s: error %v, whole file gives %v", name, rd.name, err, werr)
				continue
			}
			sameMessages(t, name+", "+rd.name, got, want)
		}
	}
}

// TestGRIB1Areas decodes the GRIB1 (and one GRIB2) files of random area
// sizes written by ecCodes, one byte at a time, and compares every point
// with ecCodes' grib_get_data dump (testdata/winds/reader/README.md).
func TestGRIB1Areas(t *testing.T) {
	for _, name := range []string{"g1_area1.grib1", "g1_area2.grib1", "g1_area3.grib1", "g1_area4.grib1", "g1_area5.grib1", "g1_area6.grib1", "g2_area.grib2"} {
		name = filepath.Join(readerFixtures, name)
		ms, err := Decode(iotest.OneByteReader(bytes.NewReader(fixture(t, name))), name)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if len(ms) != 3 || ms[0].Param != ParamU || ms[1].Param != ParamV || ms[2].Param != ParamT {
			t.Fatalf("%s: %d messages, want u, v, t", name, len(ms))
		}
		compareDump(t, name, ms)
	}
}

// TestConcatenated decodes one stream of fixtures of both editions and
// many sizes (36 B to 28 KiB a message, over 64 KiB in all so that
// messages straddle the reader's buffer) in a shuffled order, with zero
// padding between some, through random chunks: each file's messages must
// come out as when the file is read alone.
func TestConcatenated(t *testing.T) {
	names := []string{"g2_multi.grib2", "g1_ecmwf.grib1", "g2_ieee64.grib2", "g1_bitmap.grib1", "g2_multi.grib2",
		"g2_regional.grib2", "g1_wmo.grib1", "g2_multifield.grib2", "g2_png24.grib2"}
	for k := 1; k <= 6; k++ {
		names = append(names, fmt.Sprintf("%s/g1_area%d.grib1", readerFixtures, k))
	}
	names = append(names, readerFixtures+"/g2_area.grib2", readerFixtures+"/g2_products.grib2")
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := range 4 {
		rng.Shuffle(len(names), func(i, j int) { names[i], names[j] = names[j], names[i] })
		var stream []byte
		var want []Message
		pads := 0
		for _, n := range names {
			if rng.IntN(3) == 0 {
				stream = append(stream, make([]byte, 1+rng.IntN(5000))...)
				pads++
			}
			ms, err := Decode(bytes.NewReader(fixture(t, n)), "cat")
			if err != nil {
				t.Fatalf("%s: %v", n, err)
			}
			for i := range ms {
				ms[i].Index += countMessages(want)
				ms[i].Offset += int64(len(stream))
			}
			want = append(want, ms...)
			stream = append(stream, fixture(t, n)...)
		}
		if len(stream) < 1<<16 {
			t.Fatalf("stream of %d bytes does not straddle the 64 KiB buffer", len(stream))
		}
		var warns []Warning
		got, err := Options{Warn: func(w Warning) { warns = append(warns, w) }}.Decode(&chunkReader{bytes.NewReader(stream), rng, 3000}, "cat")
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		sameMessages(t, fmt.Sprintf("trial %d", trial), got, want)
		warns = slices.DeleteFunc(warns, func(w Warning) bool { return w.Message != 0 }) // sanity: the GRIB1 fixtures' t is not in K
		if len(warns) != pads {
			t.Errorf("trial %d: %d warnings for %d zero paddings: %v", trial, len(warns), pads, warns)
		}
	}
}

// countMessages is the number of GRIB messages (not fields) in ms.
func countMessages(ms []Message) int {
	if len(ms) == 0 {
		return 0
	}
	return ms[len(ms)-1].Index
}

// TestCompressed reads a bzip2 and a gzip file made by the bzip2 and gzip
// tools, named without a compression suffix, and checks they decode as
// their originals; a corrupt or truncated compressed stream is a
// *FormatError naming the file, the compression and a byte offset.
func TestCompressed(t *testing.T) {
	for comp, orig := range map[string]string{"g1_area2_bzip2.grib1": "g1_area2.grib1", "g2_area_gzip.grib2": "g2_area.grib2"} {
		comp, orig = filepath.Join(readerFixtures, comp), filepath.Join(readerFixtures, orig)
		want, err := Decode(bytes.NewReader(fixture(t, orig)), "x")
		if err != nil {
			t.Fatal(err)
		}
		got, err := Decode(iotest.HalfReader(bytes.NewReader(fixture(t, comp))), "x")
		if err != nil {
			t.Fatalf("%s: %v", comp, err)
		}
		sameMessages(t, comp, got, want)
		b := fixture(t, comp)
		bad := map[string][]byte{
			"truncated": b[:len(b)*2/3],
			"corrupt":   append(append(append([]byte(nil), b[:len(b)/2]...), b[len(b)/2]^0x5a), b[len(b)/2+1:]...),
		}
		for what, c := range bad {

			_, err := Decode(bytes.NewReader(c), "bad.grib")
			var fe *FormatError
			kind := map[bool]string{true: "bzip2", false: "gzip"}[strings.Contains(comp, "bzip2")]
			if !errors.As(err, &fe) || !strings.Contains(err.Error(), "bad.grib") || !strings.Contains(err.Error(), kind) ||
				!strings.Contains(err.Error(), "at compressed byte") {
				t.Errorf("%s %s: %v, want FormatError naming file, %s and offset", comp, what, err, kind)
			}
		}
	}
}

// zeroReader yields n zero bytes.
type zeroReader struct{ n int64 }

func (z *zeroReader) Read(p []byte) (int, error) {
	if z.n == 0 {
		return 0, io.EOF
	}
	if int64(len(p)) > z.n {
		p = p[:z.n]
	}
	clear(p)
	z.n -= int64(len(p))
	return len(p), nil
}

// TestZeroPadding skips 64 MiB of zero bytes between two messages and
// after them with a warning each, in bounded memory (before, zero bytes
// were either buffered whole or rejected as a wrong magic); other bytes
// between messages are refused.
func TestZeroPadding(t *testing.T) {
	g2 := fixture(t, "g2_simple.grib2")
	var before, after runtimeStats
	before.read()
	var warns []Warning
	ms, err := Options{Warn: func(w Warning) { warns = append(warns, w) }}.Decode(io.MultiReader(bytes.NewReader(g2), &zeroReader{64 << 20},
		bytes.NewReader(g2), &zeroReader{64 << 20}), "padded")
	after.read()
	if err != nil || len(ms) != 2 || ms[1].Index != 2 {
		t.Fatalf("%d messages, %v", len(ms), err)
	}
	if len(warns) != 2 || !strings.Contains(warns[0].String(), "skipped 67108864 zero bytes") || warns[1].Offset != int64(2*len(g2)+64<<20) {
		t.Errorf("warnings %v", warns)
	}
	if d := after.alloc - before.alloc; d > 16<<20 {
		t.Errorf("skipping 128 MiB of zeros allocated %d bytes", d)
	}
	_, err = Decode(bytes.NewReader(append(append(append([]byte(nil), g2...), 0, 0, 'x'), g2...)), "junk")
	var fe *FormatError
	if !errors.As(err, &fe) || fe.Offset != int64(len(g2)+2) || fe.Message != 2 {
		t.Errorf("junk after padding: %v, want FormatError at byte %d", err, len(g2)+2)
	}
	if _, err = Decode(&zeroReader{1000}, "zeros"); !errors.As(err, &fe) || !strings.Contains(err.Error(), "no GRIB message") {
		t.Errorf("only zeros: %v", err)
	}
	// The budget bounds the padding skipped (the time a bzip2 stream
	// expanding to zeros could take).
	_, err = Options{Budget: 1 << 20}.Decode(io.MultiReader(bytes.NewReader(g2), &zeroReader{2 << 20}), "padded")
	var be *BudgetError
	if !errors.As(err, &be) || !strings.Contains(err.Error(), "zero padding") {
		t.Errorf("2 MiB of zeros under a 1 MiB budget: %v", err)
	}
}

// TestNonRegularFiles checks that a directory, a device and a FIFO given
// as weather are refused with a FormatError naming them, before they are
// opened (a FIFO without a writer would block in open, /dev/zero would
// never end). Before, a directory scanned as an empty, valid file.
func TestNonRegularFiles(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "fifo.grib2")
	paths := map[string]string{dir: "directory", "/dev/zero": "device"}
	if err := mkfifo(fifo); err == nil {
		paths[fifo] = "FIFO"
	} else {
		t.Logf("no FIFO: %v", err)
	}
	for p, kind := range paths {
		_, err := ScanFile(p)
		var fe *FormatError
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), p) || !strings.Contains(err.Error(), kind) {
			t.Errorf("ScanFile(%s): %v, want FormatError naming a %s", p, err, kind)
		}
		if _, err := Open(p); !errors.As(err, &fe) {
			t.Errorf("Open(%s): %v, want FormatError", p, err)
		}
	}
	if _, err := ScanFile(filepath.Join(fixtures, "g2_simple.grib2")); err != nil {
		t.Error(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "absent")); err == nil {
		t.Fatal("absent exists")
	}
	if _, err := ScanFile(filepath.Join(dir, "absent")); err == nil || !strings.Contains(err.Error(), "absent") {
		t.Errorf("absent file: %v", err)
	}
}
