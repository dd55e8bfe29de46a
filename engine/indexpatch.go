package engine

import (
	"slices"
	"strings"
)

// patchIndex returns the position index of src made from old's, for an edit that patchDoc
// took (edits: the changed lines, in order). The keys of each edited line are scanned
// again where they now stand; every other position keeps its line and column, and its byte
// offset moves by the change of length of the edited lines before it. The paths, and their
// order, are the earlier index's. It returns nil when an edited line does not give back the
// keys it had, and the caller indexes src in full. On a sheet of 10,000 quantities this is
// a copy of the positions instead of a scan of the whole text.
func patchIndex(old *sheetFile, src string, edits []lineEdit) (ix *posIndex) {
	defer func() {
		if recover() != nil {
			ix = nil // a scanner bug must never take the loader down: index in full instead
		}
	}()
	ox := old.ix
	shift, moved := byteShift(old.src, edits)

	fresh := map[string]keyPos{} // the edited lines' keys, as scanned again
	freshStr := map[string]strVal{}
	freshFirst := map[string]Pos{}
	edited := map[int]bool{}
	for _, e := range edits {
		if !e.keyed {
			continue
		}
		edited[e.line] = true
		paths := old.keysOnLine(e.line)
		s, ok := rescanLine(ox, src, paths, shift)
		if !ok || len(s.ix.order) != len(paths) {
			return nil
		}
		for _, p := range paths {
			i, ok := s.ix.pos[p]
			if !ok {
				return nil
			}
			kp := *s.ix.kps.at(i)
			if kp.Key.Line != e.line || kp.ValEnd.Line != e.line {
				return nil
			}
			if kp.str > 0 {
				freshStr[p] = *s.ix.strs.at(kp.str - 1)
			}
			fresh[p] = kp
		}
		for k, v := range s.ix.first {
			freshFirst[k] = v
		}
	}

	// A full chunk whose positions all lie before the first byte that moves, and that holds
	// none of the edited keys (or their strings), is shared with the earlier index as it is
	// (chunked.share); the rest is copied.
	touchedKeys, touchedStrs := map[int]bool{}, map[int]bool{}
	for p := range fresh {
		i := ox.pos[p]
		touchedKeys[int(i)/chunkLen] = true
		if str := ox.kps.at(i).str; str > 0 {
			touchedStrs[int(str-1)/chunkLen] = true
		}
	}
	nx := &posIndex{pos: ox.pos, order: ox.order}
	for c, chunk := range ox.strs.chunks {
		if c < len(ox.strs.chunks)-1 && !touchedStrs[c] && stringsBefore(chunk, moved) {
			nx.strs.share(chunk)
			continue
		}
		for i := range chunk {
			sv := chunk[i]
			sv.base = shift(sv.base)
			if sv.segs != nil {
				segs := make([]strSeg, len(sv.segs))
				for j, sg := range sv.segs {
					sg.raw = shift(sg.raw)
					segs[j] = sg
				}
				sv.segs = segs
			}
			if got := nx.strs.add(sv); int(got) != c*chunkLen+i {
				return nil
			}
		}
	}
	movePos := func(p Pos) Pos {
		p.Byte = shift(p.Byte)
		return p
	}
	for c, chunk := range ox.kps.chunks {
		if c < len(ox.kps.chunks)-1 && !touchedKeys[c] && keysBefore(chunk, moved) {
			nx.kps.share(chunk)
			continue
		}
		for i := range chunk {
			kp := chunk[i]
			path := ox.order[c*chunkLen+i]
			if nk, ok := fresh[path]; ok {
				str := kp.str
				kp = nk
				switch sv, isStr := freshStr[path]; {
				case !isStr:
					kp.str = 0
				case str > 0:
					kp.str = str
					*nx.strs.at(str - 1) = sv
				default:
					kp.str = nx.strs.add(sv) + 1
				}
			} else {
				kp.Key, kp.KeyEnd = movePos(kp.Key), movePos(kp.KeyEnd)
				kp.Val, kp.ValEnd, kp.Content = movePos(kp.Val), movePos(kp.ValEnd), movePos(kp.Content)
			}
			nx.kps.add(kp)
		}
	}
	// The first places of tables are the earlier index's when nothing moved and no edited
	// line holds one (edits of values alone, of the same length).
	if moved > len(old.src) && !slices.ContainsFunc(edits, func(e lineEdit) bool { return firstOnLine(ox, e.line) }) {
		nx.first = ox.first
		return nx
	}
	nx.first = make(map[string]Pos, len(ox.first))
	for k, p := range ox.first {
		if edited[p.Line] {
			np, ok := freshFirst[k]
			if !ok {
				return nil
			}
			p = np
		} else {
			p = movePos(p)
		}
		nx.first[k] = p
	}
	return nx
}

// firstOnLine reports whether a table's first place is on the given line.
func firstOnLine(ix *posIndex, line int) bool {
	for _, p := range ix.first {
		if p.Line == line {
			return true
		}
	}
	return false
}

// stringsBefore reports whether every position of the string values lies before byte b.
func stringsBefore(chunk []strVal, b int) bool {
	for _, sv := range chunk {
		if sv.base >= b {
			return false
		}
		for _, sg := range sv.segs {
			if sg.raw >= b {
				return false
			}
		}
	}
	return true
}

// keysBefore reports whether every position of the keys lies before byte b.
func keysBefore(chunk []keyPos, b int) bool {
	for _, kp := range chunk {
		if max(kp.Key.Byte, kp.KeyEnd.Byte, kp.Val.Byte, kp.ValEnd.Byte, kp.Content.Byte) >= b {
			return false
		}
	}
	return true
}

// byteShift returns the map from a byte offset of old to the same place after the edits:
// each edited line moves what follows it by its change of length. Offsets below from do
// not move.
func byteShift(old string, edits []lineEdit) (shift func(int) int, from int) {
	type cut struct{ at, by int } // bytes from at on move by by
	var cuts []cut
	line, off := 1, 0
	for _, e := range edits {
		if e.delta == 0 {
			continue
		}
		for line <= e.line && off <= len(old) {
			n := strings.IndexByte(old[off:], '\n')
			if n < 0 {
				off = len(old) + 1
				break
			}
			off += n + 1
			line++
		}
		cuts = append(cuts, cut{off, e.delta}) // off: the start of the line after the edited one
	}
	from = len(old) + 1
	if len(cuts) > 0 {
		from = cuts[0].at
	}
	return func(b int) int {
		out := b
		for _, c := range cuts {
			if b < c.at {
				break
			}
			out += c.by
		}
		return out
	}, from
}

// rescanLine scans the keys of one edited line of src again, starting where the first of
// them (paths, from the earlier index) now begins.
func rescanLine(ox *posIndex, src string, paths []string, shift func(int) int) (*tomlScanner, bool) {
	if len(paths) == 0 {
		return nil, false
	}
	top, best := "", -1
	for _, p := range paths {
		kp, _ := ox.get(p)
		if best < 0 || kp.Key.Col < best {
			top, best = p, kp.Key.Col
		}
	}
	kp, _ := ox.get(top)
	start := kp.Key
	start.Byte = shift(start.Byte)
	s := &tomlScanner{src: src, i: start.Byte, line: start.Line, col: start.Col,
		ix: &posIndex{pos: map[string]int32{}, first: map[string]Pos{}}, arrays: map[string]int{}}
	if kp.Key == kp.Val { // an element of an array: a value without a key
		return s, s.value(top, start, start)
	}
	keys, ok := s.key()
	if !ok {
		return nil, false
	}
	written := ""
	for _, k := range keys {
		written = keyJoin(written, k) // as keyValue joins them
	}
	prefix := ""
	switch {
	case top == written:
	case strings.HasSuffix(top, "."+written):
		prefix = top[:len(top)-len(written)-1]
	default:
		return nil, false
	}
	s.i, s.line, s.col = start.Byte, start.Line, start.Col
	return s, s.keyValue(prefix)
}
