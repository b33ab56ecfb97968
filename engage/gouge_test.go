package engage

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/chipband/chipband/geom"
)

var tool8 = Tool{Diameter: 8, FluteLength: 20, Flutes: 3}

// closedPocket is the stock and pocket of testdata/jobs/closed_pocket.json:
// stock 100 × 70, pocket 20..80 × 15..55, 5 deep. The walls that must stay
// are the stock less the pocket, written out by hand.
func closedPocket() (stock, pocket, keep geom.Shape) {
	stock = rectShape(0, 0, 100, 70)
	pocket = rectShape(20, 15, 80, 55)
	keep = geom.Shape{{Outer: geom.RectRing(0, 0, 100, 70), Holes: []geom.Ring{geom.RectRing(20, 15, 80, 55).Reversed()}}}
	return stock, pocket, keep
}

// loopAt is the program of the closed-pocket reproduction with the tool
// centre running the rectangle inset by in from the pocket outline (in = r
// is the boundary of the tool-centre domain):
//
//	G0 Z5 / G0 X50 Y35 / G1 Z-2 / G1 X24 Y35 / G1 Y19 / G1 X76 / G1 Y51 / G1 X24 / G1 Y35 / G0 Z5
func loopAt(in float64) *geom.Toolpath {
	x0, y0, x1, y1 := 20+in, 15+in, 80-in, 55-in
	return &geom.Toolpath{Start: geom.Point3{X: 0, Y: 0, Z: 5}, Moves: []geom.Move{
		line(geom.Rapid, 0, 0, 5, 0),
		line(geom.Rapid, 50, 35, 5, 0),
		line(geom.Feed, 50, 35, -2, 300),
		line(geom.Feed, x0, 35, -2, 1000),
		line(geom.Feed, x0, y0, -2, 1000),
		line(geom.Feed, x1, y0, -2, 1000),
		line(geom.Feed, x1, y1, -2, 1000),
		line(geom.Feed, x0, y1, -2, 1000),
		line(geom.Feed, x0, 35, -2, 1000),
		line(geom.Rapid, x0, 35, 5, 0),
	}}
}

// TestGougeDomainBoundary: a tool whose centre runs exactly along the
// boundary of its tool-centre domain touches the walls and does not cut
// them; at the convex corner (24, 19) of the domain the distance to both
// walls is exactly r = 4 (elementary geometry), so there is no gouge.
func TestGougeDomainBoundary(t *testing.T) {
	stock, pocket, keep := closedPocket()
	res, err := Check(context.Background(), CheckInput{
		Stock: stock, Keep: keep, Band: [2]float64{0.05, 0.1},
		Targets: []Target{{Name: "pocket", Region: pocket, Floor: -5}},
	}, tool8, loopAt(4))
	noErr(t, err)
	s := res.Summary
	if s.MaxGouge > 1e-6 || s.GougeMove != -1 {
		t.Errorf("gouge %.3g mm in move %d at %+v, want none", s.MaxGouge, s.GougeMove, s.GougeAt)
	}
	if n := len(s.RapidViolations); n != 0 {
		t.Errorf("%d rapid violations, want 0: %+v", n, s.RapidViolations)
	}
	// The keep derived from the stock and the target is the same frame.
	res, err = Check(context.Background(), CheckInput{
		Stock: stock, Targets: []Target{{Name: "pocket", Region: pocket, Floor: -5}},
	}, tool8, loopAt(4))
	noErr(t, err)
	if g := res.Summary.MaxGouge; g > 1e-6 {
		t.Errorf("gouge with the derived keep %.3g mm, want none", g)
	}
}

// TestGougeOffsetIntoWall: the same loop 0.01 mm further out brings the
// tool centre to 3.99 mm from the walls, so the disk of radius 4 reaches
// 0.01 mm into them; at the corner (23.99, 18.99) the nearest wall points
// are again 3.99 away (the corner point (20, 15) is 3.99·√2 away), so the
// gouge is 0.01 mm along the whole loop (elementary geometry).
func TestGougeOffsetIntoWall(t *testing.T) {
	stock, _, keep := closedPocket()
	m, err := NewMaterial(stock, 0, MaterialOptions{})
	noErr(t, err)
	res, err := Simulate(context.Background(), m, tool8, loopAt(3.99), SimOptions{Keep: keep, SummaryOnly: true})
	noErr(t, err)
	s := res.Summary
	near(t, "gouge", s.MaxGouge, 0.01, 1e-6)
	if s.GougeMove < 3 || s.GougeMove > 8 {
		t.Errorf("gouge in move %d, want one of the loop moves 3..8", s.GougeMove)
	}
	near(t, "gouge z", s.GougeAt.Z, -2, 1e-9)
	// Check derives the same walls from the stock and the target.
	chk, err := Check(context.Background(), CheckInput{
		Stock: stock, Targets: []Target{{Name: "pocket", Region: rectShape(20, 15, 80, 55), Floor: -5}},
	}, tool8, loopAt(3.99))
	noErr(t, err)
	near(t, "gouge with the derived keep", chk.Summary.MaxGouge, 0.01, 1e-6)
}

// TestGougeBetweenSamples: a straight pass past the corner of a square
// island, sampled every 2 mm, comes closest to the corner midway between
// two samples. The distance from the corner (0, 0) to the line
// x + y = c is c/√2 (elementary geometry); with c/√2 = r − 0.3 the gouge
// is 0.3 mm.
func TestGougeBetweenSamples(t *testing.T) {
	r := tool10.Radius()
	c := (r - 0.3) * math.Sqrt2
	island := rectShape(-20, -20, 0, 0)
	m, err := NewMaterial(rectShape(-40, -40, 40, 40), 0, MaterialOptions{})
	noErr(t, err)
	// From (c+7, −7) to (−7, c+7): the foot of the corner is at the
	// middle, 7√2 + c/√2·0 along; samples every 2 mm miss it.
	tp := &geom.Toolpath{Start: geom.Point3{X: c + 7, Y: -7, Z: -3}, Moves: []geom.Move{
		line(geom.Feed, -7, c+7, -3, 1000),
	}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{Keep: island, Step: 2, SummaryOnly: true})
	noErr(t, err)
	near(t, "gouge", res.Summary.MaxGouge, 0.3, 1e-6)
	near(t, "gouge at x", res.Summary.GougeAt.X, c/2, 1e-6)
	near(t, "gouge at y", res.Summary.GougeAt.Y, c/2, 1e-6)
}

// polygonCircle returns a regular n-gon with its vertices on the circle of
// radius rad about o.
func polygonCircle(o geom.Point, rad float64, n int) geom.Ring {
	ring := make(geom.Ring, n)
	for i := range ring {
		a := 2 * math.Pi * float64(i) / float64(n)
		ring[i] = geom.Pt(o.X+rad*math.Cos(a), o.Y+rad*math.Sin(a))
	}
	return ring
}

// TestGougeArcIsland: an arc about the centre of a round island (a
// 720-gon with its vertices on the circle of radius 10) at radius 14.75
// passes the vertices at 4.75 mm, so a tool of radius 5 gouges the island
// by 5 − (14.75 − 10) = 0.25 mm (geometry); at radius 15.2 it clears it
// (5 − 5.2 < 0). An arc about another centre that touches the vertical
// line x = 34.8 (an island's straight edge) at its apex, 4.8 mm away,
// gouges by 0.2 mm (geometry).
func TestGougeArcIsland(t *testing.T) {
	o := geom.Pt(60, 40)
	island := geom.Shape{{Outer: polygonCircle(o, 10, 720)}}
	for _, c := range []struct{ rp, want float64 }{{14.75, 0.25}, {15.2, 0}} {
		m, err := NewMaterial(rectShape(0, 0, 120, 80), 0, MaterialOptions{})
		noErr(t, err)
		start := geom.Point3{X: o.X + c.rp, Y: o.Y, Z: -4}
		tp := &geom.Toolpath{Start: start, Moves: []geom.Move{
			{Kind: geom.Feed, To: geom.Point3{X: o.X, Y: o.Y + c.rp, Z: -4}, Arc: true, Center: o, Feed: 1000},
			{Kind: geom.Feed, To: geom.Point3{X: o.X + c.rp, Y: o.Y, Z: -4}, Arc: true, Center: o, CW: true, Feed: 1000},
		}}
		res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{Keep: island, SummaryOnly: true})
		noErr(t, err)
		near(t, "round island gouge", res.Summary.MaxGouge, c.want, 1e-6)
	}
	m, err := NewMaterial(rectShape(-10, -60, 80, 60), 0, MaterialOptions{})
	noErr(t, err)
	a := 30 * math.Pi / 180
	tp := &geom.Toolpath{Start: geom.Point3{X: 30 * math.Cos(a), Y: -30 * math.Sin(a), Z: -4}, Moves: []geom.Move{
		{Kind: geom.Feed, To: geom.Point3{X: 30 * math.Cos(a), Y: 30 * math.Sin(a), Z: -4}, Arc: true, Center: geom.Pt(0, 0), Feed: 1000},
	}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{Keep: rectShape(34.8, -10, 50, 10), SummaryOnly: true})
	noErr(t, err)
	near(t, "arc apex gouge", res.Summary.MaxGouge, 0.2, 1e-6)
	near(t, "arc apex y", res.Summary.GougeAt.Y, 0, 1e-6)
}

// TestGougeCentreInside: a pass whose centre runs 2 mm inside a keep block
// reaches r + 2 into it (geometry).
func TestGougeCentreInside(t *testing.T) {
	m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
	noErr(t, err)
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: -22, Z: -5}, Moves: []geom.Move{line(geom.Feed, 130, -22, -5, 1000)}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{Keep: rectShape(0, -40, 120, -20), SummaryOnly: true})
	noErr(t, err)
	near(t, "gouge", res.Summary.MaxGouge, 5+2, 1e-6)
}

// TestGougeAboveTop: moves above the stock top cannot gouge (the keep is
// material below the top).
func TestGougeAboveTop(t *testing.T) {
	m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
	noErr(t, err)
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: -22, Z: 1}, Moves: []geom.Move{
		line(geom.Feed, 130, -22, 1, 1000),
		line(geom.Feed, 100, -30, -1, 1000), // ramps below the top into the keep
	}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{Keep: rectShape(0, -40, 120, -20), SummaryOnly: true})
	noErr(t, err)
	if res.Summary.GougeMove != 1 {
		t.Errorf("gouge in move %d, want the ramp (1)", res.Summary.GougeMove)
	}
	if z := res.Summary.GougeAt.Z; z >= 0 {
		t.Errorf("gouge at z %.3f, want below the top", z)
	}
	// The first move runs 2 mm inside the keep above the top; the ramp
	// is there below the top only from its middle on, where the centre is
	// 4 mm inside at (115, −26) and 10 mm inside at its end (100, −30),
	// the nearest keep edge being y = −20 (geometry).
	near(t, "gouge", res.Summary.MaxGouge, 5+10, 1e-6)
}

// TestExactDistances compares the segment–segment and arc–segment
// distances with a dense sampling of the first curve (a reference that
// only uses the point–segment distance); the sampling error is at most
// half the spacing.
func TestExactDistances(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 7))
	pt := func() geom.Point { return geom.Pt(rng.Float64()*20-10, rng.Float64()*20-10) }
	const n = 4000
	for it := 0; it < 300; it++ {
		a, b, c, d := pt(), pt(), pt(), pt()
		got, tg := segSegDist(a, b, c, d)
		ref := math.Inf(1)
		for k := 0; k <= n; k++ {
			ref = math.Min(ref, geom.SegmentDistance(a.Lerp(b, float64(k)/n), c, d))
		}
		if got > ref+1e-12 || got < ref-a.Dist(b)/n {
			t.Fatalf("segment %v–%v to %v–%v: %.9f, reference %.9f", a, b, c, d, got, ref)
		}
		near(t, "segment distance at t", geom.SegmentDistance(a.Lerp(b, tg), c, d), got, 1e-9)
		s := arcSpan{o: pt(), rad: 1 + rng.Float64()*8, th0: rng.Float64() * 6, sweep: (rng.Float64()*2 - 1) * 6}
		got, tg = arcSegDist(s, c, d)
		ref = math.Inf(1)
		for k := 0; k <= n; k++ {
			ref = math.Min(ref, geom.SegmentDistance(s.at(float64(k)/n), c, d))
		}
		if got > ref+1e-9 || got < ref-s.rad*math.Abs(s.sweep)/n {
			t.Fatalf("arc %+v to %v–%v: %.9f, reference %.9f", s, c, d, got, ref)
		}
		near(t, "arc distance at t", geom.SegmentDistance(s.at(tg), c, d), got, 1e-9)
	}
}
