package engine

import (
	"strings"
)

// isSum reports whether a formula's top is an addition, subtraction or negation.
func isSum(x *inode) bool { return x.op == opAdd || x.op == opSub || x.op == opNeg }

// printTerm writes a term of a formula back in worksheet syntax, with names shortened
// relative to the owner's group.
func printTerm(s *Sheet, t *inode, owner string) string {
	group := ""
	if i := strings.LastIndex(owner, "."); i >= 0 {
		group = owner[:i+1]
	}
	var p func(*inode) string
	p = func(x *inode) string {
		switch x.op {
		case opConst:
			return x.q.String()
		case opSlot, opChain:
			return strings.TrimPrefix(s.nodes[x.id].name, group)
		case opStr:
			return "'" + x.text + "'"
		case opBool:
			if x.b {
				return "true"
			}
			return "false"
		case opNeg, opNot:
			return opSym[x.op] + p(x.kids[0])
		case opCall:
			var args []string
			for _, a := range x.kids {
				args = append(args, p(a))
			}
			return x.fn.Name + "(" + strings.Join(args, ", ") + ")"
		case opCond:
			return "(" + p(x.kids[0]) + " ? " + p(x.kids[1]) + " : " + p(x.kids[2]) + ")"
		}
		if len(x.kids) == 2 && int(x.op) < len(opSym) && opSym[x.op] != "" {
			return "(" + p(x.kids[0]) + " " + opSym[x.op] + " " + p(x.kids[1]) + ")"
		}
		return "…"
	}
	return p(t)
}
