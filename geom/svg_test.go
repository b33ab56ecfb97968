package geom

import (
	"errors"
	"math"
	"sort"
	"strings"
	"testing"
)

func parseSVG(t *testing.T, doc string) Shape {
	t.Helper()
	s, err := ParseSVG(strings.NewReader(doc))
	if err != nil {
		t.Fatalf("%s: %v", doc, err)
	}
	return s
}

// chordLoss bounds the area a flattened convex curve loses against the true
// curve: every chord stays within tol of the curve, so the lost area is at
// most perimeter × tol (sagitta bound).
func chordLoss(perimeter float64) float64 { return perimeter * DefaultSVGTolerance }

func TestSVGCircleArea(t *testing.T) {
	r := 10.0
	for _, doc := range []string{
		// W3C SVG 1.1, 9.3 (circle)
		`<svg><circle cx="3" cy="4" r="10"/></svg>`,
		// W3C SVG 1.1, 8.3.8 and F.6.5: two half arcs make a circle.
		`<svg><path d="M13 4 A10 10 0 0 1 -7 4 A10 10 0 0 1 13 4 Z"/></svg>`,
		// Same with relative arcs and flags written without separators
		// (8.3.9 grammar: a flag is one character).
		`<svg><path d="m13 4a10 10 0 01-20 0a10 10 0 0120 0z"/></svg>`,
	} {
		s := parseSVG(t, doc)
		want := math.Pi * r * r // area of a circle
		a := s.Area()
		if a > want+1e-9 || a < want-chordLoss(2*math.Pi*r) {
			t.Errorf("%s: area %.6f, want πr² = %.6f less at most %.4f", doc, a, want, chordLoss(2*math.Pi*r))
		}
		// Every vertex lies on the circle; no view box: x' = x, y' = −y.
		c := Pt(3, -4)
		for _, p := range s[0].Outer {
			if d := p.Dist(c); math.Abs(d-r) > 1e-9 {
				t.Fatalf("%s: vertex %v at distance %v from the centre, want %v", doc, p, d, r)
			}
		}
		// Chord midpoints stay within the tolerance (sagitta).
		o := s[0].Outer
		for i := range o {
			m := o[i].Lerp(o[(i+1)%len(o)], 0.5)
			if r-m.Dist(c) > DefaultSVGTolerance+1e-12 {
				t.Fatalf("%s: chord %d deviates %v mm", doc, i, r-m.Dist(c))
			}
		}
	}
}

func TestSVGArcRadiiScaledUp(t *testing.T) {
	// W3C SVG 1.1, F.6.6: radii too small to reach the end point are
	// scaled up until the ellipse just fits: here to 5, a half circle.
	s := parseSVG(t, `<svg><path d="M0 0 A1 1 0 0 1 10 0 Z"/></svg>`)
	want := math.Pi * 25 / 2
	if a := s.Area(); a > want+1e-9 || a < want-chordLoss(math.Pi*5+10) {
		t.Fatalf("area %v, want %v", a, want)
	}
}

func TestSVGEllipseArea(t *testing.T) {
	// W3C SVG 1.1, 9.4 (ellipse); area of an ellipse πab.
	s := parseSVG(t, `<svg><ellipse cx="0" cy="0" rx="20" ry="5"/></svg>`)
	want := math.Pi * 20 * 5
	per := 2 * math.Pi * 20 // more than the perimeter
	if a := s.Area(); a > want+1e-9 || a < want-chordLoss(per) {
		t.Fatalf("area %v, want %v", a, want)
	}
}

func TestSVGRoundedRect(t *testing.T) {
	cases := []struct {
		doc    string
		rx, ry float64
	}{
		{`<svg><rect x="1" y="2" width="40" height="20" rx="5" ry="3"/></svg>`, 5, 3},
		// W3C SVG 1.1, 9.2: a missing ry takes the value of rx.
		{`<svg><rect x="1" y="2" width="40" height="20" rx="4"/></svg>`, 4, 4},
		// W3C SVG 1.1, 9.2: rx beyond half the width is clamped to it.
		{`<svg><rect x="1" y="2" width="40" height="20" rx="30" ry="2"/></svg>`, 20, 2},
	}
	for _, c := range cases {
		s := parseSVG(t, c.doc)
		// Four quarter ellipses replace the corners: area w·h − (4 − π)·rx·ry.
		want := 40*20 - (4-math.Pi)*c.rx*c.ry
		if a := s.Area(); a > want+1e-9 || a < want-chordLoss(120) {
			t.Errorf("%s: area %v, want %v", c.doc, a, want)
		}
		b := s.Bounds()
		if !near(b.Min.X, 1, 1e-9) || !near(b.Max.X, 41, 1e-9) || !near(b.Min.Y, -22, 1e-9) || !near(b.Max.Y, -2, 1e-9) {
			t.Errorf("%s: bounds %v", c.doc, b)
		}
	}
	// W3C SVG 1.1, 9.2: a zero width disables rendering.
	if _, err := ParseSVG(strings.NewReader(`<svg><rect width="0" height="5"/></svg>`)); err == nil {
		t.Fatal("want an error: nothing to read")
	}
}

// sortedPts returns the points rounded to 1e-9 and sorted, to compare
// vertex sets regardless of start and direction.
func sortedPts(r Ring) []Point {
	out := make([]Point, len(r))
	for i, p := range r {
		out[i] = Pt(math.Round(p.X*1e9)/1e9, math.Round(p.Y*1e9)/1e9)
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].X != out[j].X {
			return out[i].X < out[j].X
		}
		return out[i].Y < out[j].Y
	})
	return out
}

func samePts(t *testing.T, what string, got Ring, want []Point) {
	t.Helper()
	g, w := sortedPts(got), sortedPts(Ring(want))
	if len(g) != len(w) {
		t.Fatalf("%s: got %v, want %v", what, g, w)
	}
	for i := range g {
		if g[i].Dist(w[i]) > 1e-9 {
			t.Fatalf("%s: got %v, want %v", what, g, w)
		}
	}
}

func TestSVGTransforms(t *testing.T) {
	h := 5 * math.Sqrt2
	// W3C SVG 1.1, 7.6: rotate(45 5 5) turns about (5, 5), positive angles
	// from +x towards +y of the user space (downwards on screen). Worked by
	// hand: corner (0,0) is (−5,−5) from the centre and goes to (0, −5√2),
	// i.e. (5, 5 − 5√2); the others follow by quarter turns. Then y' = −y.
	s := parseSVG(t, `<svg><rect width="10" height="10" transform="rotate(45 5 5)"/></svg>`)
	samePts(t, "rotate", s[0].Outer, []Point{{5, -(5 - h)}, {5 + h, -5}, {5, -(5 + h)}, {5 - h, -5}})

	// 7.6: a transform list applies right to left to a point, and a
	// child's transform applies before its parent's: (x, y) → scale(2) →
	// translate(10, 0) → translate(100, 0).
	s = parseSVG(t, `<svg><g transform="translate(100)"><rect width="1" height="1" transform="translate(10,0) scale(2)"/></g></svg>`)
	samePts(t, "composed", s[0].Outer, []Point{{110, 0}, {112, 0}, {112, -2}, {110, -2}})

	// 7.6: skewX(45) maps (x, y) to (x + y·tan 45°, y); matrix(a b c d e f)
	// maps (x, y) to (a·x + c·y + e, b·x + d·y + f).
	s = parseSVG(t, `<svg><polygon points="0,0 1,0 1,1 0,1" transform="matrix(1 0 0 1 3 4) skewX(45)"/></svg>`)
	samePts(t, "skewX+matrix", s[0].Outer, []Point{{3, -4}, {4, -4}, {5, -5}, {4, -5}})
	s = parseSVG(t, `<svg><polygon points="0,0 1,0 1,1 0,1" transform="skewY(45)"/></svg>`)
	samePts(t, "skewY", s[0].Outer, []Point{{0, 0}, {1, -1}, {1, -2}, {0, -1}})
	s = parseSVG(t, `<svg><polygon points="1,1 2,1 2,2" transform="scale(2,3)"/></svg>`)
	samePts(t, "scale", s[0].Outer, []Point{{2, -3}, {4, -3}, {4, -6}})
}

func TestSVGUnits(t *testing.T) {
	cases := []struct {
		doc  string
		b    Rect
		name string
	}{
		// width 100 mm over 1000 user units: 0.1 mm per unit; the view box's
		// bottom-left corner becomes the origin.
		{`<svg width="100mm" height="50mm" viewBox="0 0 1000 500"><rect width="1000" height="500"/></svg>`, Rect{Pt(0, 0), Pt(100, 50)}, "mm"},
		// CSS Values 3: 1in = 25.4 mm.
		{`<svg width="4in" viewBox="0 0 4 2"><rect width="4" height="1"/></svg>`, Rect{Pt(0, 25.4), Pt(101.6, 50.8)}, "in"},
		// CSS Values 3: 96px = 1in.
		{`<svg width="96px" height="96px" viewBox="0 0 96 96"><rect width="96" height="96"/></svg>`, Rect{Pt(0, 0), Pt(25.4, 25.4)}, "px"},
		// CSS Values 3: 1cm = 10 mm; viewBox origin (10, 20) maps to x' = 0.
		{`<svg width="10cm" viewBox="10 20 100 50"><rect x="10" y="20" width="100" height="50"/></svg>`, Rect{Pt(0, 0), Pt(100, 50)}, "cm, offset view box"},
		// No view box: one user unit is 1 mm and y' = −y.
		{`<svg width="300px"><rect x="0" y="0" width="30" height="10"/></svg>`, Rect{Pt(0, -10), Pt(30, 0)}, "no view box"},
	}
	for _, c := range cases {
		s := parseSVG(t, c.doc)
		b := s.Bounds()
		if b.Min.Dist(c.b.Min) > 1e-9 || b.Max.Dist(c.b.Max) > 1e-9 {
			t.Errorf("%s: bounds %v, want %v", c.name, b, c.b)
		}
	}
	s, err := ParseSVGWith(strings.NewReader(`<svg width="4in" viewBox="0 0 4 2"><rect width="4" height="1"/></svg>`), SVGOptions{UserUnit: 2})
	// 2 mm per unit: the 4 × 1 rectangle is 8 mm × 2 mm.
	if err != nil || !near(s.Area(), 16, 1e-9) {
		t.Errorf("UserUnit option: %v %v", s, err)
	}
}

func TestSVGPathCommands(t *testing.T) {
	cases := []struct {
		name, d string
		area    float64
		tol     float64
	}{
		// W3C SVG 1.1, 8.3.2: pairs after a moveto are implicit linetos.
		{"implicit lineto", "M0 0 10 0 10 10 0 10z", 100, 1e-9},
		{"H V absolute", "M0 0 H10 V10 H0 Z", 100, 1e-9},
		{"h v relative", "M5 5 h10 v10 h-10 z", 100, 1e-9},
		// 8.3.9: "1.5.5" is 1.5 then .5; "-1e-3" is an exponent.
		// Shoelace formula on (0,0) (10,−0.001) (10,10) (0.5,0.5), by hand:
		// ½·(0 + (100 + 0.01) + (5 − 5) + 0) = 50.005.
		{"number syntax", "M0 0L10-1e-3 10 10 .5.5z", 50.005, 1e-9},
		// Area between a quadratic Bézier and its chord is 2/3 of its control
		// triangle (Archimedes' parabolic segment); T reflects the control
		// point (8.3.7), so the second bump cancels the first against the
		// 20 × 20 square below the chord.
		{"Q and T", "M0 0 Q5 10 10 0 T20 0 V-20 H0 Z", 400, chordLoss(80)},
		// ∫y dx of the cubic (0,0) (0,10) (10,10) (10,0) is 60 (Green's
		// theorem, worked by hand: 100·18∫t²(1−t)²dt = 60); S reflects the
		// control point (8.3.6), so the second bump is the same size the
		// other side of the chord.
		{"C and S", "M0 0 C0 10 10 10 10 0 S20 -10 20 0 V20 H0 Z", 400, chordLoss(100)},
		// Relative cubic: same as the first bump alone closed by its chord.
		{"relative c", "M0 0 c0 10 10 10 10 0 z", 60, chordLoss(40)},
	}
	for _, c := range cases {
		s := parseSVG(t, `<svg><path d="`+c.d+`"/></svg>`)
		if a := s.Area(); math.Abs(a-c.area) > c.tol {
			t.Errorf("%s: area %v, want %v ± %v", c.name, a, c.area, c.tol)
		}
	}
	// 8.3.3: after closepath a relative moveto starts from the subpath's
	// initial point: the second square starts at (20, 0).
	s := parseSVG(t, `<svg><path d="m0 0 h10 v10 h-10 z m20 0 h5 v5 h-5 z"/></svg>`)
	if len(s) != 2 || !near(s.Area(), 125, 1e-9) || !near(s.Bounds().Max.X, 25, 1e-9) {
		t.Fatalf("two squares: %v", s)
	}
}

func TestSVGNesting(t *testing.T) {
	// A plate with two drilled holes; an island inside the first hole; a
	// separate small part. Nesting depth decides: 0 plate, 1 hole, 2 island.
	doc := `<svg xmlns="http://www.w3.org/2000/svg">
	<rect id="plate" x="0" y="0" width="100" height="60"/>
	<g><circle cx="25" cy="30" r="15"/><circle cx="70" cy="30" r="8"/></g>
	<rect x="20" y="25" width="10" height="10"/>
	<polygon points="200,0 210,0 205,8"/>
	</svg>`
	s := parseSVG(t, doc)
	if len(s) != 3 {
		t.Fatalf("got %d regions, want 3", len(s))
	}
	if len(s[0].Holes) != 2 || len(s[1].Holes) != 0 || len(s[2].Holes) != 0 {
		t.Fatalf("holes: %d %d %d", len(s[0].Holes), len(s[1].Holes), len(s[2].Holes))
	}
	if err := s.Validate(); err != nil {
		t.Fatal(err)
	}
	// Orientation normalised: outers CCW, holes CW (shoelace sign).
	if !s[0].Outer.CCW() || s[0].Holes[0].CCW() {
		t.Fatal("not normalised")
	}
	// A donut drawn as one path with two subpaths.
	s = parseSVG(t, `<svg><path d="M0 0h10v10h-10z M2 2h6v6h-6z"/></svg>`)
	if len(s) != 1 || len(s[0].Holes) != 1 || !near(s.Area(), 64, 1e-9) {
		t.Fatalf("donut: %v", s)
	}
}

func TestSVGErrors(t *testing.T) {
	cases := []struct{ doc, msg string }{
		// Offsets count bytes of d from 0: "M0 0 L10 0 A5 5 0 0 1" ends at 21.
		{`<svg><path id="pocket" d="M0 0 L10 0 A5 5 0 0 1"/></svg>`, `SVG: path #1 (id "pocket", line 1): arc command at offset 21: missing number`},
		{"<svg>\n<path d=\"M0 0 h1 v1z\"/>\n<path d=\"L0 0\"/></svg>", `path #2 (line 3): at offset 0: path data must begin with a moveto`},
		{`<svg><path d="M0 0 h10 v10 h-10"/></svg>`, `subpath 0 is open`},
		{`<svg><path d="M0 0 h10 v10 h-10 z 5"/></svg>`, `number after closepath`},
		{`<svg><path d="M0 0 h10 v10 X"/></svg>`, `unexpected 'X'`},
		{`<svg><path d="M0 0 h1e999 v10z"/></svg>`, `out of range`},
		{`<svg><line x1="0" y1="0" x2="1" y2="1"/></svg>`, `line #1 (line 1): a line encloses no area`},
		{`<svg><rect width="10" height="10" transform="spin(3)"/></svg>`, `rect #1 (line 1): transform: at offset 0: unknown transform "spin"`},
		{`<svg><rect width="10" height="10" transform="rotate(1,2)"/></svg>`, `rotate takes 1 or 3 numbers, got 2`},
		{`<svg><rect width="10mm" height="10"/></svg>`, `attribute width="10mm": want a number in user units`},
		{`<svg><rect width="10" height="10"/><circle id="c" cx="10" cy="5" r="2"/></svg>`, `rect #1 (line 1) and circle #1 (id "c", line 1) cross or touch`},
		{`<svg><path d="M0 0 L2 2 L2 0 L0 2 Z"/></svg>`, `path #1 (line 1): ring self-intersects`},
		{`<svg width="100mm" height="10mm" viewBox="0 0 100 100"><rect width="1" height="1"/></svg>`, `different scales`},
		{`<svg width="100furlong" viewBox="0 0 100 100"><rect width="1" height="1"/></svg>`, `unknown unit`},
		{`<html/>`, `root element is "html", want svg`},
		{`<svg><use href="#a"/></svg>`, `use elements are not supported`},
		{`<svg><rect width="10" height="10"`, `XML: `},
		{`<svg></svg>`, `no closed outline`},
		{`<svg><rect width="1e300" height="1e300"/></svg>`, `beyond`},
		{`<svg><g transform="scale(1e300)"><circle r="1e300"/></g></svg>`, `beyond`},
	}
	for _, c := range cases {
		_, err := ParseSVG(strings.NewReader(c.doc))
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%s:\n got %v\nwant error containing %q", c.doc, err, c.msg)
		}
	}
	_, err := ParseSVG(strings.NewReader(`<svg><path d="M0 0 L2 2 L2 0 L0 2 Z"/></svg>`))
	if !errors.Is(err, ErrSelfIntersection) {
		t.Fatalf("errors.Is: %v", err)
	}
}

func TestSVGIgnoredAndSkipped(t *testing.T) {
	doc := `<svg xmlns="http://www.w3.org/2000/svg" xmlns:x="urn:other">
	<defs><rect id="tmpl" width="50" height="50"/></defs>
	<x:note><x:rect width="1" height="1"/></x:note>
	<rect width="10" height="10" display="none"/>
	<text>label</text>
	<path d="M20 0 h10"/>
	<rect x="0" y="20" width="4" height="5"/>
	</svg>`
	s, err := ParseSVGWith(strings.NewReader(doc), SVGOptions{SkipOpen: true})
	if err != nil || len(s) != 1 || !near(s.Area(), 20, 1e-9) {
		t.Fatalf("%v %v", s, err)
	}
}
