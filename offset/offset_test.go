package offset

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"github.com/chipband/chipband/geom"
)

const gridMM = 1e-6 // mm, the snapping grid

func regular(c geom.Point, n int, circumradius, phase float64) geom.Ring {
	r := make(geom.Ring, n)
	for i := range r {
		a := phase + 2*math.Pi*float64(i)/float64(n)
		r[i] = geom.Pt(c.X+circumradius*math.Cos(a), c.Y+circumradius*math.Sin(a))
	}
	return r
}

// convexHull returns the counter-clockwise convex hull (Andrew's monotone
// chain).
func convexHull(pts []geom.Point) geom.Ring {
	p := append([]geom.Point(nil), pts...)
	for i := 1; i < len(p); i++ {
		for j := i; j > 0 && (p[j].X < p[j-1].X || (p[j].X == p[j-1].X && p[j].Y < p[j-1].Y)); j-- {
			p[j], p[j-1] = p[j-1], p[j]
		}
	}
	var h geom.Ring
	for pass := 0; pass < 2; pass++ {
		start := len(h)
		for _, q := range p {
			for len(h) >= start+2 && h[len(h)-1].Sub(h[len(h)-2]).Cross(q.Sub(h[len(h)-2])) <= 0 {
				h = h[:len(h)-1]
			}
			h = append(h, q)
		}
		h = h[:len(h)-1]
		for i, j := 0, len(p)-1; i < j; i, j = i+1, j-1 {
			p[i], p[j] = p[j], p[i]
		}
	}
	return h
}

// Steiner's formula for the parallel body of a convex polygon K:
// area(K ⊕ dB) = A + P·d + π·d².
// Bound from tol: the corner arcs (total angle 2π, radius d) are replaced by
// chords with vertices on the arc and sagitta ≤ tol, so each chord's
// circular segment has area ≤ chord length · tol ≤ arc length · tol; the
// deficit lies in [0, 2π·d·tol]. Snapping to the 1 nm grid moves each
// boundary point by ≤ √2/2 nm, which changes the area by at most
// (perimeter) · 1 nm.
func TestSteinerOutwardConvex(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 60; trial++ {
		var k geom.Ring
		if trial%3 == 0 {
			k = regular(geom.Pt(rng.Float64()*10, 0), 3+rng.IntN(20), 5+20*rng.Float64(), rng.Float64())
		} else {
			var pts []geom.Point
			for i := 0; i < 5+rng.IntN(40); i++ {
				pts = append(pts, geom.Pt(100*rng.Float64()-50, 60*rng.Float64()-30))
			}
			k = convexHull(pts)
		}
		d := []float64{0.01, 0.5, 3, 17, 120}[trial%5]
		tol := []float64{0.001, 0.01, 0.0001}[trial%3]
		s := geom.Shape{{Outer: k}}
		got, err := Offset(s, d, tol)
		if err != nil {
			t.Fatal(err)
		}
		mustValid(t, got, "steiner")
		if len(got) != 1 || len(got[0].Holes) != 0 {
			t.Fatalf("trial %d: want one region without holes, got %d", trial, len(got))
		}
		a, p := k.Area(), k.Perimeter()
		want := a + p*d + math.Pi*d*d
		slack := (p + 2*math.Pi*d) * gridMM
		lo, hi := want-2*math.Pi*d*tol-slack, want+slack
		if ga := got.Area(); ga < lo || ga > hi {
			t.Errorf("trial %d (d=%g tol=%g): area %.9f, Steiner %.9f, allowed [%.9f, %.9f]", trial, d, tol, ga, want, lo, hi)
		}
	}
}

// Inward offsets of a rectangle are the rectangle (w−2d)×(h−2d) (elementary
// geometry: every point at distance ≥ d from all four sides).
func TestRectangleInward(t *testing.T) {
	for _, c := range []struct{ w, h, d float64 }{{10, 10, 1}, {10, 10, 4.999}, {100, 3, 1.4}, {37.5, 12.25, 0.001}, {1000, 2000, 499}} {
		s := geom.Shape{{Outer: geom.RectRing(-3, 7, -3+c.w, 7+c.h)}}
		got, err := Offset(s, -c.d, 0)
		if err != nil {
			t.Fatal(err)
		}
		mustValid(t, got, "rectangle")
		want := (c.w - 2*c.d) * (c.h - 2*c.d)
		if len(got) != 1 || len(got[0].Outer) != 4 {
			t.Fatalf("%+v: want a single rectangle, got %v", c, got)
		}
		if math.Abs(got.Area()-want) > 2*(c.w+c.h)*gridMM {
			t.Errorf("%+v: area %.9f, want (w−2d)(h−2d) = %.9f", c, got.Area(), want)
		}
		b := got.Bounds()
		if math.Abs(b.Min.X-(-3+c.d)) > gridMM || math.Abs(b.Max.Y-(7+c.h-c.d)) > gridMM {
			t.Errorf("%+v: bounds %v", c, b)
		}
	}
}

// A regular polygon's inward offset by d is the similar polygon with
// apothem a−d, so its area scales by ((a−d)/a)² (similarity; every side
// moves in by d).
func TestRegularPolygonInward(t *testing.T) {
	for _, n := range []int{3, 5, 6, 8, 17, 100} {
		R := 20.0
		a := R * math.Cos(math.Pi/float64(n))
		ring := regular(geom.Pt(3, -4), n, R, 0.3)
		A := ring.Area()
		for _, d := range []float64{0.5, a / 3, 0.9 * a} {
			got, err := Offset(geom.Shape{{Outer: ring}}, -d, 0)
			if err != nil {
				t.Fatal(err)
			}
			mustValid(t, got, "regular")
			want := A * math.Pow((a-d)/a, 2)
			if len(got) != 1 || len(got[0].Outer) != n {
				t.Fatalf("n=%d d=%g: want one %d-gon, got %d regions", n, d, n, len(got))
			}
			if math.Abs(got.Area()-want) > ring.Perimeter()*2*gridMM {
				t.Errorf("n=%d d=%g: area %.9f, want A·((a−d)/a)² = %.9f", n, d, got.Area(), want)
			}
		}
	}
}

// Inward offset of a circle polygon of radius R with many vertices: the
// regular N-gon of circumradius R offset inward by d is the N-gon with
// apothem R·cos(π/N) − d, whose vertices lie at R − d/cos(π/N) ≈ R − d
// (elementary geometry). Outward: edges at distance R·cos(π/N) + d from the
// centre, joined by arcs of radius d about the vertices, i.e. points at
// distance ≤ R + d, and, within the chord tolerance, ≥ R·cos(π/N)+d.
func TestCircle(t *testing.T) {
	const R, N = 25.0, 1000
	c := geom.Pt(10, 20)
	circ := geom.Shape{{Outer: geom.Circle(c, R, N)}}
	cosv := math.Cos(math.Pi / N)
	for _, d := range []float64{0.3, 7, 24} {
		got, err := Offset(circ, -d, 0)
		if err != nil {
			t.Fatal(err)
		}
		mustValid(t, got, "circle inward")
		want := R - d/cosv
		for _, p := range got[0].Outer {
			if r := p.Dist(c); math.Abs(r-want) > 2*gridMM {
				t.Fatalf("inward d=%g: vertex at radius %.9f, want %.9f (≈ R−d = %g)", d, r, want, R-d)
			}
		}
		if n := len(got[0].Outer); n != N {
			t.Errorf("inward d=%g: %d vertices, want %d", d, n, N)
		}
	}
	tol := 0.001
	for _, d := range []float64{0.3, 7} {
		got, err := Offset(circ, d, tol)
		if err != nil {
			t.Fatal(err)
		}
		mustValid(t, got, "circle outward")
		for _, p := range got[0].Outer {
			r := p.Dist(c)
			if r > R+d+2*gridMM || r < R*cosv+d-tol-2*gridMM {
				t.Fatalf("outward d=%g: vertex at radius %.9f outside [%.9f, %.9f]", d, r, R*cosv+d-tol, R+d)
			}
		}
	}
}

// An inward offset by more than the inradius is empty (the erosion of K by
// a disk larger than any inscribed disk is empty, by definition).
func TestVanishing(t *testing.T) {
	hex := regular(geom.Pt(0, 0), 6, 10, 0)
	a := 10 * math.Cos(math.Pi/6) // inradius of the regular hexagon
	cases := []struct {
		s     geom.Shape
		inrad float64
	}{
		{geom.Shape{{Outer: geom.RectRing(0, 0, 10, 4)}}, 2},
		{geom.Shape{{Outer: hex}}, a},
		{geom.Shape{{Outer: geom.Circle(geom.Pt(5, 5), 3, 64)}}, 3 * math.Cos(math.Pi/64)},
	}
	for i, c := range cases {
		got, err := Offset(c.s, -(c.inrad + 1e-4), 0)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != 0 {
			t.Errorf("case %d: offset beyond the inradius not empty: area %g", i, got.Area())
		}
		got, err = Offset(c.s, -(c.inrad - 1e-3), 0)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != 1 {
			t.Errorf("case %d: offset just inside the inradius has %d regions, want 1", i, len(got))
		}
	}
}

// A square plate with a rectangular island (hole) off-centre: under an
// inward offset by d the hole grows to the rounded rectangle (its corners
// are convex for the hole), area (w+2d)(h+2d) − (4−π)d²; the plate splits
// into two parts once d exceeds half the narrowest band (elementary
// geometry of the erosion).
func TestIslandGrowsAndSplits(t *testing.T) {
	// Plate [0,100]², hole [10,90]×[40,60]: side bands 10 wide, top and
	// bottom bands 40 wide.
	s := geom.Shape{{Outer: geom.RectRing(0, 0, 100, 100), Holes: []geom.Ring{geom.RectRing(10, 40, 90, 60)}}}
	tol := 0.001
	d := 3.0
	got, err := Offset(s, -d, tol)
	if err != nil {
		t.Fatal(err)
	}
	mustValid(t, got, "island")
	if len(got) != 1 || len(got[0].Holes) != 1 {
		t.Fatalf("d=3: want one region with one hole, got %d regions", len(got))
	}
	hole := (80+2*d)*(20+2*d) - (4-math.Pi)*d*d
	want := (100-2*d)*(100-2*d) - hole
	// The hole's corner arcs are inscribed chords: the hole is smaller by
	// at most 2π·d·tol (see the Steiner test).
	if a := got.Area(); a < want-gridMM*1000 || a > want+2*math.Pi*d*tol+gridMM*1000 {
		t.Errorf("d=3: area %.6f, want %.6f (+ ≤ %.6f)", a, want, 2*math.Pi*d*tol)
	}
	// Split at d = 5 (half of the 10 mm side bands).
	got, err = Offset(s, -4.99, tol)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 1 {
		t.Errorf("d=4.99: want one region, got %d", len(got))
	}
	got, err = Offset(s, -5.01, tol)
	if err != nil {
		t.Fatal(err)
	}
	mustValid(t, got, "split")
	if len(got) != 2 {
		t.Fatalf("d=5.01: want two regions, got %d", len(got))
	}
	// Each part is the rectangle [d, 100−d] × [60+d, 100−d] (or its
	// mirror) plus two horns reaching down beside the hole's corners, in the
	// side bands: for u = distance from the hole's side in [0, w], w = 10−d,
	// the horn spans d − √(d²−u²), so its area is
	// d·w − (w/2)·√(d²−w²) − (d²/2)·asin(w/d). The horns' arcs (radius d,
	// angle asin(w/d)) are chords cutting into the disk, adding at most
	// tol per mm of arc.
	d = 5.01
	w := 10 - d
	horn := d*w - w/2*math.Sqrt(d*d-w*w) - d*d/2*math.Asin(w/d)
	want = (100-2*d)*(40-2*d) + 2*horn
	arc := 2 * d * math.Asin(w/d)
	for _, g := range got {
		if a := g.Area(); a < want-1e-6 || a > want+tol*arc+1e-6 || len(g.Holes) != 0 {
			t.Errorf("d=5.01: part area %.6f, want %.6f (+ ≤ %.6f)", a, want, tol*arc)
		}
	}
	// Outward, the hole shrinks to the square (h−2d) with sharp corners
	// and vanishes at d = h/2 = 10.
	got, err = Offset(s, 4, tol)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 1 || len(got[0].Holes) != 1 || math.Abs(got[0].Holes[0].Area()-(80-8)*(20-8)) > 1e-6 {
		t.Errorf("d=+4: hole not the %g×%g rectangle", 80-8.0, 20-8.0)
	}
	got, _ = Offset(s, 10.01, tol)
	if len(got) != 1 || len(got[0].Holes) != 0 {
		t.Errorf("d=+10.01: the hole should have vanished")
	}
}

// Two squares with a gap g merge under an outward offset by d exactly when
// 2d > g (their offsets are the points within d of each square).
func TestNearlyTouchingMerge(t *testing.T) {
	for _, g := range []float64{0.5, 0.002, 3} {
		s := geom.Shape{
			{Outer: geom.RectRing(0, 0, 10, 10)},
			{Outer: geom.RectRing(10+g, 0, 20+g, 10)},
		}
		for _, c := range []struct {
			d    float64
			want int
		}{{g/2 - 1e-4, 2}, {g/2 + 1e-4, 1}} {
			got, err := Offset(s, c.d, 0)
			if err != nil {
				t.Fatal(err)
			}
			mustValid(t, got, "merge")
			if len(got) != c.want {
				t.Errorf("gap %g, d=%g: %d regions, want %d", g, c.d, len(got), c.want)
			}
		}
	}
}

// Property (definition of erosion, Minkowski difference): every vertex and
// edge midpoint of Offset(S, −d) lies in S at distance ≥ d − tol from its
// boundary; sample points of S at distance ≥ d + tol lie in the result and
// those at distance < d − tol do not. Opening (definition): the opening
// Offset(Offset(S, −d), +d) lies in S.
func TestPropertiesRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	tol := 0.001
	const slack = 3 * gridMM
	for trial := 0; trial < 120; trial++ {
		s := randomShape(rng, trial)
		d := []float64{0.05, 0.7, 2.5, 6, 11}[trial%5] * (0.5 + rng.Float64())
		in, err := Offset(s, -d, tol)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		mustValid(t, in, "inward")
		for _, r := range in.Rings() {
			for i := range r {
				for _, p := range []geom.Point{r[i], r[i].Lerp(r[(i+1)%len(r)], 0.5)} {
					db := s.DistanceToBoundary(p)
					if !s.Contains(p) && db > slack {
						t.Fatalf("trial %d d=%g: point %v of the inward offset outside S", trial, d, p)
					}
					if db < d-tol-slack {
						t.Fatalf("trial %d d=%g: point %v of the inward offset at distance %.9f < d−tol", trial, d, p, db)
					}
				}
			}
		}
		b := s.Bounds()
		for k := 0; k < 300; k++ {
			p := geom.Pt(b.Min.X+rng.Float64()*b.Width(), b.Min.Y+rng.Float64()*b.Height())
			if !s.Contains(p) {
				continue
			}
			db := s.DistanceToBoundary(p)
			if db > d+tol+slack && !in.Contains(p) {
				t.Fatalf("trial %d d=%g: %v at distance %g from ∂S missing from the inward offset", trial, d, p, db)
			}
			if db < d-tol-slack && in.Contains(p) {
				t.Fatalf("trial %d d=%g: %v at distance %g from ∂S inside the inward offset", trial, d, p, db)
			}
		}
		op, err := Offset(in, d, tol)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		mustValid(t, op, "opening")
		for _, r := range op.Rings() {
			for i := range r {
				for _, p := range []geom.Point{r[i], r[i].Lerp(r[(i+1)%len(r)], 0.5)} {
					if !s.Contains(p) && s.DistanceToBoundary(p) > tol+slack {
						t.Fatalf("trial %d d=%g: opening point %v outside S by %g", trial, d, p, s.DistanceToBoundary(p))
					}
				}
			}
		}
		// Outward offsets (definition of dilation): result points at
		// distance ≤ d from S, sample points within d − tol of S inside.
		out, err := Offset(s, d, tol)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		mustValid(t, out, "outward")
		for _, r := range out.Rings() {
			for _, p := range r {
				if !s.Contains(p) && s.DistanceToBoundary(p) > d+slack {
					t.Fatalf("trial %d d=%g: outward vertex %v at distance %g > d", trial, d, p, s.DistanceToBoundary(p))
				}
			}
		}
		for k := 0; k < 300; k++ {
			p := geom.Pt(b.Min.X-d+rng.Float64()*(b.Width()+2*d), b.Min.Y-d+rng.Float64()*(b.Height()+2*d))
			dist := 0.0
			if !s.Contains(p) {
				dist = s.DistanceToBoundary(p)
			}
			if dist < d-tol-slack && !out.Contains(p) && out.DistanceToBoundary(p) > slack {
				t.Fatalf("trial %d d=%g: %v at distance %g from S missing from the outward offset", trial, d, p, dist)
			}
			if dist > d+slack && out.Contains(p) {
				t.Fatalf("trial %d d=%g: %v at distance %g from S inside the outward offset", trial, d, p, dist)
			}
		}
	}
}

// Same input, same output (the project's determinism rule).
func TestDeterministic(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	s := randomShape(rng, 1)
	a, err := Offset(s, -1.3, 0)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 3; i++ {
		b, _ := Offset(s, -1.3, 0)
		if !reflect.DeepEqual(a, b) {
			t.Fatal("two runs differ")
		}
	}
}

func TestZeroDistanceCopies(t *testing.T) {
	s := geom.Shape{{Outer: geom.RectRing(0, 0, 1, 1).Reversed()}}
	got, err := Offset(s, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !got[0].Outer.CCW() {
		t.Error("d = 0 result not normalised")
	}
	got[0].Outer[0].X = 99
	if s[0].Outer[3].X == 99 {
		t.Error("d = 0 result shares memory with its input")
	}
}

func TestBadInput(t *testing.T) {
	sq := geom.Shape{{Outer: geom.RectRing(0, 0, 1, 1)}}
	for name, f := range map[string]func() error{
		"NaN point": func() error {
			_, e := Offset(geom.Shape{{Outer: geom.Ring{geom.Pt(0, 0), geom.Pt(math.NaN(), 0), geom.Pt(1, 1)}}}, 1, 0)
			return e
		},
		"Inf point": func() error {
			_, e := Offset(geom.Shape{{Outer: geom.Ring{geom.Pt(0, 0), geom.Pt(math.Inf(1), 0), geom.Pt(1, 1)}}}, 1, 0)
			return e
		},
		"far point": func() error {
			_, e := Offset(geom.Shape{{Outer: geom.Ring{geom.Pt(0, 0), geom.Pt(2e6, 0), geom.Pt(1, 1)}}}, 1, 0)
			return e
		},
		"NaN d":       func() error { _, e := Offset(sq, math.NaN(), 0); return e },
		"huge d":      func() error { _, e := Offset(sq, 2e6, 0); return e },
		"NaN tol":     func() error { _, e := Offset(sq, 1, math.NaN()); return e },
		"tiny tol":    func() error { _, e := Offset(sq, 1, 1e-9); return e },
		"neg radius":  func() error { _, e := Open(sq, -1, 0); return e },
		"zero step":   func() error { _, e := Series(context.Background(), sq, 0.1, 0, 0); return e },
		"neg first":   func() error { _, e := Series(context.Background(), sq, -1, 0.1, 0); return e },
		"Close NaN r": func() error { _, e := Close(sq, math.NaN(), 0); return e },
	} {
		if err := f(); !errors.Is(err, ErrInvalidInput) {
			t.Errorf("%s: error %v, want ErrInvalidInput", name, err)
		}
	}
	// Budget: a huge circle at the finest tolerance needs too many arc
	// vertices; the call must fail quickly with ErrTooComplex.
	big := geom.Region{Outer: geom.Circle(geom.Pt(0, 0), 1000, 4000)}
	for i := range big.Outer {
		if i%2 == 1 {
			big.Outer[i] = big.Outer[i].Scale(0.01) // 2000 spikes
		}
	}
	if _, err := Offset(geom.Shape{big}, 5e5, MinTolerance); !errors.Is(err, ErrTooComplex) {
		t.Errorf("budget: error %v, want ErrTooComplex", err)
	}
}

// Opening removes a channel narrower than 2r (definition of opening:
// union of the disks of radius r inside S); closing fills a gap narrower
// than 2r.
func TestOpenClose(t *testing.T) {
	// Dumbbell: two 20×20 squares joined by a 4 mm wide, 10 mm long bar.
	db := geom.Shape{{Outer: geom.Ring{geom.Pt(0, 0), geom.Pt(20, 0), geom.Pt(20, 8), geom.Pt(30, 8), geom.Pt(30, 0), geom.Pt(50, 0), geom.Pt(50, 20), geom.Pt(30, 20), geom.Pt(30, 12), geom.Pt(20, 12), geom.Pt(20, 20), geom.Pt(0, 20)}}}
	got, err := Open(db, 2.5, 0)
	if err != nil {
		t.Fatal(err)
	}
	mustValid(t, got, "open")
	if len(got) != 2 {
		t.Errorf("opening by r=2.5 of a 4 mm bar: %d parts, want 2", len(got))
	}
	got, err = Open(db, 1.9, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 1 {
		t.Errorf("opening by r=1.9 of a 4 mm bar: %d parts, want 1", len(got))
	}
	// Opening by r of a square rounds its corners: area s² − (4−π)r².
	sq := geom.Shape{{Outer: geom.RectRing(0, 0, 20, 20)}}
	got, _ = Open(sq, 3, 0.0001)
	if want := 400 - (4-math.Pi)*9; math.Abs(got.Area()-want) > 2*math.Pi*3*0.0001+1e-6 {
		t.Errorf("opening of a square: area %.6f, want %.6f", got.Area(), want)
	}
	two := geom.Shape{{Outer: geom.RectRing(0, 0, 10, 10)}, {Outer: geom.RectRing(11, 0, 21, 10)}}
	got, err = Close(two, 0.6, 0)
	if err != nil {
		t.Fatal(err)
	}
	mustValid(t, got, "close")
	if len(got) != 1 {
		t.Errorf("closing by r=0.6 of a 1 mm gap: %d parts, want 1", len(got))
	}
	// The gap fills except where a disk of radius r still fits in from
	// above or below: at each end a circular segment of radius r on the
	// 1 mm chord stays open, area r²/2·(θ − sin θ), θ = 2·asin(0.5/r)
	// (definition of closing as the complement of the opening of the
	// complement). Chord error: ≤ tol per mm of arc (see the Steiner test).
	r, tol := 0.6, DefaultTolerance
	th := 2 * math.Asin(0.5/r)
	want := 210 - 2*r*r/2*(th-math.Sin(th))
	if math.Abs(got.Area()-want) > 2*tol*(2*r*th+2*math.Pi*r) {
		t.Errorf("closing: area %.6f, want %.6f", got.Area(), want)
	}
}

func TestSeries(t *testing.T) {
	sq := geom.Shape{{Outer: geom.RectRing(0, 0, 20, 10)}}
	rs, err := Series(context.Background(), sq, 1, 1, 0)
	if err != nil {
		t.Fatal(err)
	}
	// Inradius 5: offsets at 1, 2, 3, 4 are non-empty, at 5 the rectangle
	// degenerates to a segment (zero area) and the series stops.
	if len(rs) != 4 {
		t.Fatalf("series: %d rings, want 4", len(rs))
	}
	for k, r := range rs {
		d := float64(k + 1)
		if want := (20 - 2*d) * (10 - 2*d); math.Abs(r.Area()-want) > 1e-6 {
			t.Errorf("series %d: area %g, want %g", k, r.Area(), want)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Series(ctx, sq, 1, 1, 0); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled series: error %v", err)
	}
	if _, err := Series(context.Background(), geom.Shape{{Outer: geom.RectRing(0, 0, 1000, 1000)}}, 0, 1e-3, 0); !errors.Is(err, ErrTooComplex) {
		t.Errorf("overlong series: error %v, want ErrTooComplex", err)
	}
}
