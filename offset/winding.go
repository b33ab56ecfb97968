package offset

import (
	"math"
	"slices"
)

// bucketSegments puts segments a[i]→b[i] into a uniform bucket grid sized
// to their number and mean length, and returns the grid and its cells in
// CSR form (the segments of cell c are segs[start[c]:start[c+1]]).
func bucketSegments(a, b []ipt) (grid, []int32, []int32) {
	minX, minY := int64(math.MaxInt64), int64(math.MaxInt64)
	maxX, maxY := int64(math.MinInt64), int64(math.MinInt64)
	var total float64
	for i := range a {
		p, q := a[i], b[i]
		minX, maxX = min(minX, p.x, q.x), max(maxX, p.x, q.x)
		minY, maxY = min(minY, p.y, q.y), max(maxY, p.y, q.y)
		total += math.Hypot(float64(q.x-p.x), float64(q.y-p.y))
	}
	n := float64(len(a))
	w, h := float64(maxX-minX)+1, float64(maxY-minY)+1
	cs := max(total/n, math.Sqrt(w*h/n), 16)
	g := grid{ox: float64(minX), oy: float64(minY), cs: cs}
	g.nx = int(w/cs) + 1
	g.ny = int(h/cs) + 1
	ncell := g.nx * g.ny
	count := make([]int32, ncell+1)
	var buf []int32
	flat := make([]int32, 0, 3*len(a))
	fstart := make([]int32, len(a)+1)
	for i := range a {
		fstart[i] = int32(len(flat))
		buf = g.cells(a[i], b[i], buf[:0])
		flat = append(flat, buf...)
		for _, c := range buf {
			count[c+1]++
		}
	}
	fstart[len(a)] = int32(len(flat))
	for c := 0; c < ncell; c++ {
		count[c+1] += count[c]
	}
	start := slices.Clone(count)
	segs := make([]int32, len(flat))
	for i := range a {
		for _, c := range flat[fstart[i]:fstart[i+1]] {
			segs[count[c]] = int32(i)
			count[c]++
		}
	}
	return g, start, segs
}

// rayIndex answers winding-number queries about a closed system of
// directed segments a[i]→b[i] with multiplicities m[i] (1 when m is nil),
// by counting crossings of a downward vertical ray. Segments are kept in
// vertical strips by their x-range.
type rayIndex struct {
	a, b  []ipt
	m     []int32
	x0, w int64
	start []int32
	ids   []int32
}

// queries is the expected number of queries; the strips are sized to it.
func newRayIndex(a, b []ipt, m []int32, queries int) *rayIndex {
	ix := &rayIndex{a: a, b: b, m: m}
	if len(a) == 0 {
		return ix
	}
	minX, maxX := int64(math.MaxInt64), int64(math.MinInt64)
	for i := range a {
		minX, maxX = min(minX, a[i].x, b[i].x), max(maxX, a[i].x, b[i].x)
	}
	ns := int64(min(max(len(a)/4, 1), 1<<14, 4*queries+1))
	ix.x0 = minX
	ix.w = max((maxX-minX)/ns+1, 1)
	ns = (maxX-minX)/ix.w + 1
	count := make([]int32, ns+1)
	for i := range a {
		if a[i].x == b[i].x {
			continue // never crosses a vertical ray
		}
		s0, s1 := (min(a[i].x, b[i].x)-minX)/ix.w, (max(a[i].x, b[i].x)-minX)/ix.w
		for s := s0; s <= s1; s++ {
			count[s+1]++
		}
	}
	for s := int64(0); s < ns; s++ {
		count[s+1] += count[s]
	}
	ix.start = slices.Clone(count)
	ix.ids = make([]int32, count[ns])
	for i := range a {
		if a[i].x == b[i].x {
			continue
		}
		s0, s1 := (min(a[i].x, b[i].x)-minX)/ix.w, (max(a[i].x, b[i].x)-minX)/ix.w
		for s := s0; s <= s1; s++ {
			ix.ids[count[s]] = int32(i)
			count[s]++
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
		p1, p2 := ix.a[i], ix.b[i]
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
