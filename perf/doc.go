// Package perf models aircraft performance for vertical flight planning: the
// ICAO Standard Atmosphere, compressible airspeed conversions, aircraft
// models read from YAML, cruise point performance (drag, fuel flow, specific
// range, buffet margin, residual climb), optimum speeds, climb and descent
// between levels, and the flight envelope with its buffet-limited,
// thrust-limited and certified ceilings.
//
// An aircraft is either a model (YAML: drag polar, engines, buffet onset)
// or an operator's own tables (a directory in the format of
// aircraft/TABLES.md: cruise fuel flow, thrust limits, climb, descent and
// buffet onset on grids, interpolated multilinearly and never
// extrapolated). Load returns both as an *Aircraft whose methods answer
// from the one or the other; Aircraft.Tables tells them apart.
//
// Everything is SI: metres, seconds, kilograms, pascals, kelvin, newtons and
// metres per second. Pressure altitude is geopotential metres in the
// standard atmosphere; a flight level is hundreds of feet of pressure
// altitude. Temperatures are actual (ISA plus deviation); the deviation
// shifts temperature only, never the pressure-altitude relation.
//
// The methods and their published sources are named on each function. The
// built-in aircraft ("demo-regional", "demo-narrowbody", "demo-widebody") are
// invented for demonstration, with parameters in common textbook ranges; they
// describe no real type.
//
// perf is a planning aid, not certified for operational use: the approved
// flight manual and operator data govern.
package perf
