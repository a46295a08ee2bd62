// Package obs reads the measurements arcfit fits: observation files in the
// native CSV form or in the pipe-separated (PSV) form of the IAU's Astrometry
// Data Exchange Standard (ADES), and site files that give observers' places.
//
// # What the readers return
//
// [Read] returns a [Set]: the observations sorted by time (stable, so rows at
// one instant keep their file order), each carrying the 1-based line it came
// from; the warnings the reader had (an unused column, an exact duplicate, a
// default uncertainty); and the sites the file itself defines. Times are UTC
// Julian dates ([astro.JD]); right ascension and declination are astrometric
// ICRS as [astro.Angle] radians; uncertainties are 1-σ angles, the RA one
// measured on the sky (Δα cos δ).
//
// # Errors
//
// Bad input gives a [*ParseError] naming the file, the 1-based line, the
// 1-based column (counted in characters of the line as an editor shows it,
// after a byte order mark) and what was expected there, on one line:
//
//	obs.csv:12:34: dec: want ±DD:MM:SS or degrees within ±90, got "+91:00"
//
// It wraps a sentinel ([ErrSyntax], [ErrRange], [ErrHeader], [ErrFieldCount],
// [ErrDuplicateColumn], [ErrFormat], [ErrUnknownSite], …) for errors.Is. The
// readers never panic on their input and never guess: a time without a zone,
// a ';'-separated file, a decimal comma, NaN, an absurd magnitude are errors
// with a hint, not silent repairs.
//
// # Formats
//
// The observation CSV, the sites CSV and the reader decisions are those of
// arcfit's design note ("Input formats"); docs/ describes them for users.
// ADES PSV is read by its standard field names (obsTime, ra, dec, rmsRA,
// rmsDec, rmsCorr, stn, mag, band, and sys, ctr, pos1, pos2, pos3 for a
// station given by its WGS84 position).
//
// # References
//
//  1. IAU Astrometry Data Exchange Standard (ADES), version 2017, as adopted by
//     IAU Commission 20; the PSV (pipe-separated value) form of the standard.
//  2. ISO 8601:2004, Data elements and interchange formats — Representation of
//     dates and times.
//  3. RFC 4180, Common Format and MIME Type for Comma-Separated Values (CSV)
//     Files (2005), for quoting.
package obs
