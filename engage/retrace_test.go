package engage

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// TestRetracedPassIsAir: a tool that runs back along the path it has just
// cut, at the same depth, removes nothing, so every sample of the return
// must read as air whatever the shape of the pass (the swept region of the
// return is the swept region of the pass, elementary geometry). Passes:
// straight, circular arcs of the front radii the banded planner makes
// (as arcs and as chains of short chords), and an S-bend.
func TestRetracedPassIsAir(t *testing.T) {
	const z = -4.0
	type pass struct {
		name string
		pts  []geom.Point
	}
	arcPts := func(c geom.Point, rad, a0, a1, step float64) []geom.Point {
		n := int(math.Ceil(math.Abs(a1-a0) * rad / step))
		out := make([]geom.Point, n+1)
		for i := range out {
			a := a0 + (a1-a0)*float64(i)/float64(n)
			out[i] = geom.Pt(c.X+rad*math.Cos(a), c.Y+rad*math.Sin(a))
		}
		return out
	}
	var passes []pass
	passes = append(passes, pass{"straight", []geom.Point{geom.Pt(20, 30), geom.Pt(80, 42)}})
	for _, rad := range []float64{2, 4, 8, 20} {
		passes = append(passes, pass{fmt.Sprintf("chords on radius %g", rad), arcPts(geom.Pt(50, 50), rad, 0.3, 2.8, 0.1)})
	}
	s := append(arcPts(geom.Pt(40, 50), 6, -math.Pi/2, 0, 0.15), arcPts(geom.Pt(52, 50), 6, math.Pi, math.Pi/2, 0.15)[1:]...)
	passes = append(passes, pass{"S-bend", s})
	for _, tool := range []Tool{tool10, {Diameter: 6, FluteLength: 20, Flutes: 3}} {
		for _, ps := range passes {
			t.Run(fmt.Sprintf("D%g/%s", tool.Diameter, ps.name), func(t *testing.T) {
				m, err := NewMaterial(rectShape(0, 0, 100, 100), 0, MaterialOptions{})
				noErr(t, err)
				pts := ps.pts
				// Enter from the air, so the start disk is cut too.
				tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: pts[0].Y, Z: z}}
				tp.Moves = append(tp.Moves, line(geom.Feed, pts[0].X, pts[0].Y, z, 1000))
				for _, p := range pts[1:] {
					tp.Moves = append(tp.Moves, line(geom.Feed, p.X, p.Y, z, 1000))
				}
				back := len(tp.Moves)
				for i := len(pts) - 2; i >= 0; i-- {
					tp.Moves = append(tp.Moves, line(geom.Link, pts[i].X, pts[i].Y, z, 1000))
				}
				res, err := Simulate(context.Background(), m, tool, tp, SimOptions{})
				noErr(t, err)
				worst, cut := 0.0, 0.0
				for _, smp := range res.Profile {
					if smp.Move >= back && smp.Class == Cut {
						cut += smp.Step
						worst = math.Max(worst, smp.AE)
					}
				}
				if cut > 0 {
					t.Errorf("return reads %.2f mm as cut, ae up to %.4f mm", cut, worst)
				}
				if l := res.Summary.LinkCutLength; l != 0 {
					t.Errorf("summary: links cut over %.2f mm, want 0", l)
				}
			})
		}
	}
}

// TestLinkThroughStock: a link run straight through uncut stock is counted
// as a link that cuts, over the length on which the tool overlaps the
// stock (from a tool radius before the stock's edge to the end, elementary
// geometry), in full slotting (ae = D).
func TestLinkThroughStock(t *testing.T) {
	const z = -4.0
	m, err := NewMaterial(rectShape(0, 0, 100, 100), 0, MaterialOptions{})
	noErr(t, err)
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: 50, Z: z}}
	tp.Moves = append(tp.Moves, line(geom.Link, 50, 50, z, 1000))
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
	noErr(t, err)
	want := 50 + tool10.Diameter/2
	if l := res.Summary.LinkCutLength; math.Abs(l-want) > 2*DefaultStep {
		t.Errorf("links cut over %.2f mm, want %.2f", l, want)
	}
	if a := res.Summary.LinkMaxAeD; math.Abs(a-1) > 1e-6 {
		t.Errorf("link ae/D up to %.4f, want 1 (slotting)", a)
	}
}
