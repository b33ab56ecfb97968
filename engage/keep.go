package engage

import (
	"fmt"
	"math"

	"github.com/chipband/chipband/geom"
)

// gougeTol is the smallest intrusion of the tool disk into a shape that
// counts as a gouge, mm: below it the figure is floating-point rounding of
// a tool that runs exactly along the boundary.
const gougeTol = 1e-6

// KeepOf returns the material that must remain in a stock: its outline
// less the union of the feature regions. Islands (holes of the regions)
// stay part of the result. An empty regions list gives the stock itself.
func KeepOf(stock geom.Shape, regions []geom.Shape) (geom.Shape, error) {
	if err := checkShape(stock, "stock"); err != nil {
		return nil, fmt.Errorf("keep: %w", err)
	}
	var cut geom.Shape
	for i, r := range regions {
		if len(r) == 0 {
			continue
		}
		if err := checkShape(r, "feature region"); err != nil {
			return nil, fmt.Errorf("keep: region %d: %w", i, err)
		}
		if cut == nil {
			cut = r.Normalized()
			continue
		}
		u, err := geom.Union(cut, r)
		if err != nil {
			return nil, fmt.Errorf("keep: region %d: %w", i, err)
		}
		cut = u
	}
	if len(cut) == 0 {
		return stock.Normalized(), nil
	}
	keep, err := geom.Difference(stock, cut)
	if err != nil {
		return nil, fmt.Errorf("keep: %w", err)
	}
	return keep, nil
}

// edgeIndex answers exact distance and winding queries against the
// boundary of a shape: a uniform grid of buckets over its edges, and
// horizontal strips of the same height for the winding number.
type edgeIndex struct {
	edges  [][2]geom.Point
	x0, y0 float64
	h, inv float64
	nx, ny int
	bucket [][]int32 // edges meeting each bucket (row-major)
	strip  [][]int32 // edges whose y range meets each row of buckets
	mark   []uint32  // query stamps, one per edge
	stamp  uint32
}

// newEdgeIndex indexes the rings of s (normalised) with buckets of about
// size h mm.
func newEdgeIndex(s geom.Shape, h float64) *edgeIndex {
	ix := &edgeIndex{}
	for _, r := range s.Normalized().Rings() {
		n := len(r)
		for i := 0; i < n; i++ {
			a, b := r[i], r[(i+1)%n]
			if a != b {
				ix.edges = append(ix.edges, [2]geom.Point{a, b})
			}
		}
	}
	bb := s.Bounds()
	w, hg := math.Max(bb.Width(), 1e-9), math.Max(bb.Height(), 1e-9)
	// At most about 2^18 buckets.
	h = math.Max(h, math.Sqrt(w*hg/(1<<18)))
	ix.h, ix.inv = h, 1/h
	ix.x0, ix.y0 = bb.Min.X, bb.Min.Y
	ix.nx = int(w*ix.inv) + 1
	ix.ny = int(hg*ix.inv) + 1
	ix.bucket = make([][]int32, ix.nx*ix.ny)
	ix.strip = make([][]int32, ix.ny)
	ix.mark = make([]uint32, len(ix.edges))
	half := h * math.Sqrt2 / 2
	for e, ab := range ix.edges {
		a, b := ab[0], ab[1]
		i0, j0 := ix.cellOf(math.Min(a.X, b.X), math.Min(a.Y, b.Y))
		i1, j1 := ix.cellOf(math.Max(a.X, b.X), math.Max(a.Y, b.Y))
		for j := j0; j <= j1; j++ {
			ix.strip[j] = append(ix.strip[j], int32(e))
			for i := i0; i <= i1; i++ {
				c := geom.Pt(ix.x0+(float64(i)+0.5)*h, ix.y0+(float64(j)+0.5)*h)
				if geom.SegmentDistance(c, a, b) <= half*(1+1e-9) {
					ix.bucket[j*ix.nx+i] = append(ix.bucket[j*ix.nx+i], int32(e))
				}
			}
		}
	}
	return ix
}

// cellOf returns the bucket holding (x, y), clamped to the grid.
func (ix *edgeIndex) cellOf(x, y float64) (int, int) {
	i := int(math.Floor((x - ix.x0) * ix.inv))
	j := int(math.Floor((y - ix.y0) * ix.inv))
	return min(max(i, 0), ix.nx-1), min(max(j, 0), ix.ny-1)
}

// each calls fn once for every edge in the buckets that meet the rectangle
// [x0, x1] × [y0, y1].
func (ix *edgeIndex) each(x0, y0, x1, y1 float64, fn func(a, b geom.Point)) {
	if x1 < ix.x0-ix.h || y1 < ix.y0-ix.h || x0 > ix.x0+float64(ix.nx+1)*ix.h || y0 > ix.y0+float64(ix.ny+1)*ix.h {
		return
	}
	ix.stamp++
	if ix.stamp == 0 {
		clear(ix.mark)
		ix.stamp = 1
	}
	i0, j0 := ix.cellOf(x0, y0)
	i1, j1 := ix.cellOf(x1, y1)
	for j := j0; j <= j1; j++ {
		for _, e := range ix.bucket[j*ix.nx+i0 : j*ix.nx+i1+1] {
			for _, k := range e {
				if ix.mark[k] == ix.stamp {
					continue
				}
				ix.mark[k] = ix.stamp
				fn(ix.edges[k][0], ix.edges[k][1])
			}
		}
	}
}

// inside reports whether p lies inside the shape (non-zero winding, the
// rule of Material's rasteriser).
func (ix *edgeIndex) inside(p geom.Point) bool {
	j := int(math.Floor((p.Y - ix.y0) * ix.inv))
	if j < 0 || j >= ix.ny {
		return false
	}
	w := 0
	for _, k := range ix.strip[j] {
		a, b := ix.edges[k][0], ix.edges[k][1]
		side := (b.X-a.X)*(p.Y-a.Y) - (p.X-a.X)*(b.Y-a.Y)
		switch {
		case a.Y <= p.Y && b.Y > p.Y && side > 0:
			w++
		case b.Y <= p.Y && a.Y > p.Y && side < 0:
			w--
		}
	}
	return w != 0
}

// nearest returns the distance from p to the boundary (exact).
func (ix *edgeIndex) nearest(p geom.Point) float64 {
	span := ix.h * float64(ix.nx+ix.ny+2)
	for R := ix.h; ; R *= 2 {
		d := math.Inf(1)
		ix.each(p.X-R, p.Y-R, p.X+R, p.Y+R, func(a, b geom.Point) {
			d = math.Min(d, geom.SegmentDistance(p, a, b))
		})
		// Every edge within R of p meets the box, so a distance ≤ R is
		// final.
		if d <= R || R > span+p.Dist(geom.Pt(ix.x0, ix.y0)) {
			if math.IsInf(d, 1) {
				for _, e := range ix.edges {
					d = math.Min(d, geom.SegmentDistance(p, e[0], e[1]))
				}
			}
			return d
		}
	}
}

// segSegDist returns the distance between segments ab and cd and the
// parameter t ∈ [0, 1] of a nearest point on ab.
func segSegDist(a, b, c, d geom.Point) (float64, float64) {
	ab, cd, ac := b.Sub(a), d.Sub(c), c.Sub(a)
	if den := ab.Cross(cd); den != 0 {
		t := ac.Cross(cd) / den
		s := ac.Cross(ab) / den
		if t >= 0 && t <= 1 && s >= 0 && s <= 1 {
			return 0, t
		}
	}
	best, bt := geom.SegmentDistance(a, c, d), 0.0
	if v := geom.SegmentDistance(b, c, d); v < best {
		best, bt = v, 1
	}
	l2 := ab.Dot(ab)
	for _, q := range [2]geom.Point{c, d} {
		t := 0.0
		if l2 > 0 {
			t = math.Min(math.Max(q.Sub(a).Dot(ab)/l2, 0), 1)
		}
		if v := q.Dist(a.Add(ab.Scale(t))); v < best {
			best, bt = v, t
		}
	}
	return best, bt
}

// arcSpan is a circular arc about o of radius rad from angle th0 turning by
// sweep (signed), parameterised by t ∈ [0, 1].
type arcSpan struct {
	o          geom.Point
	rad        float64
	th0, sweep float64
}

func (s arcSpan) at(t float64) geom.Point {
	sn, cs := math.Sincos(s.th0 + s.sweep*t)
	return geom.Pt(s.o.X+s.rad*cs, s.o.Y+s.rad*sn)
}

// param returns the parameter of the arc point at the angle of q seen from
// the centre, and whether that angle lies on the arc.
func (s arcSpan) param(q geom.Point) (float64, bool) {
	if s.sweep == 0 {
		return 0, false
	}
	a := math.Atan2(q.Y-s.o.Y, q.X-s.o.X)
	rel := math.Mod(a-s.th0, 2*math.Pi)
	if s.sweep < 0 {
		rel = -rel
	}
	if rel < 0 {
		rel += 2 * math.Pi
	}
	sw := math.Abs(s.sweep)
	if rel > sw {
		return 0, false
	}
	return rel / sw, true
}

// arcSegDist returns the distance between the arc s and the segment cd and
// the parameter of a nearest point on the arc. The candidates are the arc
// ends against the segment, the segment ends against the arc, the foot of
// the centre on the segment's line (outside the circle) and the crossings
// of circle and segment: between them the distance is monotone.
func arcSegDist(s arcSpan, c, d geom.Point) (float64, float64) {
	p0, p1 := s.at(0), s.at(1)
	best, bt := geom.SegmentDistance(p0, c, d), 0.0
	if v := geom.SegmentDistance(p1, c, d); v < best {
		best, bt = v, 1
	}
	try := func(q geom.Point, dist float64) {
		if dist >= best {
			return
		}
		if t, ok := s.param(q); ok {
			best, bt = dist, t
		}
	}
	for _, q := range [2]geom.Point{c, d} {
		try(q, math.Abs(q.Dist(s.o)-s.rad))
	}
	cd := d.Sub(c)
	l2 := cd.Dot(cd)
	if l2 == 0 {
		return best, bt
	}
	co := c.Sub(s.o)
	// |co + u·cd|² = rad²: u² l2 + 2u (co·cd) + |co|² − rad² = 0.
	bq := co.Dot(cd)
	cq := co.Dot(co) - s.rad*s.rad
	if u := -bq / l2; u > 0 && u < 1 {
		f := c.Add(cd.Scale(u))
		if df := f.Dist(s.o); df >= s.rad {
			try(f, df-s.rad)
		}
	}
	if disc := bq*bq - l2*cq; disc >= 0 {
		sq := math.Sqrt(disc)
		for _, u := range [2]float64{(-bq - sq) / l2, (-bq + sq) / l2} {
			if u >= 0 && u <= 1 {
				try(c.Add(cd.Scale(u)), 0)
			}
		}
	}
	return best, bt
}

// intrusion measures how deep a tool disk of radius r, moving along a
// stretch of tool-centre path, reaches into a shape.
type intrusion struct {
	ix   *edgeIndex
	r    float64
	step float64 // spacing of the checks where the centre is inside the shape
}

// worst returns the deepest intrusion r − (signed distance of the centre
// to the shape, positive outside) over the line ab (arc nil) or the arc,
// and the path parameter where it happens. Outside the shape the figure is
// exact (segment–segment or arc–segment distance); where the centre is
// inside, the distance to the boundary is measured at the ends and every
// step along the stretch.
func (in *intrusion) worst(a, b geom.Point, arc *arcSpan) (float64, float64) {
	pt := func(t float64) geom.Point {
		if arc != nil {
			return arc.at(t)
		}
		return a.Lerp(b, t)
	}
	var bb geom.Rect
	length := a.Dist(b)
	if arc != nil {
		bb = arcBounds(*arc)
		length = arc.rad * math.Abs(arc.sweep)
	} else {
		bb = geom.EmptyRect().Extend(a).Extend(b)
	}
	R := in.r * (1 + 1e-9)
	dmin, tmin := math.Inf(1), 0.0
	in.ix.each(bb.Min.X-R, bb.Min.Y-R, bb.Max.X+R, bb.Max.Y+R, func(c, d geom.Point) {
		var v, t float64
		if arc != nil {
			v, t = arcSegDist(*arc, c, d)
		} else {
			v, t = segSegDist(a, b, c, d)
		}
		if v < dmin {
			dmin, tmin = v, t
		}
	})
	if dmin > 0 && !in.ix.inside(pt(0)) {
		// The stretch stays outside: exact.
		return in.r - dmin, tmin
	}
	// The centre is inside the shape over some of the stretch (or on its
	// boundary): at least r there.
	g, tg := in.r, tmin
	n := max(1, int(math.Ceil(length/in.step)))
	for k := 0; k <= n; k++ {
		t := float64(k) / float64(n)
		p := pt(t)
		if in.ix.inside(p) {
			if v := in.r + in.ix.nearest(p); v > g {
				g, tg = v, t
			}
		}
	}
	return g, tg
}

// arcBounds returns the bounding rectangle of an arc.
func arcBounds(s arcSpan) geom.Rect {
	bb := geom.EmptyRect().Extend(s.at(0)).Extend(s.at(1))
	for q := 0; q < 4; q++ {
		p := s.o.Add(geom.Pt(math.Cos(float64(q)*math.Pi/2), math.Sin(float64(q)*math.Pi/2)).Scale(s.rad))
		if _, ok := s.param(p); ok {
			bb = bb.Extend(p)
		}
	}
	return bb
}

// chunks calls fn for consecutive stretches of move g between parameters
// t0 and t1, each no longer than about lmax in XY; fn receives the stretch
// ends (parameters of g) and its geometry.
func chunks(g *moveGeom, t0, t1, lmax float64, fn func(ta, tb float64, a, b geom.Point, arc *arcSpan)) {
	n := max(1, int(math.Ceil(g.lengthXY*(t1-t0)/lmax)))
	if g.arc {
		n = max(n, int(math.Ceil(math.Abs(g.sweep)*(t1-t0)/(math.Pi/2))))
	}
	for k := 0; k < n; k++ {
		ta := t0 + (t1-t0)*float64(k)/float64(n)
		tb := t0 + (t1-t0)*float64(k+1)/float64(n)
		a, _ := g.at(ta)
		b, _ := g.at(tb)
		if g.arc {
			s := arcSpan{o: g.o, rad: g.rad, th0: g.th0 + g.sweep*ta, sweep: g.sweep * (tb - ta)}
			fn(ta, tb, a, b, &s)
		} else {
			fn(ta, tb, a, b, nil)
		}
	}
}

// below returns the parameter range of move g where its Z lies below zlim,
// and false when there is none.
func (g *moveGeom) below(zlim float64) (float64, float64, bool) {
	za, zb := g.za, g.zb
	switch {
	case za < zlim && zb < zlim:
		return 0, 1, true
	case za >= zlim && zb >= zlim:
		return 0, 0, false
	}
	t := (zlim - za) / (zb - za)
	if za < zlim {
		return 0, t, t > 0
	}
	return t, 1, t < 1
}

// floorCheck tracks the deepest tool bottom below a target's floor where
// the tool disk reaches into the target region.
type floorCheck struct {
	in    intrusion
	floor float64
	gouge float64
}

// gouges measures move i against the Keep shape and the target floors,
// from the geometry of the move alone (the material plays no part).
//
// Wall gouge: the part of the move below the stock top, in stretches of at
// most one index bucket, each measured exactly (see intrusion.worst).
//
// Floor gouge: the part of the move more than the tolerance below a
// target's floor where the tool disk reaches more than gougeTol into the
// target region; the figure is the floor less the lowest tool bottom of
// such a stretch. Stretches of a move that changes height are one sampling
// step long, so a ramp's figure is conservative by at most its descent
// over one step.
func (s *simulator) gouges(i int, g *moveGeom) {
	if s.keep != nil {
		if t0, t1, ok := g.below(s.m.top - epsZ); ok {
			chunks(g, t0, t1, s.keep.ix.h, func(ta, tb float64, a, b geom.Point, arc *arcSpan) {
				v, t := s.keep.worst(a, b, arc)
				if v > gougeTol && v > s.sum.MaxGouge {
					p, z := g.at(ta + (tb-ta)*t)
					s.sum.MaxGouge = v
					s.sum.GougeAt = geom.Point3{X: p.X, Y: p.Y, Z: z}
					s.sum.GougeMove = i
				}
			})
		}
	}
	for k := range s.floors {
		f := &s.floors[k]
		t0, t1, ok := g.below(f.floor - s.opt.Tolerance)
		if !ok || f.floor-math.Min(g.za, g.zb) <= f.gouge {
			continue
		}
		lmax := f.in.ix.h
		if g.za != g.zb {
			lmax = s.opt.Step
		}
		chunks(g, t0, t1, lmax, func(ta, tb float64, a, b geom.Point, arc *arcSpan) {
			_, za := g.at(ta)
			_, zb := g.at(tb)
			if d := f.floor - math.Min(za, zb); d > f.gouge {
				if v, _ := f.in.worst(a, b, arc); v > gougeTol {
					f.gouge = d
				}
			}
		})
	}
}
