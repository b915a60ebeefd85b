package winds

import (
	"fmt"
	"io"
	"math"
	"time"
)

// DefaultBudget is the memory budget of a read when Options.Budget is 0:
// 2 GiB of decoded values (4 bytes a grid point a field). A 0.25-degree
// global forecast (1440 x 721 points, 4.2 MB a field) with u, v and
// temperature on the 16 levels from 850 to 70 hPa at 9 valid times needs
// 1.8 GB; a file asking for more is more likely hostile or a mistake (for
// example every level of a long forecast) than a plan's weather, and
// refusing it early is better than dying of an out-of-memory error.
const DefaultBudget int64 = 2 << 30

// headerBytes is what Scan and Decode charge against the budget for each
// header they return: the size of a Message without values, rounded up.
const headerBytes = 256

// Options are the limits and hooks of a read; the zero value gives the
// defaults that the package functions Scan, Decode, Open and OpenBetween
// use.
type Options struct {
	// Budget is the most bytes a read may allocate for decoded data:
	// for Decode, 4 bytes a grid point of every decoded field plus
	// headerBytes a field; for Open, the whole Field (4 bytes a grid
	// point, variable, level and time). It is checked before
	// allocating; a read over it fails with a *BudgetError. It also
	// bounds the zero padding a read skips, and so the time spent on a
	// compressed stream that expands to zeros. 0 or less means
	// DefaultBudget.
	Budget int64
	// Warn, when not nil, receives each warning as it is found. Open's
	// warnings are also kept in Field.Warnings; Scan and Decode keep
	// none, so a caller that shows output should set Warn.
	Warn func(Warning)
	// EDRParam is the GRIB2 parameter number (discipline 0, category 19,
	// code table 4.2.0.19) of the EDR that Open and NewFieldWith use when
	// the files hold several: 28 mountain-wave turbulence, 29 clear-air
	// turbulence, 30 eddy dissipation parameter, 31 its maximum. 0
	// chooses DefaultEDRParam if present, else the only one present, else
	// the first of 29, 28, 31 present; the others are listed in
	// Field.Warnings. A number the files do not hold is an error naming
	// those they do. Scan and Decode return every EDR message whatever it
	// is.
	EDRParam int
	// RHReference is what relative humidity in the files is relative to
	// (see RHReference); RHAuto, the zero value, decides by the
	// originating centre.
	RHReference RHReference
}

func (o Options) budget() int64 {
	if o.Budget <= 0 {
		return DefaultBudget
	}
	return o.Budget
}

// A Warning reports something a read accepted but the user should know:
// zero padding skipped, values outside the sanity ranges (see
// MaxWindSpeed, MinTemperature, MaxTemperature), EDR parameters or product
// templates present but not used, EDR taken from spatial statistics.
type Warning struct {
	Source  string // file name or other label given by the caller
	Message int    // 1-based message index; 0 when not about one message
	Offset  int64  // byte offset in the (decompressed) file
	What    string
}

func (w Warning) String() string {
	if w.Message == 0 {
		return fmt.Sprintf("%s at byte %d: %s", w.Source, w.Offset, w.What)
	}
	return fmt.Sprintf("%s message %d: %s", w.Source, w.Message, w.What)
}

// A BudgetError reports a read that would allocate more than its memory
// budget (Options.Budget). It is bad input, or input too big for the
// budget given: the remedy is fewer levels, times or a smaller area, or a
// larger budget.
type BudgetError struct {
	Source       string // the input that needs the memory
	What         string // what would be allocated
	Need, Budget uint64 // bytes
}

func (e *BudgetError) Error() string {
	return fmt.Sprintf("winds: %s: %s needs %s, over the weather memory budget of %s (select fewer levels or times or a smaller area, or raise the budget)",
		e.Source, e.What, mib(e.Need), mib(e.Budget))
}

func mib(n uint64) string {
	if n >= 1<<30 {
		return fmt.Sprintf("%.1f GiB (%d bytes)", float64(n)/(1<<30), n)
	}
	return fmt.Sprintf("%.1f MiB (%d bytes)", float64(n)/(1<<20), n)
}

// Scan reads every message of a GRIB1 or GRIB2 stream and returns the
// headers of all fields, kept or not, without decoding values. Structure
// and lengths are validated as in Decode. Fields on grids or with
// templates that Decode refuses are listed.
func Scan(r io.Reader, source string) ([]Message, error) { return Options{}.Scan(r, source) }

// Decode reads every message of a GRIB1 or GRIB2 stream and returns all
// fields, with Values decoded for kept parameters (Param != ParamOther) and
// nil for the others. Time is linear in the number of grid points.
func Decode(r io.Reader, source string) ([]Message, error) { return Options{}.Decode(r, source) }

// Scan is the package function Scan with these options.
func (o Options) Scan(r io.Reader, source string) ([]Message, error) {
	return o.collect(r, source, false)
}

// Decode is the package function Decode with these options: the fields
// decoded so far are charged against o's budget before each allocation.
func (o Options) Decode(r io.Reader, source string) ([]Message, error) {
	return o.collect(r, source, true)
}

// collect returns every field of the stream, with values when values is
// set, each in its own slice.
func (o Options) collect(r io.Reader, source string, values bool) ([]Message, error) {
	var out []Message
	s := &decodeScratch{budget: o.budget(), warn: o.Warn}
	err := readMessages(r, source, values, s, func(m *Message) error {
		if err := s.charge(m.Source, m.Index, headerBytes, "the headers"); err != nil {
			return err
		}
		out = append(out, *m)
		return nil
	})
	return out, err
}

// charge adds n bytes to the read's total and fails when the total passes
// the budget. A reusing read (Open's second pass) is bounded by the
// Field's budget instead and is not charged.
func (s *decodeScratch) charge(src string, index int, n uint64, what string) error {
	if s.reuse {
		return nil
	}
	s.used += n
	if s.budget > 0 && s.used > uint64(s.budget) {
		return &BudgetError{Source: fmt.Sprintf("%s up to message %d", src, index), What: "decoding " + what,
			Need: s.used, Budget: uint64(s.budget)}
	}
	return nil
}

// chargeValues charges the float32 values of a field of npoints points.
func (s *decodeScratch) chargeValues(src string, index, npoints int) error {
	return s.charge(src, index, uint64(npoints)*4, "the fields")
}

func (s *decodeScratch) warning(w Warning) {
	if s.warn != nil {
		s.warn(w)
	}
}

// Sanity ranges for decoded values (common practice, not a standard: the
// strongest jet-stream winds observed are near 250 kt and temperatures in
// the troposphere and lower stratosphere stay well inside 170..320 K, from
// memory). A value outside is kept but warned about, since it more likely
// means a wrong parameter, unit or scale factor than real weather.
const (
	MaxWindSpeed   = 300 * 1852.0 / 3600 // m/s (300 kt; 1 kt = 1852 m per hour by definition)
	MinTemperature = 150.0               // K
	MaxTemperature = 350.0               // K
)

// checked wraps fn with the sanity check of each decoded field.
func (s *decodeScratch) checked(fn func(*Message) error) func(*Message) error {
	return func(m *Message) error {
		if m.Values != nil {
			if w, bad := sanity(m); bad {
				s.warn(w)
			}
		}
		return fn(m)
	}
}

// sanity checks one field's values against the sanity ranges: a wind
// component beyond MaxWindSpeed (the wind speed, then, is beyond it too;
// Field checks the speed from both components), a temperature outside
// MinTemperature..MaxTemperature. It names the number of points outside
// and the farthest one. Time O(points).
func sanity(m *Message) (Warning, bool) {
	var lo, hi float64
	unit := "m/s"
	switch m.Param {
	case ParamU, ParamV:
		lo, hi = -MaxWindSpeed, MaxWindSpeed
	case ParamT:
		lo, hi, unit = MinTemperature, MaxTemperature, "K"
	case ParamQ:
		lo, hi, unit = 0, MaxQ, "kg/kg"
	default:
		return Warning{}, false
	}
	count, worst, far := 0, -1, 0.0
	for k, v := range m.Values {
		x := float64(v)
		if x >= lo && x <= hi || x != x {
			continue
		}
		count++
		if d := math.Max(lo-x, x-hi); d > far {
			far, worst = d, k
		}
	}
	if count == 0 {
		return Warning{}, false
	}
	lat, lon := pointOf(m, worst)
	return Warning{m.Source, m.Index, 0, fmt.Sprintf("%s at %g Pa, %s: %d points outside the sanity range %g..%g %s, the farthest %.6g %s at (%.4f, %.4f)",
		m.Param, m.Level, m.ValidTime.UTC().Format(time.RFC3339), count, lo, hi, unit, m.Values[worst], unit, lat, lon)}, true
}

// pointOf returns the latitude and longitude of the k-th value in
// canonical order.
func pointOf(m *Message, k int) (lat, lon float64) {
	north, west := m.Origin()
	return north - float64(k/m.Ni)*m.Dj, west + float64(k%m.Ni)*m.Di
}
