package winds

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"path/filepath"
	"testing"
	"testing/iotest"
)

// fuzzBudget bounds what one fuzz input may make the decoder allocate.
const fuzzBudget = 32 << 20

// checkDecode decodes data whole and one byte at a time with the fuzz
// budget: any input must give messages or a *FormatError,
// *UnsupportedError or *BudgetError, never a panic; both reads must agree;
// decoded grids must have Ni*Nj values; Scan must accept whatever Decode
// accepts.
func checkDecode(t *testing.T, data []byte) {
	opts := Options{Budget: fuzzBudget}
	ms, err := opts.Decode(bytes.NewReader(data), "fuzz")
	if err != nil {
		var fe *FormatError
		var ue *UnsupportedError
		var be *BudgetError
		if !errors.As(err, &fe) && !errors.As(err, &ue) && !errors.As(err, &be) {
			t.Fatalf("untyped error %T: %v", err, err)
		}
	}
	for _, m := range ms {
		if m.Values != nil && len(m.Values) != m.Ni*m.Nj {
			t.Fatalf("%d values for a %dx%d grid", len(m.Values), m.Ni, m.Nj)
		}
	}
	ms1, err1 := opts.Decode(iotest.OneByteReader(bytes.NewReader(data)), "fuzz")
	if fmt.Sprint(err1) != fmt.Sprint(err) || len(ms1) != len(ms) {
		t.Fatalf("one byte at a time: %d messages, %v; whole: %d, %v", len(ms1), err1, len(ms), err)
	}
	// Scan reads no section 7, so it accepts whatever Decode accepts.
	heads, serr := opts.Scan(bytes.NewReader(data), "fuzz")
	if err == nil && (serr != nil || len(heads) != len(ms)) {
		t.Fatalf("Decode gave %d messages, Scan %d and %v", len(ms), len(heads), serr)
	}
}

// FuzzDecode feeds arbitrary bytes to both decoders (GRIB1 and GRIB2 are
// told apart by the edition octet; gzip and bzip2 by their magic), see
// checkDecode. The seed corpus in testdata/fuzz/FuzzDecode holds small
// ecCodes-written fixtures of every packing.
func FuzzDecode(f *testing.F) {
	for _, name := range []string{"reader/g1_area1.grib1", "reader/g2_products.grib2", "reader/g2_area_gzip.grib2", "reader/g1_area2_bzip2.grib1"} {
		f.Add(fixture(f, name))
	}
	f.Fuzz(checkDecode)
}

// FuzzMessage fuzzes one message's sections behind a valid indicator
// section: edition (odd: GRIB1, even: GRIB2), discipline and body are
// given, and the total length is made to match, so that the fuzzer spends
// its time in the section parsers, under the memory budget, rather than on
// the length check. Seeds are the bodies of ecCodes-written fixtures of
// both editions (testdata/winds/README.md, testdata/winds/reader/README.md).
func FuzzMessage(f *testing.F) {
	for _, name := range []string{"g1_wmo.grib1", "g1_bitmap.grib1", "reader/g1_area3.grib1", "reader/g1_polar.grib1",
		"g2_simple.grib2", "g2_complex.grib2", "g2_sd2_bitmap.grib2", "g2_multifield.grib2", "g2_jcons_bitmap.grib2",
		"g2_ieee64.grib2", "g2_png.grib2", "reader/g2_products.grib2", "reader/g2_longstep.grib2"} {
		b := fixture(f, name)
		if b[7] == 1 {
			f.Add(uint8(1), uint8(0), b[8:u24(b[4:])])
		} else {
			f.Add(uint8(2), b[6], b[16:u64(b[8:])])
		}
	}
	// One field of the memory bomb: 2^24 points of 0 bits.
	bomb := fixture(f, filepath.Join(readerFixtures, "bomb.grib2"))
	f.Add(uint8(2), bomb[6], bomb[16:u64(bomb[8:])])
	f.Fuzz(func(t *testing.T, edition, discipline uint8, body []byte) {
		var msg []byte
		if edition%2 == 1 {
			n := 8 + len(body)
			if n >= 1<<23 {
				return
			}
			msg = append([]byte{'G', 'R', 'I', 'B', byte(n >> 16), byte(n >> 8), byte(n), 1}, body...)
		} else {
			msg = append([]byte{'G', 'R', 'I', 'B', 0, 0, discipline, 2}, make([]byte, 8)...)
			binary.BigEndian.PutUint64(msg[8:], uint64(16+len(body)))
			msg = append(msg, body...)
		}
		checkDecode(t, msg)
	})
}
