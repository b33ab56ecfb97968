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

// capsule returns the region a tool of radius r sweeps along the segment
// a–b.
func capsule(a, b geom.Point, r float64) geom.Shape {
	u := b.Sub(a).Unit()
	base := math.Atan2(u.Y, u.X)
	var ring geom.Ring
	for k := 0; k <= 180; k++ {
		t := base - math.Pi/2 + math.Pi*float64(k)/180
		ring = append(ring, b.Add(geom.Pt(r*math.Cos(t), r*math.Sin(t))))
	}
	for k := 0; k <= 180; k++ {
		t := base + math.Pi/2 + math.Pi*float64(k)/180
		ring = append(ring, a.Add(geom.Pt(r*math.Cos(t), r*math.Sin(t))))
	}
	return geom.Shape{{Outer: ring}}
}

// TestLeanedPassEnd measures pass ends that meet the line where the passes
// stop at 30° from the swept side instead of square (pathplan's
// spiralLeanEnd): straight passes ending on y = 0, each a step δ further
// along it than the one before, coming in at 150° to +x, so that each takes
// a layer δ·sin 30° thick. By the same geometry as TestPassEndCrescent the
// earlier end then lies behind the tool, and φ stays under
// arccos(1 − 2·0.115) = 39.6° (1.15 × a 10 % band) all the way to the end
// for a 7.5 % step; square, the end reads 90° + asin(δ/2r).
func TestLeanedPassEnd(t *testing.T) {
	r := tool10.Radius()
	d := 0.075 * tool10.Diameter
	limit := math.Acos(1-2*0.115) * 180 / math.Pi
	for _, deg := range []float64{150, 90} {
		t.Run(fmt.Sprintf("%g°", deg), func(t *testing.T) {
			a := deg * math.Pi / 180
			u := geom.Pt(math.Cos(a), math.Sin(a))
			m, err := NewMaterial(rectShape(-60, -60, 60, 30), 0, MaterialOptions{})
			noErr(t, err)
			var swept geom.Shape
			var ends []geom.Point
			for j := 0; j < 12; j++ {
				e := geom.Pt(-float64(j)*d, 0)
				ends = append(ends, e)
				sh := capsule(e.Sub(u.Scale(40)), e, r)
				if swept == nil {
					swept = sh
				} else if swept, err = geom.Union(swept, sh); err != nil {
					t.Fatal(err)
				}
			}
			noErr(t, m.Remove(swept, -5))
			material := func(p geom.Point) bool {
				for _, e := range ends {
					if geom.SegmentDistance(p, e.Sub(u.Scale(40)), e) <= r {
						return false
					}
				}
				return true
			}
			end := geom.Pt(d, 0)
			var peak float64
			for s := 6.0; s >= 0; s -= 0.05 {
				c := end.Sub(u.Scale(s))
				e := m.Engage(tool10, geom.Point3{X: c.X, Y: c.Y, Z: -5}, u)
				got := e.Phi * 180 / math.Pi
				if !near(t, fmt.Sprintf("φ° %.2f mm before the end against the sampled circle", s), got, sampledFrontArc(r, c, u, material), 0.5) {
					return
				}
				peak = math.Max(peak, got)
			}
			if deg == 90 {
				near(t, "φ° at a square end", peak, 90+math.Asin(d/(2*r))*180/math.Pi, 0.5)
				return
			}
			t.Logf("peak φ %.1f°", peak)
			if peak > limit {
				t.Errorf("leaned end: φ peaks at %.1f°, above %.1f°", peak, limit)
			}
		})
	}
}
