// Package discovery finds process models in event logs.
//
// The Inductive Miner (Leemans, Fahland and van der Aalst, "Discovering block-structured process
// models from event logs - a constructive approach", Petri Nets 2013) finds the most important
// split of the log's directly-follows graph into parts related by exclusive choice, sequence,
// parallelism or a loop (a "cut"), splits the log accordingly and recurses; when no cut exists it
// falls back on a model that allows more (a "fall-through"), in the end a flower model. Its models
// are process trees (package tree), so they are sound, and it rediscovers any process tree without
// duplicate activities from a log that shows every directly-follows pair.
//
// The infrequent variant IMf (same authors, "Discovering block-structured process models from
// event logs containing infrequent behaviour", BPM workshops 2013) takes a noise threshold f in
// [0, 1]: when the full graph has no cut, edges rarer than f times the most frequent outgoing edge
// of their source are dropped (and likewise start and end activities), and the log is split by
// removing the fewest events that do not fit; empty traces rarer than f of the log are dropped,
// and an activity that repeats in fewer than f of the traces of a part that holds it alone is the
// activity alone, not a loop (so that a few duplicated events do not make every step a loop).
// IMd (Leemans, Fahland and van der Aalst, "Scalable process discovery with guarantees", BPMDS
// 2015) works on the directly-follows graph alone and never splits the log, for logs too large
// to split repeatedly; with f > 0 it is that paper's infrequent variant IMfD (from memory),
// filtering the graph as IMf does.
//
// Deviations, each from the published algorithm's text as we read it: the sequence cut merges
// mutually unreachable parts and then checks that the parts form a chain; the loop cut puts a
// component in the body unless every edge from the body into it comes from end activities and
// every edge out of it goes to start activities, all of them; when a log is split by a loop cut, an
// activity that comes again within a body segment starts a new iteration with an empty redo part. The children of
// × and ∧ are ordered by their text, so results do not depend on activity numbering.
//
// The alpha algorithm (van der Aalst, Weijters and Măruşter, "Workflow mining: discovering process
// models from event logs", IEEE TKDE 2004) is the classic first method, kept as a second, simpler
// one: it cannot find loops of length one or two, silent steps or duplicate activities, and has no
// notion of noise; its result is a Petri net given as places between sets of activities.
package discovery
