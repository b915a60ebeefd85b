package winds

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"time"
)

// WriteGRIB2 writes each message as one GRIB2 message with grid template
// 3.0 (scanning mode 0, from the canonical origin), product template 4.0
// (4.1 when Ensemble >= 0) and simple packing (5.0) at 16 bits with
// decimal scale factor 0 and the binary scale factor chosen so the range
// fits (quantisation error at most range/2^17). NaN values are written
// through a bitmap (section 6). Param other than ParamOther sets the
// parameter numbers (u 0.2.2, v 0.2.3, t 0.0.0, rh 0.1.1, q 0.1.0, edr 0.19.30 unless
// Category/Number already name 0.19.28-31); ParamOther uses Discipline,
// Category and Number as given. Levels are written as isobaric surfaces in
// Pa when LevelType is 100.
func WriteGRIB2(w io.Writer, msgs []Message) error {
	bw := bufio.NewWriter(w)
	for i := range msgs {
		b, err := encodeGRIB2(&msgs[i])
		if err != nil {
			return fmt.Errorf("winds: WriteGRIB2 message %d: %w", i+1, err)
		}
		if _, err := bw.Write(b); err != nil {
			return err
		}
	}
	return bw.Flush()
}

func encodeGRIB2(m *Message) ([]byte, error) {
	n := m.Ni * m.Nj
	if m.Ni <= 0 || m.Nj <= 0 || len(m.Values) != n {
		return nil, fmt.Errorf("grid %dx%d with %d values", m.Ni, m.Nj, len(m.Values))
	}
	disc, cat, num := m.Discipline, m.Category, m.Number
	switch m.Param {
	case ParamU:
		disc, cat, num = 0, 2, 2
	case ParamV:
		disc, cat, num = 0, 2, 3
	case ParamT:
		disc, cat, num = 0, 0, 0
	case ParamRH:
		disc, cat, num = 0, 1, 1
	case ParamQ:
		disc, cat, num = 0, 1, 0
	case ParamEDR:
		if !(m.Discipline == 0 && m.Category == 19 && m.Number >= 28 && m.Number <= 31) {
			disc, cat, num = 0, 19, 30
		}
	}
	if disc < 0 || disc > 255 || cat < 0 || cat > 255 || num < 0 || num > 255 {
		return nil, fmt.Errorf("parameter %d.%d.%d out of range", disc, cat, num)
	}
	be := binary.BigEndian
	var out []byte
	put8 := func(v int) { out = append(out, byte(v)) }
	put16 := func(v int) { out = be.AppendUint16(out, uint16(v)) }
	put32 := func(v uint32) { out = be.AppendUint32(out, v) }
	sgn32 := func(v int64) {
		if v < 0 {
			put32(uint32(-v) | 0x80000000)
		} else {
			put32(uint32(v))
		}
	}
	start := func(num int) int { at := len(out); put32(0); put8(num); return at }
	finish := func(at int) { be.PutUint32(out[at:], uint32(len(out)-at)) }

	// Section 0 and 1.
	out = append(out, 'G', 'R', 'I', 'B', 0, 0, byte(disc), 2)
	out = be.AppendUint64(out, 0)
	s := start(1)
	centre := 255 // missing
	if m.Centre > 0 && m.Centre < 0xffff {
		centre = m.Centre
	}
	put16(centre)
	put16(255)
	put8(2) // master tables version
	put8(0)
	put8(1) // significance: start of forecast
	rt := m.RefTime.UTC()
	put16(rt.Year())
	put8(int(rt.Month()))
	put8(rt.Day())
	put8(rt.Hour())
	put8(rt.Minute())
	put8(rt.Second())
	put8(255) // production status: missing
	put8(1)   // type of data: forecast
	finish(s)

	// Section 3, template 3.0 from the canonical origin, scanning mode 0.
	north, west := m.Origin()
	micro := func(deg float64) int64 { return int64(math.Round(deg * 1e6)) }
	s = start(3)
	put8(0)
	put32(uint32(n))
	put8(0)
	put8(0)
	put16(0)
	put8(6) // Earth: sphere of radius 6 371 229 m
	put8(255)
	put32(math.MaxUint32)
	put8(255)
	put32(math.MaxUint32)
	put8(255)
	put32(math.MaxUint32)
	put32(uint32(m.Ni))
	put32(uint32(m.Nj))
	put32(0)
	put32(math.MaxUint32)
	sgn32(micro(north))
	sgn32(micro(west))
	put8(0x30) // increments given
	sgn32(micro(north - float64(m.Nj-1)*m.Dj))
	sgn32(micro(west + float64(m.Ni-1)*m.Di))
	put32(uint32(micro(m.Di)))
	put32(uint32(micro(m.Dj)))
	put8(0)
	finish(s)

	// Section 4, template 4.0 or 4.1.
	tmpl := 0
	if m.Ensemble >= 0 {
		tmpl = 1
	}
	s = start(4)
	put16(0)
	put16(tmpl)
	put8(cat)
	put8(num)
	put8(2) // forecast
	put8(255)
	put8(255)
	put16(0)
	put8(0)
	lead := m.ValidTime.Sub(m.RefTime)
	if lead%time.Hour == 0 {
		put8(1)
		sgn32(int64(lead / time.Hour))
	} else {
		put8(0)
		sgn32(int64(lead / time.Minute))
	}
	if m.LevelType >= 0 && !math.IsNaN(m.Level) {
		put8(m.LevelType)
		scale, v := 0, m.Level
		for v != math.Trunc(v) && scale < 6 {
			v *= 10
			scale++
		}
		put8(scale)
		put32(uint32(math.Round(v)))
	} else {
		put8(255)
		put8(255)
		put32(math.MaxUint32)
	}
	put8(255)
	put8(255)
	put32(math.MaxUint32)
	if tmpl == 1 {
		put8(3)
		put8(m.Ensemble)
		put8(255)
	}
	finish(s)

	// Sections 5, 6, 7: simple packing.
	lo, hi := math.Inf(1), math.Inf(-1)
	present := 0
	for _, v := range m.Values {
		if v != v {
			continue
		}
		present++
		lo = math.Min(lo, float64(v))
		hi = math.Max(hi, float64(v))
	}
	if present == 0 {
		lo, hi = 0, 0
	}
	ref := float32(lo)
	if float64(ref) > lo {
		ref = math.Nextafter32(ref, float32(math.Inf(-1)))
	}
	nbits, e := 0, 0
	if hi > float64(ref) {
		nbits = 16
		e = int(math.Ceil(math.Log2((hi - float64(ref)) / 65535)))
		for (hi-float64(ref))/math.Ldexp(1, e) > 65535 {
			e++
		}
	}
	s = start(5)
	put32(uint32(present))
	put16(0)
	put32(math.Float32bits(ref))
	if e < 0 {
		put16(-e | 0x8000)
	} else {
		put16(e)
	}
	put16(0)
	put8(nbits)
	put8(0)
	finish(s)

	s = start(6)
	if present == n {
		put8(255)
	} else {
		put8(0)
		bm := make([]byte, (n+7)/8)
		for i, v := range m.Values {
			if v == v {
				bm[i>>3] |= 0x80 >> (i & 7)
			}
		}
		out = append(out, bm...)
	}
	finish(s)

	s = start(7)
	if nbits > 0 {
		step := math.Ldexp(1, e)
		for _, v := range m.Values {
			if v != v {
				continue
			}
			x := math.Round((float64(v) - float64(ref)) / step)
			put16(int(math.Max(0, math.Min(65535, x))))
		}
	}
	finish(s)
	out = append(out, '7', '7', '7', '7')
	be.PutUint64(out[8:], uint64(len(out)))
	return out, nil
}
