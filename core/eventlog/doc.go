// Package eventlog holds an event log in memory as columns of small integers, the form every
// analysis in Tracewright reads.
//
// An event log (IEEE 1849-2016, "XES") is a set of cases, each a time-ordered sequence of events;
// an event names an activity, carries a timestamp and optionally a resource, a lifecycle
// transition and further attributes. Here a Log stores one slice per field ("columns") rather
// than one struct per event, and every string (case id, activity, resource, lifecycle, string
// attribute) is interned once in a Dict and referred to by an int32 id. That keeps a 10-million
// event log near 30 bytes per event and lets analyses compare ids instead of strings.
//
// A Log is built in two steps: a Builder takes events in any order (as a reader meets them in a
// file), and Builder.Build groups them by case, orders each case by time (stable: events with the
// same timestamp keep their file order), pairs lifecycle start and complete events into activity
// instances, groups cases into variants and types the attribute columns. After Build the Log is
// immutable: its slices may be shared freely between goroutines and must not be written.
//
// Cost of Build: O(n) for the grouping (a counting sort over case ids), O(n log k) for the
// ordering of cases whose events are out of time order (k events per case), O(n) for instances
// and variants; peak extra memory is two int32 columns (the permutation and each event's case,
// kept for lifting attributes to cases) plus the columns being laid out in the new order.
package eventlog
