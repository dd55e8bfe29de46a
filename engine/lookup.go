package engine

// Name look-up for tools that work on a worksheet as it is edited (the language server):
// what a name written at some place refers to, and what a formula names.

// Resolve returns the full name of the quantity or chain that a bare or dotted name refers
// to when it is written in a formula of group (a full group name of the worksheet's own
// file, "" for its top level, where requirements stand), as formulas look names up: a
// dotted name is absolute, a bare one is looked up in the group and then in each
// enclosing group out to the top. ok is false when the name refers to nothing.
func (s *Sheet) Resolve(name, group string) (full string, ok bool) {
	if name == "" || s == nil {
		return "", false
	}
	id, ok := s.resolve(name, scope{group: group})
	if !ok {
		return "", false
	}
	return s.nodes[id].name, true
}

// ResolveFrom is Resolve for a name written in the formula of quantity from, in from's group
// (and, for a quantity of a part, within that part, as the part's formulas look names up).
// A nil from stands for the worksheet's top level.
func (s *Sheet) ResolveFrom(name string, from *Quantity) (full string, ok bool) {
	if from == nil || from.sh != s || s == nil {
		return s.Resolve(name, "")
	}
	sc := scope{group: from.Group}
	if n := s.nodes[from.node]; n.at.f != nil {
		sc = n.at.sc
	}
	id, ok := s.resolve(name, sc)
	if !ok {
		return "", false
	}
	return s.nodes[id].name, true
}

// Dependencies returns the full names of what q's formula names directly (quantities and
// chains), in the order the formula's dependencies were recorded; nil for an input or a
// formula that did not compile.
func (s *Sheet) Dependencies(q *Quantity) []string {
	if q == nil || q.sh != s {
		return nil
	}
	var out []string
	for _, d := range s.nodes[q.node].deps {
		out = append(out, s.nodes[d].name)
	}
	return out
}
