package engine

// Hooks for the external tests and benchmarks of this package.

// Rerun evaluates r again from its inputs, quietly, reusing its storage.
func Rerun(r *Result) { r.run(true) }

// Evaluated returns how many nodes EvalFrom computed again.
func Evaluated(r *Result) int { return r.evaluated }

// Patched returns how many files the sheet's Load patched instead of decoding in full.
func Patched(s *Sheet) int { return s.npatched }

// Parsed returns how many formulas the sheet's Load parsed (the rest were reused).
func Parsed(s *Sheet) int { return s.nparsed }
