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

// exactCorners returns the chains with the true crossing points inserted
// where arc chords cross other kept segments. arcs[c][i] is the input vertex
// (an index into centres) of the arc that segment c[i]→c[i+1] is a chord
// of, or −1; r is the arc radius in mm.
func exactCorners(chains [][]ipt, pruned [][]bool, arcs [][]int32, centres []ipt, r float64) ([][]ipt, [][]bool) {
	total := 0
	anyArc := false
	for c := range chains {
		total += len(chains[c])
		for _, v := range arcs[c] {
			anyArc = anyArc || v >= 0
		}
	}
	if !anyArc {
		return chains, pruned
	}
	sa := make([]ipt, 0, total)
	sb := make([]ipt, 0, total)
	sc := make([]int32, 0, total)
	si := make([]int32, 0, total)
	sarc := make([]int32, 0, total)
	for c, ch := range chains {
		n := len(ch)
		for i := range ch {
			j := (i + 1) % n
			if pruned[c][i] || ch[i] == ch[j] {
				continue
			}
			sa = append(sa, ch[i])
			sb = append(sb, ch[j])
			sc = append(sc, int32(c))
			si = append(si, int32(i))
			sarc = append(sarc, arcs[c][i])
		}
	}
	// Kept segment ids by chain and index, for the neighbours of a chord.
	idOf := make([][]int32, len(chains))
	flat := make([]int32, total)
	for i := range flat {
		flat[i] = -1
	}
	for c, ch := range chains {
		idOf[c], flat = flat[:len(ch):len(ch)], flat[len(ch):]
	}
	for e := range sa {
		idOf[sc[e]][si[e]] = int32(e)
	}
	neighbour := func(e int32, step int) int32 {
		ch := idOf[sc[e]]
		f := ch[(int(si[e])+step+len(ch))%len(ch)]
		if f < 0 || sarc[f] != sarc[e] {
			return -1
		}
		return f
	}
	g, start, segs := bucketSegments(sa, sb)
	R := r * gridScale
	type ins struct {
		seg int32
		t   float64
		p   ipt
	}
	var found []ins
	moves := map[[2]int32]ipt{}
	insert := func(e int32, x, y float64) {
		q := ipt{int64(math.Round(x)), int64(math.Round(y))}
		if q == sa[e] || q == sb[e] {
			return
		}
		dx, dy := float64(sb[e].x-sa[e].x), float64(sb[e].y-sa[e].y)
		found = append(found, ins{e, (x-float64(sa[e].x))*dx + (y-float64(sa[e].y))*dy, q})
	}
	// onCircle moves the shared vertex v of two chords of arc c radially
	// onto the circle.
	onCircle := func(e int32, end int, c ipt) {
		v := sa[e]
		key := [2]int32{sc[e], si[e]}
		if end == 1 {
			v = sb[e]
			key[1] = (si[e] + 1) % int32(len(chains[sc[e]]))
		}
		dx, dy := float64(v.x-c.x), float64(v.y-c.y)
		k := R / math.Hypot(dx, dy)
		if _, ok := moves[key]; !ok {
			moves[key] = ipt{c.x + int64(math.Round(k*dx)), c.y + int64(math.Round(k*dy))}
		}
	}
	// place puts the true crossing (x, y) on segment e's curve.
	place := func(e int32, x, y float64) {
		if sarc[e] < 0 {
			insert(e, x, y)
			return
		}
		c := centres[sarc[e]]
		switch arcSide(sa[e], sb[e], c, x, y) {
		case 0:
			insert(e, x, y)
		case 1: // beyond the chord's end: into the next chord
			if f := neighbour(e, 1); f >= 0 && arcSide(sa[f], sb[f], c, x, y) == 0 {
				onCircle(e, 1, c)
				insert(f, x, y)
			}
		case -1: // before its start: into the previous chord
			if f := neighbour(e, -1); f >= 0 && arcSide(sa[f], sb[f], c, x, y) == 0 {
				onCircle(e, 0, c)
				insert(f, x, y)
			}
		}
	}
	for c := 0; c+1 < len(start); c++ {
		list := segs[start[c]:start[c+1]]
		for k, s := range list {
			for _, t := range list[k+1:] {
				if sarc[s] < 0 && sarc[t] < 0 {
					continue
				}
				if !boxesMeet(sa[s], sb[s], sa[t], sb[t]) || !properCross(sa[s], sb[s], sa[t], sb[t]) {
					continue
				}
				s1, t1 := s, t
				if s1 > t1 {
					s1, t1 = t1, s1
				}
				px, py := crossPoint(sa[s1], sb[s1], sa[t1], sb[t1])
				if g.row(py-g.oy)*g.nx+g.col(px-g.ox) != c {
					continue // reported in the cell holding the crossing
				}
				x, y, ok := trueCrossing(sa, sb, sarc, centres, s1, t1, px, py, R)
				if !ok {
					continue
				}
				place(s1, x, y)
				place(t1, x, y)
			}
		}
	}
	if len(found) == 0 {
		return chains, pruned
	}
	slices.SortFunc(found, func(a, b ins) int {
		if a.seg != b.seg {
			return int(a.seg - b.seg)
		}
		switch {
		case a.t < b.t:
			return -1
		case a.t > b.t:
			return 1
		}
		return 0
	})
	// Rebuild the chains that got new vertices.
	outC := slices.Clone(chains)
	outP := slices.Clone(pruned)
	for k := 0; k < len(found); {
		c := sc[found[k].seg]
		ch, pr := slices.Clone(chains[c]), pruned[c]
		for key, p := range moves {
			if key[0] == int32(c) {
				ch[key[1]] = p
			}
		}
		nc := make([]ipt, 0, len(ch)+8)
		np := make([]bool, 0, len(ch)+8)
		for i := range ch {
			if len(nc) > 0 && ch[i] == nc[len(nc)-1] {
				continue
			}
			nc = append(nc, ch[i])
			np = append(np, pr[i])
			for k < len(found) && sc[found[k].seg] == int32(c) && si[found[k].seg] == int32(i) {
				if p := found[k].p; p != nc[len(nc)-1] && p != ch[(i+1)%len(ch)] {
					nc = append(nc, p)
					np = append(np, false)
				}
				k++
			}
		}
		for len(nc) > 1 && nc[len(nc)-1] == nc[0] {
			nc, np = nc[:len(nc)-1], np[:len(np)-1]
		}
		outC[c], outP[c] = nc, np
	}
	return outC, outP
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

// trueCrossing returns the crossing of the true curves of segments s and t
// (at least one an arc chord) nearest to their crossing (px, py), in grid
// units, and whether there is one (inside the straight segment, if any).
func trueCrossing(sa, sb []ipt, sarc []int32, centres []ipt, s, t int32, px, py, R float64) (float64, float64, bool) {
	if sarc[s] < 0 {
		s, t = t, s
	}
	// Work relative to (px, py) to keep the numbers small.
	cs := centres[sarc[s]]
	cx, cy := float64(cs.x)-px, float64(cs.y)-py
	var x, y float64
	if sarc[t] >= 0 {
		ct := centres[sarc[t]]
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
		ax, ay := float64(sa[t].x)-px, float64(sa[t].y)-py
		dx, dy := float64(sb[t].x-sa[t].x), float64(sb[t].y-sa[t].y)
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
