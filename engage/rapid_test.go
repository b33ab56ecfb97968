package engage

import (
	"context"
	"fmt"
	"testing"

	"github.com/chipband/chipband/geom"
)

// TestRapidRetractFromOwnHole: a rapid straight up out of a hole the tool
// has just cut (a plunge, or a helix bore ending on its circle) moves only
// through air, so it is no violation; a rapid across the stock at Z −1 is
// one, 1 mm into material (common practice: rapids only through air).
func TestRapidRetractFromOwnHole(t *testing.T) {
	for _, tl := range []Tool{tool8, tool10} {
		for _, c := range []geom.Point{geom.Pt(50, 30), geom.Pt(50.037, 30.071), geom.Pt(41.3, 27.77)} {
			t.Run(fmt.Sprintf("D%g plunge at %v", tl.Diameter, c), func(t *testing.T) {
				m, err := NewMaterial(rectShape(0, 0, 100, 60), 0, MaterialOptions{})
				noErr(t, err)
				tp := &geom.Toolpath{Start: geom.Point3{X: c.X, Y: c.Y, Z: 5}, Moves: []geom.Move{
					line(geom.Feed, c.X, c.Y, -5, 200),
					line(geom.Rapid, c.X, c.Y, 5, 0),
				}}
				res, err := Simulate(context.Background(), m, tl, tp, SimOptions{})
				noErr(t, err)
				if v := res.Summary.RapidViolations; len(v) != 0 {
					t.Errorf("retract from the plunge hole: %+v", v)
				}
			})
			if c != geom.Pt(50.037, 30.071) {
				continue // the helix once per tool (it is the slower case)
			}
			t.Run(fmt.Sprintf("D%g helix at %v", tl.Diameter, c), func(t *testing.T) {
				m, err := NewMaterial(rectShape(0, 0, 100, 60), 0, MaterialOptions{})
				noErr(t, err)
				rh := 0.7 * tl.Radius()
				s := geom.Point3{X: c.X + rh, Y: c.Y, Z: 0.5}
				tp := &geom.Toolpath{Start: s}
				for z := -0.5; z >= -6.5; z-- {
					tp.Moves = append(tp.Moves, geom.Move{Kind: geom.Entry, To: geom.Point3{X: s.X, Y: s.Y, Z: z}, Arc: true, Center: c, Feed: 800})
				}
				// A flat circle at the bottom, then straight up from it, then
				// from the centre.
				tp.Moves = append(tp.Moves,
					geom.Move{Kind: geom.Feed, To: geom.Point3{X: s.X, Y: s.Y, Z: -6.5}, Arc: true, Center: c, Feed: 800},
					line(geom.Rapid, s.X, s.Y, 5, 0),
					line(geom.Rapid, c.X, c.Y, 5, 0),
					line(geom.Rapid, c.X, c.Y, -6.4, 0),
					line(geom.Rapid, c.X, c.Y, 5, 0))
				res, err := Simulate(context.Background(), m, tl, tp, SimOptions{})
				noErr(t, err)
				if v := res.Summary.RapidViolations; len(v) != 0 {
					t.Errorf("rapids inside the helix bore: %+v", v)
				}
			})
		}
	}
	m, err := NewMaterial(rectShape(0, 0, 100, 60), 0, MaterialOptions{})
	noErr(t, err)
	tp := &geom.Toolpath{Start: geom.Point3{X: -20, Y: 30.05, Z: 5}, Moves: []geom.Move{
		line(geom.Rapid, -20, 30.05, -1, 0),
		line(geom.Rapid, 120, 30.05, -1, 0),
	}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
	noErr(t, err)
	v := res.Summary.RapidViolations
	if len(v) != 1 || v[0].Move != 1 {
		t.Fatalf("violations %+v, want one in move 1", v)
	}
	near(t, "depth", v[0].Depth, 1, 0.01)
}

// TestRapidBesideWall: a rapid at Z −4 along the wall y = w of a pocket cut
// to −5, in a stock whose rest is cut to −2 (the wall holds material from
// −5 to −2 beyond y = w). With the tool edge 0.05 mm short of the wall the
// disk misses the material, so no violation; with it 0.05 mm beyond, the
// disk overlaps it, so the move along the wall is one (elementary
// geometry: the disk of radius r about a centre at y = w − r ∓ 0.05 reaches
// y = w ∓ 0.05). Both orders of the cuts (the deeper first leaves the wall
// known to the grid only to a cell, see the package notes) and several
// positions of the wall against the 0.2 mm cells.
func TestRapidBesideWall(t *testing.T) {
	r := tool10.Radius()
	for _, w := range []float64{40, 40.03, 40.07, 40.1, 40.13, 40.17} {
		for _, deepFirst := range []bool{true, false} {
			for _, clear := range []float64{0.05, -0.05} {
				m, err := NewMaterial(rectShape(0, 0, 100, 80), 0, MaterialOptions{})
				noErr(t, err)
				deep, shallow := func() { noErr(t, m.Remove(rectShape(10, 10, 90, w), -5)) }, func() { noErr(t, m.Remove(rectShape(5, 5, 95, 60), -2)) }
				if deepFirst {
					deep()
					shallow()
				} else {
					shallow()
					deep()
				}
				y := w - r - clear
				tp := &geom.Toolpath{Start: geom.Point3{X: 20, Y: y, Z: 5}, Moves: []geom.Move{
					line(geom.Rapid, 20, y, -4, 0),
					line(geom.Rapid, 80, y, -4, 0),
					line(geom.Rapid, 80, y, 5, 0),
				}}
				res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
				noErr(t, err)
				v := res.Summary.RapidViolations
				if clear > 0 && len(v) != 0 {
					t.Errorf("wall %g, deeper first %v: 0.05 mm clear of the wall, violations %+v", w, deepFirst, v)
				}
				if clear < 0 {
					found := false
					for _, x := range v {
						found = found || x.Move == 1
					}
					if !found {
						t.Errorf("wall %g, deeper first %v: 0.05 mm into the wall, violations %+v, want one in move 1", w, deepFirst, v)
					}
				}
			}
		}
	}
}
