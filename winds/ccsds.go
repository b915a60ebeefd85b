package winds

import (
	"encoding/binary"
	"fmt"
	"math/bits"
)

// CCSDS packing (GRIB2 data representation template 5.42, data template
// 7.42): the packed integers X of Y = (R + X 2^E) / 10^D are coded with the
// adaptive Rice coder of CCSDS 121.0-B "Lossless Data Compression" (Blue
// Book, issues 2 and 3), as libaec writes it for ecCodes.
//
// Section 5 octets 21-25 of template 5.42: 21 type of original values,
// 22 CCSDS flags, 23 block size J (samples per block), 24-25 reference
// sample interval r (blocks per interval).
//
// Flag bits, as defined by libaec (aec.h) and written by ecCodes:
const (
	aecSigned     = 1  // samples are two's complement: not used by GRIB
	aec3Byte      = 2  // 17-24 bit samples stored in 3 bytes: layout only
	aecMSB        = 4  // samples stored most significant byte first: layout only
	aecPreprocess = 8  // unit-delay predictor and mapping of CCSDS 121.0-B section 4
	aecRestricted = 16 // short option identifiers for 1-4 bit samples (section 5.1.2)
	aecPadRSI     = 32 // each reference sample interval padded to a byte
	aecKnownFlags = aecSigned | aec3Byte | aecMSB | aecPreprocess | aecRestricted | aecPadRSI
)

// aecROS is the fundamental sequence value of a zero-block run that means
// "remainder of segment" (CCSDS 121.0-B section 3.4.3, table 3-2).
const aecROS = 5

// aecMaxSE is the largest second-extension codeword: pairs of samples
// summing to at most 12 (libaec's SE_TABLE_SIZE; CCSDS 121.0-B section
// 3.4.2 bounds the option to blocks it codes shorter than FS).
const aecMaxSE = 90

// aecSESum[m] is d1 + d2 of second-extension codeword m.
var aecSESum = func() (t [aecMaxSE + 1]uint8) {
	for s, m := 0, 0; m <= aecMaxSE; s++ {
		for j := 0; j <= s && m <= aecMaxSE; j++ {
			t[m] = uint8(s)
			m++
		}
	}
	return
}()

// aecDecoder decodes one CCSDS 121.0-B coded data set of n samples of bps
// bits into float32 values with Y = a + X b. Each step is named after the
// coded data set's unit: block, option identifier, zero-block run, second
// extension, fundamental sequence, split samples, uncompressed block, and
// the preprocessor's inverse mapping. Time O(len(data) + n); no allocation.
//
// Where CCSDS 121.0-B leaves the layout to the implementation, it follows
// libaec (the coder ecCodes uses), checked on ecCodes-written fixtures: a
// block opening a reference sample interval codes the reference sample
// after the option identifier (and after the low-entropy selector bit);
// with the second extension, the first codeword of such a block gives
// one sample; a zero-block run may not cross the interval. The stream
// must end within the block holding the last sample, with zero padding.
type aecDecoder struct {
	data []byte
	pos  int    // next byte of data to load into acc
	acc  uint64 // bit buffer: the next bit is bit 63
	nacc uint   // valid bits in acc

	bps        uint   // bits per sample, 1-32
	block      int    // J, samples per block
	rsi        int    // r, blocks per reference sample interval
	idLen      uint   // option identifier length
	uncomp     uint32 // identifier of an uncompressed block (all ones)
	pp         bool   // preprocessing: samples are mapped prediction errors
	xmax       uint32 // 2^bps - 1
	last       uint32 // last reconstructed sample (predictor)
	a, b       float64
	buf        [64]uint32
	blockStart uint64 // bit offset of the current block, for errors
}

// aecError is a failed decode: what went wrong and the byte offset in data.
type aecError struct {
	off  int
	what string
}

func (e *aecError) Error() string { return e.what }

// unpackCCSDS decodes template 5.42. It checks the parameters of section 5
// (block size 8, 16, 32 or 64; interval 1-4096 blocks; 0-32 bits, 0 for a
// constant field) and refuses libaec flags it has no reference decoder to
// test against (signed samples, RSI padding, unknown bits) as unsupported.
func (d *grib2Decoder) unpackCCSDS(data []byte, at int) ([]float32, error) {
	r := &d.repr
	n := r.nvalues
	if r.nbits > 32 {
		return nil, d.formatErr(at, "CCSDS packing with %d bits per value (1-32)", r.nbits)
	}
	if r.ccsdsFlags&^aecKnownFlags != 0 || r.ccsdsFlags&(aecSigned|aecPadRSI) != 0 {
		return nil, d.unsupported(at, remedyRepack, "data representation template 5.42 (CCSDS) with flags %#x (signed samples or RSI padding)", r.ccsdsFlags)
	}
	a, b := scaleFactors(r.ref, r.e, r.d)
	if r.nbits == 0 || n == 0 {
		out := d.scratch.floats(n, d.npoints)
		for i := range out {
			out[i] = float32(a)
		}
		return out, nil
	}
	switch r.ccsdsBlock {
	case 8, 16, 32, 64:
	default:
		return nil, d.formatErr(at, "CCSDS block size %d (8, 16, 32 or 64)", r.ccsdsBlock)
	}
	if r.ccsdsRSI < 1 || r.ccsdsRSI > 4096 {
		return nil, d.formatErr(at, "CCSDS reference sample interval %d blocks (1-4096)", r.ccsdsRSI)
	}
	dec := aecDecoder{data: data, bps: uint(r.nbits), block: r.ccsdsBlock, rsi: r.ccsdsRSI,
		pp: r.ccsdsFlags&aecPreprocess != 0, a: a, b: b}
	dec.optionIDLength(r.ccsdsFlags&aecRestricted != 0)
	if need := dec.minBits(n); need > uint64(len(data))*8 {
		return nil, d.formatErr(at, "CCSDS data of %d bytes cannot hold %d values (at least %d bits)", len(data), n, need)
	}
	out := d.scratch.floats(n, d.npoints)
	if err := dec.decode(out); err != nil {
		e := err.(*aecError)
		return nil, d.formatErr(at+e.off, "CCSDS data: %s", e.what)
	}
	return out, nil
}

// optionIDLength sets the option identifier length of CCSDS 121.0-B table
// 5-1: 3 bits for samples of up to 8 bits, 4 up to 16, 5 up to 32; with the
// restricted set, 1 bit for 1-2 bit samples and 2 bits for 3-4.
func (a *aecDecoder) optionIDLength(restricted bool) {
	switch {
	case a.bps > 16:
		a.idLen = 5
	case a.bps > 8:
		a.idLen = 4
	case restricted && a.bps <= 2:
		a.idLen = 1
	case restricted && a.bps <= 4:
		a.idLen = 2
	default:
		a.idLen = 3
	}
	a.uncomp = 1<<a.idLen - 1
	a.xmax = uint32(1<<a.bps - 1)
}

// minBits is the shortest coded data set of n samples: every block in
// zero-block runs to the end of each 64-block segment (an option
// identifier, the selector bit and a 1-bit FS codeword per run), plus a
// reference sample per interval with preprocessing. It bounds what a
// declared size may allocate.
func (a *aecDecoder) minBits(n int) uint64 {
	blocks := (uint64(n) + uint64(a.block) - 1) / uint64(a.block)
	r := uint64(a.rsi)
	full, rest := blocks/r, blocks%r
	runs := full*((r+63)/64) + (rest+63)/64
	bits := runs * uint64(a.idLen+2)
	if a.pp {
		bits += (full + min(rest, 1)) * uint64(a.bps)
	}
	return bits
}

func (a *aecDecoder) fail(format string, args ...any) error {
	return &aecError{int(a.blockStart / 8), fmt.Sprintf(format, args...) + fmt.Sprintf(" (block at bit %d)", a.blockStart)}
}

// bitPos is the offset in bits of the next unread bit.
func (a *aecDecoder) bitPos() uint64 { return uint64(a.pos)*8 - uint64(a.nacc) }

// refill tops acc up to at least 57 valid bits, or all that is left.
func (a *aecDecoder) refill() {
	if a.pos+8 <= len(a.data) {
		// Bits below nacc+8k are the stream's own next bits, so loading
		// them again on the next refill ORs in the same values.
		a.acc |= binary.BigEndian.Uint64(a.data[a.pos:]) >> a.nacc
		k := (63 - a.nacc) >> 3
		a.pos += int(k)
		a.nacc += k << 3
		return
	}
	for a.nacc <= 56 && a.pos < len(a.data) {
		a.acc |= uint64(a.data[a.pos]) << (56 - a.nacc)
		a.pos++
		a.nacc += 8
	}
}

// read returns the next n bits (n <= 32), MSB first.
func (a *aecDecoder) read(n uint) (uint32, bool) {
	if a.nacc < n {
		a.refill()
		if a.nacc < n {
			return 0, false
		}
	}
	v := uint32(a.acc >> 32 >> (32 - n))
	a.acc <<= n
	a.nacc -= n
	return v, true
}

// fundamentalSequence reads one FS codeword: m zeros then a one codes m
// (CCSDS 121.0-B section 3.2.2).
func (a *aecDecoder) fundamentalSequence() (uint32, bool) {
	var m uint32
	for {
		lz := uint(bits.LeadingZeros64(a.acc))
		if lz < a.nacc {
			a.acc = a.acc << (lz & 63) << 1
			a.nacc -= lz + 1
			return m + uint32(lz), true
		}
		m += uint32(a.nacc)
		a.acc, a.nacc = 0, 0
		a.refill()
		if a.nacc == 0 || m > 1<<32-64 {
			return 0, false
		}
	}
}

// decode decodes len(out) samples, block after block. A block at the start
// of a reference sample interval carries, with preprocessing, the raw
// reference sample (CCSDS 121.0-B section 5.1.3).
func (a *aecDecoder) decode(out []float32) error {
	n := len(out)
	j := a.block
	rsiLen := a.rsi * j
	for i := 0; i < n; {
		a.blockStart = a.bitPos()
		ref := a.pp && i%rsiLen == 0
		id, ok := a.read(a.idLen)
		if !ok {
			return a.fail("stream ends at sample %d of %d", i, n)
		}
		var err error
		var done int
		switch {
		case id == 0:
			done, err = a.lowEntropy(out, i, ref, (i%rsiLen)/j)
		case id == a.uncomp:
			done, err = a.uncompressed(out, i, ref)
		default:
			done, err = a.splitSamples(out, i, ref, uint(id-1))
		}
		if err != nil {
			return err
		}
		i += done
	}
	return a.trailer(n)
}

// trailer checks that nothing but zero padding follows the block holding
// the last sample: every coded block contains a one bit, so a non-zero bit
// means the stream runs over the field's size.
func (a *aecDecoder) trailer(n int) error {
	a.blockStart = a.bitPos()
	if a.nacc > 0 && a.acc>>(64-a.nacc) != 0 {
		return a.fail("stream continues after the %d values of the field", n)
	}
	for _, c := range a.data[a.pos:] {
		if c != 0 {
			return a.fail("stream continues after the %d values of the field", n)
		}
	}
	return nil
}

// lowEntropy decodes option identifier 0: one bit chooses a zero-block
// run (0) or the second extension (1); then comes the reference sample, if
// any. b is the block's index in its reference sample interval.
func (a *aecDecoder) lowEntropy(out []float32, i int, ref bool, b int) (int, error) {
	se, ok := a.read(1)
	if !ok {
		return 0, a.fail("stream ends in a low-entropy block")
	}
	start := 0
	if ref {
		x, ok := a.read(a.bps)
		if !ok {
			return 0, a.fail("stream ends in a reference sample")
		}
		a.buf[0], start = x, 1
	}
	if se == 1 {
		return a.secondExtension(out, i, start)
	}
	return a.zeroBlock(out, i, ref, b)
}

// zeroBlock decodes a run of all-zero blocks: FS value m codes m+1 blocks
// for m < 4, m blocks for m > 4, and m = 4 (ROS) the rest of the segment of
// 64 blocks or of the reference sample interval (CCSDS 121.0-B table 3-2).
// Zero mapped prediction errors repeat the last sample.
func (a *aecDecoder) zeroBlock(out []float32, i int, ref bool, b int) (int, error) {
	m, ok := a.fundamentalSequence()
	if !ok {
		return 0, a.fail("stream ends in a zero-block run")
	}
	nb := int(m) + 1
	switch {
	case nb == aecROS:
		nb = min(a.rsi-b, 64-b%64)
	case nb > aecROS:
		nb--
	}
	if nb > a.rsi-b {
		return 0, a.fail("zero-block run of %d blocks crosses the reference sample interval at block %d of %d", nb, b, a.rsi)
	}
	var x uint32
	if ref {
		x = a.buf[0]
		a.last = x
	} else if a.pp {
		x = a.last
	}
	cnt := min(nb*a.block, len(out)-i)
	v := float32(a.a + float64(x)*a.b)
	for k := range out[i : i+cnt] {
		out[i+k] = v
	}
	return nb * a.block, nil
}

// secondExtension decodes pairs of samples (d1, d2) from one FS codeword
// each, m = (d1+d2)(d1+d2+1)/2 + d2 (CCSDS 121.0-B section 3.4.2). After a
// reference sample the first codeword gives only d2.
func (a *aecDecoder) secondExtension(out []float32, i, start int) (int, error) {
	for k := start; k < a.block; {
		m, ok := a.fundamentalSequence()
		if !ok {
			return 0, a.fail("stream ends in a second-extension block")
		}
		if m > aecMaxSE {
			return 0, a.fail("second-extension codeword %d above %d", m, aecMaxSE)
		}
		sum := uint32(aecSESum[m]) // d1 + d2
		d2 := m - sum*(sum+1)/2
		if k&1 == 0 {
			a.buf[k] = sum - d2
			k++
		}
		a.buf[k] = d2
		k++
	}
	return a.emit(out, i, start == 1)
}

// splitSamples decodes option k: the FS codewords of the block's high
// parts, then the k low bits of each sample (CCSDS 121.0-B section 3.3);
// k = 0 is the fundamental sequence option.
func (a *aecDecoder) splitSamples(out []float32, i int, ref bool, k uint) (int, error) {
	start := 0
	if ref {
		x, ok := a.read(a.bps)
		if !ok {
			return 0, a.fail("stream ends in a reference sample")
		}
		a.buf[0], start = x, 1
	}
	if k > a.bps {
		return 0, a.fail("split option k=%d for %d-bit samples", k, a.bps)
	}
	hmax := a.xmax >> k
	// The FS codewords are read with acc and nacc in locals; the loop
	// falls back to fundamentalSequence (which refills) when the next one
	// bit is not among the valid bits.
	acc, nacc := a.acc, a.nacc
	hi := a.buf[start:a.block]
	for s := range hi {
		var m uint32
		if lz := uint(bits.LeadingZeros64(acc)); lz < nacc {
			m = uint32(lz)
			acc = acc << (lz & 63) << 1
			nacc -= lz + 1
		} else {
			a.acc, a.nacc = acc, nacc
			var ok bool
			if m, ok = a.fundamentalSequence(); !ok {
				return 0, a.fail("stream ends in a fundamental sequence")
			}
			acc, nacc = a.acc, a.nacc
		}
		if m > hmax {
			return 0, a.fail("sample %d exceeds %d bits", m<<k, a.bps)
		}
		hi[s] = m
	}
	if i+a.block > len(out) || !a.pp {
		// The padded last block, or no preprocessing: low bits into
		// a.buf, then emit.
		for s := range hi {
			if nacc < k {
				a.acc, a.nacc = acc, nacc
				a.refill()
				acc, nacc = a.acc, a.nacc
				if nacc < k {
					return 0, a.fail("stream ends in split samples")
				}
			}
			hi[s] = hi[s]<<k | uint32(acc>>((63-k)&63)>>1) // 0 for k = 0
			acc <<= k
			nacc -= k
		}
		a.acc, a.nacc = acc, nacc
		return a.emit(out, i, ref)
	}
	// A whole block with preprocessing: low bits, inverse mapping (see
	// emit) and scaling in one pass.
	dst := out[i+start : i+a.block]
	dst = dst[:len(hi)]
	x, xmax, fa, fb := a.last, a.xmax, a.a, a.b
	if ref {
		x = a.buf[0]
		out[i] = float32(fa + float64(x)*fb)
	}
	for s, h := range hi {
		if nacc < k {
			a.acc, a.nacc = acc, nacc
			a.refill()
			acc, nacc = a.acc, a.nacc
			if nacc < k {
				return 0, a.fail("stream ends in split samples")
			}
		}
		d := h<<(k&31) | uint32(acc>>((63-k)&63)>>1) // low bits: 0 for k = 0
		acc <<= k & 63
		nacc -= k
		if t := min(x, xmax-x); d <= 2*t {
			x += d>>1 ^ -(d & 1)
		} else if x <= xmax-x {
			x = d
		} else {
			x = xmax - d
		}
		dst[s] = float32(fa + float64(x)*fb)
	}
	a.acc, a.nacc, a.last = acc, nacc, x
	return a.block, nil
}

// uncompressed decodes a block of raw samples of bps bits; with a
// reference sample, it is the first of them (CCSDS 121.0-B section 3.5).
func (a *aecDecoder) uncompressed(out []float32, i int, ref bool) (int, error) {
	for s := 0; s < a.block; s++ {
		x, ok := a.read(a.bps)
		if !ok {
			return 0, a.fail("stream ends in an uncompressed block")
		}
		a.buf[s] = x
	}
	return a.emit(out, i, ref)
}

// emit writes the block in a.buf to out[i:], inverting the preprocessor
// when it is on: the mapped prediction error D of the sample predicted
// by the last one, x, with t = min(x, xmax - x), is 2d for a difference
// 0 <= d <= t, 2|d|-1 for -t <= d < 0, and t+|d| beyond (CCSDS 121.0-B
// section 4.3, equation 15). With ref, a.buf[0] is a raw reference sample.
func (a *aecDecoder) emit(out []float32, i int, ref bool) (int, error) {
	cnt := min(a.block, len(out)-i)
	dst := out[i : i+cnt]
	buf := a.buf[:cnt]
	if !a.pp {
		for k, x := range buf {
			dst[k] = float32(a.a + float64(x)*a.b)
		}
		return a.block, nil
	}
	x, xmax, fa, fb := a.last, a.xmax, a.a, a.b
	if ref {
		x = buf[0]
		dst[0] = float32(fa + float64(x)*fb)
		buf, dst = buf[1:], dst[1:]
	}
	for k, d := range buf {
		if t := min(x, xmax-x); d <= 2*t {
			// x + d/2 for even d, x - (d+1)/2 = x + ^(d/2) for odd d.
			x += d>>1 ^ -(d & 1)
		} else if x <= xmax-x {
			x = d
		} else {
			x = xmax - d
		}
		dst[k] = float32(fa + float64(x)*fb)
	}
	// Samples of the padded last block past the field still predict
	// nothing that is kept, so a.last need not follow them.
	a.last = x
	return a.block, nil
}
