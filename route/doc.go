// Package route reads a flight's lateral route and prepares it for vertical
// planning: waypoints from GeoJSON, CSV or an inline list; WGS-84 geodesics
// (Karney's algorithm); legs cut into segments with their true course,
// World Magnetic Model 2025 variation, magnetic course and the flight levels
// a direction-of-flight rule allows.
//
// Units: distances in metres, angles in degrees (latitude, longitude,
// courses clockwise from north; magnetic variation east positive), flight
// levels as FL numbers (hundreds of feet), the one trade unit kept because
// level rules are written in it.
//
// # Route input
//
//   - GeoJSON (RFC 7946): a LineString, a Feature holding one, or a
//     FeatureCollection of Point features in flight order, each optionally
//     named by a "name" property. Positions are [lon, lat].
//   - CSV: a header with columns name, lat, lon (any order; name optional),
//     one waypoint per row in decimal degrees; '#' starts a comment line.
//   - Inline: "lat,lon lat,lon ...", each point optionally "NAME=lat,lon",
//     separated by spaces or semicolons.
//
// Every route is validated: at least two distinct points, latitudes in
// [-90, 90], longitudes in [-180, 180] (stored in [-180, 180)), finite
// numbers, no leg longer than 10,000 km or nearly antipodal (more than 170
// degrees of arc); such legs must be split with an intermediate waypoint.
// Consecutive duplicate points (closer than 1 m) are dropped with a
// warning in Route.Warnings. Errors are *FormatError (invalid input, naming
// the source, line, column and point) or *UnsupportedError; an error
// quotes at most a short excerpt (24 bytes) of the field it could not
// read, never more of the file.
//
// # Limits
//
// A route file must be a regular file (a FIFO, device or directory is
// refused before it is opened) of at most MaxFileSize (4 MiB) bytes; a
// route has at most MaxPoints (5,000) waypoints, checked while parsing,
// and Build makes at most MaxSegments (10,000) segments, checked before
// it allocates them. Beyond a limit the error is an *UnsupportedError.
//
// # Polar areas
//
// Build computes the WMM2025 horizontal field H at each segment's
// midpoint. Where H is under 6000 nT (the model's compass caution zone)
// or 2000 nT (its blackout zone), a magnetic course is unreliable, so the
// odd-even-magnetic rule uses the true course there (Options.Polar can
// ask for the grid course instead); Segment.LevelCourse names the course
// used and Track.Warnings says where.
//
// # Level rules
//
// ParseLevelRule accepts:
//
//	odd-even-magnetic[:MIN-MAX]   ICAO Annex 2 App. 3 semicircular rule on magnetic course (default)
//	odd-even-true[:MIN-MAX]       the same table on true course
//	every-1000[:MIN-MAX]          every multiple of FL10 in the band
//	list:FL,FL,...                exactly these levels
//
// MIN and MAX are flight levels (an "FL" prefix is allowed); the default
// band is FL100 to FL510. Under the semicircular rule a course of 000-179
// degrees gets FL..., 250, 270, 290, 310, ..., 410, 450, 490 and 180-359
// degrees gets FL..., 260, 280, 300, ..., 400, 430, 470, 510.
package route
