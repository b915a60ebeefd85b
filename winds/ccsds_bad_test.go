package winds

import (
	"bytes"
	"encoding/binary"
	"errors"
	"strings"
	"testing"
)

// sections returns the offsets of sections 1-7 of a one-field GRIB2
// message (FM 92 GRIB edition 2: 4-octet length, then the section number).
func sections(t *testing.T, msg []byte) map[int]int {
	t.Helper()
	off := map[int]int{}
	for p := 16; p+5 <= len(msg) && string(msg[p:p+4]) != "7777"; p += int(binary.BigEndian.Uint32(msg[p:])) {
		off[int(msg[p+4])] = p
	}
	if off[5] == 0 || off[7] == 0 {
		t.Fatal("sections 5 and 7 not found")
	}
	return off
}

// withData returns msg with the octets of section 7 after its header
// replaced by data, and the section and total lengths fixed.
func withData(t *testing.T, msg, data []byte) []byte {
	s7 := sections(t, msg)[7]
	out := append([]byte(nil), msg[:s7+5]...)
	out = append(out, data...)
	out = append(out, "7777"...)
	binary.BigEndian.PutUint32(out[s7:], uint32(5+len(data)))
	binary.BigEndian.PutUint64(out[8:], uint64(len(out)))
	return out
}

// TestCCSDSBadInput: damaged CCSDS messages give a *FormatError naming the
// file, the message and a byte offset inside the message, or an
// *UnsupportedError for valid flags this package does not decode, and
// never a field, and without allocating for a declared size the data
// cannot hold. Offsets of template 5.42 octets per the WMO template (20
// bits per value, 22 flags, 23 block size, 24-25 RSI).
func TestCCSDSBadInput(t *testing.T) {
	good := fixture(t, "ccsds/c_b16_j32_pp.grib2")
	sec := sections(t, good)
	s3, s5, s7 := sec[3], sec[5], sec[7]
	data := good[s7+5 : len(good)-4]
	mod := func(f func([]byte)) []byte { c := append([]byte(nil), good...); f(c); return c }
	cases := []struct {
		name        string
		msg         []byte
		unsupported bool
		what        string
	}{
		{"truncated payload", withData(t, good, data[:len(data)/2]), false, "stream ends"},
		{"one byte short", withData(t, good, data[:len(data)-1]), false, "stream ends"},
		{"empty payload", withData(t, good, nil), false, "cannot hold 684 values"},
		{"huge grid, short data", mod(func(b []byte) {
			binary.BigEndian.PutUint32(b[s3+6:], 1<<24) // 4096 x 4096 points, no more data
			binary.BigEndian.PutUint32(b[s3+30:], 4096)
			binary.BigEndian.PutUint32(b[s3+34:], 4096)
			binary.BigEndian.PutUint32(b[s5+5:], 1<<24)
		}), false, "cannot hold 16777216 values"},
		{"runs over the field", withData(t, good, append(append([]byte(nil), data...), 0xff, 0x12)), false, "continues after the 684 values"},
		{"block size 12", mod(func(b []byte) { b[s5+22] = 12 }), false, "block size 12"},
		{"block size 0", mod(func(b []byte) { b[s5+22] = 0 }), false, "block size 0"},
		{"block size 128", mod(func(b []byte) { b[s5+22] = 128 }), false, "block size 128"},
		{"rsi 0", mod(func(b []byte) { binary.BigEndian.PutUint16(b[s5+23:], 0) }), false, "interval 0"},
		{"rsi 5000", mod(func(b []byte) { binary.BigEndian.PutUint16(b[s5+23:], 5000) }), false, "interval 5000"},
		{"33 bits", mod(func(b []byte) { b[s5+19] = 33 }), false, "33 bits"},
		{"wider samples", mod(func(b []byte) { b[s5+19] = 24 }), false, "CCSDS data"},
		{"signed", mod(func(b []byte) { b[s5+21] |= aecSigned }), true, "flags"},
		{"rsi padding", mod(func(b []byte) { b[s5+21] |= aecPadRSI }), true, "flags"},
		{"unknown flag", mod(func(b []byte) { b[s5+21] |= 0x80 }), true, "flags"},
		// ecCodes 2.28 wrote this stream truncated (see the fixture README).
		{"ecCodes truncated", fixture(t, "ccsds/bad_b24_no3byte.grib2"), false, "stream ends at sample 528 of 684"},
	}
	for _, c := range cases {
		ms, err := Decode(bytes.NewReader(c.msg), "bad.grib2")
		var fe *FormatError
		var ue *UnsupportedError
		switch {
		case err == nil:
			t.Errorf("%s: accepted (%d messages)", c.name, len(ms))
			continue
		case c.unsupported && !errors.As(err, &ue):
			t.Errorf("%s: %v, want *UnsupportedError", c.name, err)
		case !c.unsupported && !errors.As(err, &fe):
			t.Errorf("%s: %v, want *FormatError", c.name, err)
		}
		if len(ms) != 0 {
			t.Errorf("%s: %d fields returned with the error", c.name, len(ms))
		}
		msg := err.Error()
		if !strings.Contains(msg, "bad.grib2: message 1 at byte ") || !strings.Contains(msg, c.what) {
			t.Errorf("%s: %q does not name file, message, offset and %q", c.name, msg, c.what)
		}
		if fe != nil && (fe.Offset < int64(s5) || fe.Offset >= int64(len(c.msg))) {
			t.Errorf("%s: offset %d outside sections 5-7 (%d..%d)", c.name, fe.Offset, s5, len(c.msg))
		}
	}
}
