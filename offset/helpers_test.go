package offset

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/chipband/chipband/geom"
)

// checkValid is a brute-force validity checker, independent of the
// offsetter's own predicates except the exact orientation test: rings have
// at least 3 distinct vertices, outer rings run counter-clockwise and holes
// clockwise, no two edges cross or overlap, non-adjacent edges of one ring
// do not touch, holes lie inside their outer ring and regions do not
// overlap. (OGC Simple Features validity, allowing rings to touch at
// points.)
func checkValid(s geom.Shape) error {
	type edge struct {
		a, b       ipt
		ring, k, n int
	}
	var edges []edge
	ringID := 0
	for i, g := range s {
		for j, r := range g.Rings() {
			if len(r) < 3 {
				return fmt.Errorf("region %d ring %d: %d points", i, j, len(r))
			}
			q := make([]ipt, len(r))
			for k, p := range r {
				q[k] = snap(p)
				if q[k].point() != p {
					return fmt.Errorf("region %d ring %d point %d: off the grid", i, j, k)
				}
			}
			seen := map[ipt]bool{}
			for k, p := range q {
				if seen[p] {
					return fmt.Errorf("region %d ring %d point %d: repeated vertex %v", i, j, k, p.point())
				}
				seen[p] = true
			}
			a := r.SignedArea()
			if j == 0 && a <= 0 {
				return fmt.Errorf("region %d: outer ring not counter-clockwise (area %g)", i, a)
			}
			if j > 0 && a >= 0 {
				return fmt.Errorf("region %d hole %d: not clockwise (area %g)", i, j-1, a)
			}
			for k := range q {
				edges = append(edges, edge{q[k], q[(k+1)%len(q)], ringID, k, len(q)})
			}
			ringID++
		}
	}
	// Sweep over x to keep the pair test near-linear.
	slices.SortFunc(edges, func(e, f edge) int {
		return int(min(e.a.x, e.b.x) - min(f.a.x, f.b.x))
	})
	onSeg := func(p, a, b ipt) bool { // p strictly inside segment ab
		if orient(a, b, p) != 0 || p == a || p == b {
			return false
		}
		return min(a.x, b.x) <= p.x && p.x <= max(a.x, b.x) && min(a.y, b.y) <= p.y && p.y <= max(a.y, b.y)
	}
	for i, e := range edges {
		ex1 := max(e.a.x, e.b.x)
		for _, f := range edges[i+1:] {
			if min(f.a.x, f.b.x) > ex1 {
				break
			}
			if max(min(e.a.y, e.b.y), min(f.a.y, f.b.y)) > min(max(e.a.y, e.b.y), max(f.a.y, f.b.y)) {
				continue
			}
			if properCross(e.a, e.b, f.a, f.b) {
				return fmt.Errorf("edges %v–%v and %v–%v cross", e.a.point(), e.b.point(), f.a.point(), f.b.point())
			}
			// Overlap or touching in an edge interior.
			touch := onSeg(f.a, e.a, e.b) || onSeg(f.b, e.a, e.b) || onSeg(e.a, f.a, f.b) || onSeg(e.b, f.a, f.b)
			overlap := touch && orient(e.a, e.b, f.a) == 0 && orient(e.a, e.b, f.b) == 0
			if overlap || (e.a == f.a && e.b == f.b) || (e.a == f.b && e.b == f.a) {
				return fmt.Errorf("edges %v–%v and %v–%v overlap", e.a.point(), e.b.point(), f.a.point(), f.b.point())
			}
			if e.ring == f.ring {
				adjacent := (e.k+1)%e.n == f.k || (f.k+1)%f.n == e.k
				if touch || (!adjacent && (e.a == f.a || e.a == f.b || e.b == f.a || e.b == f.b)) {
					return fmt.Errorf("ring touches itself at edges %v–%v and %v–%v", e.a.point(), e.b.point(), f.a.point(), f.b.point())
				}
			}
		}
	}
	// Holes inside their outer ring, regions disjoint: test an edge
	// midpoint of every ring (no crossings, so one point decides).
	for i, g := range s {
		for j, h := range g.Holes {
			m := h[0].Lerp(h[1], 0.5)
			if !g.Outer.ContainsPoint(m) {
				return fmt.Errorf("region %d hole %d: outside its outer ring", i, j)
			}
		}
		m := g.Outer[0].Lerp(g.Outer[1], 0.5)
		for k, o := range s {
			if k != i && o.Contains(m) {
				return fmt.Errorf("region %d lies inside region %d", i, k)
			}
		}
	}
	return nil
}

func mustValid(t *testing.T, s geom.Shape, what string) {
	t.Helper()
	if err := checkValid(s); err != nil {
		t.Fatalf("%s: invalid result: %v", what, err)
	}
}

// star returns a star-shaped, generally concave ring of n ≥ 4 vertices about c
// with radii drawn from [r0, r1], counter-clockwise.
func star(rng *rand.Rand, c geom.Point, n int, r0, r1 float64) geom.Ring {
	// Stratified angles keep every angular gap below π, so the ring is
	// star-shaped about c and simple.
	ang := make([]float64, n)
	for i := range ang {
		ang[i] = 2 * math.Pi * (float64(i) + 0.8*rng.Float64()) / float64(n)
	}
	r := make(geom.Ring, 0, n)
	for _, a := range ang {
		rad := r0 + (r1-r0)*rng.Float64()
		r = append(r, geom.Pt(c.X+rad*math.Cos(a), c.Y+rad*math.Sin(a)))
	}
	return r
}

// randomShape returns one of several kinds of test region, chosen by kind.
func randomShape(rng *rand.Rand, kind int) geom.Shape {
	switch kind % 6 {
	case 0: // concave star
		return geom.Shape{{Outer: star(rng, geom.Pt(0, 0), 5+rng.IntN(40), 5, 30)}}
	case 1: // star with holes
		g := geom.Region{Outer: star(rng, geom.Pt(0, 0), 10+rng.IntN(40), 30, 50)}
		for k := 0; k < 1+rng.IntN(3); k++ {
			a := float64(k)*2*math.Pi/3 + rng.Float64()
			c := geom.Pt(14*math.Cos(a), 14*math.Sin(a))
			g.Holes = append(g.Holes, star(rng, c, 4+rng.IntN(10), 2, 7).Reversed())
		}
		return geom.Shape{g}
	case 2: // collinear runs: a rectangle with extra points on its sides
		w, h := 10+40*rng.Float64(), 10+40*rng.Float64()
		var r geom.Ring
		side := func(p, q geom.Point) {
			k := 1 + rng.IntN(6)
			for i := 0; i < k; i++ {
				r = append(r, p.Lerp(q, float64(i)/float64(k)))
			}
		}
		side(geom.Pt(0, 0), geom.Pt(w, 0))
		side(geom.Pt(w, 0), geom.Pt(w, h))
		side(geom.Pt(w, h), geom.Pt(0, h))
		side(geom.Pt(0, h), geom.Pt(0, 0))
		g := geom.Region{Outer: r}
		if rng.IntN(2) == 0 {
			g.Holes = []geom.Ring{geom.RectRing(w/3, h/3, 2*w/3, 2*h/3).Reversed()}
		}
		return geom.Shape{g}
	case 3: // tiny edges: a star with vertices doubled a few microns apart
		r := star(rng, geom.Pt(0, 0), 8+rng.IntN(20), 10, 25)
		var q geom.Ring
		for i, p := range r {
			q = append(q, p)
			if rng.IntN(2) == 0 {
				// A point 1–10 µm along the next edge, pushed off it by up
				// to 0.1 µm: a tiny edge and a nearly straight vertex, the
				// ring staying simple.
				nx := r[(i+1)%len(r)]
				u := nx.Sub(p).Unit()
				q = append(q, p.Add(u.Scale(1e-6+9e-6*rng.Float64())).Add(u.Perp().Scale(1e-7*(2*rng.Float64()-1))))
			}
		}
		return geom.Shape{{Outer: q}}
	case 4: // nearly touching holes
		gap := 0.01 + 0.5*rng.Float64()
		return geom.Shape{{Outer: geom.RectRing(0, 0, 60, 30), Holes: []geom.Ring{
			geom.RectRing(10, 10, 29.5-gap/2, 20).Reversed(),
			star(rng, geom.Pt(37, 15), 6+rng.IntN(6), 4, 4.5).Reversed(),
			geom.RectRing(29.5+gap/2, 5, 31, 25).Reversed(),
		}}}
	default: // two nearly touching concave parts
		a := star(rng, geom.Pt(0, 0), 6+rng.IntN(20), 8, 12)
		b := star(rng, geom.Pt(24+rng.Float64(), 0), 6+rng.IntN(20), 8, 12)
		return geom.Shape{{Outer: a}, {Outer: b}}
	}
}
