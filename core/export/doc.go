// Package export writes an eventlog.Log as CSV (RFC 4180) or XES (IEEE 1849-2016), so a log read
// from one format can be handed on in the other, and a filtered or cleaned log can be saved.
//
// Writers stream to an io.Writer, one event at a time. Reading what they write gives back the
// same log: the same cases, events, order, resources, lifecycle transitions and attributes with
// their original text (the round-trip tests in this package check it both ways).
//
// CSV output has one row per event with the columns case, activity, time, resource and
// lifecycle (always, empty where the log has none), then each case attribute and each event
// attribute under its key; times are RFC 3339 in UTC with up to six fraction digits. XES output
// declares the concept, time, lifecycle and organizational extensions and writes each attribute
// with its type; numbers keep their text (int when it is an integer, else float).
package export
