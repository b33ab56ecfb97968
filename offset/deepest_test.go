package offset

import (
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// checkDeepest asserts the contract every answer must meet whatever the
// reference: the point is inside g at exactly the reported radius.
func checkDeepest(t *testing.T, g geom.Region, p geom.Point, r float64) {
	t.Helper()
	if !g.Contains(p) {
		t.Fatalf("deepest point %v is not inside the region", p)
	}
	if d := g.DistanceToBoundary(p); math.Abs(d-r) > 1e-9 {
		t.Fatalf("reported radius %.9f but the point is %.9f from the boundary", r, d)
	}
}

func TestDeepestPointRectangle(t *testing.T) {
	const tol = 1e-3
	for _, c := range []struct{ w, h float64 }{{40, 40}, {60, 20}, {7, 31}, {100, 3}} {
		g := geom.Region{Outer: geom.RectRing(5, -2, 5+c.w, -2+c.h)}
		p, r, err := DeepestPoint(g, tol)
		if err != nil {
			t.Fatal(err)
		}
		checkDeepest(t, g, p, r)
		// Elementary geometry, worked by hand: the largest circle in a
		// w×h rectangle has radius min(w,h)/2; its centre lies on the
		// segment of points at that distance from both long sides.
		want := math.Min(c.w, c.h) / 2
		if r < want-tol || r > want+1e-12 {
			t.Errorf("%gx%g: radius %.6f, want %.6f within %g", c.w, c.h, r, want, tol)
		}
		cx, cy := 5+c.w/2, -2+c.h/2
		if c.w >= c.h {
			if math.Abs(p.Y-cy) > tol || p.X < 5+want-tol || p.X > 5+c.w-want+tol {
				t.Errorf("%gx%g: centre %v not on the centre segment y=%g", c.w, c.h, p, cy)
			}
		} else if math.Abs(p.X-cx) > tol || p.Y < -2+want-tol || p.Y > -2+c.h-want+tol {
			t.Errorf("%gx%g: centre %v not on the centre segment x=%g", c.w, c.h, p, cx)
		}
		if c.w == c.h && p.Dist(geom.Pt(cx, cy)) > 2*tol {
			t.Errorf("square: centre %v, want (%g, %g)", p, cx, cy)
		}
	}
}

func TestDeepestPointRegularPolygon(t *testing.T) {
	const tol = 1e-4
	for _, n := range []int{3, 5, 6, 12, 40} {
		R := 10.0
		g := geom.Region{Outer: geom.Circle(geom.Pt(3, 4), R, n)}
		p, r, err := DeepestPoint(g, tol)
		if err != nil {
			t.Fatal(err)
		}
		checkDeepest(t, g, p, r)
		// Elementary geometry: the inscribed circle of a regular n-gon of
		// circumradius R is centred at its centre with radius equal to the
		// apothem R·cos(π/n).
		want := R * math.Cos(math.Pi/float64(n))
		if r < want-tol || r > want+1e-9 {
			t.Errorf("n=%d: radius %.7f, want apothem %.7f", n, r, want)
		}
		// Elementary geometry: moving a distance u from the centre brings
		// some edge at least u·cos(π/n) closer, so a point within tol of
		// the optimum lies within tol/cos(π/n) ≤ 2·tol of the centre.
		if d := p.Dist(geom.Pt(3, 4)); d > 2*tol+1e-9 {
			t.Errorf("n=%d: centre %v is %.6f from (3, 4)", n, p, d)
		}
	}
}

func TestDeepestPointSquareWithSquareHole(t *testing.T) {
	const tol = 1e-4
	// Outer square of half-side a, centred hole of half-side b.
	a, b := 10.0, 4.0
	g := geom.Region{
		Outer: geom.RectRing(-a, -a, a, a),
		Holes: []geom.Ring{geom.RectRing(-b, -b, b, b).Reversed()},
	}
	p, r, err := DeepestPoint(g, tol)
	if err != nil {
		t.Fatal(err)
	}
	checkDeepest(t, g, p, r)
	// Elementary geometry, worked by hand: the band is a−b wide, but in a
	// corner the circle can be larger. Centre (t, t) on the diagonal,
	// touching the outer sides (radius a−t) and the hole's corner (b, b)
	// (distance √2·(t−b)): a−t = √2(t−b) gives t = (a+√2·b)/(1+√2) and
	// radius (2−√2)(a−b) ≈ 3.5147 > (a−b)/2 = 3. One such circle per corner.
	want := (2 - math.Sqrt2) * (a - b)
	tc := a - want
	if r < want-tol || r > want+1e-9 {
		t.Errorf("radius %.7f, want (2−√2)(a−b) = %.7f", r, want)
	}
	if math.Abs(math.Abs(p.X)-tc) > 0.05 || math.Abs(math.Abs(p.Y)-tc) > 0.05 {
		t.Errorf("centre %v, want (±%.4f, ±%.4f)", p, tc, tc)
	}
}

func TestDeepestPointLShape(t *testing.T) {
	const tol = 1e-4
	t.Run("equal arms", func(t *testing.T) {
		// Arms 4 wide and 10 long meeting at the origin.
		g := geom.Region{Outer: ringXY(0, 0, 10, 0, 10, 4, 4, 4, 4, 10, 0, 10)}
		p, r, err := DeepestPoint(g, tol)
		if err != nil {
			t.Fatal(err)
		}
		checkDeepest(t, g, p, r)
		// Elementary geometry, worked by hand: an arm alone holds radius
		// 2, but at the bend a circle centred (t, t) touches both outer
		// sides (radius t) and the reflex corner (4, 4) (distance
		// √2·(4−t)): t = 4√2/(1+√2) = 4(2−√2) ≈ 2.3431.
		want := 4 * (2 - math.Sqrt2)
		if r < want-tol || r > want+1e-9 {
			t.Errorf("radius %.7f, want 4(2−√2) = %.7f", r, want)
		}
		if p.Dist(geom.Pt(want, want)) > 0.05 {
			t.Errorf("centre %v, want (%.4f, %.4f)", p, want, want)
		}
	})
	t.Run("unequal arms", func(t *testing.T) {
		// A 6-wide arm along X and a 4-wide arm along Y.
		g := geom.Region{Outer: ringXY(0, 0, 20, 0, 20, 6, 4, 6, 4, 20, 0, 20)}
		p, r, err := DeepestPoint(g, tol)
		if err != nil {
			t.Fatal(err)
		}
		checkDeepest(t, g, p, r)
		// Elementary geometry, worked by hand: the wide arm alone holds
		// radius 3; at the bend a circle centred (r, r) touching both outer
		// sides and the reflex corner (4, 6) has (4−r)² + (6−r)² = r², so
		// r² − 20r + 52 = 0 and r = 10 − 4√3 ≈ 3.0718 > 3.
		want := 10 - 4*math.Sqrt(3)
		if r < want-tol || r > want+1e-9 {
			t.Errorf("radius %.7f, want 10−4√3 = %.7f", r, want)
		}
		if p.Dist(geom.Pt(want, want)) > 0.05 {
			t.Errorf("centre %v, want (%.4f, %.4f)", p, want, want)
		}
	})
}

func TestDeepestPointOrientationAndDeterminism(t *testing.T) {
	// The same region given clockwise must give the same answer (the
	// definition does not depend on orientation; no outside source needed
	// beyond that), and repeated calls the same bytes.
	g := geom.Region{Outer: ringXY(0, 0, 20, 0, 20, 6, 4, 6, 4, 20, 0, 20)}
	p1, r1, err := DeepestPoint(g, 0)
	if err != nil {
		t.Fatal(err)
	}
	p2, r2, err := DeepestPoint(geom.Region{Outer: g.Outer.Reversed()}, 0)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r1-r2) > DefaultTolerance {
		t.Errorf("clockwise ring: radius %v vs %v", r2, r1)
	}
	p3, r3, _ := DeepestPoint(g, 0)
	if p3 != p1 || r3 != r1 {
		t.Errorf("second call gave %v %v, first %v %v", p3, r3, p1, r1)
	}
	_ = p2
}

func TestDeepestPointOfShape(t *testing.T) {
	s := geom.Shape{
		{Outer: geom.RectRing(0, 0, 10, 10)},  // radius 5
		{Outer: geom.RectRing(20, 0, 44, 12)}, // radius 6
		{Outer: geom.RectRing(50, 0, 51, 1)},  // radius 0.5, skipped by its bounds
	}
	p, r, i, err := DeepestPointOfShape(s, 1e-4)
	if err != nil {
		t.Fatal(err)
	}
	// Elementary geometry: the 24×12 rectangle holds the largest circle,
	// radius 6, centred on y = 6.
	if i != 1 || math.Abs(r-6) > 1e-4 || math.Abs(p.Y-6) > 1e-3 {
		t.Errorf("got region %d, radius %v at %v; want region 1, radius 6 on y=6", i, r, p)
	}
	if _, _, _, err := DeepestPointOfShape(nil, 0); err == nil {
		t.Error("empty shape: no error")
	}
}

func TestDeepestPointBadInput(t *testing.T) {
	// Facts of the definition: no interior, no answer.
	for name, g := range map[string]geom.Region{
		"two points": {Outer: ringXY(0, 0, 1, 1)},
		"collinear":  {Outer: ringXY(0, 0, 1, 1, 2, 2)},
		"NaN":        {Outer: ringXY(0, 0, 1, 0, math.NaN(), 1)},
		"Inf":        {Outer: ringXY(0, 0, 1, 0, math.Inf(1), 1)},
	} {
		if _, _, err := DeepestPoint(g, 0); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, _, err := DeepestPoint(geom.Region{Outer: geom.RectRing(0, 0, 1, 1)}, math.NaN()); err == nil {
		t.Error("NaN tolerance: no error")
	}
}

func BenchmarkDeepestPoint(b *testing.B) {
	// A 2,000-vertex regular polygon: flat-ridge-free, distance dominated.
	g := geom.Region{Outer: geom.Circle(geom.Pt(0, 0), 50, 2000)}
	for b.Loop() {
		if _, _, err := DeepestPoint(g, 0); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkDeepestPointLongRectangle(b *testing.B) {
	// A flat ridge: every point of the centre segment is equally deep.
	g := geom.Region{Outer: geom.RectRing(0, 0, 200, 40)}
	for b.Loop() {
		if _, _, err := DeepestPoint(g, 0); err != nil {
			b.Fatal(err)
		}
	}
}

// ringXY builds a ring from x, y pairs.
func ringXY(xy ...float64) geom.Ring {
	r := make(geom.Ring, len(xy)/2)
	for i := range r {
		r[i] = geom.Pt(xy[2*i], xy[2*i+1])
	}
	return r
}
