package winds

import (
	"bytes"
	"errors"
	"testing"
)

// FuzzDecode feeds arbitrary bytes to both decoders (GRIB1 and GRIB2 are
// told apart by the edition octet). Any input must give messages or a
// *FormatError / *UnsupportedError, never a panic; decoded grids must have
// Ni*Nj values. The seed corpus in testdata/fuzz/FuzzDecode holds small
// ecCodes-written fixtures of every packing.
func FuzzDecode(f *testing.F) {
	f.Fuzz(func(t *testing.T, data []byte) {
		ms, err := Decode(bytes.NewReader(data), "fuzz")
		if err != nil {
			var fe *FormatError
			var ue *UnsupportedError
			if !errors.As(err, &fe) && !errors.As(err, &ue) {
				t.Fatalf("untyped error %T: %v", err, err)
			}
		}
		for _, m := range ms {
			if m.Values != nil && len(m.Values) != m.Ni*m.Nj {
				t.Fatalf("%d values for a %dx%d grid", len(m.Values), m.Ni, m.Nj)
			}
		}
		// Scan reads no section 7, so it accepts whatever Decode accepts.
		heads, serr := Scan(bytes.NewReader(data), "fuzz")
		if err == nil && (serr != nil || len(heads) != len(ms)) {
			t.Fatalf("Decode gave %d messages, Scan %d and %v", len(ms), len(heads), serr)
		}
	})
}
