package pathplan

import (
	"math"
	"math/bits"
	"sort"

	"github.com/chipband/chipband/geom"
)

// bandedStock is the material of one level on the node raster of a
// bandedGrid: which nodes hold material the tool must remove, how far each
// lies from the tool-centre path cut so far, and the scratch of the
// distance-to-material field from which the next front is taken.
//
// The fronts of the banded strategy are contours of that field: the next
// pass runs where the uncut material lies r − s from the tool centre, so
// the tool bites s into it (s the local step of the front; on a straight
// front ae = s exactly, elementary geometry). Measuring the distance to the
// material that is actually left, rather than to the previous pass, takes
// in the scallops a pass leaves where it meets a wall at a slant and the
// material between fronts that meet, which a step from the previous pass
// alone runs into head-on.
type bandedStock struct {
	r float64
	// bite is the depth a link may take into uncut material, mm.
	bite float64
	mat  []bool    // node holds material of the level within reach of the tool
	air  []bool    // node lies outside the stock
	cl   []float32 // distance to the nearest tool-centre point cut so far; > r: uncut
	// cuts counts the stamped paths; freeAt remembers free per node
	// (MaxUint32: free; cuts+1: not free since that many cuts).
	cuts   uint32
	freeAt []uint32
	ring   []geom.Point // the circle free tests, about the origin

	// Scratch of one distance query.
	dm    []float32 // distance to uncut material, where dgen == gen
	dsrc  []int32   // seed nearest to the node
	dgen  []uint32
	gen   uint32
	seeds []geom.Point
	heap  radixHeap
	// Buckets of side bs nodes that a query covers.
	bs, bnx, bny int
	bmark        []uint32
	bcol, brow   []int32 // bucket column of a node column, bucket offset of a node row
	blist        []int32
}

// radixHeap is a monotone priority queue of nodes by non-negative float32
// distance (Ahuja, Mehlhorn, Orlin and Tarjan 1990, the radix heap): keys
// are the distances' bit patterns, which order as the distances do, and no
// key pushed may be below the last one popped, as in a Dijkstra sweep.
// Entries of equal distance pop in no particular order.
type radixHeap struct {
	last uint32
	n    int
	b    [33][]radixEntry
}

type radixEntry struct {
	key uint32
	k   int32
}

func (q *radixHeap) reset() {
	for i := range q.b {
		q.b[i] = q.b[i][:0]
	}
	q.last, q.n = 0, 0
}

func radixBucket(key, last uint32) int { return bits.Len32(key ^ last) }

func (q *radixHeap) push(k int32, d float32) {
	key := math.Float32bits(d)
	i := radixBucket(key, q.last)
	q.b[i] = append(q.b[i], radixEntry{key, k})
	q.n++
}

func (q *radixHeap) pop() (int32, float32) {
	if len(q.b[0]) == 0 {
		i := 1
		for len(q.b[i]) == 0 {
			i++
		}
		m := q.b[i][0].key
		for _, e := range q.b[i][1:] {
			m = min(m, e.key)
		}
		q.last = m
		for _, e := range q.b[i] {
			j := radixBucket(e.key, m)
			q.b[j] = append(q.b[j], e)
		}
		q.b[i] = q.b[i][:0]
	}
	e := q.b[0][len(q.b[0])-1]
	q.b[0] = q.b[0][:len(q.b[0])-1]
	q.n--
	return e.k, math.Float32frombits(e.key)
}

// initStock sets up the material of the level on g's raster: every node
// inside stock (where the level holds material) within r of the tool-centre
// domain c (a little less, so that the walls themselves never count as
// material). bite is the depth a link may take into uncut material.
func (g *bandedGrid) initStock(c, stock geom.Shape, r, bite float64) {
	n := g.nx * g.ny
	s := &bandedStock{r: r, bite: bite, mat: make([]bool, n), cl: make([]float32, n)}
	s.air = scanFill(stock, g.x0, g.y0, g.h, g.nx, g.ny)
	for k := range s.air {
		s.air[k] = !s.air[k]
	}
	inf := float32(math.Inf(1))
	for k := range s.cl {
		s.cl[k] = inf
	}
	for k, in := range g.in {
		if in && !s.air[k] {
			s.mat[k] = true
		}
	}
	// The strip outside the domain within reach of it: the capsules of
	// its edges (the distance to the domain from outside is the distance
	// to its outline).
	reach := r - 0.25*g.h
	for _, ring := range c.Rings() {
		for i := range ring {
			a, b := ring[i], ring[(i+1)%len(ring)]
			j0 := max(0, int(math.Floor((min(a.Y, b.Y)-reach-g.y0)/g.h)))
			j1 := min(g.ny-1, int(math.Ceil((max(a.Y, b.Y)+reach-g.y0)/g.h)))
			cs := newCapsule(a, b, reach)
			for j := j0; j <= j1; j++ {
				lo, hi := cs.row(g.y0 + float64(j)*g.h)
				if lo > hi {
					continue
				}
				i0 := max(0, int(math.Ceil((lo-g.x0)/g.h)))
				i1 := min(g.nx-1, int(math.Floor((hi-g.x0)/g.h)))
				for k := j*g.nx + i0; k <= j*g.nx+i1; k++ {
					if !s.air[k] {
						s.mat[k] = true
					}
				}
			}
		}
	}
	s.dm = make([]float32, n)
	s.dsrc = make([]int32, n)
	s.dgen = make([]uint32, n)
	s.bs = max(1, int(math.Ceil(r/g.h)))
	s.bnx = (g.nx + s.bs - 1) / s.bs
	s.bny = (g.ny + s.bs - 1) / s.bs
	s.bmark = make([]uint32, s.bnx*s.bny)
	s.bcol = make([]int32, g.nx)
	for i := range s.bcol {
		s.bcol[i] = int32(i / s.bs)
	}
	s.brow = make([]int32, g.ny)
	for j := range s.brow {
		s.brow[j] = int32(j / s.bs * s.bnx)
	}
	g.stock = s
}

// scanFill returns, for the raster with origin (x0, y0), spacing h and
// nx × ny nodes, which nodes lie inside c (even–odd rule on its rings).
func scanFill(c geom.Shape, x0, y0, h float64, nx, ny int) []bool {
	in := make([]bool, nx*ny)
	rings := c.Rings()
	var xs []float64
	for j := 0; j < ny; j++ {
		y := y0 + float64(j)*h
		xs = xs[:0]
		for _, r := range rings {
			for k := range r {
				a, bb := r[k], r[(k+1)%len(r)]
				if (a.Y <= y) != (bb.Y <= y) {
					xs = append(xs, a.X+(y-a.Y)*(bb.X-a.X)/(bb.Y-a.Y))
				}
			}
		}
		sort.Float64s(xs)
		for k := 0; k+1 < len(xs); k += 2 {
			i0 := int(math.Ceil((xs[k] - x0) / h))
			i1 := int(math.Floor((xs[k+1] - x0) / h))
			for i := max(i0, 0); i <= i1 && i < nx; i++ {
				in[j*nx+i] = true
			}
		}
	}
	return in
}

// stampPath records the polyline pts as cut: every node within the tool
// radius of it is cut, and the distances of the nodes just beyond are
// kept, so the edge of the cut is known between nodes. Nodes deep inside
// the cut already (by this path's previous segment or an earlier pass) are
// skipped after one read, which keeps the work per segment to the strip
// its sweep adds.
func (g *bandedGrid) stampPath(pts []geom.Point) {
	if g.stock == nil || len(pts) == 0 {
		return
	}
	g.stock.cuts++
	if len(pts) == 1 {
		g.stampSeg(pts[0], pts[0], false)
		return
	}
	for i := 0; i+1 < len(pts); i++ {
		g.stampSeg(pts[i], pts[i+1], i > 0)
	}
}

// stampDisk records a disk of radius rad about c as swept by the tool
// centre (a helix): every node within rad + r is cut.
func (g *bandedGrid) stampDisk(c geom.Point, rad float64) {
	if g.stock == nil {
		return
	}
	s := g.stock
	s.cuts++
	R := rad + s.r + 1.5*g.h
	i0 := max(0, int(math.Floor((c.X-R-g.x0)/g.h)))
	i1 := min(g.nx-1, int(math.Ceil((c.X+R-g.x0)/g.h)))
	j0 := max(0, int(math.Floor((c.Y-R-g.y0)/g.h)))
	j1 := min(g.ny-1, int(math.Ceil((c.Y+R-g.y0)/g.h)))
	for j := j0; j <= j1; j++ {
		y := g.y0 + float64(j)*g.h
		for i := i0; i <= i1; i++ {
			x := g.x0 + float64(i)*g.h
			d := float32(max(0, math.Sqrt((x-c.X)*(x-c.X)+(y-c.Y)*(y-c.Y))-rad))
			if k := j*g.nx + i; d < s.cl[k] {
				s.cl[k] = d
			}
		}
	}
}

// capsule is the set of points within R of the segment ab, with the
// segment's length and direction worked out once for all the rows a stamp
// asks about.
type capsule struct {
	a, b   geom.Point
	R      float64
	l      float64 // length of ab; 0: a point
	ux, uy float64 // unit direction of ab
	flat   bool    // ab is horizontal
}

func newCapsule(a, b geom.Point, R float64) capsule {
	c := capsule{a: a, b: b, R: R}
	ab := b.Sub(a)
	if l2 := ab.X*ab.X + ab.Y*ab.Y; l2 > 0 {
		c.flat = ab.Y == 0
		c.l = math.Sqrt(l2)
		c.ux, c.uy = ab.X/c.l, ab.Y/c.l
	}
	return c
}

// row returns the x range in which the row at height y meets the capsule
// (lo > hi: none). The set is convex, so the range is the hull of the end
// circles' ranges and the strip's.
func (c *capsule) row(y float64) (lo, hi float64) {
	a, b, R := c.a, c.b, c.R
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, e := range [2]geom.Point{a, b} {
		if dy := y - e.Y; dy <= R && dy >= -R {
			w := math.Sqrt(R*R - dy*dy)
			lo, hi = min(lo, e.X-w), max(hi, e.X+w)
		}
	}
	switch {
	case c.l == 0:
	case c.flat:
		if dy := y - a.Y; dy <= R && dy >= -R {
			lo, hi = min(lo, min(a.X, b.X)), max(hi, max(a.X, b.X))
		}
	default:
		l, ux, uy := c.l, c.ux, c.uy
		// Projection on the segment: ux·(x−ax) + uy·(y−ay) ∈ [0, l].
		var p0, p1 float64
		if ux == 0 {
			if t := uy * (y - a.Y); t < 0 || t > l {
				return lo, hi
			}
			p0, p1 = math.Inf(-1), math.Inf(1)
		} else {
			p0 = a.X - uy*(y-a.Y)/ux
			p1 = a.X + (l-uy*(y-a.Y))/ux
			if p0 > p1 {
				p0, p1 = p1, p0
			}
		}
		// Distance from the line: |−uy·(x−ax) + ux·(y−ay)| ≤ R.
		q0 := a.X + (ux*(y-a.Y)-R)/uy
		q1 := a.X + (ux*(y-a.Y)+R)/uy
		if q0 > q1 {
			q0, q1 = q1, q0
		}
		if x0, x1 := max(p0, q0), min(p1, q1); x0 <= x1 {
			lo, hi = min(lo, x0), max(hi, x1)
		}
	}
	return lo, hi
}

// stampSeg records the segment ab as cut (see stampPath). joined says a
// segment ending at a was stamped before: the nodes behind a (projection
// before a on ab) are then left, since their distance to ab is their
// distance to a, which that segment already gave them, so only the strip
// and the end cap at b are swept.
func (g *bandedGrid) stampSeg(a, b geom.Point, joined bool) {
	s := g.stock
	// A node beside the cut edge lies within a node spacing of it (the
	// distance is 1-Lipschitz), so exact distances within r ± h suffice.
	R := s.r + g.h
	Rin := s.r - g.h
	ab := b.Sub(a)
	l2 := ab.X*ab.X + ab.Y*ab.Y
	j0 := max(0, int(math.Floor((min(a.Y, b.Y)-R-g.y0)/g.h)))
	j1 := min(g.ny-1, int(math.Ceil((max(a.Y, b.Y)+R-g.y0)/g.h)))
	cs := newCapsule(a, b, R)
	for j := j0; j <= j1; j++ {
		y := g.y0 + float64(j)*g.h
		lo, hi := cs.row(y)
		if lo > hi {
			continue
		}
		if joined && l2 > 0 {
			// The half-plane (x−a)·ab ≥ 0, a node's width wider.
			q := (y - a.Y) * ab.Y
			switch {
			case ab.X > 0:
				lo = max(lo, a.X-q/ab.X-g.h)
			case ab.X < 0:
				hi = min(hi, a.X-q/ab.X+g.h)
			case q < 0:
				continue
			}
		}
		ci0 := max(0, int(math.Ceil((lo-g.x0)/g.h)))
		ci1 := min(g.nx-1, int(math.Floor((hi-g.x0)/g.h)))
		row := j * g.nx
		for i := ci0; i <= ci1; i++ {
			// A node already within Rin of the path is deep in the cut;
			// only distances above Rin are ever read (uncut tests
			// against r, and the cut edge lies between a node beyond r
			// and a neighbour at least r − h away), so it is left.
			c := float64(s.cl[row+i])
			if c <= Rin {
				continue
			}
			x := g.x0 + float64(i)*g.h
			px, py := x-a.X, y-a.Y
			t := 0.0
			if l2 > 0 {
				t = (px*ab.X + py*ab.Y) / l2
				if t < 0 {
					t = 0
				} else if t > 1 {
					t = 1
				}
			}
			dx, dy := px-t*ab.X, py-t*ab.Y
			if d2 := dx*dx + dy*dy; d2 < c*c {
				s.cl[row+i] = float32(math.Sqrt(d2))
			}
		}
	}
}

// uncut reports whether node k holds material no pass has cut yet.
func (s *bandedStock) uncut(k int) bool { return s.mat[k] && float64(s.cl[k]) > s.r }

// materialDistance computes, for the nodes g.touched, the distance to the
// nearest uncut material up to r (r: none within reach), into s.dm: a
// vector distance sweep from the edge of the uncut material (points
// interpolated between an uncut node and a cut or air neighbour) through
// the nodes that hold none, over the buckets within r of a touched node.
func (g *bandedGrid) materialDistance() {
	s := g.stock
	s.gen++
	if s.gen == 0 {
		for i := range s.dgen {
			s.dgen[i] = 0
		}
		for i := range s.bmark {
			s.bmark[i] = 0
		}
		s.gen = 1
	}
	gen := s.gen
	s.blist = s.blist[:0]
	for _, k := range g.touched {
		bi, bj := int(k)%g.nx/s.bs, int(k)/g.nx/s.bs
		for dj := -1; dj <= 1; dj++ {
			for di := -1; di <= 1; di++ {
				ii, jj := bi+di, bj+dj
				if ii < 0 || jj < 0 || ii >= s.bnx || jj >= s.bny {
					continue
				}
				if b := jj*s.bnx + ii; s.bmark[b] != gen {
					s.bmark[b] = gen
					s.blist = append(s.blist, int32(b))
				}
			}
		}
	}
	s.seeds = s.seeds[:0]
	s.heap.reset()
	r := float32(s.r)
	set := func(k int, d float32, src int32) {
		s.dm[k], s.dsrc[k], s.dgen[k] = d, src, gen
		s.heap.push(int32(k), d)
	}
	for _, b := range s.blist {
		bi, bj := int(b)%s.bnx, int(b)/s.bnx
		for j := bj * s.bs; j < min(g.ny, (bj+1)*s.bs); j++ {
			for i := bi * s.bs; i < min(g.nx, (bi+1)*s.bs); i++ {
				k := j*g.nx + i
				if !s.uncut(k) {
					continue
				}
				for _, o := range [4][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
					ii, jj := i+o[0], j+o[1]
					if ii < 0 || jj < 0 || ii >= g.nx || jj >= g.ny {
						continue
					}
					kk := jj*g.nx + ii
					var e geom.Point
					switch {
					case s.air[kk]:
						e = g.pt(k).Lerp(g.pt(kk), 0.5)
					case s.mat[kk] && s.cl[kk] <= r:
						// The cut edge lies where the distance to the path
						// is r, between the two nodes.
						t := float64((r - s.cl[kk]) / (s.cl[k] - s.cl[kk]))
						e = g.pt(kk).Lerp(g.pt(k), max(0, min(1, t)))
					default:
						continue
					}
					src := int32(len(s.seeds))
					s.seeds = append(s.seeds, e)
					d := float32(g.pt(kk).Dist(e))
					if s.dgen[kk] != gen || d < s.dm[kk] {
						set(kk, d, src)
					}
				}
			}
		}
	}
	for s.heap.n > 0 {
		k, d := s.heap.pop()
		if d > s.dm[k] {
			continue
		}
		e := s.seeds[s.dsrc[k]]
		i, j := int(k)%g.nx, int(k)/g.nx
		for dj := -1; dj <= 1; dj++ {
			for di := -1; di <= 1; di++ {
				ii, jj := i+di, j+dj
				if (di == 0 && dj == 0) || ii < 0 || jj < 0 || ii >= g.nx || jj >= g.ny {
					continue
				}
				kk := jj*g.nx + ii
				if s.uncut(kk) || s.bmark[s.brow[jj]+s.bcol[ii]] != gen {
					continue
				}
				px, py := g.x0+float64(ii)*g.h-e.X, g.y0+float64(jj)*g.h-e.Y
				nd := max(float32(math.Sqrt(px*px+py*py)), d)
				if nd <= r && (s.dgen[kk] != gen || nd < s.dm[kk]) {
					set(kk, nd, s.dsrc[k])
				}
			}
		}
	}
}

// matDist returns the distance from node k to uncut material after
// materialDistance: 0 on uncut material, r when none lies within reach.
func (g *bandedGrid) matDist(k int) float64 {
	s := g.stock
	if s.uncut(k) {
		return 0
	}
	if s.dgen[k] == s.gen {
		return float64(s.dm[k])
	}
	return s.r
}
