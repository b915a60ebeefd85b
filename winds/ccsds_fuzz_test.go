package winds

import (
	"encoding/binary"
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzCCSDS runs the template 5.42 decoder on arbitrary section 7 payloads
// and section 5 parameters (bits per value, flags, block size, reference
// sample interval, number of values). It must return n values or a
// *FormatError / *UnsupportedError, never panic; with R = 0, E = D = 0 each
// value is a packed integer X, so it must be an integer below 2^bits.
// Seeds are the payloads and parameters of the ecCodes-written fixtures in
// testdata/winds/ccsds.
func FuzzCCSDS(f *testing.F) {
	paths, _ := filepath.Glob(filepath.Join(ccsdsFixtures, "c_*.grib2"))
	for _, p := range paths {
		msg, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		var s5, s7 int
		for q := 16; q+5 <= len(msg) && string(msg[q:q+4]) != "7777"; q += int(binary.BigEndian.Uint32(msg[q:])) {
			switch msg[q+4] {
			case 5:
				s5 = q
			case 7:
				s7 = q
			}
		}
		if s5 == 0 || s7 == 0 || msg[s5+10] != 42 {
			continue
		}
		f.Add(msg[s7+5:len(msg)-4], msg[s5+19], msg[s5+21], msg[s5+22], binary.BigEndian.Uint16(msg[s5+23:]), binary.BigEndian.Uint32(msg[s5+5:]))
	}
	f.Fuzz(func(t *testing.T, data []byte, nbits, flags, block byte, rsi uint16, n uint32) {
		nv := int(n % 20000)
		d := &grib2Decoder{src: "fuzz", index: 1, npoints: nv, scratch: &decodeScratch{}}
		d.repr = dataRepr{template: 42, nvalues: nv, nbits: int(nbits), ccsdsFlags: int(flags), ccsdsBlock: int(block), ccsdsRSI: int(rsi)}
		out, err := d.unpackCCSDS(data, 0)
		if err != nil {
			var fe *FormatError
			var ue *UnsupportedError
			if !errors.As(err, &fe) && !errors.As(err, &ue) {
				t.Fatalf("untyped error %T: %v", err, err)
			}
			if fe != nil && (fe.Offset < 0 || fe.Offset > int64(len(data))) {
				t.Fatalf("offset %d outside %d bytes: %v", fe.Offset, len(data), err)
			}
			return
		}
		if len(out) != nv {
			t.Fatalf("%d values, want %d", len(out), nv)
		}
		limit := math.Ldexp(1, int(nbits))
		for i, v := range out {
			x := float64(v)
			if x < 0 || x >= limit || (nbits <= 24 && x != math.Trunc(x)) {
				t.Fatalf("value %d = %g is not a %d-bit integer", i, x, nbits)
			}
		}
	})
}
