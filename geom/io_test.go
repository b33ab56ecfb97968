package geom

import (
	"errors"
	"math"
	"strings"
	"testing"

	sf "github.com/peterstace/simplefeatures/geom"
)

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

func TestParseWKTPolygonWithHole(t *testing.T) {
	// OGC Simple Features WKT: a polygon with one interior ring, written
	// clockwise outside and counter-clockwise inside (the wrong way round
	// for chipband, so normalisation shows).
	s, err := ParseWKT("POLYGON ((0 0, 0 10, 10 10, 10 0, 0 0), (2 2, 4 2, 4 4, 2 4, 2 2))")
	if err != nil {
		t.Fatal(err)
	}
	if len(s) != 1 || len(s[0].Holes) != 1 {
		t.Fatalf("got %v", s)
	}
	// shoelace formula: 10·10 − 2·2 = 96
	if a := s.Area(); !near(a, 96, 1e-12) {
		t.Fatalf("area %v, want 96", a)
	}
	if !s[0].Outer.CCW() || s[0].Holes[0].CCW() {
		t.Fatal("not normalised: outer must run CCW, holes CW")
	}
	if len(s[0].Outer) != 4 || len(s[0].Holes[0]) != 4 {
		t.Fatal("closing points not removed")
	}
}

func TestParseWKTMultiPolygon(t *testing.T) {
	// OGC Simple Features WKT MULTIPOLYGON; a repeated point in the second
	// polygon is dropped on input.
	s, err := ParseWKT("MULTIPOLYGON (((0 0, 3 0, 3 3, 0 3, 0 0)), ((10 0, 12 0, 12 0, 11 5, 10 0)))")
	if err != nil {
		t.Fatal(err)
	}
	// shoelace formula: 9 + ½·2·5 = 14
	if len(s) != 2 || !near(s.Area(), 14, 1e-12) || len(s[1].Outer) != 3 {
		t.Fatalf("got %v area %v", s, s.Area())
	}
}

func TestParseWKTErrors(t *testing.T) {
	cases := []struct{ in, msg string }{
		{"LINESTRING (0 0, 1 1)", "LINESTRING is not an area; want POLYGON or MULTIPOLYGON"},
		{"POINT (1 2)", "POINT is not an area"},
		{"GEOMETRYCOLLECTION (POLYGON ((0 0, 1 0, 1 1, 0 0)))", "GEOMETRYCOLLECTION is not an area"},
		{"POLYGON EMPTY", "POLYGON: empty geometry"},
		{"MULTIPOLYGON (((0 0, 1 0, 1 1, 0 0)), EMPTY)", "polygon 1 is empty"},
		{"POLYGON ((0 0, 1 0, 1 1))", "outer ring: ring is not closed: first point (0, 0) differs from last point (1, 1)"},
		{"POLYGON ((0 0, 1 0", "WKT: "},
		{"POLYGON ((0 0, 2 2, 2 0, 0 2, 0 0))", "WKT POLYGON: region 0, outer ring: ring self-intersects at edges"},
		{"MULTIPOLYGON (((0 0, 2 0, 2 2, 0 2, 0 0)), ((1 1, 3 1, 3 3, 1 3, 1 1)))", "regions 0 and 1 cross or touch"},
		{"POLYGON ((0 0, 3000000 0, 0 1, 0 0))", "beyond ±1e6 mm"},
	}
	for _, c := range cases {
		_, err := ParseWKT(c.in)
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("ParseWKT(%q) = %v, want error containing %q", c.in, err, c.msg)
		}
	}
}

func TestWKTWriter(t *testing.T) {
	g := Region{Outer: RectRing(0, 0, 10, 10), Holes: []Ring{{{2, 2}, {2, 4}, {4, 4}, {4, 2}}}}
	// OGC Simple Features WKT text, rings closed by repeating the first
	// point.
	want := "POLYGON ((0 0, 10 0, 10 10, 0 10, 0 0), (2 2, 2 4, 4 4, 4 2, 2 2))"
	if got := (Shape{g}).WKT(); got != want {
		t.Fatalf("got  %s\nwant %s", got, want)
	}
	// Rings given the wrong way round are written normalised: outer
	// counter-clockwise, holes clockwise (shoelace sign).
	wrong := Shape{{Outer: g.Outer.Reversed(), Holes: []Ring{g.Holes[0].Reversed()}}}
	wrongText := wrong.WKT()
	if !strings.HasPrefix(wrongText, "POLYGON ((") {
		t.Fatal(wrongText)
	}
	if back, err := sf.UnmarshalWKT(wrongText); err != nil || !back.IsCCW() {
		t.Fatalf("%s is not outer-CCW, holes-CW: %v", wrongText, err)
	}
	// 0.1+0.2 is 0.30000000000000004 in binary floating point (IEEE 754);
	// 6 decimals trimmed give 0.3. Negative zero is written as 0.
	tri := Shape{{Outer: Ring{{0.1 + 0.2, math.Copysign(0, -1)}, {1.25, -1e-9}, {1, 1}}}, {Outer: RectRing(5, 5, 6, 6)}}
	want = "MULTIPOLYGON (((0.3 0, 1.25 0, 1 1, 0.3 0)), ((5 5, 6 5, 6 6, 5 6, 5 5)))"
	if got := tri.WKT(); got != want {
		t.Fatalf("got  %s\nwant %s", got, want)
	}
	if got := (Shape{}).WKT(); got != "MULTIPOLYGON EMPTY" {
		t.Fatalf("got %s", got)
	}
	back, err := ParseWKT(tri.WKT())
	if err != nil || back.WKT() != tri.WKT() {
		t.Fatalf("round trip: %v %v", back, err)
	}
}

// RFC 7946, Appendix A.3: the Polygon example with a hole.
const rfc7946Polygon = `{"type":"Polygon","coordinates":[[[100.0,0.0],[101.0,0.0],[101.0,1.0],[100.0,1.0],[100.0,0.0]],[[100.8,0.8],[100.8,0.2],[100.2,0.2],[100.2,0.8],[100.8,0.8]]]}`

func TestParseGeoJSONGeometry(t *testing.T) {
	s, err := ParseGeoJSON([]byte(rfc7946Polygon))
	if err != nil {
		t.Fatal(err)
	}
	// shoelace formula: 1·1 − 0.6·0.6 = 0.64
	if !near(s.Area(), 0.64, 1e-9) || len(s[0].Holes) != 1 {
		t.Fatalf("got %v area %v", s, s.Area())
	}
	// RFC 7946 §3.1.6 right-hand rule on output: outer CCW, hole CW.
	want := `{"type":"Polygon","coordinates":[[[100,0],[101,0],[101,1],[100,1],[100,0]],[[100.8,0.8],[100.8,0.2],[100.2,0.2],[100.2,0.8],[100.8,0.8]]]}`
	if got := string(s.GeoJSON()); got != want {
		t.Fatalf("got  %s\nwant %s", got, want)
	}
}

func TestParseGeoJSONFeatures(t *testing.T) {
	// RFC 7946 §3.2 Feature and §3.3 FeatureCollection.
	fc := `{"type":"FeatureCollection","features":[
	 {"type":"Feature","id":"pocket","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0,0],[4,0],[4,4],[0,4],[0,0]]]}},
	 {"type":"Feature","properties":null,"geometry":{"type":"MultiPolygon","coordinates":[[[[10,0],[12,0],[12,2],[10,2],[10,0]]],[[[20,0],[21,0],[21,1],[20,0]]]]}}]}`
	s, err := ParseGeoJSON([]byte(fc))
	if err != nil {
		t.Fatal(err)
	}
	// shoelace formula: 16 + 4 + ½
	if len(s) != 3 || !near(s.Area(), 20.5, 1e-12) {
		t.Fatalf("got %v area %v", s, s.Area())
	}
	f := `{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[0,0],[4,0],[4,4],[0,0]]]},"properties":{}}`
	if s, err := ParseGeoJSON([]byte(f)); err != nil || !near(s.Area(), 8, 1e-12) {
		t.Fatalf("feature: %v %v", s, err)
	}
}

func TestParseGeoJSONErrors(t *testing.T) {
	sq := func(x float64) string {
		return `{"type":"Polygon","coordinates":[[[` + ftoa(x) + `,0],[` + ftoa(x+2) + `,0],[` + ftoa(x+2) + `,2],[` + ftoa(x) + `,2],[` + ftoa(x) + `,0]]]}`
	}
	cases := []struct{ in, msg string }{
		{`{"type":"LineString","coordinates":[[0,0],[1,1]]}`, "LineString is not an area; want Polygon or MultiPolygon"},
		{`{"type":"Feature","id":7,"geometry":null,"properties":{}}`, "feature (id 7): no geometry"},
		{`{"type":"FeatureCollection","features":[]}`, "FeatureCollection: empty geometry"},
		{`{"type":"FeatureCollection","features":[{"type":"Feature","geometry":` + sq(0) + `,"properties":{}},{"type":"Feature","id":"b","geometry":` + sq(1) + `,"properties":{}}]}`,
			`features 0 and 1 (id "b") overlap`},
		{`{"type":"FeatureCollection","features":[{"type":"Feature","geometry":` + sq(0) + `,"properties":{}},{"type":"Feature","id":"b","geometry":{"type":"Point","coordinates":[0,0]},"properties":{}}]}`,
			`feature 1 (id "b"): Point is not an area`},
		{`{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1]]]}`, "ring is not closed"},
		{`{"type":"Polygon","coordinates":[[[0,0],[2,2],[2,0],[0,2],[0,0]]]}`, "Polygon: region 0, outer ring: ring self-intersects"},
		{`{"type":"Polygon"`, "GeoJSON: "},
		{`[]`, "GeoJSON: "},
	}
	for _, c := range cases {
		_, err := ParseGeoJSON([]byte(c.in))
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("ParseGeoJSON(%s) = %v, want error containing %q", c.in, err, c.msg)
		}
	}
}

func ftoa(v float64) string {
	var b strings.Builder
	formatCoord(&b, v, true)
	return b.String()
}

func TestSetOps(t *testing.T) {
	a := Shape{{Outer: RectRing(0, 0, 2, 2)}}
	b := Shape{{Outer: RectRing(1, 1, 3, 3)}}
	// inclusion–exclusion: |A ∪ B| = |A| + |B| − |A ∩ B| = 4 + 4 − 1
	u, err := Union(a, b)
	if err != nil || !near(u.Area(), 7, 1e-9) || len(u) != 1 {
		t.Fatalf("union %v %v", u, err)
	}
	i, err := Intersection(a, b)
	if err != nil || !near(i.Area(), 1, 1e-9) {
		t.Fatalf("intersection %v %v", i, err)
	}
	d, err := Difference(a, b)
	if err != nil || !near(d.Area(), 3, 1e-9) {
		t.Fatalf("difference %v %v", d, err)
	}
	// A square less a smaller square inside it is a region with one hole,
	// normalised (outer CCW, hole CW).
	frame, err := Difference(Shape{{Outer: RectRing(0, 0, 10, 10)}}, Shape{{Outer: RectRing(3, 3, 5, 5)}})
	if err != nil || len(frame) != 1 || len(frame[0].Holes) != 1 || !frame[0].Outer.CCW() || frame[0].Holes[0].CCW() {
		t.Fatalf("frame %v %v", frame, err)
	}
	if err := frame.Validate(); err != nil {
		t.Fatal(err)
	}
	// Disjoint squares stay two regions; squares that only share an edge
	// become one (no line left over).
	two, _ := Union(a, Shape{{Outer: RectRing(5, 5, 6, 6)}})
	one, _ := Union(a, Shape{{Outer: RectRing(2, 0, 4, 2)}})
	if len(two) != 2 || len(one) != 1 || !near(one.Area(), 8, 1e-9) {
		t.Fatalf("two %v one %v", two, one)
	}
	if e, _ := Intersection(a, Shape{{Outer: RectRing(2, 0, 4, 2)}}); len(e) != 0 {
		t.Fatalf("edge-touching intersection should have no area: %v", e)
	}
	_, err = Union(Shape{{Outer: Ring{{0, 0}, {math.NaN(), 0}, {1, 1}}}}, b)
	if !errors.Is(err, ErrNotFinite) || !strings.Contains(err.Error(), "union: first operand: region 0, outer ring") {
		t.Fatalf("got %v", err)
	}
	_, err = Union(a, Shape{{Outer: Ring{{0, 0}, {2, 2}, {2, 0}, {0, 2}}}})
	if err == nil || !strings.Contains(err.Error(), "union: second operand") {
		t.Fatalf("got %v", err)
	}
}

// The set operations turn a panic of the overlay into an error (last
// resort; no panicking input is known).
func TestSetOpRecovers(t *testing.T) {
	boom := func(a, b sf.Geometry) (sf.Geometry, error) { panic("degenerate") }
	a := Shape{{Outer: RectRing(0, 0, 1, 1)}}
	_, err := setOp("union", boom, a, a)
	if err == nil || !strings.Contains(err.Error(), "union: overlay failed: degenerate") {
		t.Fatalf("got %v", err)
	}
}
