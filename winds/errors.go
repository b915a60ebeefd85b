package winds

import (
	"fmt"
	"math"
	"time"
)

// RepackHint is the ecCodes command that rewrites a GRIB2 file with simple
// packing, which this package always reads. It works on every packing that
// ecCodes itself decodes (tested on ecCodes 2.28 with JPEG 2000 and CCSDS
// files, see TestRemediesWork).
const RepackHint = "grib_set -r -s packingType=grid_simple in.grib2 out.grib2"

// Remedies for unsupported input, given in UnsupportedError.Remedy. Each
// either gives a command tested on such a file (TestRemediesWork) or says
// plainly what levelpath cannot read and what it needs instead.
const (
	remedyRepack  = "repack with: " + RepackHint
	remedyRepack1 = "repack with: grib_set -r -s packingType=grid_simple in.grib1 out.grib1"
	remedyRegrid  = "levelpath reads only regular latitude/longitude grids (GRIB2 grid template 3.0, GRIB1 data representation type 0); " +
		"download the data on such a grid, or regrid it with a tool that knows the source grid (ecCodes cannot regrid)"
	remedySpectral = "these are spectral coefficients, not grid-point values; levelpath needs grid-point data on a regular latitude/longitude grid"
	remedyNone     = "levelpath cannot read this; it needs GRIB on a regular latitude/longitude grid scanned row by row, with an explicit bitmap if any"
	remedyArea     = "download a smaller area or a coarser grid"
	remedyTime     = "levelpath needs forecasts whose valid time is given in minutes, hours, days or seconds"
)

// A FormatError reports that the input is not valid GRIB: it is truncated,
// has the wrong magic, or its lengths and counts disagree.
type FormatError struct {
	Source  string // file name or other label given by the caller
	Message int    // 1-based message index in the file; 0 before the first
	Offset  int64  // byte offset from the start of the file
	What    string
}

func (e *FormatError) Error() string {
	if e.Message == 0 && e.Offset == 0 {
		return fmt.Sprintf("winds: %s: invalid GRIB: %s", e.Source, e.What)
	}
	return fmt.Sprintf("winds: %s: message %d at byte %d: invalid GRIB: %s", e.Source, e.Message, e.Offset, e.What)
}

// An UnsupportedError reports valid GRIB that uses a feature this package
// does not decode, such as a grid, product or data representation template.
type UnsupportedError struct {
	Source   string
	Message  int
	Offset   int64
	Template string // e.g. "data representation template 5.40 (JPEG 2000)"
	Remedy   string // what to do about it (repack, regrid), or ""
}

func (e *UnsupportedError) Error() string {
	s := fmt.Sprintf("winds: %s: message %d at byte %d: unsupported %s", e.Source, e.Message, e.Offset, e.Template)
	if e.Remedy != "" {
		s += "; " + e.Remedy
	}
	return s
}

// A RangeError reports a sample point outside the field's area, pressure
// levels or valid times. The field never extrapolates.
type RangeError struct {
	Lat, Lon, P float64 // degrees, degrees, Pa
	T           time.Time
	What        string // which coordinate is out of range and the range held
}

func (e *RangeError) Error() string {
	return fmt.Sprintf("winds: point (lat %.4f, lon %.4f, %.1f Pa, %s) outside the field: %s",
		e.Lat, e.Lon, e.P, e.T.UTC().Format(time.RFC3339), e.What)
}

// nan32 is the float32 NaN used for missing grid points.
var nan32 = float32(math.NaN())
