// Package winds reads gridded forecasts of wind, temperature and turbulence
// from GRIB edition 2 and edition 1 files and samples them in four
// dimensions (valid time, pressure, latitude, longitude).
//
// The decoders follow the WMO Manual on Codes, Volume I.2, FM 92 GRIB
// (edition 2) and FM 92 GRIB edition 1, with the octet layouts cross-checked
// against the ecCodes definition files (grib2/template.*.def). Supported:
//
//   - GRIB2 sections 0-8, any number of messages per file and of fields per
//     message (repeated sections 2-7, 3-7 or 4-7);
//   - grid definition template 3.0 (regular latitude/longitude) in every
//     scanning mode of code table 3.4 (i negative, j positive, j
//     consecutive, boustrophedon rows);
//   - product definition templates 4.0, 4.1 (ensemble member) and, for
//     EDR only, 4.15 (spatial statistics); the others of 4.2-4.15 are
//     listed by Scan with their level and, where the template gives it,
//     valid time;
//   - data representation templates 5.0 (simple), 5.2 (complex), 5.3
//     (complex with spatial differencing of order 1 and 2), 5.4 (IEEE 32 and
//     64 bit), 5.41 (PNG) and 5.42 (CCSDS 121.0-B adaptive Rice coding,
//     as libaec writes it); section 6 bitmaps (indicator 0, 254, 255);
//   - GRIB1 regular latitude/longitude grids with simple packing and bitmap.
//
// Anything else is reported as an *UnsupportedError that names the template
// and what to do (the ecCodes command that repacks an unsupported packing,
// or a regridding for an unsupported grid); invalid input is reported as
// a *FormatError naming the file, message and byte offset. Sizes declared in
// the file are checked against the bytes present before anything is
// allocated.
//
// Input is read as a stream: gzip and bzip2 files are recognised by
// their magic bytes and decompressed on the fly; zero padding between
// messages is skipped with a Warning; each message's own indicator section
// decides its edition and length. Reads are bounded by a memory budget
// (Options.Budget, DefaultBudget 2 GiB) checked before allocating: Decode
// charges every decoded field, Open the whole Field from the headers; a
// read over it is a *BudgetError. Open and ScanFile refuse directories,
// devices and FIFOs before opening them. Decoded values outside sanity
// ranges (wind over 300 kt, temperature outside 150-350 K) are kept and
// warned about (Field.Warnings, Options.Warn).
//
// Kept parameters are u and v wind (GRIB2 0.2.2 and 0.2.3; GRIB1 table 2
// parameters 33/34 and ECMWF table 128 parameters 131/132), temperature
// (0.0.0; GRIB1 11 and 130), eddy dissipation rate (0.19.28-31),
// relative humidity (0.1.1; GRIB1 52 and ECMWF 157) and specific humidity
// (0.1.0; GRIB1 51 and ECMWF 133) on isobaric surfaces (GRIB2 fixed
// surface type 100, GRIB1 level type 100).
// Everything else is listed by Scan with Param "other" and not decoded.
//
// Humidity must lie on the levels of the winds (an error names the
// message otherwise), relative humidity within 0..150 % (an error names
// the message and the point). The WMO tables do not say what relative
// humidity is relative to below freezing: most producers give it over
// liquid water, ECMWF's IFS over a water/ice mixture that is ice below
// -23 °C (from memory); Options.RHReference chooses, by default by the
// originating centre. Sample converts it to relative humidity over water
// and over ice with Murphy and Koop's (2005) saturation vapour pressures
// (package perf/contrail), or derives both from specific humidity.
//
// A Field may combine files: each of u, v, temperature, EDR and humidity keeps its
// own grid, levels and times (winds from one forecast, EDR from a hazard
// file on another grid), longitudes in any convention; levels within
// LevelTolerance (0.5 %) are one level, and a pressure within it beyond a
// variable's top or bottom level is sampled at that level. Of several EDR parameters one is used
// (Options.EDRParam, DefaultEDRParam) and the rest reported by
// Field.Warnings.
//
// Units inside the package are SI: Pa, K, m/s, EDR in m^(2/3)/s; angles in
// degrees.
package winds
