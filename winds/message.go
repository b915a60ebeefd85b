package winds

import (
	"bytes"
	"math"
	"time"
)

// Param names a kept meteorological parameter.
type Param string

// Kept parameters; every other field is ParamOther.
const (
	ParamU     Param = "u"     // eastward wind, m/s
	ParamV     Param = "v"     // northward wind, m/s
	ParamT     Param = "t"     // temperature, K
	ParamEDR   Param = "edr"   // eddy dissipation rate, m^(2/3)/s
	ParamRH    Param = "rh"    // relative humidity, % (reference: see RHReference)
	ParamQ     Param = "q"     // specific humidity, kg/kg
	ParamOther Param = "other" // anything else (not decoded)
)

// LevelIsobaric is the fixed-surface type of an isobaric surface (GRIB2
// code table 4.5 and GRIB1 table 3, both 100).
const LevelIsobaric = 100

// A Message is one field (one grid of one parameter at one level and time)
// of a GRIB file. A GRIB2 message carrying several fields yields several
// Messages with the same Index.
//
// The grid description fields (Lat1 ... ScanMode) are as stored in the file:
// Lat1/Lon1 is the first grid point, Lat2/Lon2 the last, Di/Dj the
// increments (positive, degrees) and ScanMode the flags of GRIB2 code table
// 3.4 (GRIB1 uses the same top three bits). Values, however, are always in
// canonical order: row-major, rows from the northernmost latitude
// southwards, each row from the western edge eastwards, so that
// Values[j*Ni+i] lies at latitude north-j*Dj and longitude west+i*Di where
// (north, west) = m.Origin().
type Message struct {
	Source  string // name given to Scan or Decode
	Index   int    // 1-based message number in the file
	Offset  int64  // byte offset of the message in the (decompressed) file
	Edition int    // 1 or 2

	// GRIB2: discipline, parameter category and number (code tables 0.0,
	// 4.1, 4.2). GRIB1: Discipline is -1, Category is the parameter table
	// version and Number the indicator of parameter.
	Discipline, Category, Number int
	// Centre is the originating centre (WMO common code table C-11:
	// GRIB2 section 1 octets 6-7, GRIB1 section 1 octet 5), 98 for
	// ECMWF, 7 for NCEP, 255 missing. It decides the reference of
	// relative humidity (see RHReference).
	Centre int
	// Param is the kept parameter, or ParamOther. Only fields on an
	// isobaric surface are kept.
	Param Param

	LevelType int     // code table 4.5 (GRIB1 table 3); -1 when not given
	Level     float64 // Pa for isobaric surfaces; NaN when not given

	RefTime, ValidTime time.Time // UTC

	Ni, Nj                         int
	Lat1, Lon1, Lat2, Lon2, Di, Dj float64 // degrees
	ScanMode                       int
	Grid                           int // grid definition template (GRIB1: data representation type)
	Product                        int // product definition template (GRIB1: -1)
	Packing                        int // data representation template (GRIB1: 0 simple)
	Ensemble                       int // perturbation number, -1 when not an ensemble product
	Bitmap                         bool

	Values []float32 // nil from Scan; canonical order (see above); NaN for missing points
}

// Origin returns the latitude of the northernmost row and the longitude of
// the western edge of the grid (in the file's longitude convention), the
// origin of the canonical order of Values.
func (m *Message) Origin() (north, west float64) {
	north = m.Lat1
	if m.ScanMode&0x40 != 0 {
		north = m.Lat1 + float64(m.Nj-1)*m.Dj
	}
	west = m.Lon1
	if m.ScanMode&0x80 != 0 {
		west = m.Lon1 - float64(m.Ni-1)*m.Di
	}
	return north, west
}

// maxPoints bounds the grid size this package allocates for: 2^24 points
// (64 MiB of float32 per field; a 0.1-degree global grid has 6.5 million).
// It matters for constant fields, whose data section is empty whatever the
// grid size, so the data cannot bound the allocation.
const maxPoints = 1 << 24

// decodeScratch holds buffers reused between messages and fields: the
// message bytes, the integers of complex unpacking and, when reuse is set
// (for a caller that copies each field's values before the next, as Open
// does), the float32 values themselves; and the read's budget and
// warnings.
type decodeScratch struct {
	msg   bytes.Buffer
	ints  []int64
	reuse bool
	vals  []float32 // values as unpacked, then canonical (in place)
	perm  []float32 // canonical values of j-consecutive scanning

	budget int64         // bytes (see Options.Budget)
	used   uint64        // bytes charged so far
	warn   func(Warning) // nil: warnings dropped
}

// floats returns n float32s with capacity c >= n for one field's values:
// the scratch buffer when reuse is set, else a new slice.
func (s *decodeScratch) floats(n, c int) []float32 {
	if !s.reuse {
		return make([]float32, n, c)
	}
	if cap(s.vals) < c {
		s.vals = make([]float32, c)
	}
	return s.vals[:n]
}

// permuted returns n float32s for canonical to transpose into: the scratch
// buffer when reuse is set, else a new slice.
func (s *decodeScratch) permuted(n int) []float32 {
	if !s.reuse {
		return make([]float32, n)
	}
	if cap(s.perm) < n {
		s.perm = make([]float32, n)
	}
	return s.perm[:n]
}

// pow10 returns 10^n for the decimal scale factors of GRIB.
func pow10(n int) float64 { return math.Pow(10, float64(n)) }
