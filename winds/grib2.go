package winds

import (
	"fmt"
	"math"
	"slices"
	"time"
)

// grib2Decoder decodes one GRIB2 message (FM 92 GRIB edition 2). Each parse
// step is named after the section it reads; offsets in comments are the
// 1-based octet numbers of the WMO templates.
type grib2Decoder struct {
	src    string
	index  int
	base   int64 // offset of the message in the file
	msg    []byte
	pos    int // offset of the current section in msg
	values bool
	fn     func(*Message) error

	discipline int
	ref        time.Time
	centre     int
	cur        Message // header being built; copied out at section 7

	haveGrid    bool
	npoints     int  // section 3 number of data points
	gridOK      bool // grid template supported
	haveProduct bool
	productOK   bool
	haveRepr    bool
	repr        dataRepr
	bitmap      []byte // current bitmap (section 6), nil when none
	prevBitmap  []byte
	scratch     *decodeScratch
}

// dataRepr holds section 5.
type dataRepr struct {
	template  int
	nvalues   int
	ref       float64 // R
	e, d      int     // binary and decimal scale factors
	nbits     int
	precision int // 5.4
	// complex packing (5.2, 5.3); octets 24-31, the substitute values
	// for missing points, are not kept: missing points decode to NaN.
	splitting, missingMgmt           int
	ngroups                          int
	refWidth, bitsWidth              int
	refLength, lengthInc, lastLength int
	bitsLength                       int
	order, extraOctets               int
	// CCSDS packing (5.42)
	ccsdsFlags, ccsdsBlock, ccsdsRSI int
}

func (d *grib2Decoder) formatErr(at int, format string, args ...any) error {
	return &FormatError{d.src, d.index, d.base + int64(at), fmt.Sprintf(format, args...)}
}

func (d *grib2Decoder) unsupported(at int, remedy, format string, args ...any) error {
	return &UnsupportedError{d.src, d.index, d.base + int64(at), fmt.Sprintf(format, args...), remedy}
}

// decode runs the section parsers in the order Regulation 92.1.2 allows:
// 0, 1, then repeated {2?, 3, 4, 5, 6, 7} groups where a repetition may
// restart at section 2, 3 or 4, then 8.
func (d *grib2Decoder) decode() error {
	if err := d.indicator(); err != nil {
		return err
	}
	if err := d.identification(); err != nil {
		return err
	}
	last := 1
	for {
		if d.pos+4 <= len(d.msg) && string(d.msg[d.pos:d.pos+4]) == "7777" {
			return d.end(last)
		}
		if d.pos+5 > len(d.msg) {
			return d.formatErr(d.pos, "truncated before section header (after section %d)", last)
		}
		length := int(u32(d.msg[d.pos:]))
		num := int(d.msg[d.pos+4])
		if length < 5 || d.pos+length > len(d.msg)-4 {
			return d.formatErr(d.pos, "section %d length %d disagrees with message length %d", num, length, len(d.msg))
		}
		if !nextOK(last, num) {
			return d.formatErr(d.pos, "section %d may not follow section %d", num, last)
		}
		sec := d.msg[d.pos : d.pos+length]
		var err error
		switch num { // section 2 (local use, centre-specific) is skipped
		case 3:
			err = d.gridDefinition(sec)
		case 4:
			err = d.productDefinition(sec)
		case 5:
			err = d.dataRepresentation(sec)
		case 6:
			err = d.bitmapSection(sec)
		case 7:
			err = d.data(sec)
		}
		if err != nil {
			return err
		}
		d.pos += length
		last = num
	}
}

func nextOK(last, num int) bool {
	switch last {
	case 1:
		return num == 2 || num == 3
	case 2:
		return num == 3
	case 3, 4, 5, 6:
		return num == last+1
	case 7:
		return num == 2 || num == 3 || num == 4
	}
	return false
}

// indicator reads section 0: "GRIB", reserved, discipline (octet 7),
// edition (8), total length (9-16).
func (d *grib2Decoder) indicator() error {
	m := d.msg
	if len(m) < 16+21+4 {
		return d.formatErr(0, "message of %d bytes is too short for GRIB2", len(m))
	}
	if string(m[:4]) != "GRIB" {
		return d.formatErr(0, "wrong magic %q", m[:4])
	}
	if m[7] != 2 {
		return d.formatErr(7, "edition %d in a GRIB2 decoder", m[7])
	}
	if u64(m[8:16]) != uint64(len(m)) {
		return d.formatErr(8, "total length %d disagrees with %d bytes read", u64(m[8:16]), len(m))
	}
	if string(m[len(m)-4:]) != "7777" {
		return d.formatErr(len(m)-4, "missing end section \"7777\"")
	}
	d.discipline = int(m[6])
	d.pos = 16
	return nil
}

// identification reads section 1; octets 13-19 give the reference time.
func (d *grib2Decoder) identification() error {
	p := d.pos
	if p+5 > len(d.msg) || d.msg[p+4] != 1 {
		return d.formatErr(p, "section 1 missing")
	}
	length := int(u32(d.msg[p:]))
	if length < 21 || p+length > len(d.msg)-4 {
		return d.formatErr(p, "section 1 length %d disagrees with message length %d", length, len(d.msg))
	}
	s := d.msg[p:]
	year, month, day := u16(s[12:]), int(s[14]), int(s[15])
	hour, minute, second := int(s[16]), int(s[17]), int(s[18])
	if month < 1 || month > 12 || day < 1 || day > 31 || hour > 23 || minute > 59 || second > 59 {
		return d.formatErr(p+12, "invalid reference time %04d-%02d-%02d %02d:%02d:%02d", year, month, day, hour, minute, second)
	}
	d.ref = time.Date(year, time.Month(month), day, hour, minute, second, 0, time.UTC)
	d.centre = u16(s[5:])
	d.pos += length
	return nil
}

// gridDefinition reads section 3 and template 3.0 (regular lat/lon):
// octets 7-10 number of points, 11 octets for optional list, 13-14
// template; 3.0: 31-34 Ni, 35-38 Nj, 39-42 basic angle, 43-46 subdivisions,
// 47-50 La1, 51-54 Lo1, 56-59 La2, 60-63 Lo2, 64-67 Di, 68-71 Dj,
// 72 scanning mode.
func (d *grib2Decoder) gridDefinition(s []byte) error {
	if len(s) < 14 {
		return d.formatErr(d.pos, "section 3 length %d too short", len(s))
	}
	d.haveGrid = true
	d.haveProduct = false
	d.npoints = int(u32(s[6:]))
	tmpl := u16(s[12:])
	c := &d.cur
	c.Grid = tmpl
	c.Ni, c.Nj = 0, 0
	c.Lat1, c.Lon1, c.Lat2, c.Lon2, c.Di, c.Dj = 0, 0, 0, 0, 0, 0
	c.ScanMode = 0
	d.gridOK = false
	if tmpl != 0 || s[10] != 0 {
		return nil // listed; an error only if a kept field uses it
	}
	if len(s) < 72 {
		return d.formatErr(d.pos, "grid template 3.0 needs 72 octets, section has %d", len(s))
	}
	ni, nj := u32(s[30:]), u32(s[34:])
	if ni == 0 || nj == 0 || uint64(ni)*uint64(nj) != uint64(d.npoints) {
		return d.formatErr(d.pos+30, "grid Ni %d x Nj %d disagrees with %d data points", ni, nj, d.npoints)
	}
	unit := 1e-6
	if basic, sub := u32(s[38:]), u32(s[42:]); basic != 0 && basic != math.MaxUint32 {
		if sub == 0 || sub == math.MaxUint32 {
			sub = 1
		}
		unit = float64(basic) / float64(sub)
	}
	c.Ni, c.Nj = int(ni), int(nj)
	c.Lat1, c.Lon1 = float64(s32(s[46:]))*unit, float64(s32(s[50:]))*unit
	c.Lat2, c.Lon2 = float64(s32(s[55:]))*unit, float64(s32(s[59:]))*unit
	c.ScanMode = int(s[71])
	di, dj := u32(s[63:]), u32(s[67:])
	if di != math.MaxUint32 {
		c.Di = float64(di) * unit
	} else if c.Ni > 1 {
		c.Di = lonSpan(c.Lon1, c.Lon2, c.ScanMode&0x80 != 0) / float64(c.Ni-1)
	}
	if dj != math.MaxUint32 {
		c.Dj = float64(dj) * unit
	} else if c.Nj > 1 {
		c.Dj = math.Abs(c.Lat2-c.Lat1) / float64(c.Nj-1)
	}
	d.gridOK = true
	return nil
}

// lonSpan is the longitude distance from lon1 to lon2 in the scanning
// direction, in [0, 360).
func lonSpan(lon1, lon2 float64, negative bool) float64 {
	s := lon2 - lon1
	if negative {
		s = -s
	}
	return math.Mod(math.Mod(s, 360)+360, 360)
}

// productDefinition reads section 4: octets 6-7 number of coordinate
// values, 8-9 template. Templates 4.0 to 4.15 share octets 10-34 of 4.0:
// 10 category, 11 number, 18 unit of time range, 19-22 forecast time,
// 23 type of first fixed surface, 24 scale factor, 25-28 scaled value;
// 4.1 and 4.11 add 35 type of ensemble forecast, 36 perturbation number,
// 37 number of members. The statistically processed templates (4.8 to
// 4.12) give the end of the overall time interval (year 2 octets, month,
// day, hour, minute, second), which is their valid time as in ecCodes'
// validityDate: 4.8 at octet 35, 4.9 at 48, 4.10 at 36, 4.11 at 38, 4.12
// at 37 (WMO FM 92 GRIB2 templates; ecCodes grib2/template.4.*.def).
// Only 4.0 and 4.1 fields are kept; the others are listed with their level
// and, where the template gives it, valid time (zero otherwise).
func (d *grib2Decoder) productDefinition(s []byte) error {
	if !d.haveGrid {
		return d.formatErr(d.pos, "section 4 before any section 3")
	}
	if len(s) < 11 {
		return d.formatErr(d.pos, "section 4 length %d too short", len(s))
	}
	d.haveProduct = true
	d.productOK = false
	c := &d.cur
	c.Edition = 2
	c.Source, c.Index, c.Offset = d.src, d.index, d.base
	c.Discipline = d.discipline
	c.Centre = d.centre
	c.Product = u16(s[7:])
	c.Category, c.Number = int(s[9]), int(s[10])
	c.Param = ParamOther
	c.LevelType, c.Level = -1, math.NaN()
	c.RefTime, c.ValidTime = d.ref, time.Time{}
	c.Ensemble = -1
	kept := c.Product == 0 || c.Product == 1 || c.Product == 15
	if c.Product > 15 || c.Product == 13 || c.Product == 14 {
		return nil // other layouts (4.13/4.14 cluster lists, 4.20 radar, 4.30 satellite, ...): listed, not kept
	}
	// 4.1 adds 36 ensemble type, 37 member; 4.15 adds 35 statistical
	// process, 36 spatial processing, 37 points used.
	need := map[int]int{1: 37, 8: 41, 9: 54, 10: 42, 11: 44, 12: 43, 15: 37}[c.Product]
	if need == 0 {
		need = 34
	}
	if nv := u16(s[5:]); len(s) < need+4*nv {
		if !kept {
			return nil // too short to read: listed without time and level
		}
		return d.formatErr(d.pos, "product template 4.%d with %d coordinate values needs %d octets, section has %d", c.Product, nv, need+4*nv, len(s))
	}
	if s[22] != 255 {
		c.LevelType = int(s[22])
		if s[23] != 255 || u32(s[24:]) != math.MaxUint32 {
			c.Level = float64(u32(s[24:])) / pow10(s8(s[23:]))
		}
	}
	if c.Product == 1 || c.Product == 11 {
		c.Ensemble = int(s[35])
	}
	if end := map[int]int{8: 34, 9: 47, 10: 35, 11: 37, 12: 36}[c.Product]; end > 0 {
		e := s[end:]
		if t, ok := dateTime(u16(e), int(e[2]), int(e[3]), int(e[4]), int(e[5]), int(e[6])); ok {
			c.ValidTime = t
		}
		return nil
	}
	step, ok := timeUnit(int(s[17]))
	if !ok {
		if !kept {
			return nil
		}
		return d.unsupported(d.pos+17, remedyTime, "product template 4.%d: unit of time range %d (code table 4.4)", c.Product, s[17])
	}
	vt, ok := addSteps(d.ref, s32(s[18:]), step)
	if !ok {
		if !kept {
			return nil
		}
		return d.formatErr(d.pos+18, "forecast time %d x %v puts the valid time outside years 1..9999", s32(s[18:]), step)
	}
	c.ValidTime = vt
	if !kept {
		return nil
	}
	c.Param = classify2(c.Discipline, c.Category, c.Number, c.LevelType, c.Level)
	if c.Product == 15 && c.Param != ParamEDR {
		c.Param = ParamOther // spatial statistics are kept for EDR only
	}
	d.productOK = true
	return nil
}

// addSteps returns t + n*step in whole seconds, computed in int64 seconds
// so that no forecast time wraps (n*step overflows time.Duration past 292
// years), and whether the result lies in years 1..9999 (the years RFC 3339
// can write). Every GRIB2 unit of time (code table 4.4) is a whole number
// of seconds and |n| < 2^31, so the products fit easily in int64.
func addSteps(t time.Time, n int64, step time.Duration) (time.Time, bool) {
	sec := t.Unix() + n*int64(step/time.Second)
	v := time.Unix(sec, 0).UTC()
	return v, v.Year() >= 1 && v.Year() <= 9999
}

// dateTime is the time of a GRIB date (year, month, day, hour, minute,
// second), if valid.
func dateTime(year, month, day, hour, minute, second int) (time.Time, bool) {
	if month < 1 || month > 12 || day < 1 || day > 31 || hour > 23 || minute > 59 || second > 59 {
		return time.Time{}, false
	}
	return time.Date(year, time.Month(month), day, hour, minute, second, 0, time.UTC), true
}

// timeUnit maps GRIB2 code table 4.4 to a duration.
func timeUnit(code int) (time.Duration, bool) {
	switch code {
	case 0:
		return time.Minute, true
	case 1:
		return time.Hour, true
	case 2:
		return 24 * time.Hour, true
	case 10:
		return 3 * time.Hour, true
	case 11:
		return 6 * time.Hour, true
	case 12:
		return 12 * time.Hour, true
	case 13:
		return time.Second, true
	}
	return 0, false
}

// classify2 maps GRIB2 discipline, category and number (code tables 4.1 and
// 4.2) on an isobaric level to a kept parameter: 0.2.2 u, 0.2.3 v, 0.0.0
// temperature, 0.19.28-31 EDR, 0.1.1 relative humidity, 0.1.0 specific
// humidity.
func classify2(disc, cat, num, levelType int, level float64) Param {
	if disc != 0 || levelType != LevelIsobaric || math.IsNaN(level) || level <= 0 {
		return ParamOther
	}
	switch {
	case cat == 2 && num == 2:
		return ParamU
	case cat == 2 && num == 3:
		return ParamV
	case cat == 0 && num == 0:
		return ParamT
	case cat == 19 && num >= 28 && num <= 31:
		return ParamEDR
	case cat == 1 && num == 1:
		return ParamRH
	case cat == 1 && num == 0:
		return ParamQ
	}
	return ParamOther
}

// dataRepresentation reads section 5: octets 6-9 number of values, 10-11
// template. 5.0/5.41: 12-15 reference value (IEEE 32), 16-17 binary scale
// factor, 18-19 decimal scale factor, 20 bits per value; 5.2 adds 22-47
// (group layout, see complexParams); 5.3 adds 48 order of spatial
// differencing and 49 octets of extra descriptors; 5.4: 12 precision;
// 5.42 adds 22 CCSDS flags, 23 block size, 24-25 reference sample interval.
func (d *grib2Decoder) dataRepresentation(s []byte) error {
	if len(s) < 11 {
		return d.formatErr(d.pos, "section 5 length %d too short", len(s))
	}
	r := dataRepr{template: u16(s[9:]), nvalues: int(u32(s[5:]))}
	d.cur.Packing = r.template
	d.haveRepr = true
	need := map[int]int{0: 21, 2: 47, 3: 49, 4: 12, 41: 21, 42: 25}[r.template]
	if need == 0 {
		d.repr = r
		return nil // unsupported: reported at section 7 if the field is kept
	}
	if len(s) < need {
		return d.formatErr(d.pos, "data representation template 5.%d needs %d octets, section has %d", r.template, need, len(s))
	}
	if r.template == 4 {
		r.precision = int(s[11])
		d.repr = r
		return nil
	}
	r.ref = float64(math.Float32frombits(u32(s[11:])))
	r.e, r.d, r.nbits = s16(s[15:]), s16(s[17:]), int(s[19])
	if r.template == 2 || r.template == 3 {
		r.splitting, r.missingMgmt = int(s[21]), int(s[22])
		r.ngroups = int(u32(s[31:]))
		r.refWidth, r.bitsWidth = int(s[35]), int(s[36])
		r.refLength, r.lengthInc = int(u32(s[37:])), int(s[41])
		r.lastLength, r.bitsLength = int(u32(s[42:])), int(s[46])
	}
	if r.template == 3 {
		r.order, r.extraOctets = int(s[47]), int(s[48])
	}
	if r.template == 42 { // 22 CCSDS flags, 23 block size, 24-25 reference sample interval
		r.ccsdsFlags, r.ccsdsBlock, r.ccsdsRSI = int(s[21]), int(s[22]), u16(s[23:])
	}
	d.repr = r
	return nil
}

// bitmapSection reads section 6: octet 6 bitmap indicator (0: bitmap
// follows from octet 7, one bit per grid point, 1 = present; 254: the
// previous bitmap of this message applies; 255: none).
func (d *grib2Decoder) bitmapSection(s []byte) error {
	if len(s) < 6 {
		return d.formatErr(d.pos, "section 6 length %d too short", len(s))
	}
	switch ind := s[5]; ind {
	case 255:
		d.bitmap = nil
	case 254:
		if d.prevBitmap == nil {
			return d.formatErr(d.pos+5, "bitmap indicator 254 (previous bitmap) without a previous bitmap")
		}
		if len(d.prevBitmap)*8 < d.npoints {
			return d.formatErr(d.pos+5, "previous bitmap of %d bits is shorter than %d grid points", len(d.prevBitmap)*8, d.npoints)
		}
		d.bitmap = d.prevBitmap
	case 0:
		if (len(s)-6)*8 < d.npoints {
			return d.formatErr(d.pos, "bitmap of %d bits is shorter than %d grid points", (len(s)-6)*8, d.npoints)
		}
		d.bitmap = s[6:]
		d.prevBitmap = d.bitmap
	default:
		d.bitmap = nil
		d.cur.Bitmap = true
		if d.cur.Param != ParamOther && d.values {
			return d.unsupported(d.pos+5, remedyNone, "predefined bitmap %d (section 6)", ind)
		}
		return nil
	}
	d.cur.Bitmap = d.bitmap != nil
	return nil
}

// data reads section 7 and emits the field.
func (d *grib2Decoder) data(s []byte) error {
	if !d.haveProduct || !d.haveRepr {
		return d.formatErr(d.pos, "section 7 without sections 4 and 5")
	}
	m := d.cur
	if !d.values || m.Param == ParamOther {
		return d.fn(&m)
	}
	if !d.gridOK {
		if d.cur.Grid != 0 {
			return d.unsupported(d.pos, remedyRegrid, "grid definition template 3.%d (only 3.0 regular lat/lon)", d.cur.Grid)
		}
		return d.unsupported(d.pos, remedyRegrid, "grid definition with a list of numbers of points (quasi-regular grid)")
	}
	if (m.Di <= 0 || m.Dj <= 0) && (m.Ni > 1 || m.Nj > 1) {
		return d.formatErr(d.pos, "grid increments Di %g, Dj %g must be positive", m.Di, m.Dj)
	}
	if m.ScanMode&0x0f != 0 {
		return d.unsupported(d.pos, remedyNone, "scanning mode %#02x (offset or staggered rows, code table 3.4 bits 5-8)", m.ScanMode)
	}
	if d.npoints > maxPoints {
		return d.unsupported(d.pos, remedyArea, "grid of %d points (limit %d)", d.npoints, maxPoints)
	}
	if err := d.scratch.chargeValues(d.src, d.index, d.npoints); err != nil {
		return err
	}
	present := d.npoints
	if d.bitmap != nil {
		present = countBits(d.bitmap, d.npoints)
	}
	if d.repr.nvalues != present {
		return d.formatErr(d.pos, "section 5 declares %d values, grid and bitmap give %d", d.repr.nvalues, present)
	}
	vals, err := d.unpack(s[5:], d.pos+5)
	if err != nil {
		return err
	}
	m.Values = d.scratch.canonical(vals, d.bitmap, d.npoints, m.Ni, m.Nj, m.ScanMode)
	return d.fn(&m)
}

// end checks section 8 ("7777") closes the message after a section 7.
func (d *grib2Decoder) end(last int) error {
	if last != 7 {
		return d.formatErr(d.pos, "end section after section %d, want after section 7", last)
	}
	if d.pos+4 != len(d.msg) {
		return d.formatErr(d.pos, "end section at %d but message length is %d", d.pos, len(d.msg))
	}
	return nil
}

// countBits counts the set bits among the first n bits of bm.
func countBits(bm []byte, n int) int {
	c := 0
	full := n / 8
	for _, b := range bm[:full] {
		c += int(popcount8[b])
	}
	for i := full * 8; i < n; i++ {
		if bm[i>>3]&(0x80>>(i&7)) != 0 {
			c++
		}
	}
	return c
}

var popcount8 = func() (t [256]uint8) {
	for i := range t {
		for b := i; b != 0; b &= b - 1 {
			t[i]++
		}
	}
	return
}()

// canonical returns a field's npoints values in canonical order (see
// Message). vals holds the values present, in the file's scanning order
// (code table 3.4), and must have capacity npoints; the bitmap bm (nil when
// every point is present) expands them in place, with NaN where its bit is
// 0. The scanning order is then undone in place by reversing rows and
// swapping rows, except that j-consecutive scanning (a transpose) writes
// into s.permuted. Time O(npoints).
func (s *decodeScratch) canonical(vals []float32, bm []byte, npoints, ni, nj, mode int) []float32 {
	v := vals[:npoints]
	if bm != nil {
		// From the end: the k-th present value moves to grid point i >= k,
		// so no value is overwritten before it is read.
		k := len(vals)
		for i := npoints - 1; i >= 0; i-- {
			if bm[i>>3]&(0x80>>(i&7)) != 0 {
				k--
				v[i] = v[k]
			} else {
				v[i] = nan32
			}
		}
	}
	if mode&0xf0 == 0 {
		return v
	}
	iNeg, jPos, jCons, alt := mode&0x80 != 0, mode&0x40 != 0, mode&0x20 != 0, mode&0x10 != 0
	if !jCons {
		for j := range nj {
			if iNeg != (alt && j%2 == 1) {
				slices.Reverse(v[j*ni : (j+1)*ni])
			}
		}
		if jPos {
			for j := 0; j < nj/2; j++ {
				a, b := v[j*ni:(j+1)*ni], v[(nj-1-j)*ni:(nj-j)*ni]
				for i := range a {
					a[i], b[i] = b[i], a[i]
				}
			}
		}
		return v
	}
	out := s.permuted(npoints)
	for k, x := range v {
		i, j := k/nj, k%nj
		if alt && i%2 == 1 {
			j = nj - 1 - j
		}
		if iNeg {
			i = ni - 1 - i
		}
		if jPos {
			j = nj - 1 - j
		}
		out[j*ni+i] = x
	}
	return out
}
