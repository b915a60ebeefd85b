package winds

import "math"

// missingInt marks a missing value in the integer pass of complex unpacking.
const missingInt = math.MinInt64

// unpackComplex decodes templates 5.2 and 5.3 (FM 92 GRIB, Regulation
// 92.9.4 and the notes to templates 5.2, 5.3, 7.2 and 7.3). Section 7 holds,
// in order and each block padded to a whole octet:
//
//  1. for 5.3 only: the first `order` original values and the overall
//     minimum of the differences, each in extraOctets octets, sign and
//     magnitude;
//  2. NG group reference values of nbits bits;
//  3. NG group widths of bitsWidth bits (add refWidth);
//  4. NG scaled group lengths of bitsLength bits (length = refLength +
//     value x lengthInc; the last group has lastLength);
//  5. the packed values, group after group, each of its group's width.
//
// With missing value management 1 (or 2) the all-ones (or all-ones minus
// one) value of a group's width marks a missing value; a group of width 0
// is all missing when its reference is all ones (minus one) of nbits.
// Spatial differencing (5.3) is undone over the non-missing values, as in
// the NCEP g2 library: order 1 x[i] += x[i-1]; order 2
// x[i] += 2 x[i-1] - x[i-2], after adding the minimum to x[order:].
// Order 0 in template 5.3 (reserved in code table 5.6, but what ecCodes
// 2.28 writes for packingType=grid_complex_spatial_differencing) is read
// as no differencing, as ecCodes reads it.
func (d *grib2Decoder) unpackComplex(data []byte, at int) ([]float32, error) {
	r := &d.repr
	n, ng := r.nvalues, r.ngroups
	if r.nbits > 32 || r.bitsWidth > 32 || r.bitsLength > 32 {
		return nil, d.formatErr(at, "complex packing bit counts %d/%d/%d exceed 32", r.nbits, r.bitsWidth, r.bitsLength)
	}
	if r.missingMgmt > 2 {
		return nil, d.formatErr(at, "missing value management %d (code table 5.5)", r.missingMgmt)
	}
	if r.splitting > 1 {
		return nil, d.unsupported(at, remedyRepack, "group splitting method %d (code table 5.4)", r.splitting)
	}
	if n == 0 {
		return d.scratch.floats(0, d.npoints), nil
	}
	if ng == 0 || ng > n {
		return nil, d.formatErr(at, "%d groups for %d values", ng, n)
	}
	br := bitReader{buf: data}
	var first [2]int64
	var minDiff int64
	if r.template == 3 && r.order != 0 {
		if r.order != 1 && r.order != 2 {
			return nil, d.unsupported(at, remedyRepack, "spatial differencing of order %d (code table 5.6)", r.order)
		}
		if r.extraOctets < 1 || r.extraOctets > 4 {
			return nil, d.formatErr(at, "%d octets of extra descriptors (1 to 4 allowed)", r.extraOctets)
		}
		if len(data) < (r.order+1)*r.extraOctets {
			return nil, d.formatErr(at, "section 7 too short for extra descriptors")
		}
		w := uint(8 * r.extraOctets)
		readSigned := func() int64 {
			v := br.read(w)
			sign := uint32(1) << (w - 1)
			if v&sign != 0 {
				return -int64(v &^ sign)
			}
			return int64(v)
		}
		for i := 0; i < r.order; i++ {
			first[i] = readSigned()
		}
		minDiff = readSigned()
	}
	// Sizes of the three group descriptor blocks, checked before allocating.
	pad := func(bits uint64) uint64 { return (bits + 7) &^ 7 }
	descBits := pad(uint64(ng)*uint64(r.nbits)) + pad(uint64(ng)*uint64(r.bitsWidth)) + pad(uint64(ng)*uint64(r.bitsLength))
	if br.pos+descBits > uint64(len(data))*8 {
		return nil, d.formatErr(at, "%d groups need %d descriptor bytes, section 7 holds %d", ng, descBits/8, len(data)-int(br.pos/8))
	}
	refs := make([]uint32, ng)
	widths := make([]uint32, ng)
	lengths := make([]uint32, ng)
	for i := range refs {
		refs[i] = br.read(uint(r.nbits))
	}
	br.align()
	for i := range widths {
		widths[i] = br.read(uint(r.bitsWidth)) + uint32(r.refWidth)
		if widths[i] > 32 {
			return nil, d.formatErr(at, "group %d width %d exceeds 32 bits", i+1, widths[i])
		}
	}
	br.align()
	var total, bits uint64
	for i := range lengths {
		l := uint64(br.read(uint(r.bitsLength)))*uint64(r.lengthInc) + uint64(r.refLength)
		if i == ng-1 {
			l = uint64(r.lastLength)
		}
		lengths[i] = uint32(l)
		total += l
		bits += l * uint64(widths[i])
		if total > uint64(n) {
			break
		}
	}
	br.align()
	if total != uint64(n) {
		return nil, d.formatErr(at, "group lengths sum to %d, section 5 declares %d values", total, n)
	}
	if br.pos+bits > uint64(len(data))*8 {
		return nil, d.formatErr(at, "packed values need %d bytes, section 7 holds %d", (br.pos+bits+7)/8, len(data))
	}
	xs := d.scratch.int64s(n)
	k := 0
	refMiss1 := uint32(1)<<uint(r.nbits) - 1
	for g := range ng {
		w, ref, l := uint(widths[g]), int64(refs[g]), int(lengths[g])
		dst := xs[k : k+l]
		k += l
		if w == 0 {
			v := ref
			if r.missingMgmt >= 1 && r.nbits > 0 && (refs[g] == refMiss1 || (r.missingMgmt == 2 && refs[g] == refMiss1-1)) {
				v = missingInt
			}
			for i := range dst {
				dst[i] = v
			}
			continue
		}
		miss1 := uint32(1)<<w - 1
		if r.missingMgmt == 0 {
			for i := range dst {
				dst[i] = ref + int64(br.read(w))
			}
			continue
		}
		for i := range dst {
			x := br.read(w)
			if x == miss1 || (r.missingMgmt == 2 && x == miss1-1) {
				dst[i] = missingInt
			} else {
				dst[i] = ref + int64(x)
			}
		}
	}
	if r.template == 3 && r.order != 0 {
		undifference(xs, r.order, first, minDiff)
	}
	a, b := scaleFactors(r.ref, r.e, r.d)
	out := d.scratch.floats(n, d.npoints)
	for i, x := range xs {
		if x == missingInt {
			out[i] = nan32
		} else {
			out[i] = float32(a + float64(x)*b)
		}
	}
	return out, nil
}

// undifference reverses spatial differencing of order 1 or 2 in place,
// skipping missing values.
func undifference(xs []int64, order int, first [2]int64, minDiff int64) {
	var prev1, prev2 int64
	seen := 0
	for i, x := range xs {
		if x == missingInt {
			continue
		}
		switch {
		case seen < order:
			x = first[seen]
		case order == 1:
			x = x + minDiff + prev1
		default:
			x = x + minDiff + 2*prev1 - prev2
		}
		xs[i] = x
		prev2, prev1 = prev1, x
		seen++
	}
}

// int64s returns a scratch slice of n int64s.
func (s *decodeScratch) int64s(n int) []int64 {
	if cap(s.ints) < n {
		s.ints = make([]int64, n)
	}
	return s.ints[:n]
}
