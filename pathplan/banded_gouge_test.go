package pathplan

import (
	"context"
	"encoding/hex"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// bandedExactGouge returns the deepest intrusion of the tool (radius r)
// into keep along the moves of tp that run below top, computed without a
// raster: the distance from each line move to every keep edge is the exact
// segment–segment distance; arcs are sampled every 0.002 mm, and since the
// distance to a fixed set is 1-Lipschitz along the path the sampled
// minimum is within 0.001 mm of the true one (elementary geometry). It also
// returns the move where the deepest intrusion happens (−1 when none).
func bandedExactGouge(tp *geom.Toolpath, keep geom.Shape, r, top float64) (float64, int) {
	type edge struct{ a, b geom.Point }
	var edges []edge
	for _, ring := range keep.Rings() {
		for i := range ring {
			edges = append(edges, edge{ring[i], ring[(i+1)%len(ring)]})
		}
	}
	segDist := func(p, q geom.Point, e edge) float64 {
		if geom.SegmentsMeet(p, q, e.a, e.b) {
			return 0
		}
		return math.Min(math.Min(geom.SegmentDistance(p, e.a, e.b), geom.SegmentDistance(q, e.a, e.b)),
			math.Min(geom.SegmentDistance(e.a, p, q), geom.SegmentDistance(e.b, p, q)))
	}
	worst, at := 0.0, -1
	check := func(d float64, p geom.Point, i int) {
		g := r - d
		if keep.Contains(p) {
			g = r + d
		}
		if g > worst {
			worst, at = g, i
		}
	}
	from := tp.Start
	for i, m := range tp.Moves {
		a, b := from.XY(), m.To.XY()
		below := math.Min(from.Z, m.To.Z) < top-1e-9
		from = m.To
		if !below || m.Kind == geom.Rapid {
			continue
		}
		if !m.Arc {
			d := math.Inf(1)
			for _, e := range edges {
				d = math.Min(d, segDist(a, b, e))
			}
			check(d, a, i)
			continue
		}
		// ArcSweep is unsigned (geom's doc): clockwise runs the angle down.
		sweep := geom.ArcSweep(a, b, m.Center, m.CW)
		if m.CW {
			sweep = -sweep
		}
		rad := a.Dist(m.Center)
		n := int(math.Ceil(math.Abs(sweep)*rad/0.002)) + 1
		a0 := math.Atan2(a.Y-m.Center.Y, a.X-m.Center.X)
		for k := 0; k <= n; k++ {
			t := a0 + sweep*float64(k)/float64(n)
			q := geom.Pt(m.Center.X+rad*math.Cos(t), m.Center.Y+rad*math.Sin(t))
			d := math.Inf(1)
			for _, e := range edges {
				d = math.Min(d, geom.SegmentDistance(q, e.a, e.b))
			}
			check(d, q, i)
		}
	}
	return worst, at
}

// A straight tool-centre path along the walls of a square pocket, turning
// at the corners of the tool-centre domain, is exactly r from the walls:
// the exact check reports no gouge (elementary geometry), where a raster
// that interpolates a distance field across the corner bisector would see
// up to a quarter cell.
func TestBandedExactGougeCorner(t *testing.T) {
	keep := geom.Shape{{Outer: geom.RectRing(-10, -10, 30, 30), Holes: []geom.Ring{geom.RectRing(0, 0, 20, 20).Reversed()}}}
	tp := &geom.Toolpath{Start: geom.Point3{X: 3, Y: 3, Z: -1}, Moves: []geom.Move{
		{Kind: geom.Feed, To: geom.Point3{X: 17, Y: 3, Z: -1}},
		{Kind: geom.Feed, To: geom.Point3{X: 17, Y: 17, Z: -1}},
		{Kind: geom.Feed, To: geom.Point3{X: 3, Y: 17, Z: -1}},
		{Kind: geom.Feed, To: geom.Point3{X: 3, Y: 3, Z: -1}},
	}}
	if g, at := bandedExactGouge(tp, keep, 3, 0); g > 1e-9 {
		t.Errorf("gouge %.6f at move %d on a path exactly r from the walls", g, at)
	}
	// 0.01 mm too close to one wall: a gouge of 0.01.
	tp.Moves[0].To.Y, tp.Start.Y = 2.99, 2.99
	if g, _ := bandedExactGouge(tp, keep, 3, 0); math.Abs(g-0.01) > 1e-9 {
		t.Errorf("gouge %.6f, want 0.010", g)
	}
}

// A clockwise arc is measured on its own side: the quarter arc of radius 5
// about (14, 10) from (14, 15) to (19, 10) comes within 1 mm of the wall
// x = 20 of a 20 × 40 pocket, so a tool of radius 3 cuts 2 mm into it
// (elementary geometry); the other three quarters stay 5 mm or more away.
func TestBandedExactGougeClockwiseArc(t *testing.T) {
	keep := geom.Shape{{Outer: geom.RectRing(-10, -10, 30, 50), Holes: []geom.Ring{geom.RectRing(0, 0, 20, 40).Reversed()}}}
	tp := &geom.Toolpath{Start: geom.Point3{X: 14, Y: 15, Z: -1}, Moves: []geom.Move{
		{Kind: geom.Feed, To: geom.Point3{X: 19, Y: 10, Z: -1}, Arc: true, CW: true, Center: geom.Pt(14, 10)},
	}}
	if g, _ := bandedExactGouge(tp, keep, 3, 0); math.Abs(g-2) > 1e-3 {
		t.Errorf("gouge %.4f, want 2", g)
	}
}

// A link between a pass end and the next pass that both stand just outside
// the tool-centre domain, beside the rounded corner of an island, must not
// take the chord between them: the domain lies up to its offset tolerance
// outside the true one, so the ends clear the island, but a 0.22 mm chord
// across an arc of radius 3 has a sagitta of 0.002 mm (L²/8r, elementary
// geometry) and came 0.0002 mm into the island's corner (500-job property
// run, job 349). The link now goes by the raster's nodes, and no move comes
// nearer a wall than the tool radius (exact distances).
func TestBandedLinkAroundIslandCorner(t *testing.T) {
	data, err := hex.DecodeString("46c9a9f5bc6519a32f8b6faa738c39b7b4cea5faf75064c75183e45b5c3473694e6f4b803501798c1341087b974c75e8b5c83d45c59dfe6db1e7ca282b661973")
	if err != nil {
		t.Fatal(err)
	}
	j := genJob(data)
	if err := j.Validate(); err != nil {
		t.Fatalf("generated job is invalid: %v", err)
	}
	p, err := PlanBanded(context.Background(), j, BandedOptions{NoVerify: true})
	if err != nil {
		t.Fatal(err)
	}
	if g, gm := genExactGouge(p, keepShape(t, j), j.Stock.Top, j.Tool.Radius()); g > 1e-6 {
		t.Errorf("move %d comes %.5f mm into a wall", gm, g)
	}
}
