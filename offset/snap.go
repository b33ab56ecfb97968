package offset

import (
	"cmp"
	"math"
	"math/bits"

	"github.com/chipband/chipband/geom"
)

// The offsetter works on a fixed grid: every coordinate is an int64 count of
// grid units of 1 nm (1e-6 mm). Orientation and intersection predicates on
// grid points are exact (128-bit products where 64 bits do not suffice).

const gridScale = 1e6 // grid units per millimetre

// ipt is a point on the grid.
type ipt struct{ x, y int64 }

func snap(p geom.Point) ipt {
	return ipt{int64(math.Round(p.X * gridScale)), int64(math.Round(p.Y * gridScale))}
}

func (p ipt) point() geom.Point {
	return geom.Point{X: float64(p.x) / gridScale, Y: float64(p.y) / gridScale}
}

func (p ipt) less(q ipt) bool { return p.x < q.x || (p.x == q.x && p.y < q.y) }

func cmpIpt(p, q ipt) int { return cmp.Or(cmp.Compare(p.x, q.x), cmp.Compare(p.y, q.y)) }

// i128 is a signed 128-bit integer in two's complement.
type i128 struct {
	hi int64
	lo uint64
}

func mul64(a, b int64) i128 {
	neg := (a < 0) != (b < 0)
	ua, ub := uint64(a), uint64(b)
	if a < 0 {
		ua = uint64(-a)
	}
	if b < 0 {
		ub = uint64(-b)
	}
	hi, lo := bits.Mul64(ua, ub)
	r := i128{int64(hi), lo}
	if neg {
		r = r.neg()
	}
	return r
}

func (x i128) neg() i128 {
	lo := ^x.lo + 1
	hi := ^x.hi
	if lo == 0 {
		hi++
	}
	return i128{hi, lo}
}

func (x i128) add(y i128) i128 {
	lo, c := bits.Add64(x.lo, y.lo, 0)
	return i128{x.hi + y.hi + int64(c), lo}
}

func (x i128) sub(y i128) i128 {
	lo, b := bits.Sub64(x.lo, y.lo, 0)
	return i128{x.hi - y.hi - int64(b), lo}
}

func (x i128) sign() int {
	switch {
	case x.hi < 0:
		return -1
	case x.hi == 0 && x.lo == 0:
		return 0
	}
	return 1
}

func (x i128) cmp(y i128) int { return x.sub(y).sign() }

// float returns x rounded to a float64. A negative x is converted through
// its magnitude: hi·2⁶⁴ + lo with hi = −1 would cancel catastrophically.
func (x i128) float() float64 {
	if x.hi < 0 {
		n := x.neg()
		return -(float64(uint64(n.hi))*0x1p64 + float64(n.lo))
	}
	return float64(x.hi)*0x1p64 + float64(x.lo)
}

const small = 1 << 31

func fits(v int64) bool { return uint64(v+small) < 2*small }

// cross returns a×b exactly.
func cross(ax, ay, bx, by int64) i128 {
	if fits(ax) && fits(ay) && fits(bx) && fits(by) {
		v := ax*by - ay*bx
		if v < 0 {
			return i128{-1, uint64(v)}
		}
		return i128{0, uint64(v)}
	}
	return mul64(ax, by).sub(mul64(ay, bx))
}

// crossSign returns the sign of a×b exactly.
func crossSign(ax, ay, bx, by int64) int {
	if fits(ax) && fits(ay) && fits(bx) && fits(by) {
		v := ax*by - ay*bx
		switch {
		case v < 0:
			return -1
		case v > 0:
			return 1
		}
		return 0
	}
	return mul64(ax, by).sub(mul64(ay, bx)).sign()
}

// dot returns a·b exactly.
func dot(ax, ay, bx, by int64) i128 {
	if fits(ax) && fits(ay) && fits(bx) && fits(by) {
		v := ax*bx + ay*by
		if v < 0 {
			return i128{-1, uint64(v)}
		}
		return i128{0, uint64(v)}
	}
	return mul64(ax, bx).add(mul64(ay, by))
}

// orient returns +1 when c lies left of the directed line ab, −1 when right,
// 0 when the three points are collinear.
func orient(a, b, c ipt) int {
	return crossSign(b.x-a.x, b.y-a.y, c.x-a.x, c.y-a.y)
}

// properCross reports whether segments ab and cd cross at a single point
// interior to both.
func properCross(a, b, c, d ipt) bool {
	o1 := orient(a, b, c)
	o2 := orient(a, b, d)
	if o1 == 0 || o2 == 0 || o1 == o2 {
		return false
	}
	o3 := orient(c, d, a)
	o4 := orient(c, d, b)
	return o3 != 0 && o4 != 0 && o3 != o4
}

// crossPoint returns the intersection of the lines through ab and cd as
// floating-point grid coordinates (the segments must cross properly).
func crossPoint(a, b, c, d ipt) (float64, float64) {
	den := cross(b.x-a.x, b.y-a.y, d.x-c.x, d.y-c.y)
	num := cross(c.x-a.x, c.y-a.y, d.x-c.x, d.y-c.y)
	t := num.float() / den.float()
	return float64(a.x) + t*float64(b.x-a.x), float64(a.y) + t*float64(b.y-a.y)
}

// segHitsPixel reports whether segment ab meets the closed unit square
// centred on grid point c (the hot pixel of c). Exact.
func segHitsPixel(a, b, c ipt) bool {
	// Bounding boxes, in doubled coordinates: the square is [2c−1, 2c+1].
	if 2*min(a.x, b.x) > 2*c.x+1 || 2*max(a.x, b.x) < 2*c.x-1 ||
		2*min(a.y, b.y) > 2*c.y+1 || 2*max(a.y, b.y) < 2*c.y-1 {
		return false
	}
	// The square's corners must not lie strictly on one side of the line.
	dx, dy := 2*(b.x-a.x), 2*(b.y-a.y)
	pos, neg := false, false
	for _, k := range [4][2]int64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
		s := crossSign(dx, dy, 2*(c.x-a.x)+k[0], 2*(c.y-a.y)+k[1])
		if s >= 0 {
			pos = true
		}
		if s <= 0 {
			neg = true
		}
	}
	return pos && neg
}
