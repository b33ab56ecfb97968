package geom

import (
	"fmt"

	sf "github.com/peterstace/simplefeatures/geom"
)

// Union returns the area covered by a or b or both, through simplefeatures'
// overlay (for use outside hot loops). The operands must be valid shapes in
// the OGC sense (rings may touch at single points, as set-operation
// results sometimes do); chipband's stricter Validate is not required. The
// result is cleaned and normalised; lines and points that an overlay may
// produce where the operands only touch are dropped.
func Union(a, b Shape) (Shape, error) { return setOp("union", sf.Union, a, b) }

// Intersection returns the area covered by both a and b (see Union for the
// conditions and the form of the result).
func Intersection(a, b Shape) (Shape, error) { return setOp("intersection", sf.Intersection, a, b) }

// Difference returns the area covered by a but not by b (see Union for the
// conditions and the form of the result).
func Difference(a, b Shape) (Shape, error) { return setOp("difference", sf.Difference, a, b) }

func setOp(name string, op func(a, b sf.Geometry) (sf.Geometry, error), a, b Shape) (out Shape, err error) {
	ga, err := setOperand(a)
	if err != nil {
		return nil, fmt.Errorf("%s: first operand: %w", name, err)
	}
	gb, err := setOperand(b)
	if err != nil {
		return nil, fmt.Errorf("%s: second operand: %w", name, err)
	}
	// Last resort: the overlay has panicked on numerically degenerate
	// input in the past; turn that into an error rather than crash.
	defer func() {
		if r := recover(); r != nil {
			out, err = nil, fmt.Errorf("%s: overlay failed: %v", name, r)
		}
	}()
	g, err := op(ga, gb)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return polygonalParts(g), nil
}

// setOperand converts s for the overlay after checking what the overlay
// needs: finite coordinates within range and OGC validity.
func setOperand(s Shape) (sf.Geometry, error) {
	for k, g := range s {
		for j, r := range g.Rings() {
			if e := r.checkCoords(); e != nil {
				where := "outer ring"
				if j > 0 {
					where = holeName(j - 1)
				}
				return sf.Geometry{}, e.within(regionName(k) + ", " + where)
			}
		}
	}
	g := toSF(s.Clean())
	if err := g.Validate(); err != nil {
		return sf.Geometry{}, err
	}
	return g, nil
}

// polygonalParts collects the polygons of g into a cleaned, normalised
// Shape in the order the overlay returns them.
func polygonalParts(g sf.Geometry) Shape {
	var out Shape
	for _, part := range g.Dump() {
		p, ok := part.AsPolygon()
		if !ok || p.IsEmpty() {
			continue
		}
		var r Region
		for k, seq := range p.Coordinates() {
			ring := make(Ring, seq.Length())
			for i := range ring {
				xy := seq.GetXY(i)
				ring[i] = Point{xy.X, xy.Y}
			}
			if k == 0 {
				r.Outer = ring
			} else {
				r.Holes = append(r.Holes, ring)
			}
		}
		out = append(out, r.Clean())
	}
	return out
}
