package winds

import (
	"bytes"
	"image"
	"image/png"
	"math"
)

// unpack decodes section 7 data (from its octet 6) according to the data
// representation of section 5, returning d.repr.nvalues values in the order
// they are stored, in a slice of capacity d.npoints (for canonical). at is
// the offset of data in the message, for errors.
func (d *grib2Decoder) unpack(data []byte, at int) ([]float32, error) {
	r := &d.repr
	n := r.nvalues
	switch r.template {
	case 0:
		if r.nbits > 32 {
			return nil, d.formatErr(at, "simple packing with %d bits per value", r.nbits)
		}
		if uint64(n)*uint64(r.nbits) > uint64(len(data))*8 {
			return nil, d.formatErr(at, "%d values of %d bits need %d bytes, section 7 holds %d", n, r.nbits, (uint64(n)*uint64(r.nbits)+7)/8, len(data))
		}
		out := d.scratch.floats(n, d.npoints)
		unpackSimple(out, data, uint(r.nbits), r.ref, r.e, r.d)
		return out, nil
	case 2, 3:
		return d.unpackComplex(data, at)
	case 4:
		size := map[int]int{1: 4, 2: 8}[r.precision]
		if size == 0 {
			return nil, d.unsupported(at, remedyRepack, "data representation template 5.4 (IEEE) with precision %d (code table 5.7)", r.precision)
		}
		if uint64(n)*uint64(size) > uint64(len(data)) {
			return nil, d.formatErr(at, "%d IEEE values of %d bytes need %d bytes, section 7 holds %d", n, size, n*size, len(data))
		}
		out := d.scratch.floats(n, d.npoints)
		if size == 4 {
			for i := range out {
				out[i] = math.Float32frombits(u32(data[4*i:]))
			}
		} else {
			for i := range out {
				out[i] = float32(math.Float64frombits(u64(data[8*i:])))
			}
		}
		return out, nil
	case 41:
		return d.unpackPNG(data, at)
	case 40:
		return nil, d.unsupported(at, remedyRepack, "data representation template 5.40 (JPEG 2000)")
	case 42:
		return d.unpackCCSDS(data, at)
	}
	return nil, d.unsupported(at, remedyRepack, "data representation template 5.%d", r.template)
}

// scaleFactors returns the constants of Y = (R + X 2^E) / 10^D
// (FM 92 GRIB, Regulation 92.9.4) as Y = a + X b.
func scaleFactors(ref float64, e, dec int) (a, b float64) {
	p := pow10(-dec)
	return ref * p, math.Ldexp(1, e) * p
}

// unpackSimple decodes len(dst) values of nbits bits each, MSB first, with
// Y = (R + X 2^E) / 10^D. The caller has checked that data is long enough.
func unpackSimple(dst []float32, data []byte, nbits uint, ref float64, e, dec int) {
	a, b := scaleFactors(ref, e, dec)
	switch nbits {
	case 0:
		for i := range dst {
			dst[i] = float32(a)
		}
		return
	case 8:
		for i := range dst {
			dst[i] = float32(a + float64(data[i])*b)
		}
		return
	case 16:
		data = data[:2*len(dst)]
		for i := range dst {
			x := uint32(data[2*i])<<8 | uint32(data[2*i+1])
			dst[i] = float32(a + float64(x)*b)
		}
		return
	}
	var acc uint64
	var nacc uint
	p := 0
	mask := uint64(1)<<nbits - 1
	for i := range dst {
		for nacc < nbits {
			acc = acc<<8 | uint64(data[p])
			p++
			nacc += 8
		}
		nacc -= nbits
		dst[i] = float32(a + float64((acc>>nacc)&mask)*b)
	}
}

// unpackPNG decodes template 5.41: the packed integers X are the pixels of
// a greyscale (1-16 bit) or RGB/RGBA (24/32 bit) PNG image, row-major.
func (d *grib2Decoder) unpackPNG(data []byte, at int) ([]float32, error) {
	r := &d.repr
	n := r.nvalues
	a, b := scaleFactors(r.ref, r.e, r.d)
	if r.nbits == 0 || n == 0 {
		out := d.scratch.floats(n, d.npoints)
		for i := range out {
			out[i] = float32(a)
		}
		return out, nil
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(data))
	if err != nil {
		return nil, d.formatErr(at, "PNG data: %v", err)
	}
	if uint64(cfg.Width)*uint64(cfg.Height) < uint64(n) || uint64(cfg.Width)*uint64(cfg.Height) > 2*uint64(n)+1024 {
		return nil, d.formatErr(at, "PNG image %dx%d does not match %d values", cfg.Width, cfg.Height, n)
	}
	depth := 0
	if len(data) > 25 {
		depth = int(data[24]) // IHDR bit depth (PNG specification, section 11.2.2)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		return nil, d.formatErr(at, "PNG data: %v", err)
	}
	w := cfg.Width
	out := d.scratch.floats(n, d.npoints)
	k := 0
	switch im := img.(type) {
	case *image.Gray:
		// Go expands 1, 2 and 4 bit grey to 8 bits; undo the scaling.
		div := 1
		if depth < 8 && depth > 0 {
			div = 255 / (1<<depth - 1)
		}
		for y := 0; y < cfg.Height && k < n; y++ {
			row := im.Pix[y*im.Stride : y*im.Stride+w]
			for x := 0; x < w && k < n; x++ {
				out[k] = float32(a + float64(int(row[x])/div)*b)
				k++
			}
		}
	case *image.Gray16:
		for y := 0; y < cfg.Height && k < n; y++ {
			row := im.Pix[y*im.Stride:]
			for x := 0; x < w && k < n; x++ {
				out[k] = float32(a + float64(uint32(row[2*x])<<8|uint32(row[2*x+1]))*b)
				k++
			}
		}
	case *image.RGBA:
		for y := 0; y < cfg.Height && k < n; y++ {
			row := im.Pix[y*im.Stride:]
			for x := 0; x < w && k < n; x++ {
				px := row[4*x:]
				out[k] = float32(a + float64(uint32(px[0])<<16|uint32(px[1])<<8|uint32(px[2]))*b)
				k++
			}
		}
	case *image.NRGBA:
		for y := 0; y < cfg.Height && k < n; y++ {
			row := im.Pix[y*im.Stride:]
			for x := 0; x < w && k < n; x++ {
				px := row[4*x:]
				out[k] = float32(a + float64(uint32(px[0])<<24|uint32(px[1])<<16|uint32(px[2])<<8|uint32(px[3]))*b)
				k++
			}
		}
	default:
		return nil, d.unsupported(at, remedyRepack, "data representation template 5.41 (PNG) with %T pixels", img)
	}
	return out, nil
}
