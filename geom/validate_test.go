package geom

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The validity rules checked here are those of OGC Simple Features
// (ISO 19125-1 §6.1.11: rings simple and closed, holes inside the exterior,
// interiors disjoint) made stricter as chipband's Validate documents: no two
// rings may share any point. Expected positions are worked out by hand.

func TestRingValidateCases(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name string
		r    Ring
		kind error
		msg  string // substring of the message, "" for none
	}{
		{"square is valid", RectRing(0, 0, 10, 10), nil, ""},
		{"collinear run is valid", Ring{{0, 0}, {1, 0}, {2, 0}, {2, 2}, {0, 2}}, nil, ""},
		{"empty", Ring{}, ErrTooFewPoints, "(ring has 0)"},
		{"two distinct points", Ring{{0, 0}, {1, 1}, {0, 0}, {1, 1}}, ErrTooFewPoints, "(ring has 2)"},
		{"NaN", Ring{{0, 0}, {1, 0}, {nan, 1}}, ErrNotFinite, "vertex 2"},
		{"Inf", Ring{{0, 0}, {math.Inf(-1), 0}, {1, 1}}, ErrNotFinite, "vertex 1"},
		{"beyond MaxCoord", Ring{{0, 0}, {2e6, 0}, {1, 1}}, ErrOutOfRange, "vertex 1 (2000000, 0)"},
		{"repeated point", Ring{{0, 0}, {1, 0}, {1, 0}, {1, 1}}, ErrRepeatedPoint, "vertex 2, same as vertex 1"},
		{"closing point repeated", Ring{{0, 0}, {1, 0}, {1, 1}, {0, 0}}, ErrRepeatedPoint, "rings close implicitly"},
		{"all collinear", Ring{{0, 0}, {1, 0}, {2, 0}}, ErrZeroArea, ""},
		// The diagonals of the square [0,2]² cross at its centre (1, 1).
		{"bow tie", Ring{{0, 0}, {2, 2}, {2, 0}, {0, 2}}, ErrSelfIntersection, "at edges 0 and 2 near (1, 1)"},
		// Vertex 3 (2, 0) lies on edge 0 from (0,0) to (4,0).
		{"vertex on edge", Ring{{0, 0}, {4, 0}, {4, 4}, {2, 0}, {0, 4}}, ErrSelfIntersection, "at edges 0 and 2 near (2, 0)"},
		// Edge 2 runs from (4,4) back down to (4,2) over edge 1.
		{"spike", Ring{{0, 0}, {4, 0}, {4, 4}, {4, 2}}, ErrSelfIntersection, "at edges 1 and 2 near (4, 4)"},
		// Vertices 1 and 4 are the same point (2, 1): a pinched figure eight.
		{"pinch", Ring{{0, 0}, {2, 1}, {4, 0}, {4, 2}, {2, 1}, {0, 2}}, ErrSelfIntersection, "at edges 0 and 3 near (2, 1)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.r.Validate()
			if c.kind == nil {
				if err != nil {
					t.Fatalf("got %v, want valid", err)
				}
				return
			}
			if !errors.Is(err, c.kind) {
				t.Fatalf("got %v, want kind %v", err, c.kind)
			}
			if !strings.Contains(err.Error(), c.msg) {
				t.Fatalf("message %q does not contain %q", err, c.msg)
			}
		})
	}
}

func TestRegionValidateCases(t *testing.T) {
	sq := RectRing(0, 0, 10, 10)
	hole := func(x0, y0, x1, y1 float64) Ring { return RectRing(x0, y0, x1, y1).Reversed() }
	cases := []struct {
		name string
		g    Region
		kind error
		msg  string
	}{
		{"plate with two holes", Region{sq, []Ring{hole(1, 1, 3, 3), hole(5, 5, 8, 8)}}, nil, ""},
		{"bad outer", Region{Ring{{0, 0}, {2, 2}, {2, 0}, {0, 2}}, nil}, ErrSelfIntersection, "outer ring: ring self-intersects"},
		{"bad hole", Region{sq, []Ring{hole(1, 1, 3, 3), {{1, 1}, {1, 1}}}}, ErrTooFewPoints, "hole 1: fewer than 3"},
		{"hole outside", Region{sq, []Ring{hole(20, 20, 22, 22)}}, ErrHoleOutside, "hole 0: hole not inside its outer ring (it lies outside)"},
		// The hole [8,12]² crosses the outer ring at (10, 8) and (8, 10); the
		// first pair in edge order is outer edge 1 (x = 10) with hole edge 2
		// (y = 8), which meet at (10, 8).
		{"hole crosses outer", Region{sq, []Ring{hole(8, 8, 12, 12)}}, ErrHoleOutside, "(its edge 2 meets edge 1 of the outer ring) near (10, 8)"},
		{"hole touches outer", Region{sq, []Ring{{{5, 4}, {5, 6}, {10, 5}}}}, ErrHoleOutside, "near (10, 5)"},
		{"holes cross", Region{sq, []Ring{hole(1, 1, 5, 5), hole(4, 4, 8, 8)}}, ErrHolesOverlap, "hole 0 edge"},
		{"holes touch at a corner", Region{sq, []Ring{hole(1, 1, 5, 5), hole(5, 5, 8, 8)}}, ErrHolesOverlap, "near (5, 5)"},
		{"hole in hole", Region{sq, []Ring{hole(1, 1, 9, 9), hole(3, 3, 4, 4)}}, ErrHolesOverlap, "(hole 1 lies inside hole 0)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.g.Validate()
			if c.kind == nil {
				if err != nil {
					t.Fatalf("got %v, want valid", err)
				}
				return
			}
			if !errors.Is(err, c.kind) {
				t.Fatalf("got %v, want kind %v", err, c.kind)
			}
			if !strings.Contains(err.Error(), c.msg) {
				t.Fatalf("message %q does not contain %q", err, c.msg)
			}
		})
	}
}

func TestShapeValidateCases(t *testing.T) {
	sq := func(x0, y0, x1, y1 float64) Region { return Region{Outer: RectRing(x0, y0, x1, y1)} }
	frame := Region{RectRing(0, 0, 10, 10), []Ring{RectRing(2, 2, 8, 8).Reversed()}}
	cases := []struct {
		name string
		s    Shape
		kind error
		msg  string
	}{
		{"empty shape", Shape{}, nil, ""},
		{"two apart", Shape{sq(0, 0, 1, 1), sq(2, 0, 3, 1)}, nil, ""},
		{"island in a hole", Shape{frame, sq(4, 4, 6, 6)}, nil, ""},
		{"bad region named", Shape{sq(0, 0, 1, 1), {Outer: Ring{{0, 0}, {1, 0}, {2, 0}}}}, ErrZeroArea, "region 1, outer ring: zero area"},
		{"hole error named", Shape{sq(0, 0, 1, 1), sq(3, 3, 4, 4), {Outer: RectRing(10, 10, 20, 20), Holes: []Ring{nil, RectRing(12, 12, 13, 13)}}},
			ErrTooFewPoints, "region 2, hole 0: fewer than 3"},
		{"crossing", Shape{sq(0, 0, 2, 2), sq(1, 1, 3, 3)}, ErrRegionsOverlap, "(regions 0 and 1 cross or touch)"},
		{"sharing an edge", Shape{sq(0, 0, 1, 1), sq(1, 0, 2, 1)}, ErrRegionsOverlap, "regions 0 and 1"},
		{"nested", Shape{sq(0, 0, 10, 10), sq(4, 4, 6, 6)}, ErrRegionsOverlap, "(regions 0 and 1 lie one inside the other)"},
		{"nested other order", Shape{sq(4, 4, 6, 6), sq(0, 0, 10, 10)}, ErrRegionsOverlap, "lie one inside the other"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.s.Validate()
			if c.kind == nil {
				if err != nil {
					t.Fatalf("got %v, want valid", err)
				}
				return
			}
			if !errors.Is(err, c.kind) {
				t.Fatalf("got %v, want kind %v", err, c.kind)
			}
			if !strings.Contains(err.Error(), c.msg) {
				t.Fatalf("message %q does not contain %q", err, c.msg)
			}
		})
	}
}

// The example message of the validation contract, checked in full.
func TestValidationMessageForm(t *testing.T) {
	bow := Ring{{0, 0}, {2, 2}, {2, 0}, {0, 2}}.Reversed() // hole orientation
	s := Shape{
		{Outer: RectRing(-10, -10, -5, -5)},
		{Outer: RectRing(100, 100, 101, 101)},
		{Outer: RectRing(-1, -1, 5, 5), Holes: []Ring{RectRing(3, 3, 4, 4).Reversed(), bow}},
	}
	got := s.Validate().Error()
	// Reversed bow tie: (0,2) (2,0) (2,2) (0,0); edges 0 and 2 are the
	// diagonals, crossing at (1, 1).
	want := "region 2, hole 1: ring self-intersects at edges 0 and 2 near (1, 1)"
	if got != want {
		t.Fatalf("got %q\nwant %q", got, want)
	}
}

// A polygon of 100,000 vertices must validate quickly; an O(n²) pair test
// would take minutes here. (Speed targets live in the benchmark.)
func TestValidateLargeRing(t *testing.T) {
	r := Circle(Pt(0, 0), 100, 100000)
	if err := r.Validate(); err != nil {
		t.Fatal(err)
	}
	// Pull the vertex at angle π across the circle beyond the vertex at
	// angle 0: its two edges then cross the ring's boundary there.
	r[50000] = Pt(100.1, 0)
	if err := r.Validate(); !errors.Is(err, ErrSelfIntersection) {
		t.Fatalf("got %v, want self-intersection", err)
	}
}

func BenchmarkValidateCircle100k(b *testing.B) {
	r := Circle(Pt(0, 0), 100, 100000)
	for b.Loop() {
		if err := r.Validate(); err != nil {
			b.Fatal(err)
		}
	}
}

// Kettner, Mehlhorn, Pion, Schirra, Yap, "Classroom examples of robustness
// problems in geometric computations", CGTA 40 (2008): near the line y = x
// through q = (12, 12) and r = (24, 24), the sign of orient(q, r, p) for
// p = (0.5 + k·u, 0.5 + l·u) is the sign of l − k (u = 2⁻⁵³), which naive
// float evaluation gets wrong for many (k, l).
func TestOrientExactNearCollinear(t *testing.T) {
	q, r := Pt(12, 12), Pt(24, 24)
	u := math.Ldexp(1, -53)
	for k := 0; k < 64; k++ {
		for l := 0; l < 64; l++ {
			p := Pt(0.5+float64(k)*u, 0.5+float64(l)*u)
			want := 0
			// 0.5 + k·u is exact only where the float grid allows; use the
			// stored values to state the expected sign.
			switch {
			case p.Y > p.X:
				want = 1
			case p.Y < p.X:
				want = -1
			}
			if got := Orient(q, r, p); got != want {
				t.Fatalf("k=%d l=%d: Orient = %d, want %d", k, l, got, want)
			}
		}
	}
}

// Facts of plane geometry: a point left of a directed line turns
// counter-clockwise, right of it clockwise.
func TestOrientBasic(t *testing.T) {
	if Orient(Pt(0, 0), Pt(1, 0), Pt(0, 1)) != 1 || Orient(Pt(0, 0), Pt(1, 0), Pt(0, -1)) != -1 ||
		Orient(Pt(0, 0), Pt(1, 1), Pt(0.1, 0.1)) != 0 {
		t.Fatal("wrong orientation")
	}
}

func TestClean(t *testing.T) {
	r := Ring{{0, 0}, {0, 0}, {1, 0}, {1, 1}, {1, 1}, {0, 0}, {0, 0}}
	got := r.Clean()
	want := Ring{{0, 0}, {1, 0}, {1, 1}}
	if len(got) != len(want) {
		t.Fatalf("got %v, want %v", got, want)
	}
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("got %v, want %v", got, want)
		}
	}
	g := Region{Outer: RectRing(0, 0, 4, 4).Reversed(), Holes: []Ring{RectRing(1, 1, 2, 2)}}.Clean()
	if !g.Outer.CCW() || g.Holes[0].CCW() {
		t.Fatal("orientation not normalised")
	}
}

// Facts of plane geometry: two closed segments meet when they cross, when
// an end of one lies on the other, or when they overlap on one line.
func TestSegmentsMeet(t *testing.T) {
	cases := []struct {
		a, b, c, d Point
		want       bool
	}{
		{Pt(0, 0), Pt(2, 2), Pt(0, 2), Pt(2, 0), true},  // cross at (1, 1)
		{Pt(0, 0), Pt(2, 0), Pt(1, 0), Pt(1, 5), true},  // T junction
		{Pt(0, 0), Pt(2, 0), Pt(2, 0), Pt(3, 1), true},  // shared end
		{Pt(0, 0), Pt(2, 0), Pt(1, 0), Pt(3, 0), true},  // collinear overlap
		{Pt(0, 0), Pt(2, 0), Pt(3, 0), Pt(4, 0), false}, // collinear apart
		{Pt(0, 0), Pt(2, 0), Pt(0, 1), Pt(2, 1), false}, // parallel
		{Pt(0, 0), Pt(2, 0), Pt(1, 1e-300), Pt(1, 1), false},
	}
	for i, c := range cases {
		if got := SegmentsMeet(c.a, c.b, c.c, c.d); got != c.want {
			t.Errorf("case %d: got %v, want %v", i, got, c.want)
		}
	}
}
