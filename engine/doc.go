// Package engine loads rfledger worksheets, evaluates them and runs the analyses.
//
// [Load] reads a TOML worksheet and the parts it uses, finds every quantity, chain,
// requirement, sweep and solve, compiles each formula once (expr-lang's parser and compiler
// behind a whitelist of what a formula may contain, with unit literals such as "6 dB" and
// unit-checked operators), builds the dependency graph and orders it. It always returns a
// sheet together with every problem found, as [Diagnostics] positioned FILE:LINE:COL with the
// quantity's name and a hint; a quantity that failed is unknown and what depends on it is
// skipped quietly, so one typo gives one error.
//
// [Sheet.Eval] computes every value and requirement. [Sheet.Analyze] then works on the focus
// quantity: sensitivity (re-evaluating only what depends on each input), where the budget
// goes, worst case, RSS and Monte Carlo tolerance (parallel, identical for any GOMAXPROCS),
// and the sweeps and solves.
//
// Functions come from a [Library] of [Func] values supplied by the caller (rfledger's own is
// in internal/rflib); the engine checks each argument's dimension before calling one.
package engine
