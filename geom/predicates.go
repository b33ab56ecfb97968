package geom

import (
	"math"
	"math/big"
)

// Orient returns the sign of the turn a → b → c: +1 when c lies to the left
// of the directed line ab (counter-clockwise), −1 when it lies to the right
// and 0 when the three points are collinear. The answer is exact: a float64
// evaluation is used when its error bound proves the sign (the static
// error filter of orient2d in J. R. Shewchuk's 1997 paper on robust
// geometric predicates, Discrete & Computational Geometry 18), and exact
// rational arithmetic otherwise. The coordinates must be finite.
func Orient(a, b, c Point) int {
	detl := (b.X - a.X) * (c.Y - a.Y)
	detr := (b.Y - a.Y) * (c.X - a.X)
	det := detl - detr
	// Shewchuk's ccwerrboundA is (3 + 16ε)ε with ε = 2⁻⁵³; the bound below
	// is a little larger to also cover the rounding of the differences
	// b−a and c−a, which Shewchuk's filter assumes exact.
	const eps = 1.0 / (1 << 53)
	sum := math.Abs(detl) + math.Abs(detr)
	bound := (4 + 64*eps) * eps * sum
	if sum < 1e-250 {
		// Products this small may have lost bits to underflow.
		return orientExact(a, b, c)
	}
	if det > bound {
		return 1
	}
	if det < -bound {
		return -1
	}
	return orientExact(a, b, c)
}

// orientExact evaluates the orientation determinant in exact rational
// arithmetic.
func orientExact(a, b, c Point) int {
	var ax, ay, bx, by, cx, cy big.Rat
	ax.SetFloat64(a.X)
	ay.SetFloat64(a.Y)
	bx.SetFloat64(b.X)
	by.SetFloat64(b.Y)
	cx.SetFloat64(c.X)
	cy.SetFloat64(c.Y)
	var u, v, w, z, l, r big.Rat
	u.Sub(&bx, &ax)
	v.Sub(&cy, &ay)
	w.Sub(&by, &ay)
	z.Sub(&cx, &ax)
	l.Mul(&u, &v)
	r.Mul(&w, &z)
	return l.Cmp(&r)
}

// onSegment reports whether p, known to be collinear with a and b, lies on
// the closed segment ab.
func onSegment(p, a, b Point) bool {
	return math.Min(a.X, b.X) <= p.X && p.X <= math.Max(a.X, b.X) &&
		math.Min(a.Y, b.Y) <= p.Y && p.Y <= math.Max(a.Y, b.Y)
}

// SegmentsMeet reports whether the closed segments ab and cd share at least
// one point (crossing, touching or overlapping). It is exact for finite
// coordinates.
func SegmentsMeet(a, b, c, d Point) bool {
	_, ok := segmentContact(a, b, c, d)
	return ok
}

// segmentContact reports whether the closed segments ab and cd share a
// point and returns an approximation of one such point.
func segmentContact(a, b, c, d Point) (Point, bool) {
	// Bounding boxes first: cheap and exact.
	if math.Max(a.X, b.X) < math.Min(c.X, d.X) || math.Max(c.X, d.X) < math.Min(a.X, b.X) ||
		math.Max(a.Y, b.Y) < math.Min(c.Y, d.Y) || math.Max(c.Y, d.Y) < math.Min(a.Y, b.Y) {
		return Point{}, false
	}
	o1 := Orient(a, b, c)
	o2 := Orient(a, b, d)
	o3 := Orient(c, d, a)
	o4 := Orient(c, d, b)
	if o1*o2 < 0 && o3*o4 < 0 {
		return lineIntersection(a, b, c, d), true
	}
	switch {
	case o1 == 0 && onSegment(c, a, b):
		return c, true
	case o2 == 0 && onSegment(d, a, b):
		return d, true
	case o3 == 0 && onSegment(a, c, d):
		return a, true
	case o4 == 0 && onSegment(b, c, d):
		return b, true
	}
	return Point{}, false
}

// lineIntersection returns the crossing point of the lines through ab and cd
// (approximate; the lines must not be parallel).
func lineIntersection(a, b, c, d Point) Point {
	r := b.Sub(a)
	s := d.Sub(c)
	den := r.Cross(s)
	if den == 0 {
		return a
	}
	t := c.Sub(a).Cross(s) / den
	t = math.Max(0, math.Min(1, t))
	return a.Add(r.Scale(t))
}
