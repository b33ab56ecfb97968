package pathplan

import (
	"math"
	"sort"

	"github.com/chipband/chipband/geom"
)

// edgeIndex is a uniform grid over the edges of a shape, for clipping paths
// against the shape and measuring distances to its boundary.
type edgeIndex struct {
	shape  geom.Shape
	a, b   []geom.Point
	min    geom.Point
	cell   float64
	nx, ny int
	cells  [][]int32
	stamp  []uint32
	gen    uint32
	bounds geom.Rect
}

func newEdgeIndex(s geom.Shape) *edgeIndex {
	ix := &edgeIndex{shape: s, bounds: s.Bounds()}
	for _, r := range s.Rings() {
		for i := range r {
			ix.a = append(ix.a, r[i])
			ix.b = append(ix.b, r[(i+1)%len(r)])
		}
	}
	n := len(ix.a)
	if n == 0 {
		return ix
	}
	w, h := ix.bounds.Width(), ix.bounds.Height()
	side := math.Sqrt(math.Max(w*h, 1e-9) / float64(n) * 4)
	if side <= 0 || math.IsNaN(side) {
		side = 1
	}
	ix.cell = side
	ix.min = ix.bounds.Min
	ix.nx = int(w/side) + 1
	ix.ny = int(h/side) + 1
	for ix.nx*ix.ny > 4*n+16 {
		ix.cell *= 1.5
		ix.nx = int(w/ix.cell) + 1
		ix.ny = int(h/ix.cell) + 1
	}
	ix.cells = make([][]int32, ix.nx*ix.ny)
	for e := 0; e < n; e++ {
		x0, y0, x1, y1 := ix.cellRange(ix.a[e], ix.b[e], 0)
		for y := y0; y <= y1; y++ {
			for x := x0; x <= x1; x++ {
				ix.cells[y*ix.nx+x] = append(ix.cells[y*ix.nx+x], int32(e))
			}
		}
	}
	ix.stamp = make([]uint32, n)
	return ix
}

func (ix *edgeIndex) cellRange(p, q geom.Point, pad float64) (x0, y0, x1, y1 int) {
	clampi := func(v, n int) int {
		if v < 0 {
			return 0
		}
		if v >= n {
			return n - 1
		}
		return v
	}
	x0 = clampi(int(math.Floor((math.Min(p.X, q.X)-pad-ix.min.X)/ix.cell)), ix.nx)
	x1 = clampi(int(math.Floor((math.Max(p.X, q.X)+pad-ix.min.X)/ix.cell)), ix.nx)
	y0 = clampi(int(math.Floor((math.Min(p.Y, q.Y)-pad-ix.min.Y)/ix.cell)), ix.ny)
	y1 = clampi(int(math.Floor((math.Max(p.Y, q.Y)+pad-ix.min.Y)/ix.cell)), ix.ny)
	return
}

// near calls fn for every edge whose cell range meets the box of p, q
// grown by pad.
func (ix *edgeIndex) near(p, q geom.Point, pad float64, fn func(a, b geom.Point)) {
	if len(ix.a) == 0 {
		return
	}
	bx := geom.EmptyRect().Extend(p).Extend(q)
	if bx.Max.X+pad < ix.bounds.Min.X || bx.Min.X-pad > ix.bounds.Max.X ||
		bx.Max.Y+pad < ix.bounds.Min.Y || bx.Min.Y-pad > ix.bounds.Max.Y {
		return
	}
	ix.gen++
	if ix.gen == 0 {
		for i := range ix.stamp {
			ix.stamp[i] = 0
		}
		ix.gen = 1
	}
	x0, y0, x1, y1 := ix.cellRange(p, q, pad)
	for y := y0; y <= y1; y++ {
		for x := x0; x <= x1; x++ {
			for _, e := range ix.cells[y*ix.nx+x] {
				if ix.stamp[e] == ix.gen {
					continue
				}
				ix.stamp[e] = ix.gen
				fn(ix.a[e], ix.b[e])
			}
		}
	}
}

// segDist returns the distance between segments ab and cd.
func segDist(a, b, c, d geom.Point) float64 {
	if segsCross(a, b, c, d) {
		return 0
	}
	return math.Min(math.Min(geom.SegmentDistance(a, c, d), geom.SegmentDistance(b, c, d)),
		math.Min(geom.SegmentDistance(c, a, b), geom.SegmentDistance(d, a, b)))
}

func segsCross(a, b, c, d geom.Point) bool {
	d1 := b.Sub(a).Cross(c.Sub(a))
	d2 := b.Sub(a).Cross(d.Sub(a))
	d3 := d.Sub(c).Cross(a.Sub(c))
	d4 := d.Sub(c).Cross(b.Sub(c))
	return ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))
}

// clearance returns the distance from segment pq to the boundary of the
// indexed shape, looking no farther than limit (it returns limit when
// nothing is nearer).
func (ix *edgeIndex) clearance(p, q geom.Point, limit float64) float64 {
	d := limit
	ix.near(p, q, limit, func(a, b geom.Point) {
		if v := segDist(p, q, a, b); v < d {
			d = v
		}
	})
	return d
}

// piece is a part of a path: an open polyline, or a closed ring when closed
// is set (the closing edge implicit).
type piece struct {
	pts    []geom.Point
	closed bool
}

func (p piece) length() float64 {
	var l float64
	for i := 1; i < len(p.pts); i++ {
		l += p.pts[i-1].Dist(p.pts[i])
	}
	if p.closed && len(p.pts) > 1 {
		l += p.pts[len(p.pts)-1].Dist(p.pts[0])
	}
	return l
}

// clip returns the parts of the path pts (closed when closed is set) that
// lie inside the indexed shape. A closed path wholly inside comes back as
// one closed piece. Parts shorter than 1e-6 mm are dropped.
func (ix *edgeIndex) clip(pts []geom.Point, closed bool) []piece {
	n := len(pts)
	if n < 2 {
		return nil
	}
	nseg := n - 1
	if closed {
		nseg = n
	}
	type event struct {
		seg int
		t   float64
	}
	var evs []event
	var ts []float64
	for i := 0; i < nseg; i++ {
		a, b := pts[i], pts[(i+1)%n]
		ab := b.Sub(a)
		ts = ts[:0]
		ix.near(a, b, 0, func(c, d geom.Point) {
			cd := d.Sub(c)
			den := ab.Cross(cd)
			if den == 0 {
				return
			}
			ca := c.Sub(a)
			t := ca.Cross(cd) / den
			u := ca.Cross(ab) / den
			if t > 0 && t < 1 && u >= 0 && u <= 1 {
				ts = append(ts, t)
			}
		})
		sort.Float64s(ts)
		for _, t := range ts {
			evs = append(evs, event{i, t})
		}
	}
	inside := func(poly []geom.Point) bool {
		// classify by the midpoint of the polyline's length
		total := 0.0
		for i := 1; i < len(poly); i++ {
			total += poly[i-1].Dist(poly[i])
		}
		half := total / 2
		for i := 1; i < len(poly); i++ {
			l := poly[i-1].Dist(poly[i])
			if l >= half && l > 0 {
				return ix.shape.Contains(poly[i-1].Lerp(poly[i], half/l))
			}
			half -= l
		}
		return ix.shape.Contains(poly[0])
	}
	if len(evs) == 0 {
		p := piece{pts: append([]geom.Point(nil), pts...), closed: closed}
		probe := pts
		if closed {
			probe = append(append([]geom.Point(nil), pts...), pts[0])
		}
		if inside(probe) {
			return []piece{p}
		}
		return nil
	}
	var out []piece
	keep := func(poly []geom.Point) {
		if len(poly) < 2 {
			return
		}
		if (piece{pts: poly}).length() < 1e-6 {
			return
		}
		if inside(poly) {
			out = append(out, piece{pts: poly})
		}
	}
	if !closed {
		keep(walkOpen(pts, -1, 0, evs[0].seg, evs[0].t))
		for i := 0; i+1 < len(evs); i++ {
			keep(walkOpen(pts, evs[i].seg, evs[i].t, evs[i+1].seg, evs[i+1].t))
		}
		last := evs[len(evs)-1]
		keep(walkOpen(pts, last.seg, last.t, n-2, 1))
		return mergeOpen(out)
	}
	for i := range evs {
		e0, e1 := evs[i], evs[(i+1)%len(evs)]
		keep(walkClosed(pts, e0.seg, e0.t, e1.seg, e1.t, len(evs) == 1))
	}
	return mergeClosed(out)
}

// walkOpen returns the polyline of an open path from (s0, t0) to (s1, t1);
// s0 = -1 means the path's first point.
func walkOpen(pts []geom.Point, s0 int, t0 float64, s1 int, t1 float64) []geom.Point {
	var out []geom.Point
	if s0 < 0 {
		out = append(out, pts[0])
		s0 = 0
	} else {
		out = append(out, pts[s0].Lerp(pts[s0+1], t0))
	}
	for i := s0 + 1; i <= s1; i++ {
		out = append(out, pts[i])
	}
	out = append(out, pts[s1].Lerp(pts[s1+1], t1))
	return dedupe(out)
}

// walkClosed returns the polyline of a closed path from (s0, t0) forward to
// (s1, t1), going all the way round when full is set.
func walkClosed(pts []geom.Point, s0 int, t0 float64, s1 int, t1 float64, full bool) []geom.Point {
	n := len(pts)
	out := []geom.Point{pts[s0].Lerp(pts[(s0+1)%n], t0)}
	if s0 == s1 && t1 > t0 && !full {
		out = append(out, pts[s1].Lerp(pts[(s1+1)%n], t1))
		return dedupe(out)
	}
	i := (s0 + 1) % n
	for {
		out = append(out, pts[i])
		if i == s1 {
			break
		}
		i = (i + 1) % n
	}
	out = append(out, pts[s1].Lerp(pts[(s1+1)%n], t1))
	return dedupe(out)
}

func dedupe(pts []geom.Point) []geom.Point {
	out := pts[:0:0]
	for _, p := range pts {
		if len(out) > 0 && out[len(out)-1].Dist(p) < 1e-9 {
			continue
		}
		out = append(out, p)
	}
	return out
}

// mergeOpen joins consecutive pieces of an open path that meet end to start.
func mergeOpen(ps []piece) []piece {
	var out []piece
	for _, p := range ps {
		if len(out) > 0 {
			last := &out[len(out)-1]
			if last.pts[len(last.pts)-1].Dist(p.pts[0]) < 1e-9 {
				last.pts = append(last.pts, p.pts[1:]...)
				continue
			}
		}
		out = append(out, p)
	}
	return out
}

// mergeClosed joins consecutive pieces of a closed path, including the last
// with the first; a single piece that closes on itself becomes closed.
func mergeClosed(ps []piece) []piece {
	out := mergeOpen(ps)
	if len(out) > 1 {
		first, last := out[0], out[len(out)-1]
		if last.pts[len(last.pts)-1].Dist(first.pts[0]) < 1e-9 {
			out[0].pts = append(append([]geom.Point(nil), last.pts...), first.pts[1:]...)
			out = out[:len(out)-1]
		}
	}
	if len(out) == 1 {
		p := out[0].pts
		if len(p) > 2 && p[0].Dist(p[len(p)-1]) < 1e-9 {
			out[0] = piece{pts: p[:len(p)-1], closed: true}
		}
	}
	return out
}

// insideLength returns the length of segment pq inside the indexed shape.
func (ix *edgeIndex) insideLength(p, q geom.Point) float64 {
	var l float64
	for _, pc := range ix.clip([]geom.Point{p, q}, false) {
		l += pc.length()
	}
	return l
}

// insideParts returns the parts of segment pq inside the indexed shape.
func (ix *edgeIndex) insideParts(p, q geom.Point) [][2]geom.Point {
	var out [][2]geom.Point
	for _, pc := range ix.clip([]geom.Point{p, q}, false) {
		out = append(out, [2]geom.Point{pc.pts[0], pc.pts[len(pc.pts)-1]})
	}
	return out
}
