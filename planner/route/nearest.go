package route

// nearestOrder orders items by the nearest-neighbour rule from start (or
// from item 0's A end): O(n log n) on typical inputs, with a kd-tree over
// the item ends from which written items are removed.
func nearestOrder(items []Item, start *Point) ([]int, []bool) {
	n := len(items)
	if n == 0 {
		return nil, nil
	}
	g := newGraph(items, nil, nil, false)
	// A one-way stroke may only be entered at its A end.
	idx := make([]int32, 0, g.real)
	inTree := make([]bool, g.real)
	for v := range int32(g.real) {
		if p := g.partner[v]; p >= 0 && g.tail[p] {
			continue
		}
		idx = append(idx, v)
		inTree[v] = true
	}
	t := newKDTree(g.x, g.y, idx)
	// alive counts per tree node, and each point's leaf, for deletion.
	alive := make([]int32, len(t.nodes))
	parent := make([]int32, len(t.nodes))
	leaf := make([]int32, g.real)
	for id := range t.nodes {
		nd := &t.nodes[id]
		alive[id] = nd.hi - nd.lo
		if nd.left >= 0 {
			parent[nd.left], parent[nd.right] = int32(id), int32(id)
		} else {
			for _, p := range t.idx[nd.lo:nd.hi] {
				leaf[p] = int32(id)
			}
		}
	}
	parent[0] = -1
	dead := make([]bool, g.real)
	remove := func(p int32) {
		if !inTree[p] {
			return
		}
		dead[p] = true
		for id := leaf[p]; id >= 0; id = parent[id] {
			alive[id]--
		}
	}
	var bestD float64
	var bestP int32
	var qx, qy float64
	var search func(id int32)
	search = func(id int32) {
		if alive[id] == 0 {
			return
		}
		nd := &t.nodes[id]
		if nd.left < 0 {
			for _, p := range t.idx[nd.lo:nd.hi] {
				if dead[p] {
					continue
				}
				dx, dy := g.x[p]-qx, g.y[p]-qy
				if d := dx*dx + dy*dy; d < bestD || (d == bestD && p < bestP) {
					bestD, bestP = d, p
				}
			}
			return
		}
		q := qx
		if nd.dim == 1 {
			q = qy
		}
		diff := q - nd.split
		near, far := nd.left, nd.right
		if diff >= 0 {
			near, far = far, near
		}
		search(near)
		if diff*diff <= bestD {
			search(far)
		}
	}
	order := make([]int, 0, n)
	rev := make([]bool, 0, n)
	var cur int32 = 0 // node of item 0's A end
	if start != nil {
		qx, qy = start.X, start.Y
		bestD, bestP = 1e308, -1
		search(0)
		cur = bestP
	}
	for {
		it := g.item[cur]
		order = append(order, int(it))
		rev = append(rev, g.end[cur] == 1)
		remove(cur)
		out := cur
		if p := g.partner[cur]; p >= 0 {
			remove(p)
			out = p
		}
		if len(order) == n {
			break
		}
		qx, qy = g.x[out], g.y[out]
		bestD, bestP = 1e308, -1
		search(0)
		cur = bestP
	}
	return order, rev
}
