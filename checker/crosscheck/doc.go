// Package crosscheck holds no production code. Its tests compare the DC
// operating point (checker/dc) and the small-signal analysis (checker/ac) with
// a second, independently written implementation of the circuit model of
// FORMAT.md §6, on seeded random circuits, so that a slip in either one shows
// up as a disagreement rather than hiding behind a test written from the same
// understanding.
//
// The reference lives in the package's _test.go files only: plain nodal
// analysis with every zero-resistance inductor or winding merged away
// (union-find) for DC, and a complex admittance matrix solved as the stacked
// real system [[G, −B], [B, G]] for AC, where each circuit impedance is found
// by literally removing the part and driving the network with a 1 A test
// current.
package crosscheck
