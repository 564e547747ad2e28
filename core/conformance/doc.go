// Package conformance compares an event log with a process model (a Petri net with initial and
// final markings) and says where practice departs from it, for which cases, at what cost, and
// where on the model time goes.
//
// Token-based replay (Rozinat and van der Aalst, "Conformance checking of processes based on
// monitoring real behavior", Information Systems 33(1), 2008) plays each trace on the net: an
// event fires a transition with its activity as label; a transition that is not enabled is first
// enabled by the shortest sequence of silent transitions that does it (breadth first over
// markings, bounded, over only the silent transitions that can feed it), else the missing tokens
// are created and counted. At the end the silent transitions may run to the final marking, whose
// tokens are then consumed; tokens left are remaining. With p produced, c consumed, m missing and
// r remaining tokens (counting the tokens of the initial marking as produced and of the final
// marking as consumed), fitness is ½(1 − m/c) + ½(1 − r/p), for one trace or summed over the log
// (weighted by how often each trace occurs: the log's fitness is not the mean of the traces').
// Events whose activity no transition carries cannot be replayed; they are passed over and
// counted, and the activities and labels that do not match are listed.
//
// Alignments (Adriansyah, van Dongen and van der Aalst, EDOC 2011) set each distinct trace
// against the closest run of the model: A* over the synchronous product with the standard cost
// function (log and model moves 1 unless set per activity, synchronous and silent moves 0) and
// the marking-equation heuristic, solved by our own warm-started dual simplex (lp.go; see Align).
// Each variant is aligned once, within a bound of states and time; a variant over the bound is
// reported as not aligned and left out of the figures, never guessed. Alignment-based fitness
// is 1 − Σ cost / Σ (cost of all log moves + cost of the shortest model run) over cases.
//
// Precision is escaping-edges precision (Muñoz-Gama and Carmona, BPM 2010) computed on the model's
// side of the alignments (the "aligned" variant of Adriansyah et al. 2013 with one alignment per
// trace). We take it because it needs no fitting log: the states are prefixes of the model's own
// runs, so the set of activities the model allows in each is exact, and a deviating case still
// contributes what it did where it kept to the model. When several optimal alignments tie, the
// figure depends on which one A* returns (ours prefers the one deeper in the trace).
//
// Deviations tallies, per activity, synchronous moves, log moves (done where not allowed) and
// model moves (required but skipped), and groups the cases into patterns. TimeOnModel replays the
// aligned cases with their timestamps for waiting, service and sojourn per step, the time tokens
// wait in each place, and the case durations of fitting and deviating cases.
package conformance
