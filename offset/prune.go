package offset

import "math"

// Pruning. Most of a raw offset curve at a large distance is never part of
// the result: joins through the vertex, swallowtails at tight curves and
// whole offset edges that some other input edge comes closer to than the
// offset distance. Such pieces only cost crossings in the arrangement.
//
// Claim. Let the input be simple (rings simple and pairwise free of
// crossings and overlaps, every edge with the region on its left and the
// outside on its right, so its winding number is 0 or 1). Let r = |d| and
// let p be a point at distance δ < r − tol from the input boundary. Then a
// whole neighbourhood of p lies in the open set {winding ≥ 1} for d > 0 and
// in the open set {winding ≤ 0} for d < 0.
//
// Proof. The winding number of the raw curves is 1_A ± (Σ 1_rect + Σ 1_sect)
// (see the package doc; + outward, − inward), where the sectors are the
// chord polygons at the arc vertices, which contain the disk sectors of
// radius r − tol. Take q, the boundary point nearest to p. If q lies inside
// an edge e, p lies in the open rectangle of e when p is on the side of the
// offset, and on the other side p is inside A (outward: 1_A = 1 and all
// terms are ≥ 0) or outside A (inward: 1_A = 0, all terms ≤ 0). If q is a
// vertex, p lies in the normal cone at q: for a vertex convex for the offset
// direction that is the open disk sector of radius r − tol; otherwise p is
// on the far side (inside A outward, outside A inward). The same holds for
// every point near p since δ < r − tol is an open condition. ∎
//
// Hence a raw segment all of whose points are within r − tol − margin of
// the input boundary never bounds the result: it is left out of the
// noding and only counts towards winding numbers (see arrangement.go). The
// margin (pruneMargin grid units) covers the snapping of raw vertices and
// floating-point error in the distances. A segment is certified by one
// input edge e that both its endpoints are within the threshold of: the
// points within a distance of a segment form a convex set, so the whole
// segment is too.

// pruneMargin is the safety margin of the pruning threshold, in grid units.
const pruneMargin = 10

// pruner certifies raw segments as prunable.
type pruner struct {
	thr  float64 // threshold distance, grid units
	thr2 float64 // thr²
	// Input edges (grid units), edge i from (ax, ay) to (bx, by), and the
	// next and previous edge of the same ring.
	ax, ay, bx, by []float64
	next, prev     []int32
	// A coarse field: for every cell, an input edge close to the cell's
	// centre (a near-nearest edge, found by propagation).
	ox, oy, h float64
	nx, ny    int
	wit       []int32
	last      int32 // last certifying edge, tried first
}

// newPruner returns a pruner for the snapped input rings at offset
// distance d, or nil when pruning cannot help or is not safe.
func newPruner(rings [][]ipt, d, tol float64) *pruner {
	thr := (math.Abs(d)-tol)*gridScale - pruneMargin
	if thr <= 4*pruneMargin {
		return nil
	}
	p := &pruner{thr: thr, thr2: thr * thr}
	n := 0
	for _, q := range rings {
		n += len(q)
	}
	p.ax = make([]float64, n)
	p.ay = make([]float64, n)
	p.bx = make([]float64, n)
	p.by = make([]float64, n)
	p.next = make([]int32, n)
	p.prev = make([]int32, n)
	minX, minY := math.Inf(1), math.Inf(1)
	maxX, maxY := math.Inf(-1), math.Inf(-1)
	k := 0
	for _, q := range rings {
		m := len(q)
		for i := range q {
			a, b := q[i], q[(i+1)%m]
			p.ax[k+i], p.ay[k+i] = float64(a.x), float64(a.y)
			p.bx[k+i], p.by[k+i] = float64(b.x), float64(b.y)
			p.next[k+i] = int32(k + (i+1)%m)
			p.prev[k+i] = int32(k + (i+m-1)%m)
			minX, maxX = min(minX, float64(a.x)), max(maxX, float64(a.x))
			minY, maxY = min(minY, float64(a.y)), max(maxY, float64(a.y))
		}
		k += m
	}
	if d > 0 {
		r := d * gridScale
		minX, minY, maxX, maxY = minX-r, minY-r, maxX+r, maxY+r
	}
	p.buildField(minX, minY, maxX, maxY)
	p.last = 0
	return p
}

// d2 returns the squared distance from (x, y) to input edge e.
func (p *pruner) d2(x, y float64, e int32) float64 {
	ax, ay := p.ax[e], p.ay[e]
	dx, dy := p.bx[e]-ax, p.by[e]-ay
	px, py := x-ax, y-ay
	t := px*dx + py*dy
	if t <= 0 {
		return px*px + py*py
	}
	l := dx*dx + dy*dy
	if t >= l {
		qx, qy := x-p.bx[e], y-p.by[e]
		return qx*qx + qy*qy
	}
	c := px*dy - py*dx
	return c * c / l
}

func (p *pruner) cell(x, y float64) int {
	c := min(max(int((x-p.ox)/p.h), 0), p.nx-1)
	r := min(max(int((y-p.oy)/p.h), 0), p.ny-1)
	return r*p.nx + c
}

// buildField fills the witness field over the given box: seeds at the
// cells the input edges pass through, then two raster passes of
// nearest-edge propagation (a vector distance transform). Any edge is a
// valid witness; propagation only makes it a good one.
func (p *pruner) buildField(minX, minY, maxX, maxY float64) {
	n := len(p.ax)
	w, h := maxX-minX+1, maxY-minY+1
	target := float64(min(max(n/2, 64), 1<<15))
	p.h = max(math.Sqrt(w*h/target), 1)
	p.ox, p.oy = minX, minY
	p.nx = min(int(w/p.h)+1, 1<<12)
	p.ny = min(int(h/p.h)+1, 1<<12)
	p.h = max(p.h, w/float64(p.nx), h/float64(p.ny))
	nc := p.nx * p.ny
	p.wit = make([]int32, nc)
	best := make([]float64, nc)
	for i := range best {
		best[i] = math.Inf(1)
		p.wit[i] = -1
	}
	centre := func(c int) (float64, float64) {
		return p.ox + (float64(c%p.nx)+0.5)*p.h, p.oy + (float64(c/p.nx)+0.5)*p.h
	}
	try := func(c int, e int32) {
		x, y := centre(c)
		if v := p.d2(x, y, e); v < best[c] {
			best[c], p.wit[c] = v, e
		}
	}
	for e := 0; e < n; e++ {
		l := math.Hypot(p.bx[e]-p.ax[e], p.by[e]-p.ay[e])
		k := int(2*l/p.h) + 1
		for j := 0; j <= k; j++ {
			t := float64(j) / float64(k)
			try(p.cell(p.ax[e]+t*(p.bx[e]-p.ax[e]), p.ay[e]+t*(p.by[e]-p.ay[e])), int32(e))
		}
	}
	nx, ny := p.nx, p.ny
	for r := 0; r < ny; r++ {
		for c := 0; c < nx; c++ {
			i := r*nx + c
			if c > 0 && p.wit[i-1] >= 0 {
				try(i, p.wit[i-1])
			}
			if r > 0 {
				for dc := -1; dc <= 1; dc++ {
					if cc := c + dc; cc >= 0 && cc < nx && p.wit[i-nx+dc] >= 0 {
						try(i, p.wit[i-nx+dc])
					}
				}
			}
		}
		for c := nx - 2; c >= 0; c-- {
			if i := r*nx + c; p.wit[i+1] >= 0 {
				try(i, p.wit[i+1])
			}
		}
	}
	for r := ny - 1; r >= 0; r-- {
		for c := nx - 1; c >= 0; c-- {
			i := r*nx + c
			if c < nx-1 && p.wit[i+1] >= 0 {
				try(i, p.wit[i+1])
			}
			if r < ny-1 {
				for dc := -1; dc <= 1; dc++ {
					if cc := c + dc; cc >= 0 && cc < nx && p.wit[i+nx+dc] >= 0 {
						try(i, p.wit[i+nx+dc])
					}
				}
			}
		}
		for c := 1; c < nx; c++ {
			if i := r*nx + c; p.wit[i-1] >= 0 {
				try(i, p.wit[i-1])
			}
		}
	}
}

// descend walks from edge e along its ring while the distance to (x, y)
// decreases and returns the edge reached and its squared distance.
func (p *pruner) descend(x, y float64, e int32) (int32, float64) {
	best := p.d2(x, y, e)
	// Once a step along the ring has decreased the distance, the way back
	// cannot decrease it again, so the walk keeps its direction.
	step := p.next
	f := step[e]
	v := p.d2(x, y, f)
	if v >= best {
		step = p.prev
		f = step[e]
		if v = p.d2(x, y, f); v >= best {
			return e, best
		}
	}
	for k := 0; k < 512; k++ {
		e, best = f, v
		f = step[e]
		if v = p.d2(x, y, f); v >= best {
			break
		}
	}
	return e, best
}

func (p *pruner) certifies(e int32, ax, ay, bx, by float64) bool {
	return p.d2(ax, ay, e) < p.thr2 && p.d2(bx, by, e) < p.thr2
}

// covered reports whether segment ab (grid points) is certified prunable.
// e is the input edge the segment was made from (or the edge before the
// vertex it was made at), tried with its neighbours.
func (p *pruner) covered(a, b ipt, e int32) bool {
	ax, ay, bx, by := float64(a.x), float64(a.y), float64(b.x), float64(b.y)
	if p.certifies(p.last, ax, ay, bx, by) {
		return true
	}
	// A local nearest edge of the midpoint; when even that is beyond the
	// threshold, the segment has a point beyond it and cannot be pruned.
	mx, my := (ax+bx)/2, (ay+by)/2
	w := p.wit[p.cell(mx, my)]
	if w < 0 {
		return false
	}
	f, v := p.descend(mx, my, w)
	if v >= p.thr2 {
		return false
	}
	if p.certifies(f, ax, ay, bx, by) {
		p.last = f
		return true
	}
	for _, g := range [3]int32{e, p.next[e], p.prev[e]} {
		if g != f && p.certifies(g, ax, ay, bx, by) {
			p.last = g
			return true
		}
	}
	// The endpoints may have different nearest edges; try each.
	if g, _ := p.descend(ax, ay, f); g != f && p.certifies(g, ax, ay, bx, by) {
		p.last = g
		return true
	}
	if g, _ := p.descend(bx, by, f); g != f && p.certifies(g, ax, ay, bx, by) {
		p.last = g
		return true
	}
	return false
}

// simpleRings reports whether the snapped input rings are simple in the
// sense of the pruning claim: no two edges meet except consecutive edges
// of a ring at their shared vertex (without folding back), and every ring
// has winding number 1 just to its left and 0 just to its right. Rings
// that touch are reported as not simple (pruning is then skipped, which
// costs time but not correctness).
func simpleRings(rings [][]ipt, sc *ints) bool {
	n := 0
	for _, q := range rings {
		n += len(q)
	}
	if n == 0 {
		return false
	}
	// Edge s runs from pts[s] to pts[sb[s]]; ring[s] is its ring and
	// rs[ring[s]] the ring's first edge.
	pts := make([]ipt, 0, n)
	sa, sb, ring, rs := sc.get(n), sc.get(n), sc.get(n), sc.get(len(rings)+1)
	for k, q := range rings {
		b := int32(len(pts))
		rs[k] = b
		pts = append(pts, q...)
		for i := range q {
			s := b + int32(i)
			sa[s], sb[s], ring[s] = s, s+1, int32(k)
		}
		sb[b+int32(len(q))-1] = b
	}
	rs[len(rings)] = int32(n)
	_, start, segs, flat, fstart := bucketSegments(pts, sa, sb, 0, sc)
	defer sc.put(sa, sb, ring, rs, start, segs, flat, fstart)
	for c := 0; c+1 < len(start); c++ {
		list := segs[start[c]:start[c+1]]
		for i, s := range list {
			for _, t := range list[i+1:] {
				ps, qs, pt, qt := pts[s], pts[sb[s]], pts[t], pts[sb[t]]
				if !boxesMeet(ps, qs, pt, qt) {
					continue
				}
				if sb[s] == t || sb[t] == s {
					// Consecutive edges u→v→w: they must not fold back.
					u, v, w := ps, qs, qt
					if sb[t] == s {
						u, v, w = pt, qt, qs
					}
					if rs[ring[s]+1]-rs[ring[s]] < 3 || (orient(u, v, w) == 0 && dot(v.x-u.x, v.y-u.y, w.x-v.x, w.y-v.y).sign() < 0) {
						return false
					}
					continue
				}
				if segsMeet(ps, qs, pt, qt) {
					return false
				}
			}
		}
	}
	ix := newRayIndex(pts, sa, sb, nil, 2*len(rings))
	for _, q := range rings {
		u, v := q[0], q[1]
		m := ipt{u.x + v.x, u.y + v.y}
		nl := ipt{u.y - v.y, v.x - u.x}
		wl, ok1 := ix.winding(m, 2, nl)
		wr, ok2 := ix.winding(m, 2, ipt{-nl.x, -nl.y})
		if !ok1 || !ok2 || wl != 1 || wr != 0 {
			return false
		}
	}
	return true
}

func boxesMeet(p1, p2, q1, q2 ipt) bool {
	return max(p1.x, p2.x) >= min(q1.x, q2.x) && max(q1.x, q2.x) >= min(p1.x, p2.x) &&
		max(p1.y, p2.y) >= min(q1.y, q2.y) && max(q1.y, q2.y) >= min(p1.y, p2.y)
}

// segsMeet reports whether closed segments p1p2 and q1q2 have a point in
// common. Exact.
func segsMeet(p1, p2, q1, q2 ipt) bool {
	if !boxesMeet(p1, p2, q1, q2) {
		return false
	}
	o1, o2 := orient(p1, p2, q1), orient(p1, p2, q2)
	o3, o4 := orient(q1, q2, p1), orient(q1, q2, p2)
	if o1*o2 > 0 || o3*o4 > 0 {
		return false
	}
	if o1 == 0 && o2 == 0 {
		// Collinear with overlapping boxes: they meet.
		return true
	}
	return true
}
