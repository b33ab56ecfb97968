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
// the orientation normalised: outer ring counter-clockwise, holes clockwise.
func (g Region) Clean() Region {
	c := Region{Outer: g.Outer.Clean()}
	for _, h := range g.Holes {
		c.Holes = append(c.Holes, h.Clean())
	}
	return c.Normalized()
}

// Clean returns a copy of s with every region cleaned (see Region.Clean).
func (s Shape) Clean() Shape {
	out := make(Shape, len(s))
	for i, g := range s {
		out[i] = g.Clean()
	}
	return out
}
