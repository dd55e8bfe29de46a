// Package numeric holds the small numerical tools the link-budget engine
// needs: a bracketing root finder (Brent's method with an optional sample
// scan to find a bracket), tolerance distributions for Monte Carlo inputs,
// sample quantiles, and a deterministic parallel trial runner whose results
// do not depend on the number of workers.
package numeric
