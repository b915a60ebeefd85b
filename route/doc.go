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
// the source, line, column and point) or *UnsupportedError.
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
