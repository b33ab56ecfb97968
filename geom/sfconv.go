package geom

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	sf "github.com/peterstace/simplefeatures/geom"
)

// errEmpty marks an input that holds no area at all.
var errEmpty = errors.New("empty geometry; want at least one polygon")

// fromSF converts a polygonal simplefeatures geometry into a cleaned,
// normalised Shape (not yet validated). typeName spells geometry types the
// way the input format does; want lists the accepted types in that
// spelling.
func fromSF(g sf.Geometry, typeName func(sf.GeometryType) string, want string) (Shape, error) {
	switch g.Type() {
	case sf.TypePolygon:
		p := g.MustAsPolygon()
		if p.IsEmpty() {
			return nil, fmt.Errorf("%s: %w", typeName(sf.TypePolygon), errEmpty)
		}
		r, err := regionFromSF(p)
		if err != nil {
			return nil, err
		}
		return Shape{r}, nil
	case sf.TypeMultiPolygon:
		m := g.MustAsMultiPolygon()
		if m.IsEmpty() {
			return nil, fmt.Errorf("%s: %w", typeName(sf.TypeMultiPolygon), errEmpty)
		}
		s := make(Shape, 0, m.NumPolygons())
		for i := 0; i < m.NumPolygons(); i++ {
			p := m.PolygonN(i)
			if p.IsEmpty() {
				return nil, fmt.Errorf("%s: polygon %d is empty", typeName(sf.TypeMultiPolygon), i)
			}
			r, err := regionFromSF(p)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", regionName(i), err)
			}
			s = append(s, r)
		}
		return s, nil
	}
	return nil, fmt.Errorf("%s is not an area; want %s", typeName(g.Type()), want)
}

// regionFromSF converts one non-empty polygon, checking that each ring is
// closed as OGC Simple Features and RFC 7946 require.
func regionFromSF(p sf.Polygon) (Region, error) {
	var g Region
	for k, seq := range p.Coordinates() {
		n := seq.Length()
		name := "outer ring"
		if k > 0 {
			name = holeName(k - 1)
		}
		if n == 0 {
			return Region{}, fmt.Errorf("%s: ring is empty", name)
		}
		r := make(Ring, n)
		for i := range r {
			xy := seq.GetXY(i)
			r[i] = Point{xy.X, xy.Y}
		}
		if r[0] != r[n-1] {
			return Region{}, fmt.Errorf("%s: ring is not closed: first point %s differs from last point %s",
				name, fmtPoint(r[0]), fmtPoint(r[n-1]))
		}
		if k == 0 {
			g.Outer = r
		} else {
			g.Holes = append(g.Holes, r)
		}
	}
	return g.Clean(), nil
}

// toSF converts s into a simplefeatures MultiPolygon with closed rings.
func toSF(s Shape) sf.Geometry {
	polys := make([]sf.Polygon, 0, len(s))
	for _, g := range s {
		var rings []sf.LineString
		for _, r := range g.Rings() {
			if len(r) == 0 {
				continue
			}
			c := make([]float64, 0, 2*len(r)+2)
			for _, p := range r {
				c = append(c, p.X, p.Y)
			}
			c = append(c, r[0].X, r[0].Y)
			rings = append(rings, sf.NewLineString(sf.NewSequence(c, sf.DimXY)))
		}
		polys = append(polys, sf.NewPolygon(rings))
	}
	return sf.NewMultiPolygon(polys).AsGeometry()
}

// formatCoord writes v with at most 6 decimals (1 nm), trailing zeros and
// a trailing point trimmed, and without a negative zero.
//
// Values that are not finite, which only invalid shapes hold, are written
// as NaN or ±Inf in WKT and as null in JSON.
func formatCoord(b *strings.Builder, v float64, json bool) {
	s := strconv.FormatFloat(v, 'f', 6, 64)
	if strings.IndexByte(s, '.') >= 0 {
		s = strings.TrimRight(s, "0")
		s = strings.TrimSuffix(s, ".")
	}
	if s == "-0" {
		s = "0"
	}
	if json && (math.IsNaN(v) || math.IsInf(v, 0)) {
		s = "null"
	}
	b.WriteString(s)
}
