package pathplan

import (
	"math"

	"github.com/chipband/chipband/geom"
)

// bandedGrid is the node raster on which the banded strategy grows its
// fronts: which nodes lie in the tool-centre domain, which lie in the
// region the tool centre has already swept, and the scratch field of one
// front propagation.
type bandedGrid struct {
	x0, y0, h float64
	nx, ny    int
	in        []bool    // node inside the tool-centre domain
	reached   []bool    // node inside the swept (cleared) centre region
	t         []float64 // distance to the previous front (scratch)
	src       []int32   // segment of the previous front nearest to the node
	touched   []int32   // nodes whose t was set in this propagation
	bfsPrev   []int32   // scratch of link searches
	bfsGen    []uint32
	gen       uint32
	walls     *bandedWalls // the domain outline, for exact link checks
	// outer is the outline of boundary, when it is set: links in the
	// strip between the two outlines must not leave it either.
	outer *bandedWalls
	// stock is the material of the level, shared by the grids of one
	// domain part's bays; nil: fronts step from the previous front alone.
	stock *bandedStock
	// boundary, when set, is the outline the last pass follows, outside
	// the domain the fronts grow in.
	boundary geom.Shape
	// airStep, while positive, makes the front field the plain distance
	// from the last front less airStep: a step through cleared space.
	airStep float64
	heap    nodeHeap // scratch of propagate
}

// bandedWalls is the outline of a tool-centre domain in buckets, so that a
// link can be checked exactly against it: a node raster knows the domain
// only to a node, and a straight leg between two inside nodes can cut a
// convex corner of an island by up to half a node spacing.
type bandedWalls struct {
	shape        geom.Shape
	x0, y0, cell float64
	nx, ny       int
	edges        [][2]geom.Point
	bucket       [][]int32
	seen         []uint32 // scratch: bucket visited in this query
	gen          uint32
}

// newBandedWalls buckets the edges of c in square cells of side cell.
func newBandedWalls(c geom.Shape, cell float64) *bandedWalls {
	b := c.Bounds()
	w := &bandedWalls{shape: c, x0: b.Min.X - cell, y0: b.Min.Y - cell, cell: cell}
	w.nx = int(math.Ceil(b.Width()/cell)) + 3
	w.ny = int(math.Ceil(b.Height()/cell)) + 3
	w.bucket = make([][]int32, w.nx*w.ny)
	for _, ring := range c.Rings() {
		for i := range ring {
			a, bb := ring[i], ring[(i+1)%len(ring)]
			id := int32(len(w.edges))
			w.edges = append(w.edges, [2]geom.Point{a, bb})
			i0, j0, i1, j1 := w.span(a, bb)
			for j := j0; j <= j1; j++ {
				for ii := i0; ii <= i1; ii++ {
					w.bucket[j*w.nx+ii] = append(w.bucket[j*w.nx+ii], id)
				}
			}
		}
	}
	return w
}

// span returns the bucket range of the box of a and b, clamped.
func (w *bandedWalls) span(a, b geom.Point) (i0, j0, i1, j1 int) {
	cl := func(v, n int) int { return max(0, min(n-1, v)) }
	i0 = cl(int(math.Floor((min(a.X, b.X)-w.x0)/w.cell)), w.nx)
	i1 = cl(int(math.Floor((max(a.X, b.X)-w.x0)/w.cell)), w.nx)
	j0 = cl(int(math.Floor((min(a.Y, b.Y)-w.y0)/w.cell)), w.ny)
	j1 = cl(int(math.Floor((max(a.Y, b.Y)-w.y0)/w.cell)), w.ny)
	return
}

// crosses reports whether the segment ab meets the outline. It visits the
// buckets along the segment (each sample's bucket and its eight
// neighbours, samples a quarter bucket apart, so every bucket the segment
// touches is visited) rather than its whole bounding box.
// crossesWalls reports whether the segment ab crosses the outline of the
// grid's domain or, when set, that of its boundary, or runs further out
// of the tool-centre domain (the boundary, else the domain) than its ends.
func (g *bandedGrid) crossesWalls(a, b geom.Point) bool {
	if g.walls != nil && g.walls.crosses(a, b) || g.outer != nil && g.outer.crosses(a, b) {
		return true
	}
	dom := g.outer
	if dom == nil {
		dom = g.walls
	}
	return dom != nil && dom.bulges(a, b)
}

// bulges reports whether the segment ab, one of whose ends lies outside
// the shape, runs further out of it than its ends do (by 1e-6 mm). The
// tool-centre domain lies up to its offset tolerance outside the true
// one, so ends may stand just outside it and still clear the walls; a
// chord between two such ends across a rounded corner of an island, though,
// cuts into the corner (its sagitta L²/8r exceeds the tolerance from
// L = 0.22 mm for r = 3, tolerance 0.002), which no crossing shows.
func (w *bandedWalls) bulges(a, b geom.Point) bool {
	out := func(q geom.Point) float64 {
		if w.shape.Contains(q) {
			return 0
		}
		return w.shape.DistanceToBoundary(q)
	}
	da, db := out(a), out(b)
	if da == 0 && db == 0 {
		return false
	}
	lim := max(da, db) + 1e-6
	n := int(math.Ceil(a.Dist(b) / 0.02))
	for k := 1; k < n; k++ {
		if out(a.Lerp(b, float64(k)/float64(n))) > lim {
			return true
		}
	}
	return false
}

func (w *bandedWalls) crosses(a, b geom.Point) bool {
	w.gen++
	if len(w.seen) != len(w.bucket) {
		w.seen = make([]uint32, len(w.bucket))
	}
	n := int(math.Ceil(a.Dist(b)/(0.25*w.cell))) + 1
	for k := 0; k <= n; k++ {
		q := a.Lerp(b, float64(k)/float64(n))
		ci := int(math.Floor((q.X - w.x0) / w.cell))
		cj := int(math.Floor((q.Y - w.y0) / w.cell))
		for j := cj - 1; j <= cj+1; j++ {
			for i := ci - 1; i <= ci+1; i++ {
				if i < 0 || j < 0 || i >= w.nx || j >= w.ny {
					continue
				}
				bk := j*w.nx + i
				if w.seen[bk] == w.gen {
					continue
				}
				w.seen[bk] = w.gen
				for _, id := range w.bucket[bk] {
					e := w.edges[id]
					if geom.SegmentsMeet(a, b, e[0], e[1]) {
						return true
					}
				}
			}
		}
	}
	return false
}

// newBandedGrid rasterises the domain c with node spacing h.
func newBandedGrid(c geom.Shape, h float64) *bandedGrid {
	return newBandedGridPad(c, h, 2*h)
}

// newBandedGridPad rasterises the domain c with node spacing h on a raster
// that reaches pad beyond c's bounds (room for the material around it).
func newBandedGridPad(c geom.Shape, h, pad float64) *bandedGrid {
	b := c.Bounds()
	g := &bandedGrid{h: h, x0: b.Min.X - pad, y0: b.Min.Y - pad, walls: newBandedWalls(c, max(1, 8*h))}
	g.nx = int(math.Ceil((b.Width()+2*pad)/h)) + 1
	g.ny = int(math.Ceil((b.Height()+2*pad)/h)) + 1
	n := g.nx * g.ny
	g.reached = make([]bool, n)
	g.t = make([]float64, n)
	g.src = make([]int32, n)
	for i := range g.t {
		g.t[i] = math.Inf(1)
		g.src[i] = -1
	}
	g.in = scanFill(c, g.x0, g.y0, h, g.nx, g.ny)
	return g
}

func (g *bandedGrid) pt(k int) geom.Point {
	return geom.Pt(g.x0+float64(k%g.nx)*g.h, g.y0+float64(k/g.nx)*g.h)
}

// node returns the index of the node nearest to p, or −1 outside the grid.
func (g *bandedGrid) node(p geom.Point) int {
	i := int(math.Round((p.X - g.x0) / g.h))
	j := int(math.Round((p.Y - g.y0) / g.h))
	if i < 0 || j < 0 || i >= g.nx || j >= g.ny {
		return -1
	}
	return j*g.nx + i
}

// diskNodes calls each with every grid node within rad of c, row by row,
// until each returns false.
func (g *bandedGrid) diskNodes(c geom.Point, rad float64, each func(k int) bool) {
	i0 := int(math.Floor((c.X - rad - g.x0) / g.h))
	i1 := int(math.Ceil((c.X + rad - g.x0) / g.h))
	j0 := int(math.Floor((c.Y - rad - g.y0) / g.h))
	j1 := int(math.Ceil((c.Y + rad - g.y0) / g.h))
	for j := max(j0, 0); j <= j1 && j < g.ny; j++ {
		dy := g.y0 + float64(j)*g.h - c.Y
		for i := max(i0, 0); i <= i1 && i < g.nx; i++ {
			if dx := g.x0 + float64(i)*g.h - c.X; math.Hypot(dx, dy) <= rad && !each(j*g.nx+i) {
				return
			}
		}
	}
}

// markDisk marks as reached every domain node within rad of c.
func (g *bandedGrid) markDisk(c geom.Point, rad float64) {
	g.diskNodes(c, rad, func(k int) bool {
		if g.in[k] {
			g.reached[k] = true
		}
		return true
	})
}

// stockNear reports whether any node within rad of c holds material of the
// level, cut or not (true when the grid knows no stock).
func (g *bandedGrid) stockNear(c geom.Point, rad float64) bool {
	if g.stock == nil {
		return true
	}
	found := false
	g.diskNodes(c, rad, func(k int) bool {
		found = g.stock.mat[k]
		return !found
	})
	return found
}

// unreached counts domain nodes not yet swept.
func (g *bandedGrid) unreached() int {
	n := 0
	for k, in := range g.in {
		if in && !g.reached[k] {
			n++
		}
	}
	return n
}

// spiralSeg is one segment of a front with the local step at its ends.
type spiralSeg struct {
	a, b   geom.Point
	sa, sb float64
}

// distParam returns the distance from p to the segment and the parameter
// of the nearest point.
func (s spiralSeg) distParam(p geom.Point) (float64, float64) {
	abx, aby := s.b.X-s.a.X, s.b.Y-s.a.Y
	px, py := p.X-s.a.X, p.Y-s.a.Y
	l2 := abx*abx + aby*aby
	t := 0.0
	if l2 > 0 {
		t = (px*abx + py*aby) / l2
		if t < 0 {
			t = 0
		} else if t > 1 {
			t = 1
		}
	}
	dx, dy := px-t*abx, py-t*aby
	return math.Sqrt(dx*dx + dy*dy), t
}

// nodeHeap is a binary min-heap of raster nodes by distance. It pops
// equal distances in the same order as container/heap would, without the
// interface boxing of each entry.
type nodeHeap struct {
	k []int32
	d []float64
}

func (q *nodeHeap) reset() { q.k, q.d = q.k[:0], q.d[:0] }

func (q *nodeHeap) push(k int32, d float64) {
	q.k = append(q.k, k)
	q.d = append(q.d, d)
	i := len(q.k) - 1
	for i > 0 {
		p := (i - 1) / 2
		if q.d[p] <= q.d[i] {
			break
		}
		q.k[p], q.k[i] = q.k[i], q.k[p]
		q.d[p], q.d[i] = q.d[i], q.d[p]
		i = p
	}
}

func (q *nodeHeap) pop() (int32, float64) {
	k, d := q.k[0], q.d[0]
	n := len(q.k) - 1
	q.k[0], q.d[0] = q.k[n], q.d[n]
	q.k, q.d = q.k[:n], q.d[:n]
	i := 0
	for {
		l, r, m := 2*i+1, 2*i+2, i
		if l < n && q.d[l] < q.d[m] {
			m = l
		}
		if r < n && q.d[r] < q.d[m] {
			m = r
		}
		if m == i {
			break
		}
		q.k[m], q.k[i] = q.k[i], q.k[m]
		q.d[m], q.d[i] = q.d[i], q.d[m]
		i = m
	}
	return k, d
}

// propagate computes, for the unswept domain nodes within limit of the
// front segs, the distance to the front and the nearest segment, by a
// Dijkstra sweep that carries the nearest segment along (a vector distance
// transform), so the distance stays Euclidean to the front and bends
// around walls. It returns the value field v = distance − local step for
// the touched nodes (negative: inside the next front).
func (g *bandedGrid) propagate(segs []spiralSeg, limit float64) {
	for _, k := range g.touched {
		g.t[k] = math.Inf(1)
		g.src[k] = -1
	}
	g.touched = g.touched[:0]
	q := &g.heap
	q.reset()
	set := func(k int, d float64, s int) {
		if g.src[k] < 0 {
			g.touched = append(g.touched, int32(k))
		}
		g.t[k] = d
		g.src[k] = int32(s)
		q.push(int32(k), d)
	}
	pad := 1.5 * g.h
	for si, s := range segs {
		lo := geom.Pt(min(s.a.X, s.b.X)-pad, min(s.a.Y, s.b.Y)-pad)
		hi := geom.Pt(max(s.a.X, s.b.X)+pad, max(s.a.Y, s.b.Y)+pad)
		i0, i1 := int(math.Floor((lo.X-g.x0)/g.h)), int(math.Ceil((hi.X-g.x0)/g.h))
		j0, j1 := int(math.Floor((lo.Y-g.y0)/g.h)), int(math.Ceil((hi.Y-g.y0)/g.h))
		for j := max(j0, 0); j <= j1 && j < g.ny; j++ {
			for i := max(i0, 0); i <= i1 && i < g.nx; i++ {
				k := j*g.nx + i
				if !g.in[k] || g.reached[k] {
					continue
				}
				d, _ := s.distParam(g.pt(k))
				if d <= pad && d < g.t[k] {
					set(k, d, si)
				}
			}
		}
	}
	for len(q.k) > 0 {
		kq, d := q.pop()
		k := int(kq)
		if d > g.t[k] {
			continue
		}
		i, j := k%g.nx, k/g.nx
		s := segs[g.src[k]]
		for dj := -1; dj <= 1; dj++ {
			for di := -1; di <= 1; di++ {
				ii, jj := i+di, j+dj
				if (di == 0 && dj == 0) || ii < 0 || jj < 0 || ii >= g.nx || jj >= g.ny {
					continue
				}
				kk := jj*g.nx + ii
				if !g.in[kk] || g.reached[kk] {
					continue
				}
				nd, _ := s.distParam(g.pt(kk))
				// Keep the distance path-consistent: never shorter than
				// walking there through this node allows (walls bend it).
				nd = max(nd, d)
				if nd < g.t[kk] && nd <= limit {
					set(kk, nd, int(g.src[k]))
				}
			}
		}
	}
}

// value returns the front field at node k: negative inside the swept
// region or inside the next front, positive beyond it.
func (g *bandedGrid) value(k int, segs []spiralSeg, far float64) float64 {
	if g.reached[k] {
		return -far
	}
	if g.src[k] < 0 {
		return far
	}
	s := segs[g.src[k]]
	_, tp := s.distParam(g.pt(k))
	step := s.sa + (s.sb-s.sa)*tp
	if g.airStep > 0 {
		return g.t[k] - g.airStep
	}
	if g.stock != nil {
		// The tool centre at k bites r − d into the uncut material at
		// distance d (see bandedStock).
		return (g.stock.r - step) - g.matDist(k)
	}
	return g.t[k] - step
}

// contours extracts the zero set of the front field over the touched
// nodes by marching squares, as oriented polylines with the material
// (positive side) on the left. Cells with a node outside the domain are
// skipped, so the polylines end at the walls.
func (g *bandedGrid) contours(segs []spiralSeg, far float64) [][]geom.Point {
	if len(g.touched) == 0 {
		return nil
	}
	i0, j0, i1, j1 := g.nx, g.ny, -1, -1
	for _, k := range g.touched {
		i, j := int(k)%g.nx, int(k)/g.nx
		i0, i1 = min(i0, i), max(i1, i)
		j0, j1 = min(j0, j), max(j1, j)
	}
	i0, j0 = max(i0-2, 0), max(j0-2, 0)
	i1, j1 = min(i1+2, g.nx-2), min(j1+2, g.ny-2)
	type seg struct{ a, b int64 }
	var sg []seg
	pos := map[int64]geom.Point{}
	edge := func(ka, kb int, va, vb float64, key int64) int64 {
		if _, ok := pos[key]; !ok {
			t := va / (va - vb)
			pos[key] = g.pt(ka).Lerp(g.pt(kb), t)
		}
		return key
	}
	for j := j0; j <= j1; j++ {
		for i := i0; i <= i1; i++ {
			k00 := j*g.nx + i
			k10, k01, k11 := k00+1, k00+g.nx, k00+g.nx+1
			if !g.in[k00] || !g.in[k10] || !g.in[k01] || !g.in[k11] {
				continue
			}
			if g.stock != nil && (g.unknown(k00) || g.unknown(k10) || g.unknown(k01) || g.unknown(k11)) {
				// The field is not known beyond the propagation: a zero
				// there would be a front in cleared space.
				continue
			}
			v00, v10 := g.value(k00, segs, far), g.value(k10, segs, far)
			v01, v11 := g.value(k01, segs, far), g.value(k11, segs, far)
			c := 0
			if v00 > 0 {
				c |= 1
			}
			if v10 > 0 {
				c |= 2
			}
			if v11 > 0 {
				c |= 4
			}
			if v01 > 0 {
				c |= 8
			}
			if c == 0 || c == 15 {
				continue
			}
			// Edge keys: bottom, right, top, left.
			kb := func() int64 { return edge(k00, k10, v00, v10, int64(k00)*2) }
			kr := func() int64 { return edge(k10, k11, v10, v11, int64(k10)*2+1) }
			kt := func() int64 { return edge(k01, k11, v01, v11, int64(k01)*2) }
			kl := func() int64 { return edge(k00, k01, v00, v01, int64(k00)*2+1) }
			// Orientation: positive (material) on the left of a→b, tested
			// on the bilinear field of the cell.
			base := g.pt(k00)
			bil := func(p geom.Point) float64 {
				u, w := (p.X-base.X)/g.h, (p.Y-base.Y)/g.h
				return v00*(1-u)*(1-w) + v10*u*(1-w) + v01*(1-u)*w + v11*u*w
			}
			add := func(a, b int64) {
				pa, pb := pos[a], pos[b]
				d := pb.Sub(pa)
				if d.Len() == 0 {
					return
				}
				m := pa.Lerp(pb, 0.5).Add(d.Unit().Perp().Scale(0.05 * g.h))
				if bil(m) < 0 {
					a, b = b, a
				}
				sg = append(sg, seg{a, b})
			}
			switch c {
			case 1:
				add(kl(), kb())
			case 2:
				add(kb(), kr())
			case 3:
				add(kl(), kr())
			case 4:
				add(kr(), kt())
			case 5:
				if (v00+v10+v01+v11)/4 > 0 {
					add(kl(), kt())
					add(kr(), kb())
				} else {
					add(kl(), kb())
					add(kr(), kt())
				}
			case 6:
				add(kb(), kt())
			case 7:
				add(kl(), kt())
			case 8:
				add(kt(), kl())
			case 9:
				add(kt(), kb())
			case 10:
				if (v00+v10+v01+v11)/4 > 0 {
					add(kb(), kr())
					add(kt(), kl())
				} else {
					add(kb(), kl())
					add(kt(), kr())
				}
			case 11:
				add(kt(), kr())
			case 12:
				add(kr(), kl())
			case 13:
				add(kr(), kb())
			case 14:
				add(kb(), kl())
			}
		}
	}
	// Chain by shared edge points.
	next := make(map[int64]int, len(sg))
	ends := make(map[int64]bool, len(sg))
	for i, s := range sg {
		next[s.a] = i
		ends[s.b] = true
	}
	used := make([]bool, len(sg))
	var out [][]geom.Point
	walk := func(start int) []geom.Point {
		pts := []geom.Point{pos[sg[start].a]}
		i := start
		for !used[i] {
			used[i] = true
			pts = append(pts, pos[sg[i].b])
			ni, ok := next[sg[i].b]
			if !ok {
				break
			}
			i = ni
		}
		return pts
	}
	// Open chains first (a start that is no segment's end), then loops;
	// in index order, so the result is deterministic.
	for i, s := range sg {
		if !used[i] && !ends[s.a] {
			out = append(out, walk(i))
		}
	}
	for i := range sg {
		if !used[i] {
			pts := walk(i)
			if len(pts) > 2 && pts[0].Dist(pts[len(pts)-1]) < 1e-9 {
				pts = pts[:len(pts)-1]
				pts = append(pts, pts[0]) // closed: first point repeated
			}
			out = append(out, pts)
		}
	}
	return out
}

// unknown reports whether node k lies beyond the last propagation and is
// not swept: its front field is not known.
func (g *bandedGrid) unknown(k int) bool { return g.src[k] < 0 && !g.reached[k] }

// sweepReached marks as reached the touched nodes inside the new front.
func (g *bandedGrid) sweepReached(segs []spiralSeg) {
	for _, k := range g.touched {
		if g.value(int(k), segs, 1) <= 0 {
			g.reached[k] = true
		}
	}
}

// clearAt reports whether the tool centre may stand at p during a link:
// the nearest node is in the domain and swept.
func (g *bandedGrid) clearAt(p geom.Point) bool {
	k := g.node(p)
	return k >= 0 && g.in[k] && g.reached[k] && g.free(p)
}

// free reports whether the tool centred at p bites no more than the
// stock's allowed bite into uncut material: no uncut node on the circle
// of radius r − bite about p. Material within that circle that does not
// reach it would be an isolated chip smaller than the circle; the walls'
// scallops and the uncut bulk all reach beyond r, so they cross it.
func (g *bandedGrid) free(p geom.Point) bool {
	s := g.stock
	if s == nil {
		return true
	}
	if len(s.ring) == 0 {
		rho := s.r - s.bite
		n := max(8, int(math.Ceil(2*math.Pi*rho/(0.7*g.h))))
		s.ring = make([]geom.Point, n)
		for i := range s.ring {
			a := 2 * math.Pi * float64(i) / float64(n)
			s.ring[i] = geom.Pt(rho*math.Cos(a), rho*math.Sin(a))
		}
	}
	for _, o := range s.ring {
		i := int(math.Floor((p.X+o.X-g.x0)/g.h + 0.5))
		j := int(math.Floor((p.Y+o.Y-g.y0)/g.h + 0.5))
		if i < 0 || j < 0 || i >= g.nx || j >= g.ny {
			continue
		}
		if s.uncut(j*g.nx + i) {
			return false
		}
	}
	return true
}

// freeNode is free at node k, remembered: a node once free stays free (cuts
// only remove material), and a node found not free is asked again only
// after the next cut.
func (g *bandedGrid) freeNode(k int) bool {
	s := g.stock
	if s == nil {
		return true
	}
	if len(s.freeAt) != len(s.mat) {
		s.freeAt = make([]uint32, len(s.mat))
	}
	switch v := s.freeAt[k]; {
	case v == math.MaxUint32:
		return true
	case v == s.cuts+1:
		return false
	}
	if g.free(g.pt(k)) {
		s.freeAt[k] = math.MaxUint32
		return true
	}
	s.freeAt[k] = s.cuts + 1
	return false
}
