package offset

import (
	"fmt"
	"math"
	"slices"
)

// This file turns a system of closed directed chains on the grid (the raw
// offset curves) into the boundary of the set of points whose winding
// number is at least 1 (Chen & McMains, DETC2005-85513):
//
//  1. a uniform bucket grid finds every proper crossing between raw
//     segments in about O(n) for well-spread input;
//  2. snap rounding: every segment endpoint and every crossing, rounded to
//     the grid, is a hot pixel (the closed unit square around a grid point);
//     each segment is rerouted through the centres of all hot pixels it
//     meets, in order along it. The rerouted segments meet only at shared
//     vertices, so the result is a planar graph on exact integer points;
//  3. coincident pieces are merged with their net multiplicity; pieces of
//     net multiplicity 0 are dropped (they change no winding number);
//  4. faces are traced, each connected component's outer face gets the
//     winding number of the other components around it (an exact ray
//     count), and winding numbers are propagated across edges;
//  5. edges with winding ≥ 1 on exactly one side are kept, oriented with
//     that side on the left, and linked into rings, which are then split at
//     repeated vertices so that every ring is simple.

// grid is a uniform bucket grid over a rectangle of the integer plane.
type grid struct {
	ox, oy float64 // origin (grid units)
	cs     float64 // cell size (grid units)
	nx, ny int
	m      float64 // margin of cells (grid units); 0 means 2
}

func (g *grid) col(x float64) int {
	c := int(math.Floor(x / g.cs))
	return min(max(c, 0), g.nx-1)
}

func (g *grid) row(y float64) int {
	r := int(math.Floor(y / g.cs))
	return min(max(r, 0), g.ny-1)
}

func (g *grid) cellOf(p ipt) int {
	return g.row(float64(p.y)-g.oy)*g.nx + g.col(float64(p.x)-g.ox)
}

// cells appends to buf every cell that comes within the margin (2 grid
// units by default) of segment ab.
func (g *grid) cells(a, b ipt, buf []int32) []int32 {
	m := 2.0
	if g.m > 0 {
		m = g.m
	}
	ax, ay := float64(a.x)-g.ox, float64(a.y)-g.oy
	bx, by := float64(b.x)-g.ox, float64(b.y)-g.oy
	if math.Abs(bx-ax) >= math.Abs(by-ay) {
		if ax > bx {
			ax, ay, bx, by = bx, by, ax, ay
		}
		k := (by - ay) / (bx - ax)
		c0, c1 := g.col(ax-m), g.col(bx+m)
		for c := c0; c <= c1; c++ {
			xa := min(max(float64(c)*g.cs, ax), bx)
			xb := min(max(float64(c+1)*g.cs, ax), bx)
			ya, yb := ay+(xa-ax)*k, ay+(xb-ax)*k
			r0, r1 := g.row(min(ya, yb)-m), g.row(max(ya, yb)+m)
			for r := r0; r <= r1; r++ {
				buf = append(buf, int32(r*g.nx+c))
			}
		}
		return buf
	}
	if ay > by {
		ax, ay, bx, by = bx, by, ax, ay
	}
	k := (bx - ax) / (by - ay)
	r0, r1 := g.row(ay-m), g.row(by+m)
	for r := r0; r <= r1; r++ {
		ya := min(max(float64(r)*g.cs, ay), by)
		yb := min(max(float64(r+1)*g.cs, ay), by)
		xa, xb := ax+(ya-ay)*k, ax+(yb-ay)*k
		c0, c1 := g.col(min(xa, xb)-m), g.col(max(xa, xb)+m)
		for c := c0; c <= c1; c++ {
			buf = append(buf, int32(r*g.nx+c))
		}
	}
	return buf
}

// arrangement holds the working data of one winding-number extraction.
type arrangement struct {
	budget int
	sc     *ints // scratch slices

	pts          []ipt   // raw vertices
	pa, pb       []int32 // pruned raw segments pa[i] → pb[i]
	sa, sb       []int32 // raw segments sa[i] → sb[i]
	g            grid
	cellStart    []int32 // CSR: raw segments per cell
	cellSegs     []int32
	segParent    []int32 // segment whose cell lists a piece uses, after splitting
	segCells     []int32 // CSR: cells per raw segment
	segCellStart []int32
	hot          []ipt   // hot pixel centres, sorted, unique
	rawHot       []int32 // hot pixel of each raw vertex
	hotStart     []int32 // CSR: hot pixels per cell
	hotIDs       []int32
	routeStart   []int32 // per raw segment, its route through hot pixels
	route        []int32

	// planar graph
	eu, ev   []int32 // edge endpoints (hot pixel ids), eu < ev
	ec       []int32 // net multiplicity in direction eu → ev
	adjStart []int32 // CSR: outgoing half-edges per vertex, CCW order
	adj      []int32
	pos      []int32 // index of each half-edge in adj
	nxt      []int32 // next half-edge along its face
	face     []int32 // face on the left of each half-edge
}

func (a *arrangement) org(h int32) int32 {
	if h&1 == 0 {
		return a.eu[h>>1]
	}
	return a.ev[h>>1]
}

func (a *arrangement) dst(h int32) int32 { return a.org(h ^ 1) }

// windingBoundary returns the boundary of {winding ≥ 1} of the closed chains
// as simple rings, each with the set on its left (outer rings
// counter-clockwise, holes clockwise). Chain k is
// pts[chainStart[k]:chainStart[k+1]]; windingBoundary takes pts over and
// may change it.
//
// pruned, when not nil, marks segments (pruned[i] for pts[i] → the next
// vertex of its chain) that provably lie inside {winding ≥ 1} or inside
// {winding ≤ 0} with a margin (see prune.go): they are not noded and only
// count in winding numbers.
//
// arcs, when not nil, tells which segments are arc chords (arcs[i] is the
// index into centres of the arc's centre, or −1), for the exact corner
// pass (corners.go) with arc radius R and chord tolerance tol, both in grid
// units.
//
// sc, when not nil, lends and takes back scratch slices.
func windingBoundary(pts []ipt, chainStart []int32, pruned []bool, arcs []int32, centres []ipt, R, tol float64, budget int, sc *ints) ([][]ipt, error) {
	a := &arrangement{budget: budget, sc: sc}
	total := len(pts)
	nchain := len(chainStart) - 1
	np := 0
	for _, b := range pruned {
		if b {
			np++
		}
	}
	a.pts = pts
	a.sa = sc.get(total - np)[:0]
	a.sb = sc.get(total - np)[:0]
	if np > 0 {
		a.pa = make([]int32, 0, np)
		a.pb = make([]int32, 0, np)
	}
	var cp *cornerPass
	if arcs != nil {
		cp = &cornerPass{centres: centres, R: R, chainBase: chainStart}
		cp.sarc = make([]int32, 0, total-np)
		cp.chain = make([]int32, 0, total-np)
		cp.idOf = make([]int32, total)
		for i := range cp.idOf {
			cp.idOf[i] = -1
		}
	}
	for k := 0; k < nchain; k++ {
		b0, b1 := chainStart[k], chainStart[k+1]
		if b1-b0 < 2 {
			continue
		}
		for i := b0; i < b1; i++ {
			j := i + 1
			if j == b1 {
				j = b0
			}
			if pts[i] == pts[j] {
				continue
			}
			if pruned != nil && pruned[i] {
				a.pa = append(a.pa, i)
				a.pb = append(a.pb, j)
				continue
			}
			if cp != nil {
				cp.idOf[i] = int32(len(a.sa))
				cp.sarc = append(cp.sarc, arcs[i])
				cp.chain = append(cp.chain, int32(k))
			}
			a.sa = append(a.sa, i)
			a.sb = append(a.sb, j)
		}
	}
	if len(a.sa) == 0 {
		return nil, nil
	}
	if cp != nil {
		a.g.m = 4 + tol
	}
	a.buildGrid()
	if cp != nil {
		a.exactCorners(cp)
	}
	if err := a.snapRound(); err != nil {
		return nil, err
	}
	a.buildGraph()
	if len(a.eu) == 0 {
		return nil, nil
	}
	a.traceFaces()
	var keep []bool
	if len(a.pa) == 0 {
		keep = a.windings()
	} else {
		var err error
		if keep, err = a.faceWindings(); err != nil {
			return nil, err
		}
	}
	return a.link(keep), nil
}

func (a *arrangement) buildGrid() {
	a.g, a.cellStart, a.cellSegs, a.segCells, a.segCellStart = bucketSegments(a.pts, a.sa, a.sb, a.g.m, a.sc)
}

// snapRound finds the hot pixels and routes every raw segment through them.
func (a *arrangement) snapRound() error {
	ns := len(a.sa)
	// Hot pixels of the raw vertices that kept segments use.
	used := make([]bool, len(a.pts))
	nu := 0
	for i := range a.sa {
		for _, v := range [2]int32{a.sa[i], a.sb[i]} {
			if !used[v] {
				used[v] = true
				nu++
			}
		}
	}
	// Hot pixels of the crossings.
	var items []ipt
	ncell := a.g.nx * a.g.ny
	for c := 0; c < ncell; c++ {
		list := a.cellSegs[a.cellStart[c]:a.cellStart[c+1]]
		for i, s := range list {
			p1, p2 := a.pts[a.sa[s]], a.pts[a.sb[s]]
			x0, y0, x1, y1 := min(p1.x, p2.x), min(p1.y, p2.y), max(p1.x, p2.x), max(p1.y, p2.y)
			for _, t := range list[i+1:] {
				q1, q2 := a.pts[a.sa[t]], a.pts[a.sb[t]]
				if min(q1.x, q2.x) > x1 || max(q1.x, q2.x) < x0 || min(q1.y, q2.y) > y1 || max(q1.y, q2.y) < y0 {
					continue
				}
				if !properCross(p1, p2, q1, q2) {
					continue
				}
				var x, y float64
				if s < t {
					x, y = crossPoint(p1, p2, q1, q2)
				} else {
					x, y = crossPoint(q1, q2, p1, p2)
				}
				if a.g.row(y-a.g.oy)*a.g.nx+a.g.col(x-a.g.ox) != c {
					continue // reported in the cell that holds the crossing
				}
				hp := ipt{int64(math.Round(x)), int64(math.Round(y))}
				if segHitsPixel(p1, p2, hp) && segHitsPixel(q1, q2, hp) {
					items = append(items, hp)
				} else {
					// Rounding of the crossing was not exact enough to be
					// sure; the true crossing lies in one of these pixels.
					fx, fy := int64(math.Floor(x)), int64(math.Floor(y))
					items = append(items, ipt{fx, fy}, ipt{fx + 1, fy}, ipt{fx, fy + 1}, ipt{fx + 1, fy + 1})
				}
				if nu+len(items) > a.budget {
					return fmt.Errorf("%w: more than %d vertices and crossings", ErrTooComplex, a.budget)
				}
			}
		}
	}
	// Distinct hot pixels, numbered in order of first appearance (raw
	// vertices, then crossings), through an open-addressing hash table.
	nitems := nu + len(items)
	a.rawHot = a.sc.get(len(a.pts))
	a.hot = make([]ipt, 0, nitems)
	size := 1
	for size < 2*nitems {
		size <<= 1
	}
	table := a.sc.get(size)
	for i := range table {
		table[i] = -1
	}
	lookup := func(p ipt) int32 {
		hsh := (uint64(p.x)*0x9E3779B97F4A7C15 ^ uint64(p.y)*0xC2B2AE3D27D4EB4F) >> 17
		j := int(hsh) & (size - 1)
		for table[j] >= 0 && a.hot[table[j]] != p {
			j = (j + 1) & (size - 1)
		}
		if table[j] < 0 {
			table[j] = int32(len(a.hot))
			a.hot = append(a.hot, p)
		}
		return table[j]
	}
	for i, p := range a.pts {
		if used[i] {
			a.rawHot[i] = lookup(p)
		}
	}
	for _, p := range items {
		lookup(p)
	}
	// Hot pixels per cell (CSR; table is reused for the cell of each).
	count := a.sc.zeroed(2 * (ncell + 1))
	hcell := table[:len(a.hot)]
	for i, p := range a.hot {
		c := int32(a.g.cellOf(p))
		hcell[i] = c
		count[c+1]++
	}
	for c := 0; c < ncell; c++ {
		count[c+1] += count[c]
	}
	a.hotStart = count[:ncell+1]
	fill := count[ncell+1:]
	copy(fill, a.hotStart)
	a.hotIDs = a.sc.get(len(a.hot))
	for i, c := range hcell {
		a.hotIDs[fill[c]] = int32(i)
		fill[c]++
	}
	// Route every segment through the hot pixels it meets.
	type cand struct {
		t  i128
		id int32
	}
	var cands []cand
	a.routeStart = make([]int32, ns+1)
	a.route = make([]int32, 0, 2*ns+ns/2)
	for s := 0; s < ns; s++ {
		a.routeStart[s] = int32(len(a.route))
		p, q := a.pts[a.sa[s]], a.pts[a.sb[s]]
		ip, iq := a.rawHot[a.sa[s]], a.rawHot[a.sb[s]]
		dx, dy := q.x-p.x, q.y-p.y
		x0, y0 := min(p.x, q.x)-1, min(p.y, q.y)-1
		x1, y1 := max(p.x, q.x)+1, max(p.y, q.y)+1
		cands = cands[:0]
		ps := s
		if a.segParent != nil {
			ps = int(a.segParent[s])
		}
		for _, c := range a.segCells[a.segCellStart[ps]:a.segCellStart[ps+1]] {
			for _, id := range a.hotIDs[a.hotStart[c]:a.hotStart[c+1]] {
				h := a.hot[id]
				if h.x < x0 || h.x > x1 || h.y < y0 || h.y > y1 || id == ip || id == iq {
					continue
				}
				if segHitsPixel(p, q, h) {
					cands = append(cands, cand{dot(h.x-p.x, h.y-p.y, dx, dy), id})
				}
			}
		}
		a.route = append(a.route, ip)
		if len(cands) > 1 {
			slices.SortFunc(cands, func(u, v cand) int {
				if c := u.t.cmp(v.t); c != 0 {
					return c
				}
				return cmpIpt(a.hot[u.id], a.hot[v.id])
			})
		}
		for _, c := range cands {
			if a.route[len(a.route)-1] != c.id {
				a.route = append(a.route, c.id)
			}
		}
		if a.route[len(a.route)-1] != iq {
			a.route = append(a.route, iq)
		}
		if len(a.route) > 2*a.budget {
			return fmt.Errorf("%w: more than %d edges after noding", ErrTooComplex, a.budget)
		}
	}
	a.routeStart[ns] = int32(len(a.route))
	a.sc.put(table, count, a.hotIDs, a.rawHot)
	a.hotStart, a.hotIDs, a.rawHot = nil, nil, nil
	return nil
}

// buildGraph merges the rerouted pieces into undirected edges with net
// multiplicity and sorts the half-edges around every vertex.
func (a *arrangement) buildGraph() {
	ns := len(a.sa)
	keys := make([]uint64, 0, len(a.route))
	for s := 0; s < ns; s++ {
		r := a.route[a.routeStart[s]:a.routeStart[s+1]]
		for i := 0; i+1 < len(r); i++ {
			u, v := r[i], r[i+1]
			if u == v {
				continue
			}
			if u < v {
				keys = append(keys, (uint64(u)<<31|uint64(v))<<1)
			} else {
				keys = append(keys, (uint64(v)<<31|uint64(u))<<1|1)
			}
		}
	}
	slices.Sort(keys)
	a.eu = make([]int32, 0, len(keys))
	a.ev = make([]int32, 0, len(keys))
	a.ec = make([]int32, 0, len(keys))
	for i := 0; i < len(keys); {
		k := keys[i] >> 1
		c := int32(0)
		for ; i < len(keys) && keys[i]>>1 == k; i++ {
			if keys[i]&1 == 0 {
				c++
			} else {
				c--
			}
		}
		if c != 0 {
			a.eu = append(a.eu, int32(k>>31))
			a.ev = append(a.ev, int32(k&(1<<31-1)))
			a.ec = append(a.ec, c)
		}
	}
	nv := len(a.hot)
	ne := len(a.eu)
	a.adjStart = a.sc.zeroed(nv + 1)
	for e := 0; e < ne; e++ {
		a.adjStart[a.eu[e]+1]++
		a.adjStart[a.ev[e]+1]++
	}
	for v := 0; v < nv; v++ {
		a.adjStart[v+1] += a.adjStart[v]
	}
	fill := a.sc.get(nv)
	copy(fill, a.adjStart[:nv])
	a.adj = a.sc.get(2 * ne)
	for e := 0; e < ne; e++ {
		a.adj[fill[a.eu[e]]] = int32(2 * e)
		fill[a.eu[e]]++
		a.adj[fill[a.ev[e]]] = int32(2*e + 1)
		fill[a.ev[e]]++
	}
	for v := 0; v < nv; v++ {
		list := a.adj[a.adjStart[v]:a.adjStart[v+1]]
		if len(list) <= 2 {
			continue
		}
		o := a.hot[v]
		slices.SortFunc(list, func(h1, h2 int32) int {
			p, q := a.hot[a.dst(h1)], a.hot[a.dst(h2)]
			return angleCmp(p.x-o.x, p.y-o.y, q.x-o.x, q.y-o.y)
		})
	}
	a.sc.put(fill)
	a.pos = a.sc.get(2 * ne)
	for i, h := range a.adj {
		a.pos[h] = int32(i)
	}
}

// angleCmp orders directions counter-clockwise starting from +x.
func angleCmp(ax, ay, bx, by int64) int {
	ha, hb := half(ax, ay), half(bx, by)
	if ha != hb {
		return ha - hb
	}
	return -crossSign(ax, ay, bx, by)
}

func half(x, y int64) int {
	if y > 0 || (y == 0 && x > 0) {
		return 0
	}
	return 1
}

// traceFaces links every half-edge to the next one around the face on its
// left and numbers the faces.
func (a *arrangement) traceFaces() {
	nh := len(a.adj)
	a.nxt = a.sc.get(nh)
	for h := 0; h < nh; h++ {
		v := a.dst(int32(h))
		i := a.pos[h^1] - 1
		if i < a.adjStart[v] {
			i = a.adjStart[v+1] - 1
		}
		a.nxt[h] = a.adj[i]
	}
	a.face = a.sc.get(nh)
	for h := range a.face {
		a.face[h] = -1
	}
}

// windings computes the winding number of every face and returns, per
// half-edge, whether it bounds {winding ≥ 1} with that set on its left.
func (a *arrangement) windings() []bool {
	nh := len(a.adj)
	nv := len(a.hot)
	// Faces and their signed areas.
	var faceArea []i128
	var faceHE []int32
	o := a.hot[0]
	for h0 := 0; h0 < nh; h0++ {
		if a.face[h0] >= 0 {
			continue
		}
		f := int32(len(faceHE))
		var ar i128
		h := int32(h0)
		for a.face[h] < 0 {
			a.face[h] = f
			p, q := a.hot[a.org(h)], a.hot[a.dst(h)]
			ar = ar.add(cross(p.x-o.x, p.y-o.y, q.x-o.x, q.y-o.y))
			h = a.nxt[h]
		}
		faceArea = append(faceArea, ar)
		faceHE = append(faceHE, int32(h0))
	}
	nf := len(faceHE)
	// Connected components (union-find over vertices).
	parent := make([]int32, nv)
	for i := range parent {
		parent[i] = int32(i)
	}
	find := func(x int32) int32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	for e := range a.eu {
		ru, rv := find(a.eu[e]), find(a.ev[e])
		if ru != rv {
			if ru < rv {
				parent[rv] = ru
			} else {
				parent[ru] = rv
			}
		}
	}
	// Per component: lowest vertex and outer face.
	compMin := make(map[int32]int32)
	var roots []int32
	for e := range a.eu {
		for _, v := range [2]int32{a.eu[e], a.ev[e]} {
			r := find(v)
			m, ok := compMin[r]
			if !ok {
				roots = append(roots, r)
				compMin[r] = v
				continue
			}
			p, q := a.hot[v], a.hot[m]
			if p.y < q.y || (p.y == q.y && p.x < q.x) {
				compMin[r] = v
			}
		}
	}
	outer := make(map[int32]int32, len(roots))
	for f := 0; f < nf; f++ {
		if faceArea[f].sign() < 0 {
			outer[find(a.org(faceHE[f]))] = int32(f)
		}
	}
	wf := make([]int32, nf)
	set := make([]bool, nf)
	stamp := make([]int32, len(a.sa))
	var queue []int32
	for k, r := range roots {
		var w0 int32
		if len(roots) > 1 {
			w0 = a.rayWinding(a.hot[compMin[r]], stamp, int32(k+1))
		}
		f0, ok := outer[r]
		if !ok {
			continue // cannot happen for a bridgeless graph
		}
		wf[f0], set[f0] = w0, true
		queue = append(queue[:0], f0)
		for len(queue) > 0 {
			f := queue[len(queue)-1]
			queue = queue[:len(queue)-1]
			h := faceHE[f]
			for {
				g := a.face[h^1]
				if !set[g] {
					c := a.ec[h>>1]
					if h&1 == 1 {
						c = -c
					}
					wf[g], set[g] = wf[f]-c, true
					queue = append(queue, g)
				}
				h = a.nxt[h]
				if h == faceHE[f] {
					break
				}
			}
		}
	}
	keep := make([]bool, nh)
	for h := 0; h < nh; h++ {
		in := wf[a.face[h]] >= 1
		out := wf[a.face[h^1]] >= 1
		keep[h] = in && !out
	}
	return keep
}

// rayWinding returns the winding number, about a point just below v, of
// every rerouted piece: the signed count of pieces crossing the downward
// vertical ray (taken at x = v.x + ε).
func (a *arrangement) rayWinding(v ipt, stamp []int32, mark int32) int32 {
	col := a.g.col(float64(v.x) - a.g.ox)
	row := a.g.row(float64(v.y) - a.g.oy)
	var w int32
	for r := 0; r <= row; r++ {
		c := r*a.g.nx + col
		for _, s := range a.cellSegs[a.cellStart[c]:a.cellStart[c+1]] {
			if stamp[s] == mark {
				continue
			}
			stamp[s] = mark
			rt := a.route[a.routeStart[s]:a.routeStart[s+1]]
			for i := 0; i+1 < len(rt); i++ {
				p, q := a.hot[rt[i]], a.hot[rt[i+1]]
				sg := int32(1)
				if p.x > q.x {
					p, q, sg = q, p, -1
				}
				if p.x <= v.x && v.x < q.x && orient(p, q, v) > 0 {
					w += sg
				}
			}
		}
	}
	return w
}

// link joins the kept half-edges into rings and splits them at repeated
// vertices into simple rings.
func (a *arrangement) link(keep []bool) [][]ipt {
	nh := len(a.adj)
	used := make([]bool, nh)
	seen := make([]int32, len(a.hot))
	for i := range seen {
		seen[i] = -1
	}
	var out [][]ipt
	var stack []int32
	emit := func(vs []int32) {
		if len(vs) < 3 {
			for _, v := range vs {
				seen[v] = -1
			}
			return
		}
		r := make([]ipt, len(vs))
		for i, v := range vs {
			r[i] = a.hot[v]
			seen[v] = -1
		}
		out = append(out, r)
	}
	for h0 := 0; h0 < nh; h0++ {
		if !keep[h0] || used[h0] {
			continue
		}
		stack = stack[:0]
		h := int32(h0)
		for !used[h] {
			used[h] = true
			v := a.org(h)
			if p := seen[v]; p >= 0 {
				emit(stack[p:])
				stack = stack[:p]
			}
			seen[v] = int32(len(stack))
			stack = append(stack, v)
			// Next kept half-edge out of dst(h), first clockwise from the
			// reverse of h.
			d := a.dst(h)
			s, e := a.adjStart[d], a.adjStart[d+1]
			i := a.pos[h^1]
			for k := s; k < e; k++ {
				i--
				if i < s {
					i = e - 1
				}
				if keep[a.adj[i]] {
					break
				}
			}
			h = a.adj[i]
		}
		emit(stack)
	}
	return out
}

// faceWindings is windings for an arrangement with pruned segments: the
// winding number is no longer constant on a face of the noded graph (pruned
// segments cross faces without being noded), but which side of 1 it is on
// is (prune.go), so every face gets its own exact ray count against the
// graph edges and the pruned segments together. The count is taken at the
// midpoint of one of the face's half-edges, moved infinitesimally into the
// face.
func (a *arrangement) faceWindings() ([]bool, error) {
	nh := len(a.adj)
	var faceHE []int32
	for h0 := 0; h0 < nh; h0++ {
		if a.face[h0] >= 0 {
			continue
		}
		f := int32(len(faceHE))
		for h := int32(h0); a.face[h] < 0; h = a.nxt[h] {
			a.face[h] = f
		}
		faceHE = append(faceHE, int32(h0))
	}
	// Two indexes, one for the graph edges (with their multiplicities)
	// and one for the pruned segments; the winding number is the sum.
	ixe := newRayIndex(a.hot, a.eu, a.ev, a.ec, len(faceHE))
	ixp := newRayIndex(a.pts, a.pa, a.pb, nil, len(faceHE))
	in := make([]bool, len(faceHE))
	for f, h0 := range faceHE {
		var w int32
		found := false
		// The midpoints of the face's half-edges, then their quarter
		// points, until one does not lie on a pruned segment.
		for _, t := range [3][3]int64{{1, 1, 2}, {3, 1, 4}, {1, 3, 4}} {
			for h := h0; !found; {
				p, q := a.hot[a.org(h)], a.hot[a.dst(h)]
				pt, nr := ipt{t[0]*p.x + t[1]*q.x, t[0]*p.y + t[1]*q.y}, ipt{p.y - q.y, q.x - p.x}
				we, oke := ixe.winding(pt, t[2], nr)
				wp, okp := ixp.winding(pt, t[2], nr)
				w, found = we+wp, oke && okp
				if h = a.nxt[h]; h == h0 {
					break
				}
			}
		}
		if !found {
			return nil, fmt.Errorf("%w: no regular point found on a face of the arrangement", ErrTooComplex)
		}
		in[f] = w >= 1
	}
	keep := make([]bool, nh)
	for h := 0; h < nh; h++ {
		keep[h] = in[a.face[h]] && !in[a.face[h^1]]
	}
	return keep, nil
}
