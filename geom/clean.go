package geom

// Clean returns a copy of r without points that repeat their predecessor
// and without trailing points that repeat the first (rings close
// implicitly), which is what readers do to the rings they return.
func (r Ring) Clean() Ring {
	out := make(Ring, 0, len(r))
	for _, p := range r {
		if len(out) > 0 && out[len(out)-1] == p {
			continue
		}
		out = append(out, p)
	}
	for len(out) > 1 && out[len(out)-1] == out[0] {
		out = out[:len(out)-1]
	}
	return out
}

// Clean returns a copy of g with every ring cleaned (see Ring.Clean) and
// the orientation normalised: outer ring counter-clockwise, holes
// clockwise. A ring turned around keeps its first point first.
func (g Region) Clean() Region {
	c := Region{Outer: orient(g.Outer.Clean(), true)}
	for _, h := range g.Holes {
		c.Holes = append(c.Holes, orient(h.Clean(), false))
	}
	return c
}

// orient returns r (owned by the caller) running counter-clockwise when
// ccw is set and clockwise otherwise, reversed in place about its first
// point when needed.
func orient(r Ring, ccw bool) Ring {
	if len(r) < 3 || r.CCW() == ccw || r.SignedArea() == 0 {
		return r
	}
	for i, j := 1, len(r)-1; i < j; i, j = i+1, j-1 {
		r[i], r[j] = r[j], r[i]
	}
	return r
}

// Clean returns a copy of s with every region cleaned (see Region.Clean).
func (s Shape) Clean() Shape {
	out := make(Shape, len(s))
	for i, g := range s {
		out[i] = g.Clean()
	}
	return out
}
