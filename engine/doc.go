// Package engine loads rfledger worksheets and evaluates them.
//
// [Load] reads a TOML worksheet and the parts it uses, finds every quantity, chain,
// requirement, sweep, solve and case, and compiles each formula once: expr-lang's parser
// gives the syntax, which is lowered into the engine's own tree with names resolved and
// typed in evaluation order (dimension and decibel form, both branches of ?: included), so
// every unit error is found at load. It always returns a [Sheet] together with every problem
// found, as [Diagnostics] positioned FILE:LINE:COL with the quantity's name and a hint; a
// quantity that failed is unknown and what depends on it is skipped quietly, so one typo
// gives one error. A Sheet never changes after Load and may be shared between goroutines.
//
// [Sheet.Eval] computes every value and requirement into a [Result], with inputs replaced
// by [Override] values; [Sheet.EvalCases] evaluates the worksheet's cases and [Sheet.EvalFrom] a reload
// from an earlier result, each computing only what depends on what changed. A [Scenario]
// taken from a Result changes inputs and recomputes only their [Cone]: the analyses in
// package github.com/rfledger/rfledger/analysis are built on it.
//
// Formulas call functions from the [Library] given in [Options]; rfledger's built-in one is
// [github.com/rfledger/rfledger.Library], and [NewLibrary] makes one of any [Func] values.
// Each Func declares its arguments' dimensions and its result's unit, which the checker
// reads at load.
package engine
