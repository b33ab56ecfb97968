package pathplan

import (
	"math"
	"sort"

	"github.com/chipband/chipband/geom"
)

// bandedRampMin is the shortest straight stretch, in tool radii, that a
// ramp entry runs back and forth on.
const bandedRampMin = 1.0

// bandedRampMax is the longest stretch, in tool diameters, a ramp entry
// uses: a longer one only spends more of the entry slotting.
const bandedRampMax = 4.0

// bandedRampStretch returns the straight stretch a ramp entry into domain
// c runs on: the longest chord through c's point p, among directions every
// 5° and those of c's eight longest edges, whose points all lie at least
// margin inside c, cut to bandedRampMax diameters about p. False when no
// chord reaches bandedRampMin radii.
func bandedRampStretch(c geom.Shape, p geom.Point, r, margin float64) (a, b geom.Point, ok bool) {
	if !c.Contains(p) || c.DistanceToBoundary(p) < margin {
		return a, b, false
	}
	half := bandedRampMax * r // half the longest stretch, 4 D in all
	// reach walks from p along u while the centre stays margin inside c
	// (sphere tracing on the distance to the outline), at most half.
	reach := func(u geom.Point) float64 {
		t := 0.0
		for t < half {
			q := p.Add(u.Scale(t))
			if !c.Contains(q) {
				return math.Max(0, t-margin)
			}
			d := c.DistanceToBoundary(q) - margin
			if d <= 1e-4 {
				break
			}
			// At least a quarter of the margin a step, so a ray that
			// runs close along the outline ends soon; it then stands at
			// least 3/4 of the margin inside c.
			t += math.Max(d, margin/4)
		}
		return math.Min(t, half)
	}
	// Directions every 5°, and those of the outline's eight longest edges
	// (a slot's walls run along its length at any angle).
	var dirs []geom.Point
	for k := 0; k < 36; k++ {
		th := math.Pi * float64(k) / 36
		dirs = append(dirs, geom.Point{X: math.Cos(th), Y: math.Sin(th)})
	}
	var edges []geom.Point
	for _, ring := range c.Rings() {
		for i := range ring {
			if e := ring[(i+1)%len(ring)].Sub(ring[i]); e.Len() >= bandedRampMin*r {
				edges = append(edges, e)
			}
		}
	}
	sort.SliceStable(edges, func(i, j int) bool { return edges[i].Len() > edges[j].Len() })
	for _, e := range edges[:min(len(edges), 8)] {
		dirs = append(dirs, e.Unit())
	}
	best := 0.0
	for _, u := range dirs {
		ta, tb := reach(u.Scale(-1)), reach(u)
		if ta+tb > best {
			best = ta + tb
			a, b = p.Sub(u.Scale(ta)), p.Add(u.Scale(tb))
		}
	}
	return a, b, best >= bandedRampMin*r
}

// bandedRamp takes the tool from where it stands, over the clearance
// height, to a, rapid down to st.safe above the material top top, and down
// to z on a ramp back and forth between a and b at the ramp angle, then
// once more from end to end at z so that the floor of the stretch is flat.
// It returns where the tool ends (a or b).
func bandedRamp(b *builder, a, bb geom.Point, top, z, clear float64, st bandedSettings) geom.Point {
	z0 := top + st.safe
	b.rapid(p3(b.pos.XY(), clear))
	b.rapid(p3(a, clear))
	b.rapid(p3(a, z0))
	leg := a.Dist(bb) * math.Tan(st.ramp)
	legs := max(1, int(math.Ceil((z0-z)/leg-1e-9)))
	ends := [2]geom.Point{bb, a}
	for i := 0; i < legs; i++ {
		ze := z0 - (z0-z)*float64(i+1)/float64(legs)
		b.feed(geom.Entry, p3(ends[i%2], ze), st.entry)
	}
	last := ends[legs%2]
	b.feed(geom.Entry, p3(last, z), st.entry)
	return last
}

// bandedStadiumFront returns a clockwise ring of radius rad about the
// segment a–b as a start front (material outside, on the left), starting
// at the end nearest to at.
func bandedStadiumFront(a, b, at geom.Point, rad float64, p spiralParams) spiralFront {
	if at.Dist(b) < at.Dist(a) {
		a, b = b, a
	}
	u := b.Sub(a).Unit()
	n := u.Perp()
	k := max(8, int(math.Pi*rad/p.h))
	// Clockwise: from a, round a's far side, along one side to b, round b,
	// back along the other side.
	var pts []geom.Point
	for i := 0; i <= k; i++ {
		th := math.Pi * float64(i) / float64(k)
		pts = append(pts, a.Add(u.Scale(-rad*math.Sin(th))).Add(n.Scale(-rad*math.Cos(th))))
	}
	for i := 0; i <= k; i++ {
		th := math.Pi * float64(i) / float64(k)
		pts = append(pts, b.Add(u.Scale(rad*math.Sin(th))).Add(n.Scale(rad*math.Cos(th))))
	}
	pts = polyResample(append(pts, pts[0]), p.h, true)
	return spiralFront{pts: pts, closed: true, steps: spiralSteps(pts, true, p)}
}
