package engage

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

func rectShape(x0, y0, x1, y1 float64) geom.Shape {
	return geom.Shape{{Outer: geom.RectRing(x0, y0, x1, y1)}}
}

var tool10 = Tool{Diameter: 10, FluteLength: 30, Flutes: 3}

func line(kind geom.MoveKind, x, y, z, feed float64) geom.Move {
	return geom.Move{Kind: kind, To: geom.Point3{X: x, Y: y, Z: z}, Feed: feed}
}

// steady returns the samples of move mv that lie between x0 and x1.
func steady(prof []Sample, mv int, x0, x1 float64) []Sample {
	var out []Sample
	for _, s := range prof {
		if s.Move == mv && s.X >= x0 && s.X <= x1 {
			out = append(out, s)
		}
	}
	return out
}

// TestStraightCutEngagement checks φ and ae of a second pass at a stepover
// ae beside a first pass, and of a pass along the stock edge.
func TestStraightCutEngagement(t *testing.T) {
	r := tool10.Radius()
	for _, aeD := range []float64{0.05, 0.075, 0.10, 0.25, 0.5, 1.0} {
		ae := aeD * tool10.Diameter
		// Geometry of a straight cut: φ = arccos(1 − ae/r)
		// (Altintas 2012, ch. 2, from memory).
		want := math.Acos(1 - ae/r)
		if ae >= tool10.Diameter {
			want = math.Pi // a full slot engages half the periphery
		}
		t.Run(fmt.Sprintf("ae/D=%g beside previous pass", aeD), func(t *testing.T) {
			m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
			noErr(t, err)
			tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: 0, Z: 5}, Moves: []geom.Move{
				line(geom.Rapid, -10, 0, -5, 0),
				line(geom.Feed, 130, 0, -5, 1000),
				line(geom.Rapid, 130, 0, 5, 0),
				line(geom.Rapid, -10, ae, 5, 0),
				line(geom.Rapid, -10, ae, -5, 0),
				line(geom.Feed, 130, ae, -5, 1000),
			}}
			if ae >= tool10.Diameter {
				tp.Moves = tp.Moves[3:] // a slot in fresh stock
			}
			res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
			noErr(t, err)
			last := len(tp.Moves) - 1
			ss := steady(res.Profile, last, 30, 90)
			if len(ss) == 0 {
				t.Fatal("no samples")
			}
			for _, s := range ss {
				near(t, "φ°", s.PhiDeg(), want*180/math.Pi, 0.5)
				rel(t, "ae", s.AE, ae, 0.01)
				if s.Class != Cut {
					t.Errorf("class %v, want cut", s.Class)
				}
				near(t, "ap", s.AP, 5, 1e-3)
			}
		})
		t.Run(fmt.Sprintf("ae/D=%g along stock edge", aeD), func(t *testing.T) {
			m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
			noErr(t, err)
			y := 40 + r - ae
			tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: -5}, Moves: []geom.Move{
				line(geom.Feed, 130, y, -5, 1000),
			}}
			res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
			noErr(t, err)
			for _, s := range steady(res.Profile, 0, 30, 90) {
				near(t, "φ°", s.PhiDeg(), want*180/math.Pi, 0.5)
				rel(t, "ae", s.AE, ae, 0.01)
			}
		})
	}
}
