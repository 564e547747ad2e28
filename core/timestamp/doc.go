// Package timestamp reads the date-time forms that case-handling and ERP exports write, fast and
// without allocation, and infers which form a column uses from a sample of its values.
//
// Times are held as int64 microseconds since 1970-01-01T00:00:00Z ("Unix microseconds"): fine
// enough for every fraction an export writes down to the microsecond, and wide enough (±292,000
// years) for any date. A value with a zone offset is converted to UTC; a value without one is
// read as UTC wall-clock time, which keeps durations right except across a daylight-saving change
// (common practice for exports that drop the zone).
//
// A Format is compiled from a layout of our own, written the way people describe dates:
//
//	YYYY  four-digit year          MM / M   month, two digits / one or two
//	YY    two-digit year: 69-99 are 1969-1999, 00-68 are 2000-2068 (as POSIX strptime's %y)
//	MMM   month name or abbreviation, in English, German, French, Spanish, Italian, Dutch or
//	      Portuguese, any case, with or without a period (Dec, dez., Dezember, févr., mrt)
//	DD / D  day                    hh / h   hour (0-23, or 1-12 with AP)
//	WWW   weekday name in English (Tue, Tuesday), read but not checked against the date
//	mm    minutes                  ss       seconds (60 allowed, RFC 3339 section 5.6)
//	.f    a fraction of a second, 1 to 9 digits, after '.' or ','
//	Z     a zone: Z, +hh:mm, +hhmm or +hh (RFC 3339 section 5.6, ISO 8601), or UTC, GMT or UT
//	      (RFC 5322 section 4.3)
//	AP    AM or PM, any case
//	[...] an optional part      any other character stands for itself
//
// and two whole-value layouts, "epoch-s" (seconds since 1970, with an optional fraction) and
// "epoch-ms" (milliseconds). ISO 8601 / RFC 3339 is "YYYY-MM-DDThh:mm[:ss[.f]][Z]".
//
// Infer tries the common layouts on a sample and reports which parse every non-empty value. When
// day-first and month-first both fit (every day and month in the sample is at most 12) it says
// the result is ambiguous rather than guessing silently.
package timestamp
