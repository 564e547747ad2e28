// Package synth plays out an invented business process to make event logs whose truth is known:
// how many cases, events, activities and variants they hold, which cases carry injected noise and
// which were still running at the export date. Tests check the readers and analyses against that
// truth, benchmarks use it for logs of any size, and the demo log comes from it.
//
// The scenario is our own: warranty repairs of electric bicycles at an invented workshop. A
// claim is registered and the bike inspected; the claim is then either rejected (and the bike
// returned) or parts are ordered and received while, in parallel, a quote is sent and the
// customer's approval recorded; the bike is repaired and test-ridden, with adjustments and
// another test ride until it passes; finally it is handed over. As a process tree:
//
//	seq(Register claim, Inspect bike,
//	    xor(seq(Reject claim, Return bike),
//	        seq(and(seq(Order parts, Receive parts), seq(Send quote, Record approval)),
//	            Repair bike, loop(Test ride, Adjust repair), Hand over bike)))
//
// Each activity waits after it becomes enabled and then takes a lognormally distributed service
// time (means in Activities). The waits are exponentially distributed, except for parts: the wait
// for "Receive parts" is a supplier's lead time, lognormal and fairly regular (about ±30%) for one
// bike model, from about a day for the folding bike to about a week for the cargo bike
// (BikeModels), so a case's bike model tells much of how long it will take. With Shifts, work
// starts only inside the shift of the resource that takes it (clerks on weekdays 08-16, technicians
// in an early or late shift Monday to Saturday), which adds realistic waiting; without, timing is
// exactly the stated distributions, which the prediction tests use as an analytic reference.
//
// Generation is seeded and deterministic: the same Config gives the same log, byte for byte.
package synth
