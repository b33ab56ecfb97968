package geom

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strings"

	sf "github.com/peterstace/simplefeatures/geom"
)

func geojsonTypeName(t sf.GeometryType) string { return t.String() }

// ParseGeoJSON reads GeoJSON (RFC 7946): a Polygon or MultiPolygon
// geometry, a Feature holding one, or a FeatureCollection of such features,
// whose regions together make the returned Shape. The result is cleaned
// and normalised (see Shape.Clean) and validated (see Shape.Validate); the
// regions of different features must not overlap or touch, and when they
// do the error names both features. Other geometry types, features without
// a geometry, unclosed rings and invalid shapes are errors naming the
// feature (by index from 0, and id when it has one) and the part.
func ParseGeoJSON(b []byte) (Shape, error) {
	if err := checkGeoJSONSyntax(b); err != nil {
		return nil, fmt.Errorf("GeoJSON: %w", err)
	}
	var head struct {
		Type     string            `json:"type"`
		Features []json.RawMessage `json:"features"`
	}
	if err := json.Unmarshal(b, &head); err != nil {
		return nil, fmt.Errorf("GeoJSON: %w", err)
	}
	switch head.Type {
	case "FeatureCollection":
		var all Shape
		var featOf []int
		for i, raw := range head.Features {
			s, err := parseGeoJSONFeature(raw)
			if err != nil {
				return nil, fmt.Errorf("GeoJSON: feature %d%s: %w", i, featureID(raw), err)
			}
			all = append(all, s...)
			for range s {
				featOf = append(featOf, i)
			}
		}
		if len(all) == 0 {
			return nil, fmt.Errorf("GeoJSON: FeatureCollection: %w", errEmpty)
		}
		if a, c, at, how, ok := overlappingGroups(all, featOf); ok {
			return nil, fmt.Errorf("GeoJSON: features %d%s and %d%s overlap (they %s near %s); merge them into one region first",
				a, featureID(head.Features[a]), c, featureID(head.Features[c]), how, fmtPoint(at))
		}
		return all, nil
	case "Feature":
		s, err := parseGeoJSONFeature(b)
		if err != nil {
			return nil, fmt.Errorf("GeoJSON: feature%s: %w", featureID(b), err)
		}
		return s, nil
	}
	s, err := parseGeoJSONGeometry(b)
	if err != nil {
		return nil, fmt.Errorf("GeoJSON: %w", err)
	}
	return s, nil
}

// featureID returns ` (id "x")` for a feature with an id, else "".
func featureID(raw []byte) string {
	var f struct {
		ID json.RawMessage `json:"id"`
	}
	if json.Unmarshal(raw, &f) != nil || len(f.ID) == 0 || string(f.ID) == "null" {
		return ""
	}
	id := string(f.ID)
	if len(id) > 40 {
		id = id[:40] + "…"
	}
	return " (id " + id + ")"
}

func parseGeoJSONFeature(raw []byte) (Shape, error) {
	var f struct {
		Type     string          `json:"type"`
		Geometry json.RawMessage `json:"geometry"`
	}
	if err := json.Unmarshal(raw, &f); err != nil {
		return nil, err
	}
	if f.Type != "Feature" {
		return nil, fmt.Errorf("type is %q; want \"Feature\"", f.Type)
	}
	if len(f.Geometry) == 0 || string(f.Geometry) == "null" {
		return nil, fmt.Errorf("no geometry; want a Polygon or MultiPolygon")
	}
	return parseGeoJSONGeometry(f.Geometry)
}

func parseGeoJSONGeometry(raw []byte) (Shape, error) {
	g, err := sf.UnmarshalGeoJSON(raw, sf.NoValidate{})
	if err != nil {
		return nil, err
	}
	s, err := fromSF(g, geojsonTypeName, "Polygon or MultiPolygon")
	if err != nil {
		return nil, err
	}
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("%s: %w", geojsonTypeName(g.Type()), err)
	}
	return s, nil
}

// GeoJSON returns s as a GeoJSON geometry (RFC 7946): a Polygon for one
// region, a MultiPolygon otherwise (with no coordinates for an empty
// shape). Rings follow the right-hand rule of RFC 7946 §3.1.6 (outer
// counter-clockwise, holes clockwise) and are closed by repeating their
// first point; coordinates are rounded to 6 decimals (1 nm) with trailing
// zeros trimmed. The same shape always gives the same bytes.
func (s Shape) GeoJSON() []byte {
	var b strings.Builder
	if len(s) == 1 {
		b.WriteString(`{"type":"Polygon","coordinates":`)
		writeJSONPolygon(&b, s[0])
	} else {
		b.WriteString(`{"type":"MultiPolygon","coordinates":[`)
		for i, g := range s {
			if i > 0 {
				b.WriteString(",")
			}
			writeJSONPolygon(&b, g)
		}
		b.WriteString("]")
	}
	b.WriteString("}")
	return bytes.Clone([]byte(b.String()))
}

// GeoJSON returns g as a GeoJSON Polygon (see Shape.GeoJSON).
func (g Region) GeoJSON() []byte { return Shape{g}.GeoJSON() }

func writeJSONPolygon(b *strings.Builder, g Region) {
	b.WriteString("[")
	for k, r := range g.Normalized().Rings() {
		if k > 0 {
			b.WriteString(",")
		}
		b.WriteString("[")
		for i := 0; i <= len(r) && len(r) > 0; i++ {
			if i > 0 {
				b.WriteString(",")
			}
			p := r[i%len(r)]
			b.WriteString("[")
			formatCoord(b, p.X, true)
			b.WriteString(",")
			formatCoord(b, p.Y, true)
			b.WriteString("]")
		}
		b.WriteString("]")
	}
	b.WriteString("]")
}
