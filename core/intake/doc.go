// Package intake reads event logs from the files users export: CSV (RFC 4180) and XES
// (IEEE 1849-2016), plain or gzip-compressed, into an eventlog.Log.
//
// Both readers stream: they hold the log's columns and a read buffer, never the whole file, and
// report progress in bytes. Read detects the format from the first bytes (gzip's magic number,
// an XML '<'), so callers need not trust a file's name.
//
// CSV has no schema, so the CSV reader first sniffs the opening SampleBytes: the separator (the
// one that splits rows most regularly), whether the first row is a header, a role for every
// column (case, activity, time, start, resource, lifecycle or attribute, each with a confidence)
// and the timestamp layout. The page shows this Sniff for the user to correct; ReadCSV takes the
// corrections in CSVOptions.
//
// Nothing is lost silently. A row that cannot become an event (no case id, no activity, no or an
// unreadable timestamp, the wrong number of fields) stops the read with a *RowError that names
// its line, column and text, or, when the caller chooses Skip, is counted in Report.Problems by
// cause with the first ones kept. A broken file structure (an unclosed quote, malformed XML)
// always stops with a *SyntaxError giving line and column. The input is only ever read.
//
// Deviations from the standards, each for files seen in practice: CSV lines may end in LF alone;
// a quote inside an unquoted field is kept as text; empty lines are passed over. Text that is not
// UTF-8 is read as Windows-1252 with a warning, UTF-16 with a byte-order mark is converted, and a
// binary file (a spreadsheet, an archive) is refused with the offending byte.
package intake
