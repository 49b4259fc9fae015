// Package stats holds the distributions, tail probabilities, multiple-testing
// adjustments and entropy estimators that borel's checks are built on.
//
// Every probability is computed in natural-log space from the tail that is
// small, never as 1 - (the other tail), so a p-value of 1e-400 is returned as
// its logarithm (about -921.0) rather than as 0. The package does no I/O and
// formats no strings.
package stats
