package engage

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// roundedRect returns the rectangle [x0, x1] × [y0, y1] with its corners
// rounded to radius rc, the arcs as chords with their vertices on the arc
// (every 1°), so the ring lies inside the exact rounded rectangle.
func roundedRect(x0, y0, x1, y1, rc float64) geom.Ring {
	var ring geom.Ring
	corners := [4]struct{ cx, cy, a0 float64 }{
		{x1 - rc, y0 + rc, -math.Pi / 2}, {x1 - rc, y1 - rc, 0}, {x0 + rc, y1 - rc, math.Pi / 2}, {x0 + rc, y0 + rc, math.Pi},
	}
	for _, c := range corners {
		for k := 0; k <= 90; k++ {
			a := c.a0 + float64(k)*math.Pi/180
			ring = append(ring, geom.Pt(c.cx+rc*math.Cos(a), c.cy+rc*math.Sin(a)))
		}
	}
	return ring
}

// clearPocket returns a path that clears the tool-centre domain
// [x0+r, x1−r] × [y0+r, y1−r] of a pocket at depth z: rows 0.75·D apart,
// then a loop along the domain boundary.
func clearPocket(x0, y0, x1, y1, r, z float64) *geom.Toolpath {
	ax, ay, bx, by := x0+r, y0+r, x1-r, y1-r
	tp := &geom.Toolpath{Start: geom.Point3{X: ax, Y: ay, Z: 5}, Moves: []geom.Move{line(geom.Feed, ax, ay, z, 300)}}
	n := int(math.Ceil((by - ay) / (1.5 * r)))
	for k := 0; k <= n; k++ {
		y := ay + (by-ay)*float64(k)/float64(n)
		xa, xb := ax, bx
		if k%2 == 1 {
			xa, xb = bx, ax
		}
		tp.Moves = append(tp.Moves, line(geom.Feed, xa, y, z, 1000), line(geom.Feed, xb, y, z, 1000))
	}
	tp.Moves = append(tp.Moves,
		line(geom.Feed, ax, by, z, 1000), line(geom.Feed, ax, ay, z, 1000), line(geom.Feed, bx, ay, z, 1000),
		line(geom.Feed, bx, by, z, 1000), line(geom.Feed, ax, by, z, 1000), line(geom.Rapid, ax, by, 5, 0))
	return tp
}

// TestResidualExactPass: a pass sized exactly to a pocket whose corners
// are rounded to the tool radius leaves nothing of it: the swept area is
// the domain grown by r, which is the pocket (Minkowski sum of a rectangle
// and a disk, geometry). Cells count by their centre, so a wall whose line
// runs through a row of cell centres is the worst case; those centres are
// on the boundary of both the pocket and the swept area and must not count.
// The floor is cut exactly to depth: no floor gouge. Without the rounding
// the four corners keep r²·(1 − π/4) each (geometry), within the grid's
// bound of about c·(the corner arcs' length) + 4c² per corner.
func TestResidualExactPass(t *testing.T) {
	r := tool8.Radius()
	c := DefaultCellSize
	for _, sh := range []float64{0, 0.1, 0.05, 0.037} {
		t.Run(fmt.Sprintf("shift %g", sh), func(t *testing.T) {
			x0, y0, x1, y1 := 20+sh, 15+sh, 80+sh, 55+sh
			m, err := NewMaterial(rectShape(0, 0, 100, 70), 0, MaterialOptions{})
			noErr(t, err)
			tp := clearPocket(x0, y0, x1, y1, r, -5)
			res, err := Simulate(context.Background(), m, tool8, tp, SimOptions{Targets: []Target{
				{Name: "rounded", Region: geom.Shape{{Outer: roundedRect(x0, y0, x1, y1, r)}}, Floor: -5},
				{Name: "square", Region: rectShape(x0, y0, x1, y1), Floor: -5},
			}})
			noErr(t, err)
			rd, sq := res.Summary.Targets[0], res.Summary.Targets[1]
			if rd.UncutArea > 0 || rd.FloorGouge > 0 {
				t.Errorf("rounded pocket: uncut %.3f mm², floor gouge %.4f", rd.UncutArea, rd.FloorGouge)
			}
			want := 4 * r * r * (1 - math.Pi/4)
			bound := 4 * (c*math.Pi/2*r + 4*c*c)
			near(t, "square pocket corners uncut", sq.UncutArea, want, bound)
			near(t, "square pocket max above", sq.MaxAbove, 5, 1e-6)
		})
	}
}

// TestFloorGougeBeside: a deeper pocket beside a shallower one, cleared by
// a tool sized exactly to it, reaches the shared outline but not into the
// shallower pocket: no floor gouge there. The same clearing 0.01 mm too
// wide reaches 0.01 mm into it 3 mm below its floor (geometry).
func TestFloorGougeBeside(t *testing.T) {
	r := tool8.Radius()
	for _, c := range []struct{ over, want float64 }{{0, 0}, {0.01, 3}} {
		m, err := NewMaterial(rectShape(0, 0, 100, 70), 0, MaterialOptions{})
		noErr(t, err)
		noErr(t, m.Remove(rectShape(20.1, 15.1, 50.1, 55.1), -2))
		tp := clearPocket(50.1-c.over, 15.1, 80.1, 55.1, r, -5)
		res, err := Simulate(context.Background(), m, tool8, tp, SimOptions{SummaryOnly: true, Targets: []Target{
			{Name: "shallow", Region: rectShape(20.1, 15.1, 50.1, 55.1), Floor: -2},
			{Name: "deep", Region: rectShape(50.1, 15.1, 80.1, 55.1), Floor: -5},
		}})
		noErr(t, err)
		sh, dp := res.Summary.Targets[0], res.Summary.Targets[1]
		near(t, "shallow floor gouge", sh.FloorGouge, c.want, 1e-9)
		near(t, "deep floor gouge", dp.FloorGouge, 0, 1e-9)
	}
}
