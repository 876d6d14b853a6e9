package route

// Components labels the strongly connected components (Kosaraju, with
// explicit stacks): comp[v] is v's component, numbered from 0 by falling
// size (then by smallest node), so component 0 is the largest.
func (n *Network) Components() (comp []int32, sizes []int) {
	k := n.Nodes()
	// Reverse adjacency.
	rfirst := make([]int32, k+1)
	for _, v := range n.head {
		rfirst[v+1]++
	}
	for i := 0; i < k; i++ {
		rfirst[i+1] += rfirst[i]
	}
	rhead := make([]int32, len(n.head))
	fill := append([]int32(nil), rfirst[:k]...)
	for u := 0; u < k; u++ {
		for e := n.first[u]; e < n.first[u+1]; e++ {
			v := n.head[e]
			rhead[fill[v]] = int32(u)
			fill[v]++
		}
	}
	// First pass: finishing order on the forward graph.
	order := make([]int32, 0, k)
	seen := make([]bool, k)
	type frame struct{ u, e int32 }
	var stack []frame
	for s := 0; s < k; s++ {
		if seen[s] {
			continue
		}
		seen[s] = true
		stack = append(stack[:0], frame{int32(s), n.first[s]})
		for len(stack) > 0 {
			f := &stack[len(stack)-1]
			if f.e < n.first[f.u+1] {
				v := n.head[f.e]
				f.e++
				if !seen[v] {
					seen[v] = true
					stack = append(stack, frame{v, n.first[v]})
				}
				continue
			}
			order = append(order, f.u)
			stack = stack[:len(stack)-1]
		}
	}
	// Second pass on the reverse graph in reverse finishing order.
	comp = make([]int32, k)
	for i := range comp {
		comp[i] = -1
	}
	var raw []int
	var queue []int32
	for i := k - 1; i >= 0; i-- {
		s := order[i]
		if comp[s] >= 0 {
			continue
		}
		c := int32(len(raw))
		comp[s] = c
		size := 0
		queue = append(queue[:0], s)
		for len(queue) > 0 {
			u := queue[len(queue)-1]
			queue = queue[:len(queue)-1]
			size++
			for e := rfirst[u]; e < rfirst[u+1]; e++ {
				if v := rhead[e]; comp[v] < 0 {
					comp[v] = c
					queue = append(queue, v)
				}
			}
		}
		raw = append(raw, size)
	}
	// Renumber by falling size, then smallest node.
	smallest := make([]int, len(raw))
	for i := range smallest {
		smallest[i] = k
	}
	for v, c := range comp {
		smallest[c] = min(smallest[c], v)
	}
	ids := make([]int, len(raw))
	for i := range ids {
		ids[i] = i
	}
	sortInts(ids, func(a, b int) bool {
		if raw[a] != raw[b] {
			return raw[a] > raw[b]
		}
		return smallest[a] < smallest[b]
	})
	newID := make([]int32, len(raw))
	sizes = make([]int, len(raw))
	for rank, old := range ids {
		newID[old] = int32(rank)
		sizes[rank] = raw[old]
	}
	for v := range comp {
		comp[v] = newID[comp[v]]
	}
	return comp, sizes
}

func sortInts(a []int, less func(x, y int) bool) {
	// insertion sort for few components, else a simple merge via the
	// standard library would do; components are few in road networks.
	if len(a) > 64 {
		sortIntsStd(a, less)
		return
	}
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && less(a[j], a[j-1]); j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}
