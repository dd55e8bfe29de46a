package engine

import "fmt"

// Hooks for the external tests and benchmarks of this package.

// Rerun evaluates r again from its inputs, quietly, reusing its storage.
func Rerun(r *Result) { r.run(true) }

// Evaluated returns how many nodes EvalFrom computed again.
func Evaluated(r *Result) int { return r.evaluated }

// Patched returns how many files the sheet's Load patched instead of decoding in full.
func Patched(s *Sheet) int { return s.npatched }

// Parsed returns how many formulas the sheet's Load parsed (the rest were reused).
func Parsed(s *Sheet) int { return s.nparsed }

// Kept reports whether the sheet's Load kept the earlier load's model (keepModel), and how
// many quantities it read again.
func Kept(s *Sheet) (bool, int) {
	if s.kept == nil {
		return false, 0
	}
	return true, len(s.kept.changed)
}

// IndexPatched returns how many files the sheet's Load patched the position index of.
func IndexPatched(s *Sheet) int { return s.nindexPatched }

// IndexDiff compares the position index of each of the sheet's files with one built from
// the file's text in full, and describes the first difference ("" when they agree).
func IndexDiff(s *Sheet) string {
	for _, f := range s.files {
		if d := indexDiff(f.ix, indexTOML(f.src)); d != "" {
			return f.name + ": " + d
		}
	}
	return ""
}

func indexDiff(a, b *posIndex) string {
	if len(a.order) != len(b.order) {
		return fmt.Sprintf("%d paths, in full %d", len(a.order), len(b.order))
	}
	for i, p := range a.order {
		if b.order[i] != p {
			return fmt.Sprintf("path %d is %q, in full %q", i, p, b.order[i])
		}
		ka, _ := a.get(p)
		kb, _ := b.get(p)
		sa, oka := a.str(ka)
		sb, okb := b.str(kb)
		ka.str, kb.str = 0, 0
		if ka != kb {
			return fmt.Sprintf("%s: %+v, in full %+v", p, ka, kb)
		}
		if oka != okb || (oka && (sa.Text != sb.Text || sa.base != sb.base || fmt.Sprint(sa.segs) != fmt.Sprint(sb.segs))) {
			return fmt.Sprintf("%s: string %+v, in full %+v", p, sa, sb)
		}
	}
	if len(a.first) != len(b.first) {
		return fmt.Sprintf("%d first positions, in full %d", len(a.first), len(b.first))
	}
	for k, p := range b.first {
		if a.first[k] != p {
			return fmt.Sprintf("first %q at %+v, in full %+v", k, a.first[k], p)
		}
	}
	return ""
}

// BuiltAhead returns how many groups the sheet's Load built ahead on the cores.
func BuiltAhead(s *Sheet) int { return s.nahead }
