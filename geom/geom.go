// Package geom holds chipband's shared 2D types: points, rings, regions with
// holes and shapes made of disjoint regions, together with their measures,
// validation and readers, and the Toolpath and Move types that the planning
// and simulation packages exchange.
//
// Units are millimetres. A Ring is closed implicitly: its last point joins
// its first and is not repeated. After normalisation an outer ring runs
// counter-clockwise (positive signed area) and a hole runs clockwise.
package geom

import (
	"math"
)

// Point is a position in the XY plane, in millimetres.
type Point struct {
	X, Y float64
}

// Pt is shorthand for Point{x, y}.
func Pt(x, y float64) Point { return Point{x, y} }

// Add returns p+q.
func (p Point) Add(q Point) Point { return Point{p.X + q.X, p.Y + q.Y} }

// Sub returns p−q.
func (p Point) Sub(q Point) Point { return Point{p.X - q.X, p.Y - q.Y} }

// Scale returns p·k.
func (p Point) Scale(k float64) Point { return Point{p.X * k, p.Y * k} }

// Dot returns the dot product of p and q.
func (p Point) Dot(q Point) float64 { return p.X*q.X + p.Y*q.Y }

// Cross returns the z component of the cross product p × q.
func (p Point) Cross(q Point) float64 { return p.X*q.Y - p.Y*q.X }

// Len returns the length of p as a vector.
func (p Point) Len() float64 { return math.Hypot(p.X, p.Y) }

// Dist returns the distance between p and q.
func (p Point) Dist(q Point) float64 { return math.Hypot(p.X-q.X, p.Y-q.Y) }

// Unit returns p scaled to length 1, or the zero point when p is zero.
func (p Point) Unit() Point {
	l := p.Len()
	if l == 0 {
		return Point{}
	}
	return Point{p.X / l, p.Y / l}
}

// Perp returns p turned 90° counter-clockwise.
func (p Point) Perp() Point { return Point{-p.Y, p.X} }

// Lerp returns the point a fraction t of the way from p to q.
func (p Point) Lerp(q Point, t float64) Point {
	return Point{p.X + (q.X-p.X)*t, p.Y + (q.Y-p.Y)*t}
}

// Rect is an axis-aligned rectangle. An empty Rect has Min > Max.
type Rect struct {
	Min, Max Point
}

// EmptyRect returns a rectangle that contains nothing and grows to fit
// whatever is added to it.
func EmptyRect() Rect {
	inf := math.Inf(1)
	return Rect{Point{inf, inf}, Point{-inf, -inf}}
}

// Empty reports whether r contains no point.
func (r Rect) Empty() bool { return r.Min.X > r.Max.X || r.Min.Y > r.Max.Y }

// Extend returns the smallest rectangle holding r and p.
func (r Rect) Extend(p Point) Rect {
	return Rect{
		Point{math.Min(r.Min.X, p.X), math.Min(r.Min.Y, p.Y)},
		Point{math.Max(r.Max.X, p.X), math.Max(r.Max.Y, p.Y)},
	}
}

// Union returns the smallest rectangle holding r and s.
func (r Rect) Union(s Rect) Rect {
	if s.Empty() {
		return r
	}
	return r.Extend(s.Min).Extend(s.Max)
}

// Grow returns r with every side moved out by d (in when d < 0); an empty
// r stays empty.
func (r Rect) Grow(d float64) Rect {
	if r.Empty() {
		return r
	}
	return Rect{Point{r.Min.X - d, r.Min.Y - d}, Point{r.Max.X + d, r.Max.Y + d}}
}

// Intersect returns the part of r that lies in s (empty when none).
func (r Rect) Intersect(s Rect) Rect {
	return Rect{
		Point{math.Max(r.Min.X, s.Min.X), math.Max(r.Min.Y, s.Min.Y)},
		Point{math.Min(r.Max.X, s.Max.X), math.Min(r.Max.Y, s.Max.Y)},
	}
}

// Overlaps reports whether r and s share a point, boundaries included.
func (r Rect) Overlaps(s Rect) bool { return !r.Intersect(s).Empty() }

// Width returns the extent of r along X (0 when empty).
func (r Rect) Width() float64 { return math.Max(0, r.Max.X-r.Min.X) }

// Height returns the extent of r along Y (0 when empty).
func (r Rect) Height() float64 { return math.Max(0, r.Max.Y-r.Min.Y) }

// Contains reports whether p lies in r, boundary included.
func (r Rect) Contains(p Point) bool {
	return p.X >= r.Min.X && p.X <= r.Max.X && p.Y >= r.Min.Y && p.Y <= r.Max.Y
}

// Ring is a closed polygonal chain. The closing edge from the last point back
// to the first is implicit; the first point is not repeated at the end.
type Ring []Point

// SignedArea returns the area enclosed by r, positive when r runs
// counter-clockwise (shoelace formula).
func (r Ring) SignedArea() float64 {
	n := len(r)
	if n < 3 {
		return 0
	}
	// Shift by the first point to keep precision for far-away coordinates.
	o := r[0]
	var s float64
	for i := 1; i+1 < n; i++ {
		s += r[i].Sub(o).Cross(r[i+1].Sub(o))
	}
	return s / 2
}

// Area returns the unsigned area enclosed by r.
func (r Ring) Area() float64 { return math.Abs(r.SignedArea()) }

// CCW reports whether r runs counter-clockwise.
func (r Ring) CCW() bool { return r.SignedArea() > 0 }

// Perimeter returns the length of r including its closing edge.
func (r Ring) Perimeter() float64 {
	var l float64
	for i := range r {
		l += r[i].Dist(r[(i+1)%len(r)])
	}
	return l
}

// Bounds returns the bounding rectangle of r.
func (r Ring) Bounds() Rect {
	b := EmptyRect()
	for _, p := range r {
		b = b.Extend(p)
	}
	return b
}

// Reversed returns a copy of r running the other way.
func (r Ring) Reversed() Ring {
	out := make(Ring, len(r))
	for i, p := range r {
		out[len(r)-1-i] = p
	}
	return out
}

// Clone returns a copy of r.
func (r Ring) Clone() Ring { return append(Ring(nil), r...) }

// Winding returns the winding number of r around p (0 outside). Points on
// the boundary give an unspecified but finite result; use DistanceTo to
// treat them separately.
func (r Ring) Winding(p Point) int {
	w := 0
	n := len(r)
	for i := 0; i < n; i++ {
		a, b := r[i], r[(i+1)%n]
		if a.Y <= p.Y {
			if b.Y > p.Y && b.Sub(a).Cross(p.Sub(a)) > 0 {
				w++
			}
		} else if b.Y <= p.Y && b.Sub(a).Cross(p.Sub(a)) < 0 {
			w--
		}
	}
	return w
}

// ContainsPoint reports whether p lies strictly inside r by the non-zero
// winding rule.
func (r Ring) ContainsPoint(p Point) bool { return r.Winding(p) != 0 }

// DistanceTo returns the distance from p to the nearest point of r's boundary.
func (r Ring) DistanceTo(p Point) float64 {
	// The nearest point by squared distance, then one square root.
	d2, best := math.Inf(1), p
	n := len(r)
	for i := 0; i < n; i++ {
		q := ClosestOnSegment(p, r[i], r[(i+1)%n])
		if e := q.Sub(p); e.Dot(e) < d2 {
			d2, best = e.Dot(e), q
		}
	}
	if n == 0 {
		return math.Inf(1)
	}
	return p.Dist(best)
}

// SegmentDistance returns the distance from p to the segment ab.
func SegmentDistance(p, a, b Point) float64 {
	return p.Dist(ClosestOnSegment(p, a, b))
}

// ClosestOnSegment returns the point of segment ab nearest to p.
func ClosestOnSegment(p, a, b Point) Point {
	ab := b.Sub(a)
	l2 := ab.Dot(ab)
	if l2 == 0 {
		return a
	}
	t := p.Sub(a).Dot(ab) / l2
	switch {
	case t <= 0:
		return a
	case t >= 1:
		return b
	}
	return a.Add(ab.Scale(t))
}

// Region is an area bounded by one outer ring, less zero or more holes.
type Region struct {
	Outer Ring
	Holes []Ring
}

// Normalized returns a copy of g whose outer ring runs counter-clockwise and
// whose holes run clockwise.
func (g Region) Normalized() Region {
	out := Region{Outer: g.Outer.Clone()}
	if !out.Outer.CCW() {
		out.Outer = g.Outer.Reversed()
	}
	for _, h := range g.Holes {
		if h.CCW() {
			h = h.Reversed()
		} else {
			h = h.Clone()
		}
		out.Holes = append(out.Holes, h)
	}
	return out
}

// Area returns the area of the outer ring less the areas of the holes.
func (g Region) Area() float64 {
	a := g.Outer.Area()
	for _, h := range g.Holes {
		a -= h.Area()
	}
	return a
}

// Perimeter returns the total boundary length, holes included.
func (g Region) Perimeter() float64 {
	l := g.Outer.Perimeter()
	for _, h := range g.Holes {
		l += h.Perimeter()
	}
	return l
}

// Bounds returns the bounding rectangle of the outer ring.
func (g Region) Bounds() Rect { return g.Outer.Bounds() }

// Contains reports whether p lies strictly inside g: inside the outer ring
// and outside every hole.
func (g Region) Contains(p Point) bool {
	if !g.Outer.ContainsPoint(p) {
		return false
	}
	for _, h := range g.Holes {
		if h.ContainsPoint(p) {
			return false
		}
	}
	return true
}

// DistanceToBoundary returns the distance from p to the nearest point of any
// ring of g.
func (g Region) DistanceToBoundary(p Point) float64 {
	d := g.Outer.DistanceTo(p)
	for _, h := range g.Holes {
		d = math.Min(d, h.DistanceTo(p))
	}
	return d
}

// Rings returns the outer ring followed by the holes.
func (g Region) Rings() []Ring {
	return append([]Ring{g.Outer}, g.Holes...)
}

// Shape is a set of disjoint regions.
type Shape []Region

// Normalized returns a copy of s with every region normalised.
func (s Shape) Normalized() Shape {
	out := make(Shape, len(s))
	for i, g := range s {
		out[i] = g.Normalized()
	}
	return out
}

// Area returns the total area of the regions of s.
func (s Shape) Area() float64 {
	var a float64
	for _, g := range s {
		a += g.Area()
	}
	return a
}

// Perimeter returns the total boundary length of s.
func (s Shape) Perimeter() float64 {
	var l float64
	for _, g := range s {
		l += g.Perimeter()
	}
	return l
}

// Bounds returns the bounding rectangle of s.
func (s Shape) Bounds() Rect {
	b := EmptyRect()
	for _, g := range s {
		b = b.Union(g.Bounds())
	}
	return b
}

// Contains reports whether p lies strictly inside one of the regions of s.
func (s Shape) Contains(p Point) bool {
	for _, g := range s {
		if g.Contains(p) {
			return true
		}
	}
	return false
}

// DistanceToBoundary returns the distance from p to the nearest boundary of s
// (+Inf for an empty shape).
func (s Shape) DistanceToBoundary(p Point) float64 {
	d := math.Inf(1)
	for _, g := range s {
		d = math.Min(d, g.DistanceToBoundary(p))
	}
	return d
}

// Rings returns every ring of s, outer rings and holes alike.
func (s Shape) Rings() []Ring {
	var out []Ring
	for _, g := range s {
		out = append(out, g.Rings()...)
	}
	return out
}

// VertexCount returns the number of vertices over all rings of s.
func (s Shape) VertexCount() int {
	n := 0
	for _, r := range s.Rings() {
		n += len(r)
	}
	return n
}

// Circle returns a ring of n points on the circle of radius r about c,
// counter-clockwise, starting at angle 0.
func Circle(c Point, r float64, n int) Ring {
	out := make(Ring, n)
	for i := range out {
		a := 2 * math.Pi * float64(i) / float64(n)
		out[i] = Point{c.X + r*math.Cos(a), c.Y + r*math.Sin(a)}
	}
	return out
}

// RectRing returns the counter-clockwise ring of the rectangle with corners
// (x0, y0) and (x1, y1).
func RectRing(x0, y0, x1, y1 float64) Ring {
	return Ring{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}}
}
