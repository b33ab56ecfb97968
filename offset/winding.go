package offset

import "math"

// bucketSegments puts segments pts[sa[i]]→pts[sb[i]] into a uniform bucket
// grid sized to their number and mean length, and returns the grid and its
// cells in CSR form (the segments of cell c are segs[start[c]:start[c+1]]).
// The grid's margin m is kept.
func bucketSegments(pts []ipt, sa, sb []int32, m float64, sc *ints) (g grid, start, segs, segCells, segCellStart []int32) {
	minX, minY := int64(math.MaxInt64), int64(math.MaxInt64)
	maxX, maxY := int64(math.MinInt64), int64(math.MinInt64)
	var total float64
	for i := range sa {
		p, q := pts[sa[i]], pts[sb[i]]
		minX, maxX = min(minX, p.x, q.x), max(maxX, p.x, q.x)
		minY, maxY = min(minY, p.y, q.y), max(maxY, p.y, q.y)
		total += math.Hypot(float64(q.x-p.x), float64(q.y-p.y))
	}
	n := float64(len(sa))
	w, h := float64(maxX-minX)+1, float64(maxY-minY)+1
	cs := max(total/n, math.Sqrt(w*h/n), 16)
	g = grid{ox: float64(minX), oy: float64(minY), cs: cs, m: m}
	g.nx = int(w/cs) + 1
	g.ny = int(h/cs) + 1
	ncell := g.nx * g.ny
	count := sc.zeroed(2 * (ncell + 1))
	flat := sc.get(3 * len(sa))[:0]
	fstart := sc.get(len(sa) + 1)
	for i := range sa {
		fstart[i] = int32(len(flat))
		k := len(flat)
		flat = g.cells(pts[sa[i]], pts[sb[i]], flat)
		for _, c := range flat[k:] {
			count[c+1]++
		}
	}
	fstart[len(sa)] = int32(len(flat))
	for c := 0; c < ncell; c++ {
		count[c+1] += count[c]
	}
	start = count[:ncell+1]
	fill := count[ncell+1:]
	copy(fill, start)
	segs = sc.get(len(flat))
	for i := range sa {
		for _, c := range flat[fstart[i]:fstart[i+1]] {
			segs[fill[c]] = int32(i)
			fill[c]++
		}
	}
	return g, start, segs, flat, fstart
}

// ints is a free list of int32 slices, so that the passes of one offset
// reuse each other's scratch memory. A nil *ints allocates.
type ints struct{ free [][]int32 }

// get returns a slice of length n with undefined contents.
func (p *ints) get(n int) []int32 {
	if p == nil {
		return make([]int32, n)
	}
	best := -1
	for i, s := range p.free {
		if cap(s) >= n && (best < 0 || cap(s) < cap(p.free[best])) {
			best = i
		}
	}
	if best < 0 {
		return make([]int32, n)
	}
	s := p.free[best]
	p.free[best] = p.free[len(p.free)-1]
	p.free = p.free[:len(p.free)-1]
	return s[:n]
}

// zeroed returns a slice of n zeros.
func (p *ints) zeroed(n int) []int32 {
	s := p.get(n)
	clear(s)
	return s
}

// put hands slices back; the caller must not use them any more.
func (p *ints) put(ss ...[]int32) {
	if p == nil {
		return
	}
	for _, s := range ss {
		if cap(s) > 0 {
			p.free = append(p.free, s)
		}
	}
}

// rayIndex answers winding-number queries about a closed system of
// directed segments pts[sa[i]]→pts[sb[i]] with multiplicities m[i] (1 when
// m is nil), by counting crossings of a downward vertical ray. Segments are
// kept in vertical strips by their x-range.
type rayIndex struct {
	pts    []ipt
	sa, sb []int32
	m      []int32
	x0, w  int64
	start  []int32
	ids    []int32
}

// queries is the expected number of queries; the strips are sized to it.
func newRayIndex(pts []ipt, sa, sb []int32, m []int32, queries int) *rayIndex {
	ix := &rayIndex{pts: pts, sa: sa, sb: sb, m: m}
	if len(sa) == 0 {
		return ix
	}
	minX, maxX := int64(math.MaxInt64), int64(math.MinInt64)
	for i := range sa {
		ax, bx := pts[sa[i]].x, pts[sb[i]].x
		minX, maxX = min(minX, ax, bx), max(maxX, ax, bx)
	}
	ns := int64(min(max(len(sa)/4, 1), 1<<14, 4*queries+1))
	ix.x0 = minX
	ix.w = max((maxX-minX)/ns+1, 1)
	ns = (maxX-minX)/ix.w + 1
	count := make([]int32, 2*ns+2)
	for i := range sa {
		ax, bx := pts[sa[i]].x, pts[sb[i]].x
		if ax == bx {
			continue // never crosses a vertical ray
		}
		s0, s1 := (min(ax, bx)-minX)/ix.w, (max(ax, bx)-minX)/ix.w
		for s := s0; s <= s1; s++ {
			count[s+1]++
		}
	}
	for s := int64(0); s < ns; s++ {
		count[s+1] += count[s]
	}
	ix.start = count[:ns+1]
	fill := count[ns+1:]
	copy(fill, ix.start)
	ix.ids = make([]int32, ix.start[ns])
	for i := range sa {
		ax, bx := pts[sa[i]].x, pts[sb[i]].x
		if ax == bx {
			continue
		}
		s0, s1 := (min(ax, bx)-minX)/ix.w, (max(ax, bx)-minX)/ix.w
		for s := s0; s <= s1; s++ {
			ix.ids[fill[s]] = int32(i)
			fill[s]++
		}
	}
	return ix
}

// winding returns the winding number of the segments about the point
// q/k + ε·n for an infinitesimal ε > 0 (q in coordinates multiplied by
// k ≥ 1; n = 0 means no perturbation). ok is false when that point lies on
// a segment, which the caller must avoid by choosing another point.
func (ix *rayIndex) winding(q ipt, k int64, n ipt) (w int32, ok bool) {
	if len(ix.start) == 0 {
		return 0, true
	}
	// Strip of x = q.x/k (floor division; q.x may be negative).
	fx := q.x - k*ix.x0
	if fx < 0 {
		return 0, true // left of every segment
	}
	s := fx / (k * ix.w)
	if s+1 >= int64(len(ix.start)) {
		return 0, true
	}
	for _, i := range ix.ids[ix.start[s]:ix.start[s+1]] {
		p1, p2 := ix.pts[ix.sa[i]], ix.pts[ix.sb[i]]
		sg := int32(1)
		if ix.m != nil {
			sg = ix.m[i]
		}
		if p1.x > p2.x {
			p1, p2, sg = p2, p1, -sg
		}
		x1, x2 := k*p1.x, k*p2.x
		if x1 > q.x || (x1 == q.x && n.x < 0) {
			continue
		}
		if x2 < q.x || (x2 == q.x && n.x >= 0) {
			continue
		}
		// Quick rejection when the segment's box is above q.
		if k*min(p1.y, p2.y) > q.y {
			continue
		}
		P1, P2 := ipt{x1, k * p1.y}, ipt{x2, k * p2.y}
		o := 1
		if k*max(p1.y, p2.y) >= q.y {
			o = orient(P1, P2, q)
			if o == 0 {
				o = crossSign(P2.x-P1.x, P2.y-P1.y, n.x, n.y)
				if o == 0 {
					return 0, false
				}
			}
		}
		if o > 0 {
			w += sg
		}
	}
	return w, true
}
