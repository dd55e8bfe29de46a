package engine

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// Building the model of a large worksheet on every core.
//
// The model is built key by key in file order (document, member), and each quantity's node
// id is its place in that order. A group's members touch nothing outside the group: its
// quantities, chains and sub-groups, their nodes, names, formula sites and diagnostics. So the
// groups of a large worksheet are built ahead, each by a loader of its own with ids counted
// from 0, and then taken in file order (adopt), their ids moved past the nodes before them.
// The sheet is then the one a build in file order gives, for any number of cores.

// aheadValues is the least number of values (decodeTOML) for which groups are built ahead:
// below it, a goroutine per group costs more than it saves.
const aheadValues = 4096

// aheadSplit is the least number of sub-groups for which a top-level group's sub-groups are
// built ahead one by one rather than the group as a whole (a worksheet with two regions then
// still keeps every core busy).
const aheadSplit = 4

// ahead holds the groups built ahead, by index path.
type ahead struct {
	built map[string]*aheadBuild // groups built by a loader of their own
	open  map[string][]string    // top-level groups whose sub-groups were built ahead: their keys in order
}

// aheadBuild is one group built ahead: the loader that built it, and its copy of the file
// (whose orders it filled).
type aheadBuild struct {
	l *loader
	f *sheetFile
}

// buildAhead builds ahead the groups among the top-level keys of a worksheet (keys, in file
// order), and returns them, or nil when the worksheet is built key by key. It does so only
// for the main worksheet of a load that uses no parts (a part's quantities count towards the
// limit, and their ids come between the groups'), and only when the values quickDecode
// counted show that no quantity can pass MaxQuantities (so that no group's build depends on
// how many quantities came before it).
func (l *loader) buildAhead(f *sheetFile, doc map[string]any, keys []string) *ahead {
	procs := runtime.GOMAXPROCS(0)
	if procs < 2 || f.prefix != "" || !f.counted || f.values < aheadValues || l.nq+f.values > MaxQuantities {
		return nil
	}
	if _, uses := doc["use"]; uses {
		return nil
	}
	type job struct {
		g         *Group
		path, key string
		v         map[string]any
	}
	var jobs []job
	a := &ahead{built: map[string]*aheadBuild{}, open: map[string][]string{}}
	top := &Group{Name: f.prefix}
	for _, key := range keys {
		path := escapeKey(key)
		m, ok := l.groupAt(f, top, path, key, doc[key])
		if !ok || contains(topKeys, key) {
			continue
		}
		subKeys := l.ordered(f, path, m)
		var subs []string
		sub := &Group{Name: join(top.Name, key)}
		for _, k := range subKeys {
			if _, ok := l.groupAt(f, sub, keyJoin(path, k), k, m[k]); ok {
				subs = append(subs, k)
			}
		}
		if len(subs) < aheadSplit {
			jobs = append(jobs, job{top, path, key, m})
			continue
		}
		a.open[path] = subKeys
		for _, k := range subs {
			jobs = append(jobs, job{sub, keyJoin(path, k), k, m[k].(map[string]any)})
		}
	}
	if len(jobs) < 2 {
		return nil
	}
	built := make([]*aheadBuild, len(jobs))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(procs, len(jobs)) {
		wg.Go(func() {
			for i := int(next.Add(1) - 1); i < len(jobs); i = int(next.Add(1) - 1) {
				j := jobs[i]
				wf := *f
				wf.orders = map[string][]string{}
				wl := &loader{sh: &Sheet{byName: map[string]int{}}, prev: l.prev, fsys: l.fsys, lim: l.lim}
				wl.member(&wf, j.g, j.path, j.key, j.v)
				built[i] = &aheadBuild{wl, &wf}
			}
		})
	}
	wg.Wait()
	l.sh.nahead += len(jobs)
	for i, j := range jobs {
		a.built[j.path] = built[i]
	}
	return a
}

// groupAt reports whether the key at path of group g is a group that member would build as
// one (a table with a valid name that is not a quantity's long form), and returns its table.
func (l *loader) groupAt(f *sheetFile, g *Group, path, key string, v any) (map[string]any, bool) {
	m, ok := v.(map[string]any)
	if !ok || !isName(key) || l.longForm(f, path, m) {
		return nil, false
	}
	if _, ok := predeclared[key]; ok && g.Name == "" {
		return nil, false
	}
	return m, true
}

// memberAhead is member for a key whose group may have been built ahead.
func (l *loader) memberAhead(f *sheetFile, g *Group, path, key string, v any, a *ahead) {
	if a != nil {
		if b, ok := a.built[path]; ok {
			l.adopt(f, b)
			return
		}
		if keys, ok := a.open[path]; ok {
			m := v.(map[string]any)
			sub := &Group{Name: join(g.Name, key), Range: f.rangeOf(path)}
			l.sh.Groups = append(l.sh.Groups, sub)
			for _, k := range keys {
				l.memberAhead(f, sub, keyJoin(path, k), k, m[k], a)
			}
			return
		}
	}
	l.member(f, g, path, key, v)
}

// adopt takes what a loader built ahead into l, as if l had built it: its nodes' ids move past
// l's nodes, and its quantities belong to l's sheet.
func (l *loader) adopt(f *sheetFile, b *aheadBuild) {
	wl := b.l
	base := len(l.sh.nodes)
	for _, n := range wl.sh.nodes {
		if n.q != nil {
			n.q.node += base
			n.q.sh = l.sh
		}
		if ch := n.chain; ch != nil {
			ch.node += base
			for i := range n.deps {
				n.deps[i] += base
			}
			for _, st := range ch.Stages {
				for i := range st.slots {
					st.slots[i].node += base
				}
			}
		}
		l.sh.byName[n.name] = len(l.sh.nodes)
		l.sh.nodes = append(l.sh.nodes, n)
	}
	for _, st := range wl.formulaSites {
		st.node += base
		st.f = f
		l.formulaSites = append(l.formulaSites, st)
	}
	l.sh.Groups = append(l.sh.Groups, wl.sh.Groups...)
	l.diags = append(l.diags, wl.diags...)
	l.shows = append(l.shows, wl.shows...)
	l.nq += wl.nq
	if f.orders == nil {
		f.orders = map[string][]string{}
	}
	for path, keys := range b.f.orders {
		f.orders[path] = keys
	}
}
