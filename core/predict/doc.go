// Package predict forecasts running cases from an annotated transition system (van der Aalst,
// Schonenberg and Song, "Time prediction based on process mining", Information Systems 36(2),
// 2011): every prefix of a past case is mapped to a state by an abstraction (the sequence, the
// multiset or the set of its activities, over the last k activity instances or the whole
// prefix, optionally with one case attribute), and each state is annotated with what followed
// the prefixes that reached it: their remaining, elapsed and sojourn times, their next
// activities, and how their cases ended. A running case is predicted by the annotations of its
// state; a state never seen falls back to shorter horizons (k-1, k-2, ..., 1, then the empty
// prefix) and says so.
//
// Remaining time comes with an interval calibrated by split conformal prediction (Vovk,
// Gammerman and Shafer, Algorithmic Learning in a Random World, 2005; the split form as in Lei
// et al., "Distribution-free predictive inference for regression", JASA 2018): the training
// cases are split by case into a proper training part and a calibration part; the absolute
// errors of the median prediction on every calibration prefix, each divided by its state's
// spread (the interquartile range of its remaining times, plus an hour), give the quantile q at
// level ⌈(n+1)(1-α)⌉/n, and the interval is median ± q·spread (clipped at 0), so that uncertain
// states get wide intervals and settled ones narrow intervals (locally weighted, as in Lei et al.
// 2018, section 5.2). For new cases exchangeable with
// the calibration cases it covers the truth with probability at least 1-α (FitExchangeable,
// used by k-fold). The cases a forecast is for, those open at a moment, are not exchangeable with
// them: they are drawn in proportion to their duration. Fit therefore weights each calibration
// case by its duration and takes the weighted quantile; the temporal hold-out measures the
// coverage that results.
//
// Choose picks the abstraction, the horizon and the refining attribute by cross-validation on the
// completed cases, so that the user need not know which of them carries what the time left
// depends on.
//
// Every forecast is an estimate from past cases, not a guarantee; Evaluate measures its error on
// a temporal hold-out so that the page can show it beside the forecasts.
//
// Times: an activity instance's time is its completion (its last event); a case's duration runs
// from its first event to its last.
package predict
