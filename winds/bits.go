package winds

// bitReader reads big-endian, most-significant-bit-first unsigned integers
// of 0 to 32 bits from a byte slice, as GRIB packs them (WMO Manual on
// Codes, FM 92 GRIB, Regulation 92.1.5). Reads past the end return zero
// bits and set over; callers check lengths before reading so that over
// never happens on valid input.
type bitReader struct {
	buf  []byte
	pos  uint64 // bit position
	over bool
}

// read returns the next n bits (n <= 32).
func (b *bitReader) read(n uint) uint32 {
	if n == 0 {
		return 0
	}
	byteOff := b.pos >> 3
	shift := uint(b.pos & 7)
	b.pos += uint64(n)
	if byteOff+8 <= uint64(len(b.buf)) {
		// Fast path: load 8 bytes big-endian.
		p := b.buf[byteOff : byteOff+8]
		w := uint64(p[0])<<56 | uint64(p[1])<<48 | uint64(p[2])<<40 | uint64(p[3])<<32 |
			uint64(p[4])<<24 | uint64(p[5])<<16 | uint64(p[6])<<8 | uint64(p[7])
		return uint32((w << shift) >> (64 - n))
	}
	var w uint64
	for i := range uint64(8) {
		w <<= 8
		if byteOff+i < uint64(len(b.buf)) {
			w |= uint64(b.buf[byteOff+i])
		}
	}
	if (b.pos+7)>>3 > uint64(len(b.buf)) {
		b.over = true
	}
	return uint32((w << shift) >> (64 - n))
}

// align moves to the next octet boundary.
func (b *bitReader) align() { b.pos = (b.pos + 7) &^ 7 }

// Integers in GRIB sections are big-endian; signed ones use a sign bit and
// magnitude, not two's complement (FM 92 GRIB, Regulation 92.1.5).

func u16(p []byte) int { return int(p[0])<<8 | int(p[1]) }
func u24(p []byte) int { return int(p[0])<<16 | int(p[1])<<8 | int(p[2]) }
func u32(p []byte) uint32 {
	return uint32(p[0])<<24 | uint32(p[1])<<16 | uint32(p[2])<<8 | uint32(p[3])
}
func u64(p []byte) uint64 { return uint64(u32(p))<<32 | uint64(u32(p[4:])) }

func s8(p []byte) int {
	v := int(p[0] & 0x7f)
	if p[0]&0x80 != 0 {
		return -v
	}
	return v
}
func s16(p []byte) int {
	v := u16(p) & 0x7fff
	if p[0]&0x80 != 0 {
		return -v
	}
	return v
}
func s24(p []byte) int {
	v := u24(p) & 0x7fffff
	if p[0]&0x80 != 0 {
		return -v
	}
	return v
}
func s32(p []byte) int64 {
	v := int64(u32(p) & 0x7fffffff)
	if p[0]&0x80 != 0 {
		return -v
	}
	return v
}
