package geom

import (
	"fmt"
	"strings"

	sf "github.com/peterstace/simplefeatures/geom"
)

// wktTypeName spells a geometry type as WKT does (OGC Simple Features).
func wktTypeName(t sf.GeometryType) string { return strings.ToUpper(t.String()) }

// ParseWKT reads a POLYGON or MULTIPOLYGON in Well-Known Text (OGC Simple
// Features, ISO 19125-1 §7) and returns it cleaned and normalised (see
// Shape.Clean) and validated (see Shape.Validate). Z and M values are
// dropped. Any other geometry type, an empty geometry, an unclosed ring or
// an invalid shape is an error that names what is wrong and where; region k
// is the k-th polygon of a MULTIPOLYGON, counting from 0.
func ParseWKT(s string) (Shape, error) {
	g, err := sf.UnmarshalWKT(s, sf.NoValidate{})
	if err != nil {
		return nil, fmt.Errorf("WKT: %w", err)
	}
	shape, err := fromSF(g, wktTypeName, "POLYGON or MULTIPOLYGON")
	if err != nil {
		return nil, fmt.Errorf("WKT: %w", err)
	}
	if err := shape.Validate(); err != nil {
		return nil, fmt.Errorf("WKT %s: %w", wktTypeName(g.Type()), err)
	}
	return shape, nil
}

// WKT returns s as Well-Known Text: POLYGON for one region, MULTIPOLYGON
// otherwise (MULTIPOLYGON EMPTY for no region). Rings are written with the
// outer ring counter-clockwise and holes clockwise, closed by repeating
// their first point, with coordinates rounded to 6 decimals (1 nm) and
// trailing zeros trimmed. The same shape always gives the same text.
// Rounding may make a shape whose rings nearly touch invalid when read back.
func (s Shape) WKT() string {
	var b strings.Builder
	switch len(s) {
	case 0:
		return "MULTIPOLYGON EMPTY"
	case 1:
		b.WriteString("POLYGON ")
		writeWKTPolygon(&b, s[0])
	default:
		b.WriteString("MULTIPOLYGON (")
		for i, g := range s {
			if i > 0 {
				b.WriteString(", ")
			}
			writeWKTPolygon(&b, g)
		}
		b.WriteString(")")
	}
	return b.String()
}

// WKT returns g as a WKT POLYGON (see Shape.WKT).
func (g Region) WKT() string { return Shape{g}.WKT() }

func writeWKTPolygon(b *strings.Builder, g Region) {
	b.WriteString("(")
	for k, r := range g.Normalized().Rings() {
		if k > 0 {
			b.WriteString(", ")
		}
		if len(r) == 0 { // only in invalid shapes
			b.WriteString("EMPTY")
			continue
		}
		b.WriteString("(")
		for i := 0; i <= len(r); i++ {
			if i > 0 {
				b.WriteString(", ")
			}
			p := r[i%len(r)]
			formatCoord(b, p.X, false)
			b.WriteString(" ")
			formatCoord(b, p.Y, false)
		}
		b.WriteString(")")
	}
	b.WriteString(")")
}
