package winds

import (
	"fmt"
	"math"
	"time"
)

// decodeGRIB1 decodes one GRIB edition 1 message (FM 92 GRIB edition 1):
// section 0 indicator, 1 product definition (PDS), 2 grid description
// (GDS, optional), 3 bitmap (BMS, optional), 4 binary data (BDS), 5 end.
// Only regular lat/lon grids (data representation type 0) with simple
// grid-point packing are decoded.
func decodeGRIB1(msg []byte, src string, index int, base int64, values bool, scratch *decodeScratch, fn func(*Message) error) error {
	ferr := func(at int, format string, args ...any) error {
		return &FormatError{src, index, base + int64(at), fmt.Sprintf(format, args...)}
	}
	unsup := func(at int, remedy, format string, args ...any) error {
		return &UnsupportedError{src, index, base + int64(at), fmt.Sprintf(format, args...), remedy}
	}
	if string(msg[len(msg)-4:]) != "7777" {
		if u24(msg[4:])&0x800000 != 0 {
			return unsup(4, "", "GRIB1 large-message length convention")
		}
		return ferr(len(msg)-4, "missing end section \"7777\"")
	}
	body := msg[:len(msg)-4]
	pos := 8
	section := func(name string, min int) ([]byte, error) {
		if pos+3 > len(body) {
			return nil, ferr(pos, "truncated before %s", name)
		}
		l := u24(body[pos:])
		if l < min || pos+l > len(body) {
			return nil, ferr(pos, "%s length %d disagrees with message length %d", name, l, len(msg))
		}
		s := body[pos : pos+l]
		pos += l
		return s, nil
	}
	// Section 1 (PDS): 4 table 2 version, 5 centre, 8 flags (0x80 GDS,
	// 0x40 BMS), 9 parameter, 10 level type, 11-12 level, 13-17 year of
	// century, month, day, hour, minute, 18 time unit, 19 P1, 20 P2,
	// 21 time range indicator, 25 century, 27-28 decimal scale factor.
	pds, err := section("section 1 (product definition)", 28)
	if err != nil {
		return err
	}
	m := Message{Source: src, Index: index, Offset: base, Edition: 1, Discipline: -1, Product: -1, Ensemble: -1,
		Category: int(pds[3]), Centre: int(pds[4]), Number: int(pds[8]), LevelType: int(pds[9]), Level: math.NaN()}
	if m.LevelType == LevelIsobaric {
		m.Level = float64(u16(pds[10:])) * 100 // hPa to Pa
	}
	year := (int(pds[24])-1)*100 + int(pds[12])
	month, day, hour, minute := int(pds[13]), int(pds[14]), int(pds[15]), int(pds[16])
	if month < 1 || month > 12 || day < 1 || day > 31 || hour > 23 || minute > 59 {
		return ferr(12, "invalid reference time %04d-%02d-%02d %02d:%02d", year, month, day, hour, minute)
	}
	m.RefTime = time.Date(year, time.Month(month), day, hour, minute, 0, 0, time.UTC)
	m.Param = classify1(m.Category, m.Number, m.LevelType, m.Level)
	step, ok := timeUnit1(int(pds[17]))
	var p int
	switch tri := pds[20]; tri {
	case 0, 1:
		p = int(pds[18])
	case 10:
		p = u16(pds[18:])
	case 2, 3, 4, 5:
		p = int(pds[19])
	default:
		ok = false
	}
	if !ok {
		// Listed without a valid time (zero); refused when decoded.
		if values && m.Param != ParamOther {
			return unsup(17, remedyTime, "GRIB1 time unit %d with time range indicator %d (tables 4 and 5)", pds[17], pds[20])
		}
	} else {
		m.ValidTime = m.RefTime.Add(time.Duration(p) * step)
	}
	dec := s16(pds[26:])
	flags := pds[7]

	// Section 2 (GDS): 6 data representation type; type 0: 7-8 Ni, 9-10 Nj,
	// 11-13 La1, 14-16 Lo1 (millidegrees), 17 resolution flags, 18-20 La2,
	// 21-23 Lo2, 24-25 Di, 26-27 Dj, 28 scanning mode.
	gridOK := false
	if flags&0x80 == 0 {
		m.Grid = -1
		if values && m.Param != ParamOther {
			return unsup(7, remedyRegrid, "GRIB1 predefined grid %d (no grid description section)", pds[6])
		}
	} else {
		gds, err := section("section 2 (grid description)", 6)
		if err != nil {
			return err
		}
		m.Grid = int(gds[5])
		if len(gds) >= 10 {
			// Octets 7-10 are Ni (Nx) and Nj (Ny) in the latitude/longitude,
			// Gaussian, polar stereographic, Lambert and Mercator layouts
			// (GRIB1 table D); 0xffff (missing) marks a reduced grid's rows.
			for k, p := range []*int{&m.Ni, &m.Nj} {
				if v := u16(gds[6+2*k:]); v != 0xffff {
					*p = v
				}
			}
		}
		if m.Grid == 0 && len(gds) >= 28 && u16(gds[6:]) != 0xffff {
			gridOK = true
			m.Ni, m.Nj = u16(gds[6:]), u16(gds[8:])
			m.Lat1, m.Lon1 = float64(s24(gds[10:]))/1000, float64(s24(gds[13:]))/1000
			m.Lat2, m.Lon2 = float64(s24(gds[17:]))/1000, float64(s24(gds[20:]))/1000
			m.ScanMode = int(gds[27])
			if gds[16]&0x80 != 0 && u16(gds[23:]) != 0xffff {
				m.Di, m.Dj = float64(u16(gds[23:]))/1000, float64(u16(gds[25:]))/1000
			} else {
				if m.Ni > 1 {
					m.Di = lonSpan(m.Lon1, m.Lon2, m.ScanMode&0x80 != 0) / float64(m.Ni-1)
				}
				if m.Nj > 1 {
					m.Dj = math.Abs(m.Lat2-m.Lat1) / float64(m.Nj-1)
				}
			}
		}
	}
	if values && m.Param != ParamOther && !gridOK && m.Grid >= 0 {
		return unsup(8, remedyRegrid, "GRIB1 grid (data representation type %d, GRIB1 table 6; only 0 regular lat/lon)", m.Grid)
	}
	if m.Param != ParamOther && gridOK && (m.Ni == 0 || m.Nj == 0 || ((m.Di <= 0 || m.Dj <= 0) && m.Ni*m.Nj > 1)) {
		return ferr(8, "grid Ni %d, Nj %d, Di %g, Dj %g", m.Ni, m.Nj, m.Di, m.Dj)
	}
	npoints := m.Ni * m.Nj

	// Section 3 (BMS): 4 unused bits, 5-6 predefined bitmap (0: follows).
	var bitmap []byte
	if flags&0x40 != 0 {
		bms, err := section("section 3 (bitmap)", 6)
		if err != nil {
			return err
		}
		m.Bitmap = true
		if u16(bms[4:]) != 0 {
			if values && m.Param != ParamOther {
				return unsup(pos-len(bms)+4, remedyNone, "GRIB1 predefined bitmap %d", u16(bms[4:]))
			}
		} else {
			bitmap = bms[6:]
			if m.Param != ParamOther && gridOK && len(bitmap)*8 < npoints {
				return ferr(pos-len(bms), "bitmap of %d bits is shorter than %d grid points", len(bitmap)*8, npoints)
			}
		}
	}

	// Section 4 (BDS): 4 flags (high nibble) and unused bits (low nibble),
	// 5-6 binary scale factor, 7-10 reference value (IBM single
	// precision), 11 bits per value, 12- packed values.
	bdsAt := pos
	bds, err := section("section 4 (binary data)", 11)
	if err != nil {
		return err
	}
	if pos != len(body) {
		return ferr(pos, "%d bytes between section 4 and the end section", len(body)-pos)
	}
	if bds[3]&0xc0 == 0 {
		m.Packing = 0
	} else {
		m.Packing = int(bds[3] >> 4)
	}
	if !values || m.Param == ParamOther {
		return fn(&m)
	}
	if bds[3]&0x80 != 0 {
		return unsup(bdsAt+3, remedySpectral, "GRIB1 spherical harmonic coefficients")
	}
	if bds[3]&0x40 != 0 {
		return unsup(bdsAt+3, remedyRepack1, "GRIB1 complex (second-order) packing")
	}
	if m.ScanMode&0x1f != 0 {
		return unsup(8, remedyNone, "GRIB1 scanning mode %#02x (bits 4-8 are reserved in GRIB1 table 8)", m.ScanMode)
	}
	n := npoints
	if bitmap != nil {
		n = countBits(bitmap, npoints)
	}
	nbits := int(bds[10])
	avail := int64(len(bds)-11)*8 - int64(bds[3]&0x0f)
	if nbits > 32 || avail < 0 || int64(n)*int64(nbits) > avail {
		return ferr(bdsAt, "%d values of %d bits need %d bytes, section 4 holds %d", n, nbits, (uint64(n)*uint64(nbits)+7)/8, len(bds)-11)
	}
	if npoints > maxPoints {
		return unsup(8, remedyArea, "grid of %d points (limit %d)", npoints, maxPoints)
	}
	if err := scratch.chargeValues(src, index, npoints); err != nil {
		return err
	}
	vals := scratch.floats(n, npoints)
	unpackSimple(vals, bds[11:], uint(nbits), ibmFloat(u32(bds[6:])), s16(bds[4:]), dec)
	m.Values = scratch.canonical(vals, bitmap, npoints, m.Ni, m.Nj, m.ScanMode)
	return fn(&m)
}

// ibmFloat converts an IBM System/360 single-precision number (sign, 7-bit
// base-16 exponent biased by 64, 24-bit fraction), the GRIB1 reference
// value format (FM 92 GRIB edition 1, Regulation 92.6.4).
func ibmFloat(b uint32) float64 {
	mant := float64(b & 0xffffff)
	exp := int((b>>24)&0x7f) - 64
	v := mant / (1 << 24) * math.Pow(16, float64(exp))
	if b&0x80000000 != 0 {
		return -v
	}
	return v
}

// timeUnit1 maps GRIB1 code table 4 to a duration.
func timeUnit1(code int) (time.Duration, bool) {
	switch code {
	case 13:
		return 15 * time.Minute, true
	case 14:
		return 30 * time.Minute, true
	case 254:
		return time.Second, true
	}
	return timeUnit(code) // 0, 1, 2, 10, 11, 12 agree with GRIB2 table 4.4
}

// classify1 maps a GRIB1 parameter to a kept parameter: WMO table 2
// (versions 1-3) 33 u, 34 v, 11 temperature, 52 relative humidity, 51
// specific humidity; ECMWF local table 128: 131 u, 132 v, 130
// temperature, 157 relative humidity, 133 specific humidity.
func classify1(table, param, levelType int, level float64) Param {
	if levelType != LevelIsobaric || !(level > 0) {
		return ParamOther
	}
	switch {
	case table <= 3 && param == 33, table == 128 && param == 131:
		return ParamU
	case table <= 3 && param == 34, table == 128 && param == 132:
		return ParamV
	case table <= 3 && param == 11, table == 128 && param == 130:
		return ParamT
	case table <= 3 && param == 52, table == 128 && param == 157:
		return ParamRH
	case table <= 3 && param == 51, table == 128 && param == 133:
		return ParamQ
	}
	return ParamOther
}
