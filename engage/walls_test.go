package engage

import (
	"fmt"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// sampledFrontArc returns, in degrees, the part of the front half of the periphery
// of a tool of radius r at c moving along dir that lies in material, by
// dense sampling of the circle against an exact predicate: the reference
// the tests below measure Engage against.
func sampledFrontArc(r float64, c, dir geom.Point, material func(geom.Point) bool) float64 {
	const n = 36000
	base := math.Atan2(dir.Y, dir.X)
	in := 0
	for k := range n {
		// From the right normal through the feed direction to the left one.
		a := base - math.Pi/2 + math.Pi*(float64(k)+0.5)/n
		if material(c.Add(geom.Pt(r*math.Cos(a), r*math.Sin(a)))) {
			in++
		}
	}
	return 180 * float64(in) / n
}

// TestPassEndCrescent measures the engagement where a pass ends beside
// the end of the pass before it, a step δ over: the situation of every
// pass that stops at a common line (a wall of the front domain). The
// earlier pass swept the strip |x| ≤ r up to y = 0 and its round end, the
// disk of radius r about the origin; the tool now stands at (δ, yc)
// moving +y. By elementary geometry its front half is in material from
// its right normal up to where its circle meets the earlier end circle,
// so at the end (yc = 0) φ = 90° + asin(δ/2r) whatever the step: ae/D
// reads at least 0.5 by the arc, while the chip there is at most δ
// thick. The rise starts about a radius before the end, where the front
// half first reaches past the earlier round end (at yc = −1 it is already
// 44° for δ = 0.75, against 32° for the straight cut); a radius and more
// before the end φ is the straight cut's arccos(1 − δ/r) (Altintas 2012,
// ch. 2, from memory).
func TestPassEndCrescent(t *testing.T) {
	r := tool10.Radius()
	for _, d := range []float64{0.25, 0.5, 0.75} {
		m, err := NewMaterial(rectShape(-40, -40, 40, 40), 0, MaterialOptions{})
		noErr(t, err)
		swept, err := geom.Union(rectShape(-40, -40, r, 0), geom.Shape{{Outer: geom.Circle(geom.Pt(0, 0), r, 1440)}})
		noErr(t, err)
		noErr(t, m.Remove(swept, -5))
		material := func(p geom.Point) bool {
			return !(p.Y <= 0 && p.X <= r) && p.Dist(geom.Pt(0, 0)) > r
		}
		for _, yc := range []float64{-6, -2, -1, -0.3, 0} {
			t.Run(fmt.Sprintf("step %g end %g", d, yc), func(t *testing.T) {
				c := geom.Pt(d, yc)
				e := m.Engage(tool10, geom.Point3{X: c.X, Y: c.Y, Z: -5}, geom.Pt(0, 1))
				want := sampledFrontArc(r, c, geom.Pt(0, 1), material)
				near(t, "φ° against the sampled circle", e.Phi*180/math.Pi, want, 0.5)
				switch yc {
				case 0:
					// Two circles of radius r, δ apart.
					near(t, "φ° at the end", e.Phi*180/math.Pi, 90+math.Asin(d/(2*r))*180/math.Pi, 0.5)
					if e.AE/tool10.Diameter < 0.5 {
						t.Errorf("ae/D %.3f at the pass end, want ≥ 0.5", e.AE/tool10.Diameter)
					}
				case -6:
					// The front half does not reach y = 0 yet.
					near(t, "φ° well before the end", e.Phi*180/math.Pi, math.Acos(1-d/r)*180/math.Pi, 0.5)
				}
			})
		}
	}
}

// TestInsideCornerStrips measures the engagement of the last pass along
// the walls of a pocket with a sharp inside corner, when the passes before
// it left a strip of width w along both walls: the walls are x = 50 and
// y = 30, the region cleared before is the rectangle up to x = 50 − w,
// y = 30 − w with its corner rounded by r (the tool swept its centre up
// to a sharp corner w inside the walls' centre lines). Along one wall
// φ = arccos(1 − w/r) (straight cut); at the corner the strip of the other
// wall meets the tool head-on and φ = 90° + arccos(1 − w/r) by elementary
// geometry: ae/D 0.76 for w = 0.075·D, and more than 0.5 for any w.
func TestInsideCornerStrips(t *testing.T) {
	r := tool10.Radius()
	for _, aeD := range []float64{0.02, 0.05, 0.075, 0.1} {
		w := aeD * tool10.Diameter
		t.Run(fmt.Sprintf("w=%gD", aeD), func(t *testing.T) {
			m, err := NewMaterial(rectShape(0, 0, 60, 40), 0, MaterialOptions{})
			noErr(t, err)
			o := geom.Pt(50-w-r, 30-w-r) // centre of the rounded corner
			ring := geom.Ring{geom.Pt(0, 0), geom.Pt(50-w, 0)}
			for k := 0; k <= 360; k++ {
				a := math.Pi / 2 * float64(k) / 360
				ring = append(ring, o.Add(geom.Pt(r*math.Cos(a), r*math.Sin(a))))
			}
			ring = append(ring, geom.Pt(0, 30-w))
			noErr(t, m.Remove(geom.Shape{{Outer: ring}}, -5))
			material := func(p geom.Point) bool {
				in := (p.X <= 50-w && p.Y <= o.Y) || (p.X <= o.X && p.Y <= 30-w) || p.Dist(o) <= r
				return !in
			}
			dir := geom.Pt(1, 0)
			for _, c := range []geom.Point{geom.Pt(30, 30-r), geom.Pt(50-r, 30-r)} {
				e := m.Engage(tool10, geom.Point3{X: c.X, Y: c.Y, Z: -5}, dir)
				got := e.Phi * 180 / math.Pi
				near(t, fmt.Sprintf("φ° at %v against the sampled circle", c), got, sampledFrontArc(r, c, dir, material), 0.5)
				straight := math.Acos(1-w/r) * 180 / math.Pi
				if c.X < 40 {
					near(t, "φ° along the wall", got, straight, 0.5)
					continue
				}
				near(t, "φ° in the corner", got, 90+straight, 0.5)
				if e.AE/tool10.Diameter <= 0.5 {
					t.Errorf("ae/D %.3f in the corner, want > 0.5", e.AE/tool10.Diameter)
				}
			}
		})
	}
}
