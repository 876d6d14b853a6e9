package groups

import (
	"context"
	"errors"
	"fmt"
	"math/bits"
	"slices"
)

// Options sets the rules of Mine. The zero value asks for every closed
// group recurring on at least one day, of any size.
type Options struct {
	// MinSupport is the least number of days on which a group must recur;
	// values below 1 are taken as 1.
	MinSupport int
	// MaxEdges bounds the search to connected groups of at most this many
	// edges (0 = no bound). A closed group can still have more edges than
	// MaxEdges when it is the closure of a smaller group, that is, when
	// edges always recur together: such a cluster is reported whole rather
	// than lost or cut into its many sub-groups. The search visits every
	// frequent connected group within the bound, a number that grows
	// exponentially with the size of the recurring clusters, so keep a
	// bound on real data.
	MaxEdges int
	// AllFrequent reports every frequent connected group of at most
	// MaxEdges edges, closed or not, instead of the closed groups only.
	AllFrequent bool
	// MaximalOnly drops every group contained in another group of the
	// result, leaving the most readable list: the largest groups, each with
	// its own days. The days of a dropped group are a superset of those of
	// any group containing it.
	MaximalOnly bool
	// MaxVisits bounds the search by its work (0 = no bound): each
	// connected group visited counts one, and so does each neighbouring
	// edge tested against a group's days (for closedness or a closure), so
	// that the bound holds time as well on a few huge groups as on many
	// small ones. When the bound is reached the search stops and returns
	// the groups found so far, with Result.Truncated set: a low support over
	// many candidates would otherwise run for hours.
	MaxVisits int
}

// Result is the outcome of MineBounded.
type Result struct {
	Groups []Group
	// Visited counts the search's work in the units of Options.MaxVisits.
	Visited int
	// Truncated is set when the search stopped at Options.MaxVisits, so
	// that Groups may lack some groups.
	Truncated bool
}

// errVisitBound stops the search at Options.MaxVisits.
var errVisitBound = errors.New("groups: visit bound reached")

// Group is a connected set of edges and the days on which all of them
// occur.
type Group struct {
	Edges []Edge // sorted by From, then To
	Days  []int  // indices into the days given to Mine, ascending
}

// Mine finds the connected groups of edges that occur together on at least
// opts.MinSupport of the given days (each day a set of edges; duplicates
// within a day are ignored). Edges are connected when they share a region,
// whatever their direction; A>B and B>A are distinct edges.
//
// Only closed groups are reported, unless opts.AllFrequent: a group is
// closed when no connected group containing it occurs on the same days.
// Such a super-group can always be grown from the group one adjacent edge
// at a time without losing a day, so a group is closed exactly when no edge
// sharing a region with it occurs on all of its days.
//
// Groups are returned sorted by their edge lists. Mine returns the
// context's error if it is cancelled.
func Mine(ctx context.Context, days [][]Edge, opts Options) ([]Group, error) {
	res, err := MineBounded(ctx, days, opts)
	if err != nil {
		return nil, err
	}
	return res.Groups, nil
}

// MineBounded is Mine that also says how many groups it visited and
// whether it stopped at opts.MaxVisits. A truncated search keeps the
// groups found before the bound, in the same order: they are groups of
// the full result, though the closures reported beyond MaxEdges may
// lack their largest members' later roots.
func MineBounded(ctx context.Context, days [][]Edge, opts Options) (Result, error) {
	if opts.MaxEdges < 0 {
		return Result{}, fmt.Errorf("groups: MaxEdges is %d, want 0 (no bound) or more", opts.MaxEdges)
	}
	if opts.MaxVisits < 0 {
		return Result{}, fmt.Errorf("groups: MaxVisits is %d, want 0 (no bound) or more", opts.MaxVisits)
	}
	m := newMiner(days, max(opts.MinSupport, 1))
	m.ctx = ctx
	m.maxEdges = opts.MaxEdges
	if m.maxEdges == 0 || m.maxEdges > len(m.items) {
		m.maxEdges = len(m.items)
	}
	m.allFrequent = opts.AllFrequent
	m.maxVisits = opts.MaxVisits
	res := Result{}
	if err := m.run(); err != nil {
		if !errors.Is(err, errVisitBound) {
			return Result{}, err
		}
		res.Truncated = true
	}
	res.Visited = m.visited
	slices.SortFunc(m.groups, func(a, b Group) int { return compareEdgeLists(a.Edges, b.Edges) })
	res.Groups = m.groups
	if opts.MaximalOnly {
		res.Groups = maximalGroups(m.groups)
	}
	return res, nil
}

// compareEdgeLists orders sorted edge lists lexicographically.
func compareEdgeLists(a, b []Edge) int {
	return slices.CompareFunc(a, b, CompareEdges)
}

// miner holds the frequent edges (items), their day sets and adjacency,
// and the search state. Items are numbered in edge order, so a set of item
// numbers sorted ascending lists its edges sorted.
type miner struct {
	ctx         context.Context
	minSupport  int
	maxEdges    int
	allFrequent bool
	maxVisits   int

	items     []Edge
	words     int      // uint64 words per day set
	daySets   []uint64 // item i's days at [i*words, (i+1)*words)
	neighbors [][]int32

	// Search state, indexed by depth where it varies.
	sub     []int32    // current group
	inSub   []bool     // item in sub
	blocked []int32    // number of sub members that are the item or share a region with it
	setAt   [][]uint64 // day set of sub[:d+1]
	extAt   [][]int32  // extension buffers
	visited int
	calls   int // extend calls, for checking the context now and then

	groups   []Group
	reported map[string]bool // closures larger than maxEdges already reported
	queue    []int32
	seen     []bool
}

func newMiner(days [][]Edge, minSupport int) *miner {
	m := &miner{minSupport: minSupport, words: (len(days) + 63) / 64}
	var all []Edge
	for _, day := range days {
		all = append(all, day...)
	}
	slices.SortFunc(all, CompareEdges)
	all = slices.Compact(all)
	sets := make([]uint64, len(all)*m.words)
	for d, day := range days {
		for _, e := range day {
			i, _ := slices.BinarySearchFunc(all, e, CompareEdges)
			sets[i*m.words+d/64] |= 1 << (d % 64)
		}
	}
	// Keep the frequent edges only: no group holding another edge can be
	// frequent.
	for i, e := range all {
		set := sets[i*m.words : (i+1)*m.words]
		if popcount(set) >= minSupport {
			m.items = append(m.items, e)
			m.daySets = append(m.daySets, set...)
		}
	}
	// Adjacency through shared regions.
	byRegion := make(map[int][]int32)
	for i, e := range m.items {
		byRegion[e.From] = append(byRegion[e.From], int32(i))
		if e.To != e.From {
			byRegion[e.To] = append(byRegion[e.To], int32(i))
		}
	}
	m.neighbors = make([][]int32, len(m.items))
	for i, e := range m.items {
		nb := append([]int32(nil), byRegion[e.From]...)
		if e.To != e.From {
			nb = append(nb, byRegion[e.To]...)
		}
		slices.Sort(nb)
		nb = slices.Compact(nb)
		if k, found := slices.BinarySearch(nb, int32(i)); found {
			nb = slices.Delete(nb, k, k+1)
		}
		m.neighbors[i] = nb
	}
	return m
}

func (m *miner) daySet(i int32) []uint64 {
	return m.daySets[int(i)*m.words : (int(i)+1)*m.words]
}

func popcount(set []uint64) int {
	n := 0
	for _, w := range set {
		n += bits.OnesCount64(w)
	}
	return n
}

// subset reports whether every day of a is in b.
func subset(a, b []uint64) bool {
	for i, w := range a {
		if w&^b[i] != 0 {
			return false
		}
	}
	return true
}

// run enumerates every frequent connected group of at most maxEdges items
// exactly once, by the rule of the ESU algorithm: a group is grown from its
// smallest item v, and each step adds an item from the extension set, which
// holds items greater than v that share a region with the group; when item
// w is added, the extension set keeps the items not yet tried and gains
// those neighbours of w greater than v that neither are in nor border the
// group before w. So every connected group has exactly one path of growth,
// through connected groups that are its subsets; since support can only
// fall along that path, cutting a branch as soon as it is infrequent loses
// no frequent group.
func (m *miner) run() error {
	n := len(m.items)
	m.inSub = make([]bool, n)
	m.blocked = make([]int32, n)
	m.seen = make([]bool, n)
	m.setAt = make([][]uint64, m.maxEdges)
	m.extAt = make([][]int32, m.maxEdges)
	for d := range m.setAt {
		m.setAt[d] = make([]uint64, m.words)
	}
	m.reported = make(map[string]bool)
	for v := range int32(n) {
		if err := m.ctx.Err(); err != nil {
			return err
		}
		copy(m.setAt[0], m.daySet(v))
		m.add(v)
		ext := m.extAt[0][:0]
		for _, u := range m.neighbors[v] {
			if u > v {
				ext = append(ext, u)
			}
		}
		m.extAt[0] = ext
		err := m.extend(v, ext)
		m.remove(v)
		if err != nil {
			return err
		}
	}
	return nil
}

func (m *miner) add(w int32) {
	m.sub = append(m.sub, w)
	m.inSub[w] = true
	m.blocked[w]++
	for _, u := range m.neighbors[w] {
		m.blocked[u]++
	}
}

func (m *miner) remove(w int32) {
	m.sub = m.sub[:len(m.sub)-1]
	m.inSub[w] = false
	m.blocked[w]--
	for _, u := range m.neighbors[w] {
		m.blocked[u]--
	}
}

// extend reports the current group and grows it from ext.
func (m *miner) extend(v int32, ext []int32) error {
	if m.maxVisits > 0 && m.visited >= m.maxVisits {
		return errVisitBound
	}
	m.visited++
	if m.calls++; m.calls%4096 == 0 {
		if err := m.ctx.Err(); err != nil {
			return err
		}
	}
	depth := len(m.sub) - 1
	set := m.setAt[depth]
	m.report(set)
	if depth+1 >= m.maxEdges {
		return nil
	}
	next := m.setAt[depth+1]
	for len(ext) > 0 {
		w := ext[len(ext)-1]
		ext = ext[:len(ext)-1]
		ws := m.daySet(w)
		support := 0
		for i := range next {
			next[i] = set[i] & ws[i]
			support += bits.OnesCount64(next[i])
		}
		if support < m.minSupport {
			continue
		}
		grown := append(m.extAt[depth+1][:0], ext...)
		for _, u := range m.neighbors[w] {
			if u > v && m.blocked[u] == 0 {
				grown = append(grown, u)
			}
		}
		m.extAt[depth+1] = grown
		m.add(w)
		err := m.extend(v, grown)
		m.remove(w)
		if err != nil {
			return err
		}
	}
	return nil
}

// report records the current group if the options ask for it.
func (m *miner) report(set []uint64) {
	if m.allFrequent {
		m.record(m.sub, set)
		return
	}
	closed := true
	for _, s := range m.sub {
		m.visited += len(m.neighbors[s])
		for _, u := range m.neighbors[s] {
			if !m.inSub[u] && subset(set, m.daySet(u)) {
				closed = false
				break
			}
		}
		if !closed {
			break
		}
	}
	if closed {
		m.record(m.sub, set)
		return
	}
	// A closure within the bound is enumerated itself. A closure beyond it
	// is the closure of some group of exactly maxEdges edges, so looking
	// only from groups at the bound finds every such closure.
	if len(m.sub) < m.maxEdges {
		return
	}
	closure := m.closure(set)
	if len(closure) <= m.maxEdges {
		return
	}
	key := fmt.Sprint(closure)
	if m.reported[key] {
		return
	}
	m.reported[key] = true
	m.record(closure, set)
}

// closure returns the items, ascending, reachable from the current group
// through items that occur on every day of set.
func (m *miner) closure(set []uint64) []int32 {
	q := append(m.queue[:0], m.sub...)
	for _, s := range m.sub {
		m.seen[s] = true
	}
	for head := 0; head < len(q); head++ {
		m.visited += len(m.neighbors[q[head]])
		for _, u := range m.neighbors[q[head]] {
			if !m.seen[u] && subset(set, m.daySet(u)) {
				m.seen[u] = true
				q = append(q, u)
			}
		}
	}
	for _, u := range q {
		m.seen[u] = false
	}
	m.queue = q
	out := slices.Clone(q)
	slices.Sort(out)
	return out
}

func (m *miner) record(items []int32, set []uint64) {
	sorted := slices.Clone(items)
	slices.Sort(sorted)
	g := Group{Edges: make([]Edge, len(sorted)), Days: make([]int, 0, popcount(set))}
	for i, it := range sorted {
		g.Edges[i] = m.items[it]
	}
	for w, word := range set {
		for word != 0 {
			g.Days = append(g.Days, w*64+bits.TrailingZeros64(word))
			word &= word - 1
		}
	}
	m.groups = append(m.groups, g)
}

// maximalGroups returns the groups, in order, that no other group
// contains.
func maximalGroups(groups []Group) []Group {
	containing := make(map[Edge][]int) // edge -> groups holding it
	for i, g := range groups {
		for _, e := range g.Edges {
			containing[e] = append(containing[e], i)
		}
	}
	var out []Group
	for i, g := range groups {
		maximal := true
		for _, j := range containing[g.Edges[0]] {
			if j != i && len(groups[j].Edges) > len(g.Edges) && containsEdges(groups[j].Edges, g.Edges) {
				maximal = false
				break
			}
		}
		if maximal {
			out = append(out, g)
		}
	}
	return out
}

// containsEdges reports whether sorted list a holds every edge of sorted
// list b.
func containsEdges(a, b []Edge) bool {
	i := 0
	for _, e := range b {
		for i < len(a) && CompareEdges(a[i], e) < 0 {
			i++
		}
		if i == len(a) || a[i] != e {
			return false
		}
		i++
	}
	return true
}
