package offset

import (
	"container/heap"
	"fmt"
	"math"

	"github.com/chipband/chipband/geom"
)

// deepestMaxCells bounds the work of one search. The search converges long
// before this on any region within geom's coordinate limits; reaching it
// means the input is degenerate and is reported as an error.
const deepestMaxCells = 20_000_000

// DeepestPoint returns the centre of the largest circle that fits inside g,
// holes respected, and the radius of that circle: the point of the region
// farthest from its boundary (its pole of inaccessibility). A helix entry
// or a trochoidal loop centred there has the most room.
//
// The result is within tol of the optimum: the returned point lies inside g
// at exactly the returned distance from its boundary, and no point of g is
// farther than radius+tol from the boundary. tol ≤ 0 means DefaultTolerance.
//
// The search covers the bounding box with square cells kept in a priority
// queue ordered by the best distance a cell could still hold (the distance
// at its centre plus its half-diagonal, since the distance to the boundary
// changes by at most the distance moved); the most promising cell is split
// in four until no cell can beat the best point found by more than tol.
// When several points are equally deep (a rectangle's centre line) any of
// them may be returned, but the same input always gives the same point.
//
// It fails on a region with fewer than three outer points, a non-finite
// coordinate or tolerance, or no interior.
func DeepestPoint(g geom.Region, tol float64) (geom.Point, float64, error) {
	if math.IsNaN(tol) || math.IsInf(tol, 0) {
		return geom.Point{}, 0, fmt.Errorf("deepest point: tolerance %v is not finite", tol)
	}
	if tol <= 0 {
		tol = DefaultTolerance
	}
	if len(g.Outer) < 3 {
		return geom.Point{}, 0, fmt.Errorf("deepest point: outer ring has %d points, need at least 3", len(g.Outer))
	}
	for ri, r := range g.Rings() {
		for pi, p := range r {
			if math.IsNaN(p.X) || math.IsNaN(p.Y) || math.IsInf(p.X, 0) || math.IsInf(p.Y, 0) {
				return geom.Point{}, 0, fmt.Errorf("deepest point: ring %d point %d is not finite (%v, %v)", ri, pi, p.X, p.Y)
			}
		}
	}
	if g.Area() <= 0 {
		return geom.Point{}, 0, fmt.Errorf("deepest point: region has no interior (area %g)", g.Area())
	}
	b := g.Bounds()
	w, h := b.Width(), b.Height()
	size := math.Max(w, h)
	// Below this the distances themselves are not more accurate.
	tol = math.Max(tol, 1e-12*math.Max(size, math.Max(math.Abs(b.Max.X), math.Abs(b.Max.Y))))

	s := newSignedDistance(g)
	cs := math.Max(math.Min(w, h), size/1024)
	half := cs / 2

	q := &cellQueue{}
	best := cell{c: regionCentroid(g)}
	best.d = s.at(best.c)
	if bc := newCell(b.Min.Lerp(b.Max, 0.5), 0, s); bc.d > best.d {
		best = bc
	}
	nx, ny := int(math.Ceil(w/cs)), int(math.Ceil(h/cs))
	for i := 0; i < nx; i++ {
		for j := 0; j < ny; j++ {
			c := newCell(geom.Pt(b.Min.X+(float64(i)+0.5)*cs, b.Min.Y+(float64(j)+0.5)*cs), half, s)
			if c.d > best.d {
				best = c
			}
			heap.Push(q, c)
		}
	}
	n := q.Len()
	for q.Len() > 0 {
		c := heap.Pop(q).(cell)
		if c.max-best.d <= tol {
			break // every remaining cell has a lower bound still
		}
		hh := c.h / 2
		for _, o := range [4]geom.Point{{X: -hh, Y: -hh}, {X: hh, Y: -hh}, {X: -hh, Y: hh}, {X: hh, Y: hh}} {
			k := newCell(c.c.Add(o), hh, s)
			if k.d > best.d {
				best = k
			}
			if k.max-best.d > tol {
				heap.Push(q, k)
			}
		}
		n += 4
		if n > deepestMaxCells {
			return geom.Point{}, 0, fmt.Errorf("deepest point: search did not converge after %d cells (degenerate region?)", n)
		}
	}
	if best.d <= 0 {
		return geom.Point{}, 0, fmt.Errorf("deepest point: found no interior point (region too thin for tolerance %g?)", tol)
	}
	return best.c, best.d, nil
}

// DeepestPointOfShape returns the deepest point over all regions of s (see
// DeepestPoint), its radius and the index of the region that holds it. Ties
// go to the lower index. It fails on an empty shape and on any region that
// DeepestPoint rejects, naming the region.
func DeepestPointOfShape(s geom.Shape, tol float64) (geom.Point, float64, int, error) {
	if len(s) == 0 {
		return geom.Point{}, 0, -1, fmt.Errorf("deepest point: empty shape")
	}
	bestP, bestR, bestI := geom.Point{}, math.Inf(-1), -1
	for i, g := range s {
		// A region cannot hold a circle wider than its bounding box.
		b := g.Bounds()
		if bound := math.Min(b.Width(), b.Height()) / 2; bound <= bestR {
			continue
		}
		p, r, err := DeepestPoint(g, tol)
		if err != nil {
			return geom.Point{}, 0, -1, fmt.Errorf("region %d: %w", i, err)
		}
		if r > bestR {
			bestP, bestR, bestI = p, r, i
		}
	}
	return bestP, bestR, bestI, nil
}

// cell is a square of half-size h about c; d is the signed distance at c
// and max the most any point of the cell can have.
type cell struct {
	c      geom.Point
	h      float64
	d, max float64
}

func newCell(c geom.Point, h float64, s *signedDistance) cell {
	d, e1, e2 := s.near(c)
	ub := d + h*math.Sqrt2
	if h > 0 && e1 >= 0 && e2 >= 0 {
		ub = math.Min(ub, s.pairBound(c, h, e1, e2))
	}
	return cell{c: c, h: h, d: d, max: ub}
}

// cellQueue is a max-heap of cells by max, ties broken by position so that
// the order of work, and hence the answer, never depends on heap history.
type cellQueue []cell

func (q cellQueue) Len() int { return len(q) }
func (q cellQueue) Less(i, j int) bool {
	if q[i].max != q[j].max {
		return q[i].max > q[j].max
	}
	if q[i].c.X != q[j].c.X {
		return q[i].c.X < q[j].c.X
	}
	return q[i].c.Y < q[j].c.Y
}
func (q cellQueue) Swap(i, j int) { q[i], q[j] = q[j], q[i] }
func (q *cellQueue) Push(x any)   { *q = append(*q, x.(cell)) }
func (q *cellQueue) Pop() any {
	old := *q
	c := old[len(old)-1]
	*q = old[:len(old)-1]
	return c
}

// signedDistance evaluates the distance to a region's boundary, positive
// inside and negative outside, in one pass over its edges.
type signedDistance struct {
	a, b   []geom.Point // edge i runs from a[i] to b[i]
	ring   []int        // ring index of edge i (0 = outer)
	nrings int
}

func newSignedDistance(g geom.Region) *signedDistance {
	s := &signedDistance{}
	for ri, r := range g.Rings() {
		for i := range r {
			s.a = append(s.a, r[i])
			s.b = append(s.b, r[(i+1)%len(r)])
			s.ring = append(s.ring, ri)
		}
	}
	s.nrings = len(g.Holes) + 1
	return s
}

func (s *signedDistance) at(p geom.Point) float64 {
	d, _, _ := s.near(p)
	return d
}

// near returns the signed distance at p and the indices of the two nearest
// edges (−1 when there are fewer).
func (s *signedDistance) near(p geom.Point) (float64, int, int) {
	d1, d2 := math.Inf(1), math.Inf(1)
	e1, e2 := -1, -1
	inside := false
	w, cur := 0, 0
	for i := range s.a {
		if s.ring[i] != cur {
			inside = ringInside(inside, cur, w)
			cur, w = s.ring[i], 0
		}
		a, b := s.a[i], s.b[i]
		if a.Y <= p.Y {
			if b.Y > p.Y && b.Sub(a).Cross(p.Sub(a)) > 0 {
				w++
			}
		} else if b.Y <= p.Y && b.Sub(a).Cross(p.Sub(a)) < 0 {
			w--
		}
		q := geom.ClosestOnSegment(p, a, b)
		dx, dy := p.X-q.X, p.Y-q.Y
		e := dx*dx + dy*dy
		switch {
		case e < d1:
			d2, e2 = d1, e1
			d1, e1 = e, i
		case e < d2:
			d2, e2 = e, i
		}
	}
	inside = ringInside(inside, cur, w)
	d := math.Sqrt(d1)
	if !inside {
		return -d, e1, e2
	}
	return d, e1, e2
}

// ringInside folds ring ri's winding number w into the inside flag: inside
// the outer ring and outside every hole.
func ringInside(inside bool, ri, w int) bool {
	if ri == 0 {
		return w != 0
	}
	return inside && w == 0
}

// pairBound returns an upper bound on the distance to the boundary over the
// square of half-size h about c, or +Inf when it does not apply. The
// distance is at most the smaller of the distances to edges i and j; where
// both are plain distances to their supporting lines over the whole square
// they are linear there, and the maximum of the smaller of two linear
// functions over a square lies at a corner or where they cross on its
// sides. This makes the bound exact on a flat ridge, such as a rectangle's
// centre line, which the half-diagonal bound alone would refine down to
// cells of size tol along its whole length.
func (s *signedDistance) pairBound(c geom.Point, h float64, i, j int) float64 {
	corners := [4]geom.Point{{X: c.X - h, Y: c.Y - h}, {X: c.X + h, Y: c.Y - h}, {X: c.X + h, Y: c.Y + h}, {X: c.X - h, Y: c.Y + h}}
	fi, ok := s.lineDistance(i, corners)
	if !ok {
		return math.Inf(1)
	}
	fj, ok := s.lineDistance(j, corners)
	if !ok {
		return math.Inf(1)
	}
	ub := math.Inf(-1)
	for k := 0; k < 4; k++ {
		ub = math.Max(ub, math.Min(fi[k], fj[k]))
		l := (k + 1) % 4
		gk, gl := fi[k]-fj[k], fi[l]-fj[l]
		if (gk < 0) != (gl < 0) && gk != gl {
			t := gk / (gk - gl)
			ub = math.Max(ub, math.Min(fi[k]+(fi[l]-fi[k])*t, fj[k]+(fj[l]-fj[k])*t))
		}
	}
	return ub
}

// lineDistance returns the distances from the corners to edge e when, over
// the whole square, the nearest point of the edge is inside it and the
// square lies on one side of its line, so that the distance is linear.
func (s *signedDistance) lineDistance(e int, corners [4]geom.Point) ([4]float64, bool) {
	var f [4]float64
	a, b := s.a[e], s.b[e]
	ab := b.Sub(a)
	l2 := ab.Dot(ab)
	if l2 == 0 {
		return f, false
	}
	l := math.Sqrt(l2)
	sign := 0.0
	for k, q := range corners {
		aq := q.Sub(a)
		if t := aq.Dot(ab) / l2; t < 0 || t > 1 {
			return f, false
		}
		cr := ab.Cross(aq)
		switch {
		case sign == 0:
			sign = math.Copysign(1, cr)
		case cr*sign < 0:
			return f, false
		}
		f[k] = cr * sign / l
	}
	return f, true
}

// regionCentroid returns the area centroid of g's outer ring, or the mean
// of its points when the ring has no area.
func regionCentroid(g geom.Region) geom.Point {
	r := g.Outer
	o := r[0]
	var a, cx, cy float64
	for i := 1; i+1 < len(r); i++ {
		p, q := r[i].Sub(o), r[i+1].Sub(o)
		c := p.Cross(q)
		a += c
		cx += (p.X + q.X) * c
		cy += (p.Y + q.Y) * c
	}
	if a == 0 {
		var m geom.Point
		for _, p := range r {
			m = m.Add(p)
		}
		return m.Scale(1 / float64(len(r)))
	}
	return geom.Pt(o.X+cx/(3*a), o.Y+cy/(3*a))
}
