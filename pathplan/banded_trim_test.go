package pathplan

import (
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// TestBoundaryTrimSkipsAir checks that the boundary pass of an open part
// leaves out the stretches where the tool cannot reach the stock and keeps
// the rest: a tool of radius r centred farther than r from the stock
// touches nothing (elementary geometry). The stock is a 20 mm square; the
// tool-centre ring runs round it 10 mm out on three sides and 2 mm above
// its top edge, within reach of it.
func TestBoundaryTrimSkipsAir(t *testing.T) {
	const r, h = 3.0, 0.2
	box := func(x0, y0, x1, y1 float64) geom.Shape {
		return geom.Shape{{Outer: geom.Ring{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}}}
	}
	stock, dom := box(0, 0, 20, 20), box(-10, -10, 30, 22)
	g := newBandedGridPad(dom, h, r+2*h)
	g.initStock(dom, stock, r, 0.45)
	p := spiralParams{r: r, h: h, maxStep: 0.72}
	// Climb round the ring from the middle of the top edge.
	ring := []geom.Point{{X: 10, Y: 22}, {X: -10, Y: 22}, {X: -10, Y: -10}, {X: 30, Y: -10}, {X: 30, Y: 22}, {X: 10, Y: 22}}
	out := boundaryTrim(g, []bandedPiece{{kind: pieceBoundary, pts: ring}}, p)
	// Distance from a tool centre to the stock square.
	toStock := func(q geom.Point) float64 {
		dx := math.Max(math.Max(-q.X, q.X-20), 0)
		dy := math.Max(math.Max(-q.Y, q.Y-20), 0)
		return math.Hypot(dx, dy)
	}
	kept := 0.0
	at := ring[0]
	for i, pc := range out {
		if pc.pts[0].Dist(at) > 1e-9 {
			t.Fatalf("piece %d starts at %v, the one before ended at %v", i, pc.pts[0], at)
		}
		at = pc.pts[len(pc.pts)-1]
		if pc.kind != pieceBoundary {
			continue
		}
		kept += polyLen(pc.pts)
		// A kept stretch may run on past the stock's reach by the margin
		// of two nodes and a sampling step.
		for k := 1; k < len(pc.pts); k++ {
			for s := 0.0; s <= 1; s += 0.05 {
				q := pc.pts[k-1].Lerp(pc.pts[k], s)
				if d := toStock(q); d > r+3*h+0.25+1e-9 {
					t.Errorf("piece %d cuts at %v, %.2f mm from the stock (the tool reaches %.1f)", i, q, d, r)
				}
			}
		}
	}
	if at.Dist(ring[len(ring)-1]) > 1e-9 {
		t.Errorf("the trimmed pass ends at %v, not at the ring's end %v", at, ring[len(ring)-1])
	}
	// The top edge lies 2 mm from the stock over its whole 40 mm, and its
	// ends reach the stock's corners ((0,20), (20,20)) for another
	// √(r² − 2²) = 2.24 mm beyond x = 0 and x = 20.
	if min, max := 20+2*math.Sqrt(r*r-4), 40.0; kept < min-0.1 || kept > max+1e-9 {
		t.Errorf("kept %.2f mm of the pass, want between %.2f and %.0f (the stretch within reach of the stock)", kept, min, max)
	}
}
