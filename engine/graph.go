package engine

import (
	"slices"
	"sync"
)

// graphCache holds what the analyses need of the graph, computed on first use and kept with
// the sheet: who reads each node, and each input's cone.
type graphCache struct {
	usersOnce sync.Once
	users     [][]int32
	mu        sync.Mutex
	cones     map[int][]int32
	mark      []uint32 // generation stamps for coneOf, under mu
	gen       uint32
}

// usersOf returns, for every node, the nodes that read it.
func (s *Sheet) usersOf() [][]int32 {
	s.graph.usersOnce.Do(func() {
		us := make([][]int32, len(s.nodes))
		for id, n := range s.nodes {
			for _, d := range n.deps {
				us[d] = append(us[d], int32(id))
			}
		}
		s.graph.users = us
	})
	return s.graph.users
}

// cone returns the nodes that depend on node id (not id itself), in evaluation order. It is
// computed once per sheet and node; its cost is the cone's size, not the sheet's.
func (s *Sheet) cone(id int) []int32 {
	s.graph.mu.Lock()
	c, ok := s.graph.cones[id]
	s.graph.mu.Unlock()
	if ok {
		return c
	}
	c = s.coneOf([]int{id})
	s.graph.mu.Lock()
	if s.graph.cones == nil {
		s.graph.cones = map[int][]int32{}
	}
	s.graph.cones[id] = c
	s.graph.mu.Unlock()
	return c
}

// coneOf returns the nodes that depend on any of the given ones (excluding them), in
// evaluation order.
func (s *Sheet) coneOf(from []int) []int32 {
	us := s.usersOf()
	g := s.graph
	g.mu.Lock()
	defer g.mu.Unlock()
	if g.mark == nil || g.gen == ^uint32(0) {
		g.mark, g.gen = make([]uint32, len(s.nodes)), 0
	}
	g.gen++
	mark, gen := g.mark, g.gen
	var out []int32
	stack := make([]int32, 0, len(from))
	for _, id := range from {
		stack = append(stack, int32(id))
	}
	for len(stack) > 0 {
		id := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		for _, u := range us[id] {
			if mark[u] != gen && s.pos[u] >= 0 {
				mark[u] = gen
				out = append(out, u)
				stack = append(stack, u)
			}
		}
	}
	slices.SortFunc(out, func(a, b int32) int { return s.pos[a] - s.pos[b] })
	return out
}

// upstreamInputs returns the input quantities the given nodes depend on, in file order.
func (s *Sheet) upstreamInputs(ids ...int) []int {
	mark := s.upstream(ids...)
	var out []int
	for id, n := range s.nodes {
		if mark[id] && n.q != nil && n.q.Formula == "" && n.ok {
			out = append(out, id)
		}
	}
	return out
}

// upstream marks the given nodes and every node they depend on.
func (s *Sheet) upstream(ids ...int) []bool {
	mark := make([]bool, len(s.nodes))
	stack := append([]int(nil), ids...)
	for len(stack) > 0 {
		id := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if mark[id] {
			continue
		}
		mark[id] = true
		stack = append(stack, s.nodes[id].deps...)
	}
	return mark
}
