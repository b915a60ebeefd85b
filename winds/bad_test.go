package winds

import (
	"bytes"
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func fixture(t testing.TB, name string) []byte {
	b, err := os.ReadFile(filepath.Join(fixtures, name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestBadInput corrupts ecCodes-written messages and checks for a
// *FormatError naming the file, never a panic or a silent answer.
func TestBadInput(t *testing.T) {
	g2 := fixture(t, "g2_simple.grib2")
	g1 := fixture(t, "g1_ecmwf.grib1")
	mod := func(b []byte, f func([]byte)) []byte { c := append([]byte(nil), b...); f(c); return c }
	// Section offsets in g2_simple: 0 at 0 (16), 1 at 16 (21), 3 at 37 (72),
	// 4 at 109 (34), 5 at 143 (21), 6 at 164 (6), 7 at 170.
	cases := map[string][]byte{
		"empty":               {},
		"wrong magic":         mod(g2, func(b []byte) { copy(b, "GRIP") }),
		"truncated":           g2[:len(g2)-100],
		"truncated header":    g2[:10],
		"total length larger": mod(g2, func(b []byte) { binary.BigEndian.PutUint64(b[8:], uint64(len(g2)+10)) }),
		"total length huge":   mod(g2, func(b []byte) { binary.BigEndian.PutUint64(b[8:], 1<<39) }),
		"section length":      mod(g2, func(b []byte) { binary.BigEndian.PutUint32(b[37:], 5000) }),
		"section order":       mod(g2, func(b []byte) { b[37+4] = 5 }),
		"more points": mod(g2, func(b []byte) {
			binary.BigEndian.PutUint32(b[37+30:], 3600)
			binary.BigEndian.PutUint32(b[37+34:], 1800)
			binary.BigEndian.PutUint32(b[37+6:], 3600*1800)
			binary.BigEndian.PutUint32(b[143+5:], 3600*1800)
		}),
		"points disagree": mod(g2, func(b []byte) { binary.BigEndian.PutUint32(b[37+6:], 100) }),
		"values disagree": mod(g2, func(b []byte) { binary.BigEndian.PutUint32(b[143+5:], 683) }),
		"missing 7777":    mod(g2, func(b []byte) { copy(b[len(b)-4:], "7778") }),
		"trailing junk":   append(append([]byte(nil), g2...), "JUNKJUNKJUNKJUNK"...),
		"grib1 truncated": g1[:len(g1)-500],
		"grib1 bds length": mod(g1, func(b []byte) {
			pds := 8 + u24(b[8:])
			bds := pds + u24(b[pds:])
			b[bds] = 0xff
		}),
		"grib1 more points": mod(g1, func(b []byte) {
			pds := 8 + u24(b[8:])
			binary.BigEndian.PutUint16(b[pds+6:], 3600)
		}),
	}
	dataOnly := map[string]bool{"more points": true, "values disagree": true, "grib1 more points": true}
	for name, b := range cases {
		for _, fn := range []func([]byte) ([]Message, error){
			func(b []byte) ([]Message, error) { return Decode(bytes.NewReader(b), "bad.grib") },
			func(b []byte) ([]Message, error) { return Scan(bytes.NewReader(b), "bad.grib") },
		} {
			ms, err := fn(b)
			var fe *FormatError
			if err == nil && len(ms) > 0 && ms[0].Values == nil && dataOnly[name] {
				continue // Scan does not read section 7
			}
			if !errors.As(err, &fe) || !strings.Contains(err.Error(), "bad.grib") {
				t.Errorf("%s: %v, want FormatError naming the file", name, err)
			}
		}
	}
}
