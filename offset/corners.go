package offset

import (
	"math"
	"slices"
)

// Exact corners. Where an arc polyline crosses another raw curve at a
// small angle α, an error e of the polyline against its arc moves the
// crossing, a corner of the result, by up to e / sin α along the other
// curve: a narrow wedge of the result ends too early or too late. So before
// noding, every crossing of an arc chord with another kept raw segment is
// replaced by the crossing of the true curves (circle with line, or two
// circles of the same radius), inserted as a vertex into both. A vertex on
// the true arc within a chord's angular range leaves the chord polyline
// within the tolerance (both new chords deviate less than the old one), and
// a vertex on a straight segment moves it by the grid rounding only, so
// nothing else changes; the two curves then cross at the exact corner
// (up to the grid), whatever α is.

// cornerPass holds what the exact corner pass needs besides the
// arrangement: per kept segment its arc (an index into centres, or −1) and
// chain, the kept segment starting at each raw vertex (or −1), the first
// raw vertex of each chain, and the arc radius R in grid units.
type cornerPass struct {
	centres   []ipt
	R         float64
	sarc      []int32
	chain     []int32
	idOf      []int32
	chainBase []int32
}

// exactCorners inserts the true crossing points where arc chords cross
// other kept segments, before snap rounding. The grid cells of every
// segment were taken with a margin of tol + 4 grid units, so the pieces of
// a split segment, which stay within tol of it, are still covered by its
// cells.
func (a *arrangement) exactCorners(cp *cornerPass) {
	anyArc := false
	for _, v := range cp.sarc {
		if v >= 0 {
			anyArc = true
			break
		}
	}
	if !anyArc {
		return
	}
	pts, sa, sb, sarc := a.pts, a.sa, a.sb, cp.sarc
	// neighbour returns the kept chord of the same arc before (step −1)
	// or after (+1) kept segment e, or −1.
	neighbour := func(e int32, step int32) int32 {
		c := cp.chain[e]
		b0, b1 := cp.chainBase[c], cp.chainBase[c+1]
		v := sa[e] + step
		if step > 0 {
			v = sb[e]
		}
		if v < b0 {
			v = b1 - 1
		}
		f := cp.idOf[v]
		if f < 0 || sarc[f] != sarc[e] {
			return -1
		}
		return f
	}
	type ins struct {
		seg int32
		t   float64
		p   ipt
	}
	var found []ins
	var moves map[int32]ipt
	insert := func(e int32, x, y float64) {
		q := ipt{int64(math.Round(x)), int64(math.Round(y))}
		p0, p1 := pts[sa[e]], pts[sb[e]]
		if q == p0 || q == p1 {
			return
		}
		dx, dy := float64(p1.x-p0.x), float64(p1.y-p0.y)
		found = append(found, ins{e, (x-float64(p0.x))*dx + (y-float64(p0.y))*dy, q})
	}
	// onCircle moves raw vertex v, shared by two kept chords of the arc
	// about c, radially onto the circle.
	onCircle := func(v int32, c ipt) {
		if moves == nil {
			moves = map[int32]ipt{}
		}
		if _, ok := moves[v]; ok {
			return
		}
		p := pts[v]
		dx, dy := float64(p.x-c.x), float64(p.y-c.y)
		k := cp.R / math.Hypot(dx, dy)
		moves[v] = ipt{c.x + int64(math.Round(k*dx)), c.y + int64(math.Round(k*dy))}
	}
	// place puts the true crossing (x, y) on segment e's curve.
	place := func(e int32, x, y float64) {
		if sarc[e] < 0 {
			insert(e, x, y)
			return
		}
		c := cp.centres[sarc[e]]
		switch arcSide(pts[sa[e]], pts[sb[e]], c, x, y) {
		case 0:
			insert(e, x, y)
		case 1: // beyond the chord's end: into the next chord
			if f := neighbour(e, 1); f >= 0 && arcSide(pts[sa[f]], pts[sb[f]], c, x, y) == 0 {
				onCircle(sb[e], c)
				insert(f, x, y)
			}
		case -1: // before its start: into the previous chord
			if f := neighbour(e, -1); f >= 0 && arcSide(pts[sa[f]], pts[sb[f]], c, x, y) == 0 {
				onCircle(sa[e], c)
				insert(f, x, y)
			}
		}
	}
	g := &a.g
	for c := 0; c+1 < len(a.cellStart); c++ {
		list := a.cellSegs[a.cellStart[c]:a.cellStart[c+1]]
		for k, s := range list {
			for _, t := range list[k+1:] {
				if sarc[s] < 0 && sarc[t] < 0 {
					continue
				}
				p1, p2, q1, q2 := pts[sa[s]], pts[sb[s]], pts[sa[t]], pts[sb[t]]
				if !boxesMeet(p1, p2, q1, q2) || !properCross(p1, p2, q1, q2) {
					continue
				}
				s1, t1 := s, t
				if s1 > t1 {
					s1, t1 = t1, s1
				}
				px, py := crossPoint(pts[sa[s1]], pts[sb[s1]], pts[sa[t1]], pts[sb[t1]])
				if g.row(py-g.oy)*g.nx+g.col(px-g.ox) != c {
					continue // reported in the cell holding the crossing
				}
				x, y, ok := trueCrossing(pts[sa[s1]], pts[sb[s1]], sarc[s1], pts[sa[t1]], pts[sb[t1]], sarc[t1], cp.centres, px, py, cp.R)
				if !ok {
					continue
				}
				place(s1, x, y)
				place(t1, x, y)
			}
		}
	}
	if len(found) == 0 {
		return
	}
	for v, p := range moves {
		a.pts[v] = p
	}
	slices.SortFunc(found, func(u, v ins) int {
		if u.seg != v.seg {
			return int(u.seg - v.seg)
		}
		switch {
		case u.t < v.t:
			return -1
		case u.t > v.t:
			return 1
		}
		return 0
	})
	// Split the segments, keeping each piece's parent for its cells.
	ns := len(sa)
	nsa := make([]int32, 0, ns+len(found))
	nsb := make([]int32, 0, ns+len(found))
	parent := make([]int32, 0, ns+len(found))
	first := make([]int32, ns+1) // pieces of segment e: first[e]..first[e+1]
	k := 0
	for e := 0; e < ns; e++ {
		first[e] = int32(len(nsa))
		from := sa[e]
		for ; k < len(found) && found[k].seg == int32(e); k++ {
			q := found[k].p
			if q == a.pts[from] || q == a.pts[sb[e]] {
				continue
			}
			a.pts = append(a.pts, q)
			v := int32(len(a.pts) - 1)
			nsa, nsb, parent = append(nsa, from), append(nsb, v), append(parent, int32(e))
			from = v
		}
		if a.pts[from] != a.pts[sb[e]] {
			nsa, nsb, parent = append(nsa, from), append(nsb, sb[e]), append(parent, int32(e))
		}
	}
	first[ns] = int32(len(nsa))
	// Cell lists of the pieces from those of their segments.
	ncell := len(a.cellStart) - 1
	start := make([]int32, ncell+1)
	for c := 0; c < ncell; c++ {
		n := int32(0)
		for _, e := range a.cellSegs[a.cellStart[c]:a.cellStart[c+1]] {
			n += first[e+1] - first[e]
		}
		start[c+1] = start[c] + n
	}
	segs := make([]int32, start[ncell])
	for c := 0; c < ncell; c++ {
		o := start[c]
		for _, e := range a.cellSegs[a.cellStart[c]:a.cellStart[c+1]] {
			for f := first[e]; f < first[e+1]; f++ {
				segs[o] = f
				o++
			}
		}
	}
	a.sa, a.sb, a.segParent = nsa, nsb, parent
	a.cellStart, a.cellSegs = start, segs
}

// arcSide tells where the point (x, y) lies, seen from the arc centre c,
// against the angular range of the chord ab: 0 inside, −1 before a, +1
// beyond b (for chords shorter than half a turn).
func arcSide(a, b, c ipt, x, y float64) int {
	ax, ay := float64(a.x-c.x), float64(a.y-c.y)
	bx, by := float64(b.x-c.x), float64(b.y-c.y)
	qx, qy := x-float64(c.x), y-float64(c.y)
	ab := ax*by - ay*bx
	switch {
	case (ax*qy-ay*qx)*ab <= 0:
		return -1
	case (qx*by-qy*bx)*ab <= 0:
		return 1
	}
	return 0
}

// trueCrossing returns the crossing of the true curves of segments sa→sb and
// ta→tb
// (at least one an arc chord) nearest to their crossing (px, py), in grid
// units, and whether there is one (inside the straight segment, if any).
func trueCrossing(sa, sb ipt, sarc int32, ta, tb ipt, tarc int32, centres []ipt, px, py, R float64) (float64, float64, bool) {
	if sarc < 0 {
		sa, sb, sarc, ta, tb, tarc = ta, tb, tarc, sa, sb, sarc
	}
	// Work relative to (px, py) to keep the numbers small.
	cs := centres[sarc]
	cx, cy := float64(cs.x)-px, float64(cs.y)-py
	var x, y float64
	if tarc >= 0 {
		ct := centres[tarc]
		ex, ey := float64(ct.x)-px, float64(ct.y)-py
		dx, dy := ex-cx, ey-cy
		dd := dx*dx + dy*dy
		h2 := R*R - dd/4
		if dd == 0 || h2 < 0 {
			return 0, 0, false
		}
		h := math.Sqrt(h2 / dd)
		mx, my := (cx+ex)/2, (cy+ey)/2
		x1, y1 := mx-h*dy, my+h*dx
		x2, y2 := mx+h*dy, my-h*dx
		x, y = x1, y1
		if x2*x2+y2*y2 < x1*x1+y1*y1 {
			x, y = x2, y2
		}
	} else {
		ax, ay := float64(ta.x)-px, float64(ta.y)-py
		dx, dy := float64(tb.x-ta.x), float64(tb.y-ta.y)
		A := dx*dx + dy*dy
		B := (ax-cx)*dx + (ay-cy)*dy
		C := (ax-cx)*(ax-cx) + (ay-cy)*(ay-cy) - R*R
		disc := B*B - A*C
		if A == 0 || disc < 0 {
			return 0, 0, false
		}
		sq := math.Sqrt(disc)
		u1, u2 := (-B-sq)/A, (-B+sq)/A
		x1, y1 := ax+u1*dx, ay+u1*dy
		x2, y2 := ax+u2*dx, ay+u2*dy
		u := u1
		x, y = x1, y1
		if x2*x2+y2*y2 < x1*x1+y1*y1 {
			u, x, y = u2, x2, y2
		}
		if u <= 0 || u >= 1 {
			return 0, 0, false
		}
	}
	return x + px, y + py, true
}
